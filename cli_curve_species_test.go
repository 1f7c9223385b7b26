package main

import (
	"encoding/json"
	"testing"
)

func TestCurve_SpeciesReference(t *testing.T) {
	code, out, errs := run(t, nil, "curve", "--species", "falco peregrinus", "--sex", "female", "--json")
	if code != 0 {
		t.Fatalf("curve --species: %d %s", code, errs)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	sp, _ := got["species"].(map[string]any)
	if sp["common_name"] != "Peregrine Falcon" || got["launch_mode"] != "standing" {
		t.Errorf("species %v launch %v", got["species"], got["launch_mode"])
	}
	// The reference bird itself at sea level: its margin is the expected one
	// and its excess-power fraction 1 (SCIENCE.md §5, derived).
	if f, _ := got["excess_power_fraction"].(float64); f < 0.999 || f > 1.001 {
		t.Errorf("excess_power_fraction of the reference bird = %v, want 1", got["excess_power_fraction"])
	}
	for _, k := range []string{"expected_margin", "expected_margin_site", "power_margin", "margin_ratio", "reference_min_speed_m_s"} {
		if _, ok := got[k]; !ok {
			t.Errorf("missing key %s", k)
		}
	}
	// A lighter, shorter-winged falcon has less margin than the reference.
	code, out, _ = run(t, nil, "curve", "--species", "Peregrine Falcon", "--sex", "female", "--mass-g", "900", "--span-mm", "950", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var low map[string]any
	json.Unmarshal([]byte(out), &low)
	if low["wing_area_estimated"] != true {
		t.Error("span given without area: the area should be estimated from the reference and flagged")
	}
	if code, _, _ := run(t, nil, "curve", "--species", "Dodo"); code != exitUsage {
		t.Errorf("unknown species: exit %d, want 2", code)
	}
}

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"
)

func runSpeciesCmd(t *testing.T, env map[string]string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errOut bytes.Buffer
	cio := cmdIO{Stdout: &out, Stderr: &errOut, Getenv: func(k string) string { return env[k] }}
	code = runCLI(context.Background(), append([]string{"species"}, args...), cio)
	return code, out.String(), errOut.String()
}

func TestSpecies_ListJSON(t *testing.T) {
	code, out, errOut := runSpeciesCmd(t, nil, "list", "--json")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	var got []map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("stdout is not a JSON array: %v", err)
	}
	// Issue 4: at least 300 species, one object each, with these columns.
	if len(got) < 300 {
		t.Errorf("got %d species, want at least 300", len(got))
	}
	for _, k := range []string{"scientific_name", "common_name", "group", "launch_mode", "mass_g",
		"mass_range_g", "wing_chord_mm", "span_mm", "area_cm2", "span_area_estimated", "primaries",
		"secondaries", "rectrices", "min_passes", "release_min_mass_g", "expected_margin",
		"flight_muscle_fraction", "sources"} {
		if _, ok := got[0][k]; !ok {
			t.Errorf("first object lacks %q", k)
		}
	}
	src, _ := got[0]["sources"].(map[string]any)
	mass, _ := src["mass_g.pooled"].(map[string]any)
	if mass["provenance"] != "published" || !strings.Contains(mass["citation"].(string), "AVONET") {
		t.Errorf("sources[mass_g.pooled] got %v, want AVONET, published", mass)
	}
}

func TestSpecies_ListText(t *testing.T) {
	code, out, _ := runSpeciesCmd(t, map[string]string{"ALOFT_GROUP": "swift"}, "list")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{"COMMON NAME", "Common Swift", "Apus apus", "5 species", "advice only"} {
		if !strings.Contains(out, want) {
			t.Errorf("list --group swift (from ALOFT_GROUP) lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "Barn Swallow") {
		t.Error("the group filter let a swallow through")
	}
}

func TestSpecies_Show(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"common name, any case", []string{"show", "red-TAILED hawk"},
			[]string{"Red-tailed Hawk (Buteo jamaicensis)", "1101.16 g", "from-memory", "Sources:", "advice only"}},
		{"several words", []string{"show", "common", "swift"},
			[]string{"Common Swift (Apus apus)", "at least 40 g", "hand, standing"}},
		{"scientific name", []string{"show", "gavia immer"},
			[]string{"Common Loon (Gavia immer)", "run-up-water", "Great Northern Diver"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runSpeciesCmd(t, nil, tc.args...)
			if code != exitOK || errOut != "" {
				t.Fatalf("exit %d, stderr %q", code, errOut)
			}
			for _, w := range tc.want {
				if !strings.Contains(out, w) {
					t.Errorf("%v lacks %q:\n%s", tc.args, w, out)
				}
			}
		})
	}
}

func TestSpecies_ShowJSON(t *testing.T) {
	code, out, _ := runSpeciesCmd(t, nil, "show", "Peregrine Falcon", "--json")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	var got struct {
		ScientificName string `json:"scientific_name"`
		MassG          struct {
			Female *float64 `json:"female"`
		} `json:"mass_g"`
		Sources map[string]struct {
			Provenance string `json:"provenance"`
			Citation   string `json:"citation"`
		} `json:"sources"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("not one JSON object: %v", err)
	}
	// Bruderer 2010 via BirdWingData: female 998 g.
	if got.ScientificName != "Falco peregrinus" || got.MassG.Female == nil || *got.MassG.Female != 998 {
		t.Errorf("got %s, female %v; want Falco peregrinus, 998 g", got.ScientificName, got.MassG.Female)
	}
	if c := got.Sources["mass_g.female"].Citation; !strings.Contains(c, "Bruderer 2010") {
		t.Errorf("female mass citation got %q, want Bruderer 2010", c)
	}
}

func TestSpecies_Errors(t *testing.T) {
	tests := []struct {
		name     string
		args     []string
		wantCode int
		wantErr  string
	}{
		{"no subcommand", nil, exitUsage, "missing subcommand"},
		{"unknown subcommand", []string{"delete"}, exitUsage, "unknown subcommand"},
		{"show without name", []string{"show"}, exitUsage, "missing NAME"},
		{"unknown species", []string{"show", "dodo"}, exitFail, `no species named "dodo"`},
		{"near miss suggests", []string{"show", "robin"}, exitFail, "American Robin"},
		{"bad group", []string{"list", "--group", "penguin"}, exitUsage, "unknown group"},
		{"bad flag", []string{"list", "--xml"}, exitUsage, "flag provided but not defined"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errOut := runSpeciesCmd(t, nil, tc.args...)
			if code != tc.wantCode || !strings.Contains(errOut, tc.wantErr) {
				t.Errorf("%v: exit %d, stderr %q; want %d and %q", tc.args, code, errOut, tc.wantCode, tc.wantErr)
			}
		})
	}
}

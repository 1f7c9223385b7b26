package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

func runCurve(t *testing.T, env map[string]string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errOut bytes.Buffer
	cio := cmdIO{Stdout: &out, Stderr: &errOut, Getenv: func(k string) string { return env[k] }}
	code = runCLI(context.Background(), append([]string{"curve"}, args...), cio)
	return code, out.String(), errOut.String()
}

func TestCurve_PinnedVectorJSON(t *testing.T) {
	// SCIENCE.md §8's pinned vector [derived; relative tolerance 1e-4], through
	// the command line: the done-when.
	code, out, errOut := runCurve(t, nil, "--mass-g", "100", "--span-mm", "400", "--area-cm2", "300", "--json")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("stdout is not one JSON object: %v", err)
	}
	want := map[string]float64{
		"aspect_ratio": 5.33333, "wing_loading_n_m2": 32.700, "absolute_min_power_w": 0.481533,
		"profile_power_w": 0.758414, "min_power_speed_m_s": 10.3805, "min_power_mech_w": 1.23979,
		"min_power_chem_w": 6.71834, "max_range_speed_m_s": 18.3681, "max_range_speed_mech_m_s": 17.6581,
		"hover_power_w": 2.85976, "wingbeat_hz": 9.47914, "effective_lift_drag": 9.13384,
		"min_speed_m_s": 5.77645, "expected_margin": 2.64204, "available_power_w": 3.27557,
		"climb_rate_m_s": 2.07521, "takeoff_index": 2.22208,
	}
	for k, w := range want {
		g, ok := got[k].(float64)
		if !ok || math.Abs(g-w) > 1e-4*w {
			t.Errorf("%s = %v, want %g", k, got[k], w)
		}
	}
	for _, k := range []string{"still_air_range_km", "marden_lift_ratio"} {
		if v, ok := got[k]; !ok || v != nil {
			t.Errorf("%s = %v, want null", k, v)
		}
	}
	if n := len(got["notes"].([]any)); n == 0 {
		t.Error("no notes for the null values")
	}
	curve := got["curve"].([]any)
	last := curve[len(curve)-1].(map[string]any)
	if math.Abs(last["speed_m_s"].(float64)-1.5*18.3681) > 1e-3 || len(curve) < 111 {
		t.Errorf("curve of %d points ending at %v", len(curve), last)
	}
}

func TestCurve_Text(t *testing.T) {
	code, out, _ := runCurve(t, map[string]string{"ALOFT_ELEVATION_M": "1000"},
		"--mass-g", "100", "--span-mm", "400", "--area-cm2", "300", "--fat-score", "3", "--fat-scale", "0-5",
		"--muscle-score", "2", "--migrant", "--params", "pennycuick2013")
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	for _, s := range []string{"pennycuick2013", "1.1116 kg/m³", "minimum-power speed", "m/s", " W\n",
		"still-air range", " km\n", "Advisory only"} {
		if !strings.Contains(out, s) {
			t.Errorf("summary lacks %q:\n%s", s, out)
		}
	}
}

func TestCurve_BadFlags(t *testing.T) {
	base := []string{"--mass-g", "100", "--span-mm", "400", "--area-cm2", "300"}
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"ErrNoMass", []string{"--span-mm", "400", "--area-cm2", "300"}, "--mass-g is required"},
		{"ErrNoArea", []string{"--mass-g", "100", "--span-mm", "400"}, "--area-cm2 is required"},
		{"ErrNotNumber", append([]string{"--mass-g", "heavy"}, base[2:]...), "mass-g"},
		{"ErrMassZero", append([]string{"--mass-g", "0"}, base[2:]...), "--mass-g:"},
		{"ErrElevation", append(base, "--elevation-m", "6000"), "--elevation-m:"},
		{"ErrTemp", append(base, "--temp-c", "60"), "--temp-c:"},
		{"ErrFatNoScale", append(base, "--fat-score", "3"), "--fat-scale:"},
		{"ErrFatScale", append(base, "--fat-score", "7", "--fat-scale", "0-5"), "--fat-score:"},
		{"ErrMuscle", append(base, "--muscle-score", "5"), "--muscle-score:"},
		{"ErrParams", append(base, "--params", "pennycuick1975"), "--params:"},
		{"ErrAspectRatio", []string{"--mass-g", "100", "--span-mm", "400", "--area-cm2", "30"}, "aspect_ratio:"},
		{"ErrExtraArg", append(base, "now"), "unexpected argument"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runCurve(t, nil, tc.args...)
			if code != exitUsage || out != "" {
				t.Errorf("exit %d, stdout %q; want 2 and nothing", code, out)
			}
			if strings.Count(errOut, "\n") != 1 || !strings.Contains(errOut, tc.want) {
				t.Errorf("stderr %q, want one line with %q", errOut, tc.want)
			}
		})
	}
}

func TestCurve_Help(t *testing.T) {
	code, _, errOut := runCurve(t, nil, "--help")
	if code != exitOK || !strings.Contains(errOut, "usage: aloft curve") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
}

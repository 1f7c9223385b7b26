package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// caseFilePath is a scenario case file of package assess (invented patients,
// assessed as of scenarioAt).
func caseFilePath(name string) string {
	return filepath.Join("assess", "testdata", "cases", name+".json")
}

const scenarioAt = "2025-06-20T12:00:00Z"

func TestCLIAssess_JSON(t *testing.T) {
	code, out, errs := run(t, nil, "assess", "--input", caseFilePath("osprey-ready"), "--at", scenarioAt, "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal([]byte(out), &top); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	for _, k := range []string{"outcome", "criteria", "physics", "params", "species", "site", "cautions"} {
		if _, ok := top[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	var o struct{ Level string }
	if err := json.Unmarshal(top["outcome"], &o); err != nil || o.Level != "ready" {
		t.Errorf("outcome %s, want ready (%v)", top["outcome"], err)
	}
	// The same inputs give the same bytes.
	_, again, _ := run(t, nil, "assess", "--input", caseFilePath("osprey-ready"), "--at", scenarioAt, "--json")
	if again != out {
		t.Errorf("two runs differ")
	}
}

func TestCLIAssess_Text(t *testing.T) {
	code, out, errs := run(t, nil, "assess", "--input", caseFilePath("kestrel-drooping-wing"), "--at", scenarioAt)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Case 2025-0104", "Ask the veterinarian", "[not met]", "Wings carried level",
		"takeoff index", "Holz", "Advice only"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestCLIAssess_Site(t *testing.T) {
	// ρ at 3000 m and 15 °C: p(3000 m) = 70108 Pa (U.S. Standard Atmosphere
	// 1976) over 287.05·288.15 gives 0.8476 kg/m³ [derived].
	code, out, errs := run(t, nil, "assess", "--input", caseFilePath("osprey-ready"), "--at", scenarioAt,
		"--elevation-m", "3000", "--temp-c", "15", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var a struct {
		Site struct {
			ElevationM float64 `json:"elevation_m"`
			Density    float64 `json:"air_density_kg_m3"`
		}
	}
	if err := json.Unmarshal([]byte(out), &a); err != nil {
		t.Fatal(err)
	}
	if a.Site.ElevationM != 3000 || a.Site.Density < 0.8466 || a.Site.Density > 0.8486 {
		t.Errorf("site %+v, want 3000 m and about 0.8476 kg/m³", a.Site)
	}
}

func TestCLIAssess_Errors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	data, err := os.ReadFile(caseFilePath("osprey-ready"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(bad, []byte(strings.Replace(string(data), `"fed": "before-feed"`, `"fed": "lunchtime"`, 1)), 0o600); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"NoSource", []string{"assess"}, exitUsage, "--input"},
		{"Both", []string{"assess", "--input", "x.json", "--case", "2025-0001"}, exitUsage, "not both"},
		{"CaseWithoutDB", []string{"assess", "--case", "2025-0001"}, exitUsage, "--db"},
		{"TempWithoutElevation", []string{"assess", "--input", caseFilePath("osprey-ready"), "--temp-c", "20"}, exitUsage, "--elevation-m"},
		{"BadAt", []string{"assess", "--input", caseFilePath("osprey-ready"), "--at", "tomorrow"}, exitUsage, "--at"},
		{"SiteTooHigh", []string{"assess", "--input", caseFilePath("osprey-ready"), "--elevation-m", "9000"}, exitUsage, "--elevation-m"},
		{"MissingFile", []string{"assess", "--input", filepath.Join(dir, "none.json")}, exitFail, "cannot open"},
		{"InvalidCaseFile", []string{"assess", "--input", bad}, exitFail, "inputs.weigh_ins[0].fed"},
		{"NoDatabase", []string{"assess", "--db", filepath.Join(dir, "none.db"), "--case", "2025-0001"}, exitFail, "no database"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errs := run(t, nil, tc.args...)
			if code != tc.code || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stderr %q; want exit %d mentioning %q", code, errs, tc.code, tc.want)
			}
		})
	}
}

// TestCLIAssess_Database assesses a demo patient from a database, at the
// centre's elevation with the centre's thresholds.
func TestCLIAssess_Database(t *testing.T) {
	db := filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != exitOK {
		t.Fatalf("demo: %d %s", code, errs)
	}
	_, out, _ := run(t, nil, "patients", "--json", "--db", db)
	var list []struct {
		CaseNumber string `json:"case_number"`
	}
	if err := json.Unmarshal([]byte(out), &list); err != nil || len(list) == 0 {
		t.Fatalf("patients: %v", err)
	}
	code, out, errs := run(t, nil, "assess", "--db", db, "--case", list[0].CaseNumber, "--json")
	switch {
	case code != exitOK:
		t.Fatalf("assess --db: exit %d: %s", code, errs)
	case !strings.Contains(out, `"outcome"`):
		t.Errorf("assess --db printed no outcome")
	}
	if code, _, errs := run(t, nil, "assess", "--db", db, "--case", "1999-9999"); code != exitFail || !strings.Contains(errs, "1999-9999") {
		t.Errorf("unknown case: exit %d, %q", code, errs)
	}
}

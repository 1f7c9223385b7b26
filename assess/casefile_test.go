package assess

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func readScenarioBytes(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "cases", name+".json"))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestWriteCaseFile_RoundTrip: every scenario reads, writes and reads back
// to the same bytes and the same assessment.
func TestWriteCaseFile_RoundTrip(t *testing.T) {
	for _, name := range scenarioNames(t) {
		t.Run(name, func(t *testing.T) {
			cf := loadCase(t, name)
			var first bytes.Buffer
			if err := WriteCaseFile(&first, cf); err != nil {
				t.Fatalf("WriteCaseFile: %v", err)
			}
			back, err := ReadCaseFile(bytes.NewReader(first.Bytes()))
			if err != nil {
				t.Fatalf("ReadCaseFile of written file: %v", err)
			}
			var second bytes.Buffer
			if err := WriteCaseFile(&second, back); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(first.Bytes(), second.Bytes()) {
				t.Errorf("written, read and written again: bytes differ")
			}
			if got, want := mustJSON(t, assessCase(t, back, Thresholds{})), mustJSON(t, assessCase(t, cf, Thresholds{})); !bytes.Equal(got, want) {
				t.Errorf("assessment differs after a round trip")
			}
		})
	}
}

// TestReadCaseFile_Errors: each fault is refused with a ValidationError
// whose Field is the JSON path of the fault.
func TestReadCaseFile_Errors(t *testing.T) {
	type doc = map[string]any
	at := func(m doc, path ...any) doc {
		var cur any = m
		for _, p := range path {
			switch k := p.(type) {
			case string:
				cur = cur.(doc)[k]
			case int:
				cur = cur.([]any)[k]
			}
		}
		return cur.(doc)
	}
	tests := []struct {
		name   string
		mutate func(m doc)
		raw    string // used instead of the mutated scenario when set
		field  string
	}{
		{name: "VersionMissing", mutate: func(m doc) { delete(m, "format_version") }, field: "format_version"},
		{name: "VersionUnknown", mutate: func(m doc) { m["format_version"] = 2 }, field: "format_version"},
		{name: "VersionText", mutate: func(m doc) { m["format_version"] = "1" }, field: "format_version"},
		{name: "UnknownKey", mutate: func(m doc) { at(m, "inputs", "weigh_ins", 0)["mass_kg"] = 1.5 }, field: "mass_kg"},
		{name: "BadFedState", mutate: func(m doc) { at(m, "inputs", "weigh_ins", 2)["fed"] = "lunchtime" }, field: "inputs.weigh_ins[2].fed"},
		{name: "NegativeMass", mutate: func(m doc) { at(m, "inputs", "weigh_ins", 1)["mass_g"] = -1 }, field: "inputs.weigh_ins[1].mass_g"},
		{name: "MassAsText", mutate: func(m doc) { at(m, "inputs", "weigh_ins", 1)["mass_g"] = "heavy" }, field: "inputs.weigh_ins.mass_g"},
		{name: "MissingTime", mutate: func(m doc) { delete(at(m, "inputs", "conditions", 1), "at") }, field: "inputs.conditions[1].at"},
		{name: "BadTime", mutate: func(m doc) { at(m, "inputs", "trials", 0)["at"] = "yesterday" }, field: "case file"},
		{name: "MuscleScoreHigh", mutate: func(m doc) { at(m, "inputs", "conditions", 1)["muscle_score"] = 4 }, field: "inputs.conditions[1].muscle_score"},
		{name: "NegativePasses", mutate: func(m doc) { at(m, "inputs", "sessions", 1)["passes"] = -2 }, field: "inputs.sessions[1].passes"},
		{name: "RunLongerThanPasses", mutate: func(m doc) { at(m, "inputs", "sessions", 0)["longest_run"] = 40 }, field: "inputs.sessions[0].longest_run"},
		{name: "BadDurationUnit", mutate: func(m doc) { at(m, "inputs", "sessions", 0)["duration_s"] = -5 }, field: "inputs.sessions[0].duration_s"},
		{name: "BadFlightLength", mutate: func(m doc) { at(m, "inputs", "sessions", 0)["enclosure_length_m"] = 0 }, field: "inputs.sessions[0].enclosure_length_m"},
		{name: "BadFeather", mutate: func(m doc) {
			at(m, "inputs", "wings", 0, "feathers")["right_primaries"].([]any)[8] = "singed"
		}, field: "inputs.wings[0].feathers.right_primaries[8]"},
		{name: "BadAttempt", mutate: func(m doc) { at(m, "inputs", "trials", 0)["attempts"].([]any)[1] = "soared" }, field: "inputs.trials[0].attempts[1]"},
		{name: "BadTrialMode", mutate: func(m doc) { at(m, "inputs", "trials", 0)["mode"] = "catapult" }, field: "inputs.trials[0].mode"},
		{name: "BadHousingKind", mutate: func(m doc) { at(m, "inputs", "housing", 1)["kind"] = "shed" }, field: "inputs.housing[1].kind"},
		{name: "ZeroHousingWidth", mutate: func(m doc) { at(m, "inputs", "housing", 1)["width_m"] = 0 }, field: "inputs.housing[1].width_m"},
		{name: "BadClearanceState", mutate: func(m doc) { at(m, "inputs", "clearances", 0)["state"] = "maybe" }, field: "inputs.clearances[0].state"},
		{name: "BadSex", mutate: func(m doc) { at(m, "patient")["sex"] = "f" }, field: "patient.sex"},
		{name: "SexDisagrees", mutate: func(m doc) { at(m, "inputs")["sex"] = "male" }, field: "inputs.sex"},
		{name: "NoCaseNumber", mutate: func(m doc) { at(m, "patient")["case_number"] = " " }, field: "patient.case_number"},
		{name: "BadFoundDate", mutate: func(m doc) { at(m, "patient")["found_date"] = "1/6/2025" }, field: "patient.found_date"},
		{name: "BadStatus", mutate: func(m doc) { at(m, "patient")["status"] = "flown" }, field: "patient.status"},
		{name: "SpeciesMismatch", mutate: func(m doc) { at(m, "patient")["species_scientific"] = "Buteo buteo" }, field: "patient.species_scientific"},
		{name: "SpeciesBadGroup", mutate: func(m doc) { at(m, "species")["group"] = "dinosaur" }, field: "species.group"},
		{name: "SpeciesNegativeSpan", mutate: func(m doc) { at(m, "species")["span_mm"] = -1600 }, field: "species.span_mm"},
		{name: "SpeciesRangeInverted", mutate: func(m doc) { at(m, "species", "mass_range_g", "female")["min"] = 3000 }, field: "species.mass_range_g.female"},
		{name: "SpeciesBadProvenance", mutate: func(m doc) { at(m, "species", "sources", "span_mm")["provenance"] = "folklore" }, field: "species.sources.span_mm.provenance"},
		{name: "SiteTooHigh", mutate: func(m doc) { at(m, "site")["elevation_m"] = 9000 }, field: "site.elevation_m"},
		{name: "NotJSON", raw: `{"format_version": 1, "patient": `, field: "case file"},
		{name: "Empty", raw: ``, field: "case file"},
		{name: "TrailingData", raw: "", field: "case file"},
	}
	base := readScenarioBytes(t, "osprey-ready")
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			data := []byte(tc.raw)
			switch {
			case tc.name == "TrailingData":
				data = append(bytes.Clone(base), []byte(`{"more": 1}`)...)
			case tc.mutate != nil:
				var m doc
				if err := json.Unmarshal(base, &m); err != nil {
					t.Fatal(err)
				}
				tc.mutate(m)
				data = mustJSON(t, m)
			}
			_, err := ReadCaseFile(bytes.NewReader(data))
			if !hasField(err, tc.field) {
				t.Errorf("ReadCaseFile error %v, want a ValidationError for %s", err, tc.field)
			}
		})
	}
}

// TestCaseFile_ValidateNonFinite: numbers JSON cannot carry (NaN, ±Inf)
// can still reach Validate from Go; they are refused by path.
func TestCaseFile_ValidateNonFinite(t *testing.T) {
	cf := loadCase(t, "osprey-ready")
	cf.Inputs.WeighIns[3].MassG = nan()
	cf.Species.AreaCM2 = inf()
	err := cf.Validate()
	for _, f := range []string{"inputs.weigh_ins[3].mass_g", "species.area_cm2"} {
		if !hasField(err, f) {
			t.Errorf("Validate error %v, want one for %s", err, f)
		}
	}
}

func nan() float64 { z := 0.0; return z / z }
func inf() float64 { z := 0.0; return 1 / z }

// TestWriteCaseFile_Refuses: an invalid case file is not written.
func TestWriteCaseFile_Refuses(t *testing.T) {
	cf := loadCase(t, "osprey-ready")
	cf.Patient.CaseNumber = ""
	var buf bytes.Buffer
	if err := WriteCaseFile(&buf, cf); !hasField(err, "patient.case_number") || buf.Len() > 0 {
		t.Errorf("WriteCaseFile = %v, %d bytes; want a refusal and nothing written", err, buf.Len())
	}
}

// TestCaseFile_InputsFromPatient: empty sex, age class and admission time in
// inputs are the patient's.
func TestCaseFile_InputsFromPatient(t *testing.T) {
	var m map[string]any
	if err := json.Unmarshal(readScenarioBytes(t, "osprey-ready"), &m); err != nil {
		t.Fatal(err)
	}
	in := m["inputs"].(map[string]any)
	delete(in, "sex")
	delete(in, "age_class")
	delete(in, "admitted_at")
	cf, err := ReadCaseFile(bytes.NewReader(mustJSON(t, m)))
	if err != nil {
		t.Fatal(err)
	}
	if cf.Inputs.Sex != SexFemale || cf.Inputs.AgeClass != "adult" || !cf.Inputs.AdmittedAt.Equal(cf.Patient.AdmittedAt) {
		t.Errorf("inputs %q %q %v, want the patient's", cf.Inputs.Sex, cf.Inputs.AgeClass, cf.Inputs.AdmittedAt)
	}
}

// FuzzReadCaseFile feeds arbitrary bytes to ReadCaseFile: it must never
// panic; it refuses with validation errors only; a file it accepts must
// assess without error, marshal to JSON and survive a write and read back.
// Seeds: every scenario, and the corpus in testdata/fuzz/FuzzReadCaseFile.
func FuzzReadCaseFile(f *testing.F) {
	// Compact seeds (no species sources, no indentation): the fuzzing engine
	// slows to a crawl on the 15–20 kB scenario files.
	for _, name := range scenarioNames(f) {
		cf := loadCase(f, name)
		cf.Species.Sources = nil
		f.Add(mustJSON(f, cf))
	}
	f.Add([]byte(`{"format_version": 1}`))
	f.Add([]byte(`{"format_version": 1, "patient": {}, "species": {}, "inputs": {}}`))
	now := time.Date(2025, 6, 20, 12, 0, 0, 0, time.UTC)
	f.Fuzz(func(t *testing.T, data []byte) {
		cf, err := ReadCaseFile(bytes.NewReader(data))
		if err != nil {
			if !isValidation(err) {
				t.Fatalf("ReadCaseFile error %v is not a validation error", err)
			}
			return
		}
		a, err := cf.Evaluate(Thresholds{}, nil, now)
		if err != nil {
			t.Fatalf("accepted case file does not assess: %v", err)
		}
		if _, err := json.Marshal(a); err != nil {
			t.Fatalf("assessment does not marshal: %v", err)
		}
		var buf bytes.Buffer
		if err := WriteCaseFile(&buf, cf); err != nil {
			t.Fatalf("accepted case file does not write: %v", err)
		}
		if _, err := ReadCaseFile(&buf); err != nil {
			t.Fatalf("written case file does not read back: %v", err)
		}
	})
}

// FuzzEvaluate varies the numbers of a complete case (mass, span, area,
// scores, passes, recovery, site) within and beyond their ranges: Evaluate
// must never panic, must refuse only with validation errors, and its
// outcome must follow its rule: insufficient exactly when a core criterion
// is not assessed.
func FuzzEvaluate(f *testing.F) {
	f.Add(1550.0, 1590.0, 3150.0, 3, 3, 12, 11, 60, 120.0, 18.0, true)
	f.Add(1100.0, 1590.0, 0.0, 0, 0, 0, 0, 0, 0.0, 0.0, false)
	f.Add(5e4, 10.0, 1e6, 9, -1, -3, 99, -1, 6000.0, 90.0, true)
	f.Add(1e-9, 4000.0, 1.0, 8, 2, 1000, 1000, 3600, -500.0, -40.0, true)
	base := loadCase(f, "osprey-ready")
	now := time.Date(2025, 6, 20, 12, 0, 0, 0, time.UTC)
	f.Fuzz(func(t *testing.T, massG, spanMM, areaCM2 float64, fat, muscle, passes, run, recovery int, elevM, tempC float64, hasTemp bool) {
		cf := base
		in := cf.Inputs
		in.WeighIns = append([]WeighIn(nil), in.WeighIns...)
		in.WeighIns[len(in.WeighIns)-1].MassG = massG
		in.Wings = append([]WingMeasurement(nil), in.Wings...)
		in.Wings[0].SpanMM, in.Wings[0].AreaCM2 = &spanMM, nil
		if areaCM2 != 0 {
			in.Wings[0].AreaCM2 = &areaCM2
		}
		in.Conditions = []ConditionScore{{At: now.Add(-time.Hour), FatScore: &fat, FatScale: FatScaleKaiser, MuscleScore: &muscle}}
		in.Sessions = append([]FlightSession(nil), in.Sessions...)
		s := &in.Sessions[len(in.Sessions)-1]
		s.Passes, s.LongestRun, s.RecoveryS = passes, run, &recovery
		site := Site{ElevationM: elevM}
		if hasTemp {
			site.TempC = &tempC
		}
		a, err := Evaluate(in, &cf.Species, Thresholds{}, site, now)
		if err != nil {
			if !isValidation(err) {
				t.Fatalf("Evaluate error %v is not a validation error", err)
			}
			return
		}
		if _, err := json.Marshal(a); err != nil {
			t.Fatalf("assessment does not marshal: %v", err)
		}
		coreMissing := false
		for _, c := range a.Criteria {
			coreMissing = coreMissing || c.Core && c.Status == StatusNotAssessed
		}
		if coreMissing != (a.Outcome.Level == OutcomeInsufficient) {
			t.Fatalf("outcome %s with a core criterion not assessed: %v", a.Outcome.Level, coreMissing)
		}
		if strings.TrimSpace(a.Outcome.Label) == "" || len(a.Outcome.Reasons) == 0 {
			t.Fatalf("outcome %+v without a label or reasons", a.Outcome)
		}
	})
}

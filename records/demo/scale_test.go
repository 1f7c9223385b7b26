package demo_test

import (
	"context"
	"database/sql"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"testing"
	"time"

	"golang.org/x/crypto/bcrypt"

	"aloft/assess"
	"aloft/records"
	"aloft/records/demo"
)

// scaleNow is the fixed seeding instant of these tests: early December, so
// the overwintering rule and the in-care tail are both exercised.
var scaleNow = time.Date(2026, 12, 2, 9, 30, 0, 0, time.UTC)

// seedScaleDB seeds the demo centre and n scale patients into a new file.
func seedScaleDB(t testing.TB, n int) *records.Store {
	t.Helper()
	ctx := context.Background()
	s, err := records.Open(ctx, filepath.Join(t.TempDir(), "scale.db"),
		records.Options{Now: func() time.Time { return scaleNow }, BcryptCost: bcrypt.MinCost})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	species, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sc, err := demo.Load(os.DirFS("../../testdata/demo"))
	if err != nil {
		t.Fatal(err)
	}
	if err := demo.Seed(ctx, s, species, sc, scaleNow); err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	if err := demo.SeedScale(ctx, s, species, n, scaleNow); err != nil {
		t.Fatal(err)
	}
	t.Logf("SeedScale(%d) took %s", n, time.Since(start).Round(time.Millisecond))
	return s
}

func count(t testing.TB, db *sql.DB, q string) int {
	t.Helper()
	var n int
	if err := db.QueryRow(q).Scan(&n); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	return n
}

// TestSeedScale seeds a small invented centre once and checks its shape
// and every record in it.
func TestSeedScale(t *testing.T) {
	const n = 200
	s := seedScaleDB(t, n)
	t.Run("Shape", func(t *testing.T) { testScaleShape(t, s, n) })
	t.Run("RecordsPassValidators", func(t *testing.T) { testScaleValid(t, s) })
}

// testScaleShape checks the invented centre's shape: every patient and
// record has its audit row, most patients have a disposition, some are
// still in care, and nothing is dated after the seeding instant.
func testScaleShape(t *testing.T, s *records.Store, n int) {
	db := s.DB()
	cases := []struct {
		name string
		q    string
		ok   func(int) bool
		want string
	}{
		{"Patients", `SELECT count(*) FROM patients`, func(v int) bool { return v == n+16 }, "n + the 16 demo patients"},
		{"RecordsPerPatient", `SELECT count(*) / (SELECT count(*) FROM patients) FROM entries`, func(v int) bool { return v >= 25 && v <= 80 }, "25 to 80"},
		{"EntriesWithoutAudit", `SELECT count(*) FROM entries e WHERE NOT EXISTS (SELECT 1 FROM audit_log a
			WHERE a.entity = e.kind AND a.entity_id = e.entry_key AND a.patient_id = e.patient_id)`, func(v int) bool { return v == 0 }, "0"},
		{"PatientsWithoutAudit", `SELECT count(*) FROM patients p WHERE NOT EXISTS (SELECT 1 FROM audit_log a
			WHERE a.entity = 'patient' AND a.entity_id = p.id AND a.action = 'create')`, func(v int) bool { return v == 0 }, "0"},
		{"DispositionsWithoutAudit", `SELECT count(*) FROM dispositions d WHERE NOT EXISTS (SELECT 1 FROM audit_log a
			WHERE a.entity = 'disposition' AND a.entity_id = d.disposition_key)`, func(v int) bool { return v == 0 }, "0"},
		{"StatusMirrorsDisposition", `SELECT count(*) FROM patients p JOIN dispositions d ON d.patient_id = p.id AND d.superseded = 0
			WHERE p.status <> d.kind OR p.status_date <> d.disposed_on`, func(v int) bool { return v == 0 }, "0"},
		{"MostDisposed", `SELECT 100 * count(*) / (SELECT count(*) FROM patients) FROM patients WHERE status <> 'in-care'`, func(v int) bool { return v >= 85 }, "at least 85 %"},
		{"SomeInCare", `SELECT count(*) FROM patients WHERE status = 'in-care'`, func(v int) bool { return v >= 1 }, "at least 1"},
		{"MostReleased", `SELECT count(*) FROM patients WHERE status = 'released'`, func(v int) bool { return v > n/3 }, "over a third"},
		{"EveryOutcome", `SELECT count(DISTINCT status) FROM patients`, func(v int) bool { return v >= 6 }, "at least 6 statuses"},
		{"NoFutureRecords", `SELECT count(*) FROM entries WHERE at > '` + scaleNow.Format(time.RFC3339) + `'`, func(v int) bool { return v == 0 }, "0"},
		{"RecordsAfterAdmission", `SELECT count(*) FROM entries e JOIN patients p ON p.id = e.patient_id WHERE e.at < p.admitted_at`, func(v int) bool { return v == 0 }, "0"},
		{"TenYears", `SELECT CAST(julianday('` + scaleNow.Format(time.RFC3339) + `') - julianday(min(admitted_at)) AS INTEGER) FROM patients`, func(v int) bool { return v > 9*365 && v <= 3653 }, "about ten years"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := count(t, db, tc.q); !tc.ok(got) {
				t.Errorf("got %d, want %s", got, tc.want)
			}
		})
	}
	if err := records.CheckIntegrity(context.Background(), s.Path()); err != nil {
		t.Error(err)
	}
}

// testScaleValid re-reads every stored record and runs the validator its
// form runs, with the species where the form has it.
func testScaleValid(t *testing.T, s *records.Store) {
	ctx := context.Background()
	species, _ := assess.LoadSpecies()
	patients, err := s.Patients(ctx, records.PatientFilter{Limit: 1 << 20})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range patients {
		sp, err := species.Find(p.SpeciesScientific)
		if err != nil {
			t.Fatalf("%s: %v", p.CaseNumber, err)
		}
		if mc := assess.CheckMass("intake_mass_g", p.IntakeMassG, sp, p.Sex); mc != nil && mc.NeedsConfirm && p.MassNote == "" {
			t.Errorf("%s: intake mass %g g needs a confirmed reason, as the intake form asks: %s", p.CaseNumber, p.IntakeMassG, mc.Message)
		}
		es, err := s.Entries(ctx, p.ID, records.EntryFilter{})
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range es {
			if err := validateEntry(e, sp, p.Sex); err != nil {
				t.Errorf("%s %s %d: %v\n%s", p.CaseNumber, e.Kind, e.ID, err, e.Data)
			}
		}
	}
}

// validateEntry decodes e and checks it as its form would.
func validateEntry(e records.Entry, sp *assess.Species, sex assess.Sex) error {
	decode := func(v interface{ Validate(time.Time) error }) error {
		if err := json.Unmarshal(e.Data, v); err != nil {
			return err
		}
		return v.Validate(scaleNow)
	}
	switch e.Kind {
	case records.KindWeighIn:
		var w assess.WeighIn
		if err := json.Unmarshal(e.Data, &w); err != nil {
			return err
		}
		if mc := assess.CheckMass("mass_g", w.MassG, sp, sex); mc != nil && mc.NeedsConfirm && w.Note == "" {
			return &mc.ValidationError
		}
		return w.Validate()
	case records.KindCondition:
		var c assess.ConditionScore
		return firstErr(json.Unmarshal(e.Data, &c), c.Validate)
	case records.KindWing:
		var w assess.WingMeasurement
		if err := json.Unmarshal(e.Data, &w); err != nil {
			return err
		}
		if w.SpanMM != nil {
			if sc := assess.CheckSpan("span_mm", *w.SpanMM, sp); sc != nil {
				return &sc.ValidationError
			}
		}
		return w.Validate(sp)
	case records.KindTrial:
		var x assess.TakeoffTrial
		return firstErr(json.Unmarshal(e.Data, &x), func() error { return x.Validate(assess.TrialRulesFor(sp, assess.DefaultDropCapM)) })
	case records.KindSession:
		var x assess.FlightSession
		return firstErr(json.Unmarshal(e.Data, &x), x.Validate)
	case records.KindWaterproof:
		var x assess.WaterproofTest
		return firstErr(json.Unmarshal(e.Data, &x), x.Validate)
	case records.KindHousing:
		var x assess.Housing
		return firstErr(json.Unmarshal(e.Data, &x), x.Validate)
	case records.KindClearance:
		var x assess.Clearance
		return firstErr(json.Unmarshal(e.Data, &x), x.ValidateChange)
	case records.KindExam:
		return decode(&assess.Exam{})
	case records.KindDiagnosis:
		return decode(&assess.Diagnosis{})
	case records.KindTreatment:
		return decode(&assess.Treatment{})
	case records.KindMedication:
		return decode(&assess.Medication{})
	case records.KindLab:
		return decode(&assess.LabResult{})
	case records.KindDiseaseTest:
		return decode(&assess.DiseaseTest{})
	}
	return nil
}

func firstErr(err error, then func() error) error {
	if err != nil {
		return err
	}
	return then()
}

// TestSeedScale_Deterministic seeds twice and compares what was written.
func TestSeedScale_Deterministic(t *testing.T) {
	digest := func(s *records.Store) string {
		var out string
		q := `SELECT group_concat(x, '|') FROM (SELECT p.case_number || p.species_scientific || p.admitted_at || p.intake_mass_g ||
			p.status || COALESCE(p.status_date, '') || (SELECT count(*) FROM entries e WHERE e.patient_id = p.id) ||
			COALESCE((SELECT max(e.data_json) FROM entries e WHERE e.patient_id = p.id), '') AS x FROM patients p ORDER BY p.id)`
		if err := s.DB().QueryRow(q).Scan(&out); err != nil {
			t.Fatal(err)
		}
		return out
	}
	a, b := digest(seedScaleDB(t, 40)), digest(seedScaleDB(t, 40))
	if a != b {
		t.Errorf("two seedings with the same n and clock differ (%d and %d bytes of digest)", len(a), len(b))
	}
}

// TestSeedScale_Timing seeds ALOFT_SCALE_N patients (default: skipped) and
// logs the time, for profiling: ALOFT_SCALE_N=20000 go test -run Timing -v
// -cpuprofile cpu.out ./records/demo/.
func TestSeedScale_Timing(t *testing.T) {
	n, _ := strconv.Atoi(os.Getenv("ALOFT_SCALE_N"))
	if n <= 0 {
		t.Skip("set ALOFT_SCALE_N to time a scale seeding")
	}
	s := seedScaleDB(t, n)
	t.Logf("%d patients, %d records, %d audit rows", count(t, s.DB(), `SELECT count(*) FROM patients`),
		count(t, s.DB(), `SELECT count(*) FROM entries`), count(t, s.DB(), `SELECT count(*) FROM audit_log`))
}

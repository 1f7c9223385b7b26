package records_test

import (
	"context"
	"errors"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// Every clinical value below is an invented test input: these tests check
// storage, versions, roles and date arithmetic, not clinical content.

func clinicalFixture(t *testing.T) (*records.Store, records.User, records.Patient) {
	t.Helper()
	s := recordstest.Open(t, nil)
	u := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	p, err := s.AdmitPatient(context.Background(), u.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	if err != nil {
		t.Fatal(err)
	}
	return s, u, p
}

func clinInt(n int) *int { return &n }

var clinAt = recordstest.Epoch.Add(-2 * time.Hour)

func clinMedication() assess.Medication {
	return assess.Medication{At: clinAt, Drug: "meloxicam oral suspension", Dose: 0.5, DoseUnit: assess.DoseMgPerKg,
		Route: assess.RouteOral, EveryHours: 24, FirstDose: "08:00", Start: "2026-06-15", End: "2026-06-19",
		Prescriber: "Dr Test"}
}

func TestStore_AddClinical(t *testing.T) {
	ctx := context.Background()
	cases := []struct {
		name string
		rec  records.ClinicalRecord
		kind records.Kind
		list func(s *records.Store, id int64) (int, error)
	}{
		{"Exam", assess.Exam{At: clinAt, EyeLeft: assess.FindingNormal, EyeRight: assess.FindingAbnormal, EyesNote: "hyphema",
			FeetLegs: assess.FindingNormal, KeelScore: clinInt(2), Feathers: assess.FindingNotExamined, Hydration: assess.HydrationMild,
			Findings: map[assess.BodySystem]string{assess.SysGeneral: "quiet, alert"}}, records.KindExam,
			func(s *records.Store, id int64) (int, error) { l, err := s.Exams(ctx, id); return len(l), err }},
		{"Diagnosis", assess.Diagnosis{At: clinAt, Condition: "soft-tissue bruising, right wing", Status: assess.DiagnosisActive}, records.KindDiagnosis,
			func(s *records.Store, id int64) (int, error) { l, err := s.Diagnoses(ctx, id); return len(l), err }},
		{"Treatment", assess.Treatment{At: clinAt, Procedure: "figure-of-eight wing wrap"}, records.KindTreatment,
			func(s *records.Store, id int64) (int, error) { l, err := s.Treatments(ctx, id); return len(l), err }},
		{"Medication", clinMedication(), records.KindMedication,
			func(s *records.Store, id int64) (int, error) { l, err := s.Medications(ctx, id); return len(l), err }},
		{"LabResult", assess.LabResult{At: clinAt, Test: "packed cell volume", Value: "38", Unit: "%"}, records.KindLab,
			func(s *records.Store, id int64) (int, error) { l, err := s.LabResults(ctx, id); return len(l), err }},
		{"DiseaseTest", assess.DiseaseTest{At: clinAt, Test: "avian influenza A, PCR", Sample: "oropharyngeal and cloacal swabs",
			Result: assess.ResultNegative, ResultOn: "2026-06-15"}, records.KindDiseaseTest,
			func(s *records.Store, id int64) (int, error) { l, err := s.DiseaseTests(ctx, id); return len(l), err }},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s, u, p := clinicalFixture(t)
			e, err := s.AddClinical(ctx, u.ID, p.ID, tc.rec)
			if err != nil {
				t.Fatalf("add: %v", err)
			}
			if e.Kind != tc.kind || e.ByName != "Test ana" || !e.At.Equal(clinAt) {
				t.Errorf("entry = kind %q by %q clinAt %v; want %q by Test ana clinAt %v", e.Kind, e.ByName, e.At, tc.kind, clinAt)
			}
			if n, err := tc.list(s, p.ID); err != nil || n != 1 {
				t.Errorf("listed %d, %v; want 1", n, err)
			}
			audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: string(tc.kind)})
			if len(audit) != 1 || audit[0].Action != records.ActionCreate {
				t.Errorf("audit rows = %+v, want one create", audit)
			}
		})
	}
}

func TestStore_AddClinical_Validation(t *testing.T) {
	ctx := context.Background()
	med := func(f func(*assess.Medication)) assess.Medication { m := clinMedication(); f(&m); return m }
	cases := []struct {
		name  string
		rec   records.ClinicalRecord
		field string
	}{
		{"ErrDoseZero", med(func(m *assess.Medication) { m.Dose = 0 }), "dose"},
		{"ErrDoseNegative", med(func(m *assess.Medication) { m.Dose = -1 }), "dose"},
		{"ErrDoseUnitMissing", med(func(m *assess.Medication) { m.DoseUnit = "" }), "dose_unit"},
		{"ErrDoseUnitUnknown", med(func(m *assess.Medication) { m.DoseUnit = "spoon" }), "dose_unit"},
		{"ErrEndBeforeStart", med(func(m *assess.Medication) { m.End = "2026-06-14" }), "end"},
		{"ErrRoute", med(func(m *assess.Medication) { m.Route = "by post" }), "route"},
		{"ErrInterval", med(func(m *assess.Medication) { m.EveryHours = 5 }), "every_hours"},
		{"ErrPrescriber", med(func(m *assess.Medication) { m.Prescriber = " " }), "prescriber"},
		{"ErrDiagnosisStatus", assess.Diagnosis{At: clinAt, Condition: "x", Status: "cured"}, "status"},
		{"ErrExamEmpty", assess.Exam{At: clinAt, EyeLeft: assess.FindingNotExamined, EyeRight: assess.FindingNotExamined,
			FeetLegs: assess.FindingNotExamined, Feathers: assess.FindingNotExamined, Hydration: assess.HydrationNotAssessed}, "notes"},
		{"ErrLabRange", assess.LabResult{At: clinAt, Test: "PCV", Value: "40", RefLow: clinFloat(55), RefHigh: clinFloat(35)}, "ref_high"},
		{"ErrDiseaseResult", assess.DiseaseTest{At: clinAt, Test: "AI PCR", Result: "unclear"}, "result"},
		{"ErrFuture", assess.Treatment{At: recordstest.Epoch.Add(48 * time.Hour), Procedure: "dressing"}, "at"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s, u, p := clinicalFixture(t)
			_, err := s.AddClinical(ctx, u.ID, p.ID, tc.rec)
			var ve assess.ValidationErrors
			if !errors.As(err, &ve) || ve.Field(tc.field) == "" {
				t.Fatalf("add %+v: got %v, want a validation error on %q", tc.rec, err, tc.field)
			}
			all, _ := s.Entries(ctx, p.ID, records.EntryFilter{AllVersions: true})
			if len(all) != 0 {
				t.Errorf("%d entries stored after a refused record, want 0", len(all))
			}
		})
	}
}

func clinFloat(f float64) *float64 { return &f }

func TestStore_CorrectClinical(t *testing.T) {
	ctx := context.Background()
	s, u, p := clinicalFixture(t)
	e, err := s.AddMedication(ctx, u.ID, p.ID, clinMedication())
	if err != nil {
		t.Fatal(err)
	}
	fixed := clinMedication()
	fixed.Dose = 0.3
	c, err := s.CorrectClinical(ctx, u.ID, e.Key, 1, fixed)
	if err != nil || c.Version != 2 {
		t.Fatalf("correct = %+v, %v; want version 2", c, err)
	}
	meds, _ := s.Medications(ctx, p.ID)
	if len(meds) != 1 || meds[0].Record.Dose != 0.3 || meds[0].Entry.Version != 2 {
		t.Errorf("current medications = %+v, want the corrected 0.3 mg/kg as version 2", meds)
	}
	vs, _ := s.EntryVersions(ctx, e.Key)
	if len(vs) != 2 || !vs[0].Superseded {
		t.Errorf("versions = %d, want 2 with the first kept and superseded", len(vs))
	}
	t.Run("ErrStaleVersion", func(t *testing.T) {
		if _, err := s.CorrectClinical(ctx, u.ID, e.Key, 1, fixed); !errors.Is(err, records.ErrConflict) {
			t.Errorf("got %v, want ErrConflict", err)
		}
	})
	t.Run("ErrWrongKind", func(t *testing.T) {
		_, err := s.CorrectClinical(ctx, u.ID, e.Key, 2, assess.Treatment{At: clinAt, Procedure: "dressing"})
		if !errors.Is(err, records.ErrNotFound) {
			t.Errorf("got %v, want ErrNotFound", err)
		}
	})
	t.Run("ErrInvalid", func(t *testing.T) {
		bad := fixed
		bad.Dose = 0
		var ve assess.ValidationErrors
		if _, err := s.CorrectClinical(ctx, u.ID, e.Key, 2, bad); !errors.As(err, &ve) || ve.Field("dose") == "" {
			t.Errorf("got %v, want a validation error on dose", err)
		}
	})
}

func TestStore_RemoveClinical(t *testing.T) {
	ctx := context.Background()
	s, u, p := clinicalFixture(t)
	e, _ := s.AddDiagnosis(ctx, u.ID, p.ID, assess.Diagnosis{At: clinAt, Condition: "keel abrasion", Status: assess.DiagnosisActive})
	if err := s.RemoveClinical(ctx, u.ID, e.Key, ""); err == nil {
		t.Error("removal without a reason accepted")
	}
	if err := s.RemoveClinical(ctx, u.ID, e.Key, "entered on the wrong patient"); err != nil {
		t.Fatal(err)
	}
	if ds, _ := s.Diagnoses(ctx, p.ID); len(ds) != 0 {
		t.Errorf("%d current diagnoses after removal, want 0", len(ds))
	}
	all, _ := s.Entries(ctx, p.ID, records.EntryFilter{AllVersions: true, Kinds: []records.Kind{records.KindDiagnosis}})
	if len(all) != 1 || all[0].RemovedReason != "entered on the wrong patient" {
		t.Errorf("history = %+v, want the removed record with its reason", all)
	}
	t.Run("ErrClearanceNotRemovable", func(t *testing.T) {
		vet := recordstest.AddUser(t, s, "vic", records.RoleVet)
		if _, err := s.SetClearance(ctx, vet, p.ID, assess.ClearVision, assess.ClearanceCleared, ""); err != nil {
			t.Fatal(err)
		}
		cl, _ := s.Entries(ctx, p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindClearance}})
		if err := s.RemoveClinical(ctx, vet.ID, cl[0].Key, "mistake"); !errors.Is(err, records.ErrNotFound) {
			t.Errorf("removing a clearance entry: %v, want ErrNotFound", err)
		}
	})
}

func TestStore_MedicationsDue(t *testing.T) {
	ctx := context.Background()
	s, u, p := clinicalFixture(t)
	other, _ := s.AdmitPatient(ctx, u.ID, recordstest.Intake("Anas platyrhynchos", "Mallard", 1000))
	gone, _ := s.AdmitPatient(ctx, u.ID, recordstest.Intake("Apus apus", "Common Swift", 40))
	if _, err := s.DB().ExecContext(ctx, `UPDATE patients SET status = 'released' WHERE id = ?`, gone.ID); err != nil {
		t.Fatal(err)
	}
	add := func(pid int64, f func(*assess.Medication)) records.Entry {
		m := clinMedication()
		f(&m)
		e, err := s.AddMedication(ctx, u.ID, pid, m)
		if err != nil {
			t.Fatalf("add %+v: %v", m, err)
		}
		return e
	}
	daily := add(p.ID, func(m *assess.Medication) {})
	q8h := add(other.ID, func(m *assess.Medication) {
		m.Drug = "enrofloxacin"
		m.EveryHours = 8
		m.FirstDose = "06:00"
		m.Start = "2026-06-14"
	})
	add(other.ID, func(m *assess.Medication) { m.Drug = "ended"; m.Start = "2026-06-01"; m.End = "2026-06-14" })
	add(other.ID, func(m *assess.Medication) { m.Drug = "alternate days"; m.EveryHours = 48; m.Start = "2026-06-14" })
	add(gone.ID, func(m *assess.Medication) { m.Drug = "released bird" })
	removed := add(p.ID, func(m *assess.Medication) { m.Drug = "removed" })
	if err := s.RemoveClinical(ctx, u.ID, removed.Key, "prescription cancelled"); err != nil {
		t.Fatal(err)
	}

	day := time.Date(2026, 6, 15, 0, 0, 0, 0, time.UTC)
	due, err := s.MedicationsDue(ctx, day)
	if err != nil {
		t.Fatal(err)
	}
	type row struct {
		key   int64
		doses string
	}
	var got []row
	for _, d := range due {
		var ts string
		for _, t := range d.Doses {
			ts += t.Format("15:04") + " "
		}
		got = append(got, row{d.Key, ts})
	}
	// q8h from 06:00 the day before falls clinAt 06, 14 and 22 h; once daily clinAt
	// 08 h (derived from the schedule rule of assess.Medication.DosesOn).
	want := []row{{q8h.Key, "06:00 14:00 22:00 "}, {daily.Key, "08:00 "}}
	if len(got) != len(want) {
		t.Fatalf("due = %+v, want %+v (no ended, removed, alternate-day-off or released-patient course)", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("due[%d] = %+v, want %+v", i, got[i], want[i])
		}
	}
	if due[1].Patient.ID != p.ID || due[1].Medication.Dose != 0.5 {
		t.Errorf("due[1] = %+v, want the hawk's 0.5 mg/kg", due[1])
	}
	next, _ := s.MedicationsDue(ctx, day.AddDate(0, 0, 1))
	if len(next) != 3 {
		t.Errorf("%d courses due on the 16th, want 3 (daily, q8h and the alternate-day one)", len(next))
	}
}

func TestStore_SetClearance_Roles(t *testing.T) {
	ctx := context.Background()
	cases := []struct {
		name    string
		roles   []records.Role
		disable bool
		forge   bool // pass a User value claiming the vet role
		wantErr error
		role    string
	}{
		{"Vet", []records.Role{records.RoleVet}, false, false, nil, "vet"},
		{"Rehabilitator", []records.Role{records.RoleRehabilitator, records.RoleStaff}, false, false, nil, "rehabilitator"},
		{"ErrStaff", []records.Role{records.RoleStaff}, false, false, records.ErrForbidden, ""},
		{"ErrAdmin", []records.Role{records.RoleAdmin}, false, false, records.ErrForbidden, ""},
		{"ErrForgedRole", []records.Role{records.RoleStaff}, false, true, records.ErrForbidden, ""},
		{"ErrDisabledVet", []records.Role{records.RoleVet}, true, false, records.ErrForbidden, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s, _, p := clinicalFixture(t)
			u := recordstest.AddUser(t, s, "who", tc.roles...)
			if tc.disable {
				if err := s.SetDisabled(ctx, 0, u.ID, true); err != nil {
					t.Fatal(err)
				}
			}
			if tc.forge {
				u.Roles = []records.Role{records.RoleVet}
			}
			c, err := s.SetClearance(ctx, u, p.ID, assess.ClearVision, assess.ClearanceCleared, "tracks food across the cage")
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("got %v, want %v", err, tc.wantErr)
			}
			cl, _ := s.Clearances(ctx, p.ID)
			vision := cl[1]
			if tc.wantErr != nil {
				if vision.State != assess.ClearanceNotExamined {
					t.Errorf("refused change stored: vision = %+v", vision)
				}
				return
			}
			if c.Role != tc.role || vision.State != assess.ClearanceCleared || vision.By != "Test who" || vision.Role != tc.role ||
				!vision.At.Equal(recordstest.Epoch) {
				t.Errorf("vision = %+v, want cleared by Test who (%s) clinAt %v", vision, tc.role, recordstest.Epoch)
			}
		})
	}
}

func TestStore_Clearances_LatestPerItem(t *testing.T) {
	ctx := context.Background()
	clock := recordstest.NewClock(recordstest.Epoch)
	s := recordstest.Open(t, clock)
	vet := recordstest.AddUser(t, s, "vic", records.RoleVet)
	rehab := recordstest.AddUser(t, s, "rae", records.RoleRehabilitator)
	p, _ := s.AdmitPatient(ctx, vet.ID, recordstest.Intake("Accipiter cooperii", "Cooper's Hawk", 300))

	if _, err := s.SetClearance(ctx, vet, p.ID, assess.ClearVision, assess.ClearanceNotCleared, ""); err == nil {
		t.Error("not cleared without a note accepted")
	}
	if _, err := s.SetClearance(ctx, vet, p.ID, assess.ClearVision, assess.ClearanceNotCleared, "left eye: re-check the fundus"); err != nil {
		t.Fatal(err)
	}
	clock.Advance(72 * time.Hour)
	if _, err := s.SetClearance(ctx, rehab, p.ID, assess.ClearVision, assess.ClearanceCleared, "re-check normal"); err != nil {
		t.Fatal(err)
	}
	if _, err := s.SetClearance(ctx, rehab, p.ID, "wings", assess.ClearanceCleared, ""); err == nil {
		t.Error("unknown item accepted")
	}
	cl, err := s.Clearances(ctx, p.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(cl) != len(assess.ClearanceItems) {
		t.Fatalf("%d items, want every item (%d)", len(cl), len(assess.ClearanceItems))
	}
	for i, c := range cl {
		if c.Item != assess.ClearanceItems[i] {
			t.Errorf("item %d = %q, want %q", i, c.Item, assess.ClearanceItems[i])
		}
		switch {
		case c.Item == assess.ClearVision:
			if c.State != assess.ClearanceCleared || c.By != "Test rae" || c.Role != "rehabilitator" || !c.At.Equal(clock.Now()) {
				t.Errorf("vision = %+v, want the later change: cleared by Test rae", c)
			}
		case c.State != assess.ClearanceNotExamined || c.By != "":
			t.Errorf("%s = %+v, want not examined by nobody", c.Item, c)
		}
	}
	hist, _ := s.ClearanceHistory(ctx, p.ID)
	if len(hist) != 2 || hist[1].State != assess.ClearanceNotCleared {
		t.Errorf("history = %+v, want both changes, newest first", hist)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: string(records.KindClearance)})
	if len(audit) != 2 {
		t.Errorf("%d audit rows for two clearance changes, want 2", len(audit))
	}
}

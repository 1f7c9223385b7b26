package records_test

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"sync"
	"testing"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

func TestOpen_MigratesOnceAndReopens(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "a.db")
	for i := 0; i < 2; i++ {
		s, err := records.Open(ctx, path, records.Options{})
		if err != nil {
			t.Fatalf("open %d: %v", i, err)
		}
		var n int
		if err := s.DB().QueryRow(`SELECT count(*) FROM schema_migrations`).Scan(&n); err != nil || n == 0 {
			t.Fatalf("open %d: schema_migrations count %d, err %v", i, n, err)
		}
		s.Close()
	}
	if _, err := records.Open(ctx, ":memory:", records.Options{}); err == nil {
		t.Fatal("Open(:memory:) succeeded, want an error (each pooled connection would get its own database)")
	}
}

func TestStore_AdmitPatient(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	u := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	p1, err := s.AdmitPatient(ctx, u.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	if err != nil {
		t.Fatalf("admit: %v", err)
	}
	p2, err := s.AdmitPatient(ctx, u.ID, recordstest.Intake("Turdus migratorius", "American Robin", 77))
	if err != nil {
		t.Fatalf("admit: %v", err)
	}
	if p1.CaseNumber != "2026-0001" || p2.CaseNumber != "2026-0002" {
		t.Errorf("case numbers %q, %q; want 2026-0001, 2026-0002", p1.CaseNumber, p2.CaseNumber)
	}
	if p1.Status != assess.DispInCare || p1.Version != 1 {
		t.Errorf("new patient status %q version %d, want in-care 1", p1.Status, p1.Version)
	}
	got, err := s.PatientByCase(ctx, "2026-0002")
	if err != nil || got.SpeciesCommon != "American Robin" || got.IntakeMassG != 77 {
		t.Errorf("PatientByCase = %+v, %v", got, err)
	}
	if _, err := s.PatientByCase(ctx, "1999-0001"); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("unknown case: err %v, want ErrNotFound", err)
	}
	audit, err := s.Audit(ctx, records.AuditFilter{PatientID: p1.ID})
	if err != nil || len(audit) != 1 || audit[0].Action != records.ActionCreate || audit[0].Username != "ana" {
		t.Errorf("audit for new patient = %+v, %v; want one create row by ana", audit, err)
	}
	list, err := s.Patients(ctx, records.PatientFilter{Query: "robin"})
	if err != nil || len(list) != 1 || list[0].ID != p2.ID {
		t.Errorf("search robin = %v, %v", list, err)
	}
}

func TestStore_AdmitPatient_Validation(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	cases := []struct {
		name  string
		edit  func(*records.PatientInput)
		field string
	}{
		{"ErrMassZero", func(p *records.PatientInput) { p.IntakeMassG = 0 }, "intake_mass_g"},
		{"ErrMassKilograms", func(p *records.PatientInput) { p.IntakeMassG = 0.35 }, "intake_mass_g"},
		{"ErrMassMilligrams", func(p *records.PatientInput) { p.IntakeMassG = 350000 }, "intake_mass_g"},
		{"ErrNoSpecies", func(p *records.PatientInput) { p.SpeciesScientific = " " }, "species"},
		{"ErrSex", func(p *records.PatientInput) { p.Sex = "x" }, "sex"},
		{"ErrDate", func(p *records.PatientInput) { p.FoundDate = "15/06/2026" }, "found_date"},
		{"ErrFutureDate", func(p *records.PatientInput) { p.FoundDate = "2027-01-01" }, "found_date"},
		{"ErrLat", func(p *records.PatientInput) { v, w := 91.0, 0.0; p.FoundLat, p.FoundLon = &v, &w }, "found_lat"},
		{"ErrReason", func(p *records.PatientInput) { p.Reason = "" }, "reason"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
			tc.edit(&in)
			_, err := s.AdmitPatient(ctx, 0, in)
			var ve assess.ValidationErrors
			if !errors.As(err, &ve) || ve.Field(tc.field) == "" {
				t.Fatalf("err = %v, want a validation error on %s", err, tc.field)
			}
		})
	}
	list, _ := s.Patients(ctx, records.PatientFilter{})
	if len(list) != 0 {
		t.Errorf("%d patients stored after refused intakes, want 0", len(list))
	}
	var n int
	s.DB().QueryRow(`SELECT count(*) FROM audit_log WHERE entity = 'patient'`).Scan(&n)
	if n != 0 {
		t.Errorf("%d audit rows after refused intakes, want 0", n)
	}
}

func TestStore_UpdatePatient_AuditsBeforeAfterAndDetectsConflict(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	in := recordstest.Intake("Anas platyrhynchos", "Mallard", 1000)
	p, _ := s.AdmitPatient(ctx, 0, in)
	in.IntakeMassG = 1050
	p2, err := s.UpdatePatient(ctx, 0, p.ID, p.Version, in)
	if err != nil || p2.IntakeMassG != 1050 || p2.Version != 2 {
		t.Fatalf("update = %+v, %v", p2, err)
	}
	if _, err := s.UpdatePatient(ctx, 0, p.ID, p.Version, in); !errors.Is(err, records.ErrConflict) {
		t.Errorf("stale version: err %v, want ErrConflict", err)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID})
	if len(audit) != 2 || audit[0].Action != records.ActionUpdate || audit[0].Before == "" || audit[0].After == "" {
		t.Errorf("audit = %+v, want create then update with before and after", audit)
	}
}

func TestStore_AuditIsAppendOnly(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	s.AdmitPatient(ctx, 0, recordstest.Intake("Anas platyrhynchos", "Mallard", 1000))
	if _, err := s.DB().Exec(`UPDATE audit_log SET action = 'x'`); err == nil {
		t.Error("UPDATE audit_log succeeded, want the trigger to refuse")
	}
	if _, err := s.DB().Exec(`DELETE FROM audit_log`); err == nil {
		t.Error("DELETE FROM audit_log succeeded, want the trigger to refuse")
	}
}

func TestStore_UsersAndLoginSessions(t *testing.T) {
	ctx := context.Background()
	clock := recordstest.NewClock(recordstest.Epoch)
	s := recordstest.Open(t, clock)
	u := recordstest.AddUser(t, s, "Vera", records.RoleVet, records.RoleStaff)
	if _, err := s.AddUser(ctx, 0, records.NewUser{Username: "vera", DisplayName: "x", Password: recordstest.Password, Roles: []records.Role{records.RoleStaff}}); err == nil {
		t.Error("duplicate username (other case) accepted")
	}
	if _, err := s.Authenticate(ctx, "vera", "wrong password!"); !errors.Is(err, records.ErrBadLogin) {
		t.Errorf("wrong password: %v, want ErrBadLogin", err)
	}
	got, err := s.Authenticate(ctx, "vera", recordstest.Password)
	if err != nil || got.ID != u.ID || !got.Has(records.RoleVet) || got.Has(records.RoleAdmin) {
		t.Fatalf("authenticate = %+v, %v", got, err)
	}
	tok1, _, _ := s.CreateLoginSession(ctx, u.ID)
	tok2, ls, err := s.CreateLoginSession(ctx, u.ID)
	if err != nil || tok1 == tok2 || ls.CSRFToken == "" {
		t.Fatalf("sessions: %q %q %+v %v", tok1, tok2, ls, err)
	}
	if _, err := s.LoginSessionByToken(ctx, tok2); err != nil {
		t.Errorf("live session: %v", err)
	}
	clock.Advance(records.SessionTTL + 1)
	if _, err := s.LoginSessionByToken(ctx, tok2); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("expired session: %v, want ErrNotFound", err)
	}
	tok3, _, _ := s.CreateLoginSession(ctx, u.ID)
	if err := s.SetDisabled(ctx, 0, u.ID, true); err != nil {
		t.Fatal(err)
	}
	if _, err := s.LoginSessionByToken(ctx, tok3); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("disabled user's session: %v, want ErrNotFound", err)
	}
	if _, err := s.Authenticate(ctx, "vera", recordstest.Password); !errors.Is(err, records.ErrBadLogin) {
		t.Errorf("disabled user login: %v, want ErrBadLogin", err)
	}
}

func TestStore_ConcurrentAdmissions(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	var wg sync.WaitGroup
	errs := make(chan error, 40)
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < 5; i++ {
				if _, err := s.AdmitPatient(ctx, 0, recordstest.Intake("Columba livia", "Rock Dove", 350)); err != nil {
					errs <- err
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Errorf("concurrent admit: %v", err)
	}
	list, _ := s.Patients(ctx, records.PatientFilter{})
	seen := map[string]bool{}
	for _, p := range list {
		if seen[p.CaseNumber] {
			t.Errorf("duplicate case number %s", p.CaseNumber)
		}
		seen[p.CaseNumber] = true
	}
	if len(list) != 40 {
		t.Errorf("%d patients, want 40", len(list))
	}
}

func TestBackupRestore_RoundTrip(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	s := recordstest.Open(t, nil)
	for i := 0; i < 3; i++ {
		s.AdmitPatient(ctx, 0, recordstest.Intake("Cygnus olor", "Mute Swan", 9000+float64(i)))
	}
	bak := filepath.Join(dir, "backup.db")
	if err := s.Backup(ctx, bak); err != nil {
		t.Fatalf("backup: %v", err)
	}
	if err := s.Backup(ctx, bak); err == nil {
		t.Error("backup over an existing file succeeded")
	}
	if err := records.Restore(ctx, bak, s.Path()); !errors.Is(err, records.ErrInUse) {
		t.Errorf("restore over a database in use: %v, want ErrInUse", err)
	}
	dest := filepath.Join(dir, "restored.db")
	if err := records.Restore(ctx, bak, dest); err != nil {
		t.Fatalf("restore: %v", err)
	}
	r, err := records.Open(ctx, dest, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	list, _ := r.Patients(ctx, records.PatientFilter{})
	if len(list) != 3 {
		t.Errorf("restored %d patients, want 3", len(list))
	}
	bad := filepath.Join(dir, "bad.db")
	if err := records.Restore(ctx, filepath.Join(dir, "missing.db"), bad); err == nil {
		t.Error("restore from a missing file succeeded")
	}
	_ = fmt.Sprint()
}

package records_test

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// reportFixture is a store with one patient and users of every role.
type reportFixture struct {
	store                     *records.Store
	clock                     *recordstest.Clock
	patient                   records.Patient
	staff, vet, rehab, vetReh records.User
}

func newReportFixture(t *testing.T) reportFixture {
	t.Helper()
	clock := recordstest.NewClock(recordstest.Epoch)
	s := recordstest.Open(t, clock)
	f := reportFixture{store: s, clock: clock}
	f.staff = recordstest.AddUser(t, s, "staff", records.RoleStaff)
	f.vet = recordstest.AddUser(t, s, "vet", records.RoleVet, records.RoleStaff)
	f.rehab = recordstest.AddUser(t, s, "rehab", records.RoleRehabilitator)
	f.vetReh = recordstest.AddUser(t, s, "both", records.RoleVet, records.RoleRehabilitator)
	p, err := s.AdmitPatient(context.Background(), f.staff.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	if err != nil {
		t.Fatal(err)
	}
	f.patient = p
	return f
}

// fakePDF stands for a rendered report: it names its version, so each
// version's bytes differ.
func fakePDF(st records.ReportStamp) ([]byte, error) {
	return []byte("%PDF-1.3 version " + string(rune('0'+st.Version)) + " at " + st.CreatedAt.Format(time.RFC3339)), nil
}

func (f reportFixture) freeze(t *testing.T) records.ReportVersion {
	t.Helper()
	v, err := f.store.FreezeReport(context.Background(), f.staff.ID, records.NewReport{PatientID: f.patient.ID,
		Site: records.ReportSite{Label: "centre", ElevationM: 140}}, fakePDF)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestStore_FreezeReport(t *testing.T) {
	ctx := context.Background()
	f := newReportFixture(t)
	v1 := f.freeze(t)
	f.clock.Advance(time.Hour)
	v2 := f.freeze(t)
	if v1.Version != 1 || v2.Version != 2 {
		t.Fatalf("versions %d, %d, want 1, 2", v1.Version, v2.Version)
	}
	pdf, err := f.store.ReportPDF(ctx, v2.ID)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := fakePDF(records.ReportStamp{Version: 2, CreatedAt: recordstest.Epoch.Add(time.Hour)})
	if !bytes.Equal(pdf, want) {
		t.Errorf("stored bytes %q, want %q", pdf, want)
	}
	sum := sha256.Sum256(want)
	if v2.SHA256 != hex.EncodeToString(sum[:]) || v2.SizeBytes != len(want) {
		t.Errorf("sha256 %s size %d, want %x size %d", v2.SHA256, v2.SizeBytes, sum, len(want))
	}
	if v2.PageSize != records.PageA4 || v2.Site.ElevationM != 140 || v2.CreatedByName != "Test staff" {
		t.Errorf("version metadata %+v", v2)
	}
	list, err := f.store.ReportVersions(ctx, f.patient.ID)
	if err != nil || len(list) != 2 || list[0].Version != 1 {
		t.Fatalf("ReportVersions = %+v, %v", list, err)
	}
	audit, err := f.store.Audit(ctx, records.AuditFilter{Entity: "report_version"})
	if err != nil || len(audit) != 2 || audit[0].PatientID != f.patient.ID {
		t.Errorf("audit rows %+v, %v; want 2 for the patient", audit, err)
	}
}

func TestStore_FreezeReport_Errors(t *testing.T) {
	ctx := context.Background()
	f := newReportFixture(t)
	boom := errors.New("render failed")
	cases := []struct {
		name    string
		n       records.NewReport
		render  func(records.ReportStamp) ([]byte, error)
		wantErr func(error) bool
	}{
		{"ErrRender", records.NewReport{PatientID: f.patient.ID}, func(records.ReportStamp) ([]byte, error) { return nil, boom },
			func(err error) bool { return errors.Is(err, boom) }},
		{"ErrEmpty", records.NewReport{PatientID: f.patient.ID}, func(records.ReportStamp) ([]byte, error) { return nil, nil },
			func(err error) bool { return err != nil }},
		{"ErrPageSize", records.NewReport{PatientID: f.patient.ID, PageSize: "A3"}, fakePDF,
			func(err error) bool { var ve assess.ValidationErrors; return errors.As(err, &ve) }},
		{"ErrNoPatient", records.NewReport{PatientID: 999}, fakePDF,
			func(err error) bool { return errors.Is(err, records.ErrNotFound) }},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := f.store.FreezeReport(ctx, f.staff.ID, tc.n, tc.render)
			if !tc.wantErr(err) {
				t.Errorf("FreezeReport(%+v) error %v", tc.n, err)
			}
		})
	}
	if list, _ := f.store.ReportVersions(ctx, f.patient.ID); len(list) != 0 {
		t.Errorf("%d versions stored after failures, want 0", len(list))
	}
}

func TestStore_SignReport(t *testing.T) {
	ctx := context.Background()
	f := newReportFixture(t)
	v := f.freeze(t)
	cases := []struct {
		name     string
		actor    records.User
		role     records.Role
		password string
		comment  string
		want     error
	}{
		{"ErrStaffCannotSign", f.staff, records.RoleStaff, recordstest.Password, "", records.ErrForbidden},
		{"ErrStaffAsVet", f.staff, records.RoleVet, recordstest.Password, "", records.ErrForbidden},
		{"ErrRoleNotHeld", f.rehab, records.RoleVet, recordstest.Password, "", records.ErrForbidden},
		{"ErrWrongPassword", f.vet, records.RoleVet, "not the password", "", records.ErrBadLogin},
		{"Vet", f.vet, records.RoleVet, recordstest.Password, "  Wing healed; flies level.  ", nil},
		{"ErrTwice", f.vet, records.RoleVet, recordstest.Password, "again", records.ErrConflict},
		{"Rehabilitator", f.rehab, records.RoleRehabilitator, recordstest.Password, "", nil},
		{"BothRolesAsVet", f.vetReh, records.RoleVet, recordstest.Password, "", nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			so, err := f.store.SignReport(ctx, tc.actor, v.ID, tc.role, tc.password, tc.comment)
			if !errors.Is(err, tc.want) {
				t.Fatalf("SignReport(%s as %s) error %v, want %v", tc.actor.Username, tc.role, err, tc.want)
			}
			if err != nil {
				return
			}
			if so.SHA256 != v.SHA256 || so.Role != tc.role || so.UserID != tc.actor.ID || so.Comment != strings.TrimSpace(tc.comment) {
				t.Errorf("sign-off %+v, want hash %s, role %s, user %d", so, v.SHA256, tc.role, tc.actor.ID)
			}
		})
	}
	got, err := f.store.ReportVersionByID(ctx, v.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.SignOffs) != 3 || !got.Signed(records.RoleVet) || !got.Signed(records.RoleRehabilitator) {
		t.Errorf("sign-offs %+v, want vet, rehabilitator and vet", got.SignOffs)
	}
	if got.SignOffs[0].UserName != "Test vet" {
		t.Errorf("first sign-off by %q, want Test vet", got.SignOffs[0].UserName)
	}
	audit, _ := f.store.Audit(ctx, records.AuditFilter{Entity: "signoff"})
	if len(audit) != 3 {
		t.Errorf("%d sign-off audit rows, want 3", len(audit))
	}
	if _, err := f.store.SignReport(ctx, f.vet, 999, records.RoleVet, recordstest.Password, ""); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("sign a missing version: %v, want ErrNotFound", err)
	}
	if err := f.store.SetDisabled(ctx, 0, f.rehab.ID, true); err != nil {
		t.Fatal(err)
	}
	v2 := f.freeze(t)
	if _, err := f.store.SignReport(ctx, f.rehab, v2.ID, records.RoleRehabilitator, recordstest.Password, ""); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("disabled rehabilitator signs: %v, want ErrForbidden", err)
	}
}

// TestStore_ReportFrozen checks that a signed version stays byte-identical
// when the patient's records change, and that the database itself refuses
// to change or delete a version or a sign-off.
func TestStore_ReportFrozen(t *testing.T) {
	ctx := context.Background()
	f := newReportFixture(t)
	v := f.freeze(t)
	if _, err := f.store.SignReport(ctx, f.vet, v.ID, records.RoleVet, recordstest.Password, ""); err != nil {
		t.Fatal(err)
	}
	before, _ := f.store.ReportPDF(ctx, v.ID)
	if _, err := f.store.AddWeighIn(ctx, f.staff.ID, f.patient.ID, assess.WeighIn{At: recordstest.Epoch, MassG: 1150,
		Fed: assess.FedBefore}, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	after, _ := f.store.ReportPDF(ctx, v.ID)
	if sha256.Sum256(before) != sha256.Sum256(after) {
		t.Error("the stored report changed after a weigh-in was added")
	}
	for _, q := range []string{
		`UPDATE report_versions SET pdf = x'00' WHERE id = 1`,
		`UPDATE report_versions SET sha256 = '` + strings.Repeat("0", 64) + `'`,
		`DELETE FROM report_versions`,
		`UPDATE signoffs SET comment = 'changed'`,
		`DELETE FROM signoffs`,
	} {
		if _, err := f.store.DB().ExecContext(ctx, q); err == nil {
			t.Errorf("%s: the database allowed it", q)
		}
	}
}

// TestStore_SignReport_ErrCorrupt: bytes that no longer match their hash
// (changed behind the application's back, with the guard trigger dropped)
// cannot be signed.
func TestStore_SignReport_ErrCorrupt(t *testing.T) {
	ctx := context.Background()
	f := newReportFixture(t)
	v := f.freeze(t)
	db := f.store.DB()
	if _, err := db.ExecContext(ctx, `DROP TRIGGER report_versions_no_update`); err != nil {
		t.Fatal(err)
	}
	if _, err := db.ExecContext(ctx, `UPDATE report_versions SET pdf = x'25504446' WHERE id = ?`, v.ID); err != nil {
		t.Fatal(err)
	}
	if _, err := f.store.SignReport(ctx, f.vet, v.ID, records.RoleVet, recordstest.Password, ""); !errors.Is(err, records.ErrReportCorrupt) {
		t.Errorf("sign a corrupted version: %v, want ErrReportCorrupt", err)
	}
}

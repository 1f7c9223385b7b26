package records_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"aloft/records"
	"aloft/records/recordstest"
)

func TestRedactFinder_ScrubsRecordAndAuditHistory(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, s, "boss", records.RoleAdmin)
	staff := recordstest.AddUser(t, s, "kim", records.RoleStaff)
	in := recordstest.Intake("Tyto alba", "Western Barn Owl", 300)
	in.FinderName, in.FinderContact = "Zebedee Quarrington", "zq@example.org"
	p, err := s.AdmitPatient(ctx, staff.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	in.Reason = "found grounded by a barn"
	p, _ = s.UpdatePatient(ctx, staff.ID, p.ID, p.Version, in)
	if err := s.RedactFinder(ctx, staff, p.ID); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("staff redaction: %v, want ErrForbidden", err)
	}
	if err := s.RedactFinder(ctx, admin, p.ID); err != nil {
		t.Fatal(err)
	}
	got, _ := s.Patient(ctx, p.ID)
	if got.FinderName != "[redacted]" || got.FinderContact != "[redacted]" || got.Reason != in.Reason {
		t.Errorf("after redaction: %+v", got)
	}
	var dump strings.Builder
	rows, _ := s.DB().Query(`SELECT COALESCE(before_json,''), COALESCE(after_json,'') FROM audit_log`)
	for rows.Next() {
		var b, a string
		rows.Scan(&b, &a)
		dump.WriteString(b + a)
	}
	rows.Close()
	for _, secret := range []string{"Zebedee", "Quarrington", "zq@example.org"} {
		if strings.Contains(dump.String(), secret) {
			t.Errorf("audit history still holds %q after redaction", secret)
		}
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID})
	if audit[0].Action != records.ActionRedact || audit[0].Username != "boss" {
		t.Errorf("newest audit row = %+v, want a redaction by boss", audit[0])
	}
	// The audit log is still append-only after a redaction.
	if _, err := s.DB().Exec(`UPDATE audit_log SET action = 'x'`); err == nil {
		t.Error("audit_log accepts updates after a redaction")
	}
}

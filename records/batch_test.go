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

// TestBatch_SameRowsAsStore writes the same admission, record, clearance
// and disposition once through the store's one-at-a-time methods and once
// through a Batch, and compares the rows and audit rows they leave.
func TestBatch_SameRowsAsStore(t *testing.T) {
	ctx := context.Background()
	at := recordstest.Epoch.Add(-2 * time.Hour)
	write := func(t *testing.T, batch bool) *records.Store {
		s := recordstest.Open(t, nil)
		staff := recordstest.AddUser(t, s, "ana", records.RoleStaff)
		vet := recordstest.AddUser(t, s, "vera", records.RoleVet)
		in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
		w := assess.WeighIn{At: at, MassG: 1080, Fed: assess.FedBefore, Note: `<"quoted"> & more`}
		disp := records.DispositionInput{Kind: assess.DispDied, Date: recordstest.Epoch.Format(records.DateLayout), Reason: "unknown"}
		if !batch {
			p, err := s.AdmitPatient(ctx, staff.ID, in)
			if err == nil {
				_, err = s.AddEntry(ctx, staff.ID, records.NewEntry{PatientID: p.ID, Kind: records.KindWeighIn, At: at, Data: w})
			}
			if err == nil {
				_, err = s.SetClearanceAt(ctx, vet, p.ID, at, assess.ClearVision, assess.ClearanceCleared, "")
			}
			if err == nil {
				_, err = s.Dispose(ctx, vet.ID, p.ID, disp)
			}
			if err != nil {
				t.Fatal(err)
			}
			return s
		}
		err := s.Batch(ctx, func(b *records.Batch) error {
			p, err := b.Admit(staff.ID, in)
			if err != nil {
				return err
			}
			e, err := b.AddEntry(staff.ID, records.NewEntry{PatientID: p.ID, Kind: records.KindWeighIn, At: at, Data: w})
			if err != nil {
				return err
			}
			if _, err := s.Entry(ctx, e.Key); !errors.Is(err, records.ErrNotFound) {
				t.Errorf("entry %d outside the batch before it commits: %v, want ErrNotFound", e.Key, err)
			}
			if _, err := b.SetClearanceAt(vet, p.ID, at, assess.ClearVision, assess.ClearanceCleared, ""); err != nil {
				return err
			}
			_, err = b.Dispose(vet.ID, p.ID, disp)
			return err
		})
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	one, many := write(t, false), write(t, true)
	queries := []struct{ name, q string }{
		{"Patients", `SELECT group_concat(case_number || species_scientific || status || status_date || version, ';') FROM patients`},
		{"Entries", `SELECT group_concat(id || '/' || entry_key || kind || version || at || data_json || created_by || created_at, ';') FROM entries`},
		{"Dispositions", `SELECT group_concat(disposition_key || kind || disposed_on || reason || performed_by, ';') FROM dispositions`},
		{"Audit", `SELECT group_concat(at || COALESCE(user_id, 0) || entity || entity_id || patient_id || action ||
			COALESCE(before_json, '') || COALESCE(after_json, ''), ';') FROM (SELECT * FROM audit_log ORDER BY id)`},
	}
	for _, tc := range queries {
		t.Run(tc.name, func(t *testing.T) {
			var a, b string
			if err := one.DB().QueryRow(tc.q).Scan(&a); err != nil {
				t.Fatal(err)
			}
			if err := many.DB().QueryRow(tc.q).Scan(&b); err != nil {
				t.Fatal(err)
			}
			if a != b {
				t.Errorf("batch wrote\n%s\nthe store wrote\n%s", b, a)
			}
		})
	}
}

// TestBatch_Refusals checks that a batch refuses what the store refuses,
// and that an error rolls back every write of the batch.
func TestBatch_Refusals(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	staff := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	at := recordstest.Epoch.Add(-time.Hour)
	cases := []struct {
		name string
		run  func(b *records.Batch, p records.Patient) error
		want func(error) bool
	}{
		{"ErrUnknownPatient", func(b *records.Batch, p records.Patient) error {
			_, err := b.AddEntry(staff.ID, records.NewEntry{PatientID: p.ID + 999, Kind: records.KindWeighIn, At: at, Data: assess.WeighIn{}})
			return err
		}, func(err error) bool { return errors.Is(err, records.ErrNotFound) }},
		{"ErrClearanceByStaff", func(b *records.Batch, p records.Patient) error {
			_, err := b.SetClearanceAt(staff, p.ID, at, assess.ClearVision, assess.ClearanceCleared, "")
			return err
		}, func(err error) bool { return errors.Is(err, records.ErrForbidden) }},
		{"ErrReleaseByStaff", func(b *records.Batch, p records.Patient) error {
			_, err := b.Dispose(staff.ID, p.ID, records.DispositionInput{Kind: assess.DispReleased, Place: "a marsh",
				Date: recordstest.Epoch.Format(records.DateLayout), NoReportReason: "test"})
			return err
		}, func(err error) bool { return errors.Is(err, records.ErrForbidden) }},
		{"ErrDisposeTwice", func(b *records.Batch, p records.Patient) error {
			d := records.DispositionInput{Kind: assess.DispDied, Date: recordstest.Epoch.Format(records.DateLayout), Reason: "unknown"}
			if _, err := b.Dispose(staff.ID, p.ID, d); err != nil {
				return err
			}
			_, err := b.Dispose(staff.ID, p.ID, d)
			return err
		}, func(err error) bool { return errors.Is(err, records.ErrConflict) }},
		{"ErrBadIntake", func(b *records.Batch, p records.Patient) error {
			in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 0)
			_, err := b.Admit(staff.ID, in)
			return err
		}, func(err error) bool { var ve assess.ValidationErrors; return errors.As(err, &ve) }},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var before int
			s.DB().QueryRow(`SELECT count(*) FROM audit_log`).Scan(&before)
			err := s.Batch(ctx, func(b *records.Batch) error {
				p, err := b.Admit(staff.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
				if err != nil {
					return err
				}
				if _, err := b.AddEntry(staff.ID, records.NewEntry{PatientID: p.ID, Kind: records.KindWeighIn, At: at,
					Data: assess.WeighIn{At: at, MassG: 1000, Fed: assess.FedBefore}}); err != nil {
					return err
				}
				return tc.run(b, p)
			})
			if !tc.want(err) {
				t.Errorf("got error %v", err)
			}
			var after int
			s.DB().QueryRow(`SELECT count(*) FROM audit_log`).Scan(&after)
			if after != before {
				t.Errorf("audit rows %d after a failed batch, want %d: the batch was not rolled back", after, before)
			}
		})
	}
}

// TestBatch_IdempotencyKey returns the stored entry for a key already used.
func TestBatch_IdempotencyKey(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	staff := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	at := recordstest.Epoch.Add(-time.Hour)
	err := s.Batch(ctx, func(b *records.Batch) error {
		p, err := b.Admit(staff.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
		if err != nil {
			return err
		}
		n := records.NewEntry{PatientID: p.ID, Kind: records.KindWeighIn, At: at, IdempotencyKey: "draft-0001",
			Data: assess.WeighIn{At: at, MassG: 1000, Fed: assess.FedBefore}}
		first, err := b.AddEntry(staff.ID, n)
		if err != nil {
			return err
		}
		again, err := b.AddEntry(staff.ID, n)
		if !errors.Is(err, records.ErrDuplicate) || again.ID != first.ID {
			t.Errorf("second add with the same key: %+v, %v; want entry %d and ErrDuplicate", again, err, first.ID)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}

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

func TestEntries_AddCorrectRemoveKeepHistory(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	u := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	p, _ := s.AdmitPatient(ctx, u.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	at := recordstest.Epoch
	e, err := s.AddEntry(ctx, u.ID, records.NewEntry{PatientID: p.ID, Kind: "weigh-in", At: at, Data: assess.WeighIn{At: at, MassG: 1100, Fed: assess.FedBefore}})
	if err != nil || e.Version != 1 || e.Key != e.ID || e.ByName != "Test ana" {
		t.Fatalf("add = %+v, %v", e, err)
	}
	c, err := s.CorrectEntry(ctx, u.ID, e.Key, 1, at, assess.WeighIn{At: at, MassG: 1010, Fed: assess.FedBefore})
	if err != nil || c.Version != 2 || c.Key != e.Key {
		t.Fatalf("correct = %+v, %v", c, err)
	}
	if _, err := s.CorrectEntry(ctx, u.ID, e.Key, 1, at, assess.WeighIn{MassG: 1}); !errors.Is(err, records.ErrConflict) {
		t.Errorf("correcting a superseded version: %v, want ErrConflict", err)
	}
	cur, _ := s.Entries(ctx, p.ID, records.EntryFilter{})
	ws, _ := records.DecodeAll[assess.WeighIn](cur)
	if len(ws) != 1 || ws[0].MassG != 1010 {
		t.Errorf("current weigh-ins = %+v, want the corrected 1010 g only", ws)
	}
	vs, _ := s.EntryVersions(ctx, e.Key)
	if len(vs) != 2 || !vs[0].Superseded || vs[1].Superseded {
		t.Errorf("versions = %+v, want the original kept and superseded", vs)
	}
	if err := s.RemoveEntry(ctx, u.ID, e.Key, ""); err == nil {
		t.Error("removal without a reason accepted")
	}
	if err := s.RemoveEntry(ctx, u.ID, e.Key, "weighed the wrong bird"); err != nil {
		t.Fatal(err)
	}
	cur, _ = s.Entries(ctx, p.ID, records.EntryFilter{})
	all, _ := s.Entries(ctx, p.ID, records.EntryFilter{AllVersions: true})
	if len(cur) != 0 || len(all) != 2 {
		t.Errorf("after removal: %d current, %d in history; want 0 and 2", len(cur), len(all))
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: "weigh-in"})
	if len(audit) != 3 {
		t.Errorf("%d audit rows for add, correct, remove; want 3", len(audit))
	}
}

func TestEntries_IdempotencyKey(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	p, _ := s.AdmitPatient(ctx, 0, recordstest.Intake("Apus apus", "Common Swift", 40))
	n := records.NewEntry{PatientID: p.ID, Kind: "flight-session", At: time.Now(), Data: assess.FlightSession{Passes: 10}, IdempotencyKey: "draft-1"}
	first, err := s.AddEntry(ctx, 0, n)
	if err != nil {
		t.Fatal(err)
	}
	again, err := s.AddEntry(ctx, 0, n)
	if !errors.Is(err, records.ErrDuplicate) || again.ID != first.ID {
		t.Errorf("repeat = %+v, %v; want the first entry and ErrDuplicate", again, err)
	}
	all, _ := s.Entries(ctx, p.ID, records.EntryFilter{})
	if len(all) != 1 {
		t.Errorf("%d entries after a repeated submission, want 1", len(all))
	}
	if _, err := s.AddEntry(ctx, 0, records.NewEntry{PatientID: 9999, Kind: "x", At: time.Now(), Data: 1}); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("entry for a missing patient: %v, want ErrNotFound", err)
	}
}

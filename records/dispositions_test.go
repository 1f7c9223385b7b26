package records_test

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

func fptr(v float64) *float64 { return &v }

// admitted returns a store, a rehabilitator and a staff member, and a
// patient admitted at recordstest.Epoch (2026-06-15).
func admitted(t *testing.T) (*records.Store, *recordstest.Clock, records.User, records.User, records.Patient) {
	t.Helper()
	clock := recordstest.NewClock(recordstest.Epoch)
	s := recordstest.Open(t, clock)
	rehab := recordstest.AddUser(t, s, "rehab", records.RoleRehabilitator, records.RoleStaff)
	staff := recordstest.AddUser(t, s, "staff", records.RoleStaff)
	p, err := s.AdmitPatient(context.Background(), staff.ID, recordstest.Intake("Cygnus olor", "Mute Swan", 9800))
	if err != nil {
		t.Fatal(err)
	}
	clock.Advance(20 * 24 * time.Hour) // today is 2026-07-05
	return s, clock, rehab, staff, p
}

func TestStore_Dispose(t *testing.T) {
	cases := []struct {
		name string
		in   records.DispositionInput
		want assess.Disposition
	}{
		{"Released", records.DispositionInput{Kind: assess.DispReleased, Date: "2026-07-01", Place: "Harbour mouth",
			Lat: fptr(42.44), Lon: fptr(-76.5), NoReportReason: "released before the report feature existed"}, assess.DispReleased},
		{"ReleasedWithReport", records.DispositionInput{Kind: assess.DispReleased, Date: "2026-07-01", Place: "Harbour mouth",
			ReportVersionID: new(int64(7))}, assess.DispReleased},
		{"Renested", records.DispositionInput{Kind: assess.DispRenested, Date: "2026-06-15", Place: "Hedge nest, garden",
			NoReportReason: "nestling returned to its nest the day it was found"}, assess.DispRenested},
		{"Transferred", records.DispositionInput{Kind: assess.DispTransferred, Date: "2026-06-20", Place: "Valley swan unit",
			Receiver: "Valley Swan Unit (invented)"}, assess.DispTransferred},
		{"Died", records.DispositionInput{Kind: assess.DispDied, Date: "2026-06-16", Reason: "lead poisoning"}, assess.DispDied},
		{"Euthanised", records.DispositionInput{Kind: assess.DispEuthanised, Date: "2026-06-16",
			Reason: "untreatable wing fracture"}, assess.DispEuthanised},
		{"DeadOnArrival", records.DispositionInput{Kind: assess.DispDeadOnArrival, Date: "2026-06-15"}, assess.DispDeadOnArrival},
		{"Escaped", records.DispositionInput{Kind: assess.DispEscaped, Date: "2026-07-05", Place: "outdoor pool"}, assess.DispEscaped},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ctx := context.Background()
			s, _, rehab, _, p := admitted(t)
			d, err := s.Dispose(ctx, rehab.ID, p.ID, tc.in)
			if err != nil {
				t.Fatalf("Dispose(%+v): %v", tc.in, err)
			}
			if d.Kind != tc.want || d.Version != 1 || d.Key != d.ID || d.PerformedBy != "Test rehab" {
				t.Errorf("got kind %q version %d key %d id %d by %q, want %q 1 key=id by Test rehab",
					d.Kind, d.Version, d.Key, d.ID, d.PerformedBy, tc.want)
			}
			got, err := s.Patient(ctx, p.ID)
			if err != nil {
				t.Fatal(err)
			}
			if got.Status != tc.want || got.StatusDate != tc.in.Date || got.InCare() {
				t.Errorf("patient status %q %q, want %q %q", got.Status, got.StatusDate, tc.want, tc.in.Date)
			}
			list, _ := s.Patients(ctx, records.PatientFilter{Status: string(assess.DispInCare)})
			if len(list) != 0 {
				t.Errorf("in-care list has %d patients after disposition, want 0", len(list))
			}
			cur, err := s.Disposition(ctx, p.ID)
			if err != nil || cur.ID != d.ID {
				t.Errorf("Disposition = %+v, %v; want the stored one", cur, err)
			}
			audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: "disposition"})
			if len(audit) != 1 || audit[0].Action != records.ActionCreate || audit[0].UserID != rehab.ID {
				t.Errorf("audit = %+v, want one create by the rehabilitator", audit)
			}
		})
	}
}

func TestStore_Dispose_DropsFieldsOfOtherKinds(t *testing.T) {
	s, _, rehab, _, p := admitted(t)
	d, err := s.Dispose(context.Background(), rehab.ID, p.ID, records.DispositionInput{Kind: assess.DispDied,
		Date: "2026-06-16", Reason: " unknown ", Receiver: "someone", NoReportReason: "x", ReportVersionID: new(int64(3))})
	if err != nil {
		t.Fatal(err)
	}
	if d.Receiver != "" || d.NoReportReason != "" || d.ReportVersionID != nil || d.Reason != "unknown" {
		t.Errorf("got %+v, want receiver and report fields dropped, reason trimmed", d.DispositionInput)
	}
}

func TestStore_Dispose_Errors(t *testing.T) {
	ok := records.DispositionInput{Kind: assess.DispReleased, Date: "2026-07-01", Place: "Harbour",
		NoReportReason: "no report feature yet"}
	with := func(f func(*records.DispositionInput)) records.DispositionInput { in := ok; f(&in); return in }
	cases := []struct {
		name, field string
		in          records.DispositionInput
	}{
		{"ErrKindInCare", "kind", with(func(in *records.DispositionInput) { in.Kind = assess.DispInCare })},
		{"ErrKindUnknown", "kind", with(func(in *records.DispositionInput) { in.Kind = "flew" })},
		{"ErrDateFormat", "date", with(func(in *records.DispositionInput) { in.Date = "01/07/2026" })},
		{"ErrDateBeforeAdmission", "date", with(func(in *records.DispositionInput) { in.Date = "2026-06-13" })},
		{"ErrDateFuture", "date", with(func(in *records.DispositionInput) { in.Date = "2026-07-07" })},
		{"ErrReleasePlace", "place", with(func(in *records.DispositionInput) { in.Place = " " })},
		{"ErrRenestedPlace", "place", with(func(in *records.DispositionInput) { in.Kind, in.Place = assess.DispRenested, "" })},
		{"ErrReleaseNoReportReason", "no_report_reason", with(func(in *records.DispositionInput) { in.NoReportReason = "" })},
		{"ErrTransferReceiver", "receiver", records.DispositionInput{Kind: assess.DispTransferred, Date: "2026-06-20", Place: "Vet"}},
		{"ErrTransferPlace", "place", records.DispositionInput{Kind: assess.DispTransferred, Date: "2026-06-20", Receiver: "Vet"}},
		{"ErrDiedCause", "reason", records.DispositionInput{Kind: assess.DispDied, Date: "2026-06-20"}},
		{"ErrEuthanisedReason", "reason", records.DispositionInput{Kind: assess.DispEuthanised, Date: "2026-06-20"}},
		{"ErrLat", "lat", with(func(in *records.DispositionInput) { in.Lat, in.Lon = fptr(91), fptr(0) })},
		{"ErrLon", "lon", with(func(in *records.DispositionInput) { in.Lat, in.Lon = fptr(0), fptr(-180.5) })},
		{"ErrLatWithoutLon", "lat", with(func(in *records.DispositionInput) { in.Lat = fptr(42) })},
		{"ErrPlaceTooLong", "place", with(func(in *records.DispositionInput) { in.Place = strings.Repeat("x", 2001) })},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ctx := context.Background()
			s, _, rehab, _, p := admitted(t)
			_, err := s.Dispose(ctx, rehab.ID, p.ID, tc.in)
			var ve assess.ValidationErrors
			if !errors.As(err, &ve) || ve.Field(tc.field) == "" {
				t.Fatalf("Dispose(%+v) = %v, want a validation error on %q", tc.in, err, tc.field)
			}
			got, _ := s.Patient(ctx, p.ID)
			if !got.InCare() {
				t.Errorf("status %q after a refused disposition, want in-care", got.Status)
			}
			if audit, _ := s.Audit(ctx, records.AuditFilter{Entity: "disposition"}); len(audit) != 0 {
				t.Errorf("%d audit rows after a refused disposition", len(audit))
			}
		})
	}
}

func TestStore_Dispose_Refusals(t *testing.T) {
	ctx := context.Background()
	s, _, rehab, staff, p := admitted(t)
	rel := records.DispositionInput{Kind: assess.DispReleased, Date: "2026-07-01", Place: "Harbour", NoReportReason: "none yet"}
	if _, err := s.Dispose(ctx, staff.ID, p.ID, rel); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("staff releasing: %v, want ErrForbidden", err)
	}
	ren := rel
	ren.Kind = assess.DispRenested
	if _, err := s.Dispose(ctx, staff.ID, p.ID, ren); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("staff renesting: %v, want ErrForbidden", err)
	}
	if _, err := s.Dispose(ctx, staff.ID, p.ID, records.DispositionInput{Kind: assess.DispDied, Date: "2026-06-20", Reason: "x"}); err != nil {
		t.Fatalf("staff recording a death: %v", err)
	}
	if _, err := s.Dispose(ctx, rehab.ID, p.ID, rel); !errors.Is(err, records.ErrConflict) {
		t.Errorf("second disposition: %v, want ErrConflict", err)
	}
	if _, err := s.Dispose(ctx, rehab.ID, 9999, rel); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("missing patient: %v, want ErrNotFound", err)
	}
	if _, err := s.Disposition(ctx, 9999); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("Disposition of a missing patient: %v, want ErrNotFound", err)
	}
}

func TestStore_CorrectDisposition(t *testing.T) {
	ctx := context.Background()
	s, _, rehab, staff, p := admitted(t)
	first, err := s.Dispose(ctx, staff.ID, p.ID, records.DispositionInput{Kind: assess.DispTransferred, Date: "2026-06-20",
		Place: "Swan unit", Receiver: "Swan Unit"})
	if err != nil {
		t.Fatal(err)
	}
	fix := records.DispositionInput{Kind: assess.DispReleased, Date: "2026-06-21", Place: "Harbour", Lat: fptr(42.44),
		Lon: fptr(-76.5), NoReportReason: "released on the vet's word", Note: "it was released, not transferred"}
	if _, err := s.CorrectDisposition(ctx, staff.ID, p.ID, 1, fix); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("staff correcting into a release: %v, want ErrForbidden", err)
	}
	noNote := fix
	noNote.Note = ""
	var ve assess.ValidationErrors
	if _, err := s.CorrectDisposition(ctx, rehab.ID, p.ID, 1, noNote); !errors.As(err, &ve) || ve.Field("note") == "" {
		t.Errorf("correction without a note: %v, want a note error", err)
	}
	back := fix
	back.Kind = assess.DispInCare
	if _, err := s.CorrectDisposition(ctx, rehab.ID, p.ID, 1, back); !errors.As(err, &ve) || ve.Field("kind") == "" {
		t.Errorf("correction back to in-care: %v, want a kind error", err)
	}
	second, err := s.CorrectDisposition(ctx, rehab.ID, p.ID, 1, fix)
	if err != nil {
		t.Fatal(err)
	}
	if second.Key != first.Key || second.Version != 2 || second.Note != fix.Note {
		t.Errorf("correction: key %d version %d note %q, want key %d version 2", second.Key, second.Version, second.Note, first.Key)
	}
	if _, err := s.CorrectDisposition(ctx, rehab.ID, p.ID, 1, fix); !errors.Is(err, records.ErrConflict) {
		t.Errorf("stale version: %v, want ErrConflict", err)
	}
	vs, err := s.DispositionVersions(ctx, p.ID)
	if err != nil || len(vs) != 2 || !vs[0].Superseded || vs[1].Superseded || vs[0].Kind != assess.DispTransferred {
		t.Fatalf("versions = %+v, %v; want the transfer superseded, then the release", vs, err)
	}
	got, _ := s.Patient(ctx, p.ID)
	if got.Status != assess.DispReleased || got.StatusDate != "2026-06-21" {
		t.Errorf("patient status %q %q after correction, want released 2026-06-21", got.Status, got.StatusDate)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{Entity: "disposition", EntityID: first.Key})
	if len(audit) != 2 || audit[0].Action != records.ActionCorrect || !strings.Contains(audit[0].Before, "transferred") ||
		!strings.Contains(audit[0].After, "released") {
		t.Errorf("audit = %+v, want create then correct with before and after", audit)
	}
	if _, err := s.CorrectDisposition(ctx, rehab.ID, 9999, 1, fix); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("correcting a missing patient: %v, want ErrNotFound", err)
	}
}

func TestStore_Caseload(t *testing.T) {
	ctx := context.Background()
	clock := recordstest.NewClock(time.Date(2025, 11, 1, 10, 0, 0, 0, time.UTC))
	s := recordstest.Open(t, clock)
	admit := func(sp string) records.Patient {
		in := recordstest.Intake(sp, "", 1000)
		in.FoundDate = clock.Now().Format(records.DateLayout)
		p, err := s.AdmitPatient(ctx, 0, in)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	dispose := func(p records.Patient, kind assess.Disposition, date string) {
		if _, err := s.Dispose(ctx, 0, p.ID, records.DispositionInput{Kind: kind, Date: date, Reason: "x", Place: "y",
			Receiver: "z", NoReportReason: "n"}); err != nil {
			t.Fatal(err)
		}
	}
	gone := admit("Buteo jamaicensis")     // 2025: died in 2025, not held over
	held := admit("Buteo jamaicensis")     // 2025: released in 2026, held over
	stillIn := admit("Anas platyrhynchos") // 2025: still in care, held over
	clock.Advance(100 * 24 * time.Hour)    // 2026-02-09
	fresh := admit("Anas platyrhynchos")   // 2026
	dispose(gone, assess.DispDied, "2025-12-31")
	dispose(held, assess.DispReleased, "2026-01-01")
	_ = stillIn
	_ = fresh
	got, err := s.Caseload(ctx, 2026)
	if err != nil {
		t.Fatal(err)
	}
	var summary []string
	for _, c := range got {
		summary = append(summary, c.Patient.CaseNumber+" "+string(c.StatusAtYearEnd(2026))+" "+map[bool]string{true: "held", false: "new"}[c.HeldOver])
	}
	want := []string{"2025-0002 released held", "2025-0003 in-care held", "2026-0001 in-care new"}
	if strings.Join(summary, "|") != strings.Join(want, "|") {
		t.Errorf("Caseload(2026) = %q, want %q", summary, want)
	}
	got25, _ := s.Caseload(ctx, 2025)
	if len(got25) != 3 || got25[0].StatusAtYearEnd(2025) != assess.DispDied || got25[1].StatusAtYearEnd(2025) != assess.DispInCare {
		t.Errorf("Caseload(2025): the 2026 release must be pending at the end of 2025: %+v", got25)
	}
	counts, err := s.DispositionCounts(ctx, 2026)
	if err != nil {
		t.Fatal(err)
	}
	wantCounts := []records.DispositionCount{
		{"Anas platyrhynchos", "", assess.DispInCare, 1, 1},
		{"Buteo jamaicensis", "", assess.DispReleased, 0, 1},
	}
	if len(counts) != len(wantCounts) {
		t.Fatalf("DispositionCounts(2026) = %+v, want %+v", counts, wantCounts)
	}
	for i := range counts {
		if counts[i] != wantCounts[i] {
			t.Errorf("DispositionCounts(2026)[%d] = %+v, want %+v", i, counts[i], wantCounts[i])
		}
	}
}

func TestStore_LogExport(t *testing.T) {
	ctx := context.Background()
	s, _, rehab, _, p := admitted(t)
	if err := s.LogExport(ctx, rehab.ID, p.ID, records.ExportRecord{Kind: "patient-csv", CaseNumber: p.CaseNumber,
		IncludeFinders: true}); err != nil {
		t.Fatal(err)
	}
	audit, err := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: "export"})
	if err != nil || len(audit) != 1 || audit[0].Action != records.ActionExport || audit[0].UserID != rehab.ID ||
		!strings.Contains(audit[0].After, `"include_finders":true`) {
		t.Errorf("audit = %+v, %v; want one export row by the rehabilitator, with finders", audit, err)
	}
}

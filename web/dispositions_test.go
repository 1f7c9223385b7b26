package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// dispPatient admits a Mute Swan on the test clock's day (2026-06-15).
func dispPatient(t *testing.T, a *testApp) records.Patient {
	t.Helper()
	p, err := a.store.AdmitPatient(context.Background(), 0, recordstest.Intake("Cygnus olor", "Mute Swan", 9800))
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func dispFieldErr(doc *goquery.Document, id string) string {
	return doc.Find("#"+id).NextFilteredUntil(".field-error", "label").First().Text()
}

func releaseForm() url.Values {
	return url.Values{"kind": {"released"}, "date": {"2026-06-15"}, "place": {"Harbour, north breakwater"},
		"lat": {"42.453"}, "lon": {"-76.5125"}, "no_report_reason": {"judged in person on the lake"}}
}

func TestDisposition_StaffRecordsDeath(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := dispPatient(t, a)
	resp, doc := a.get("/patients/" + p.CaseNumber)
	wantStatus(t, resp, http.StatusOK)
	sec := doc.Find("[data-testid=section-disposition]")
	if sec.Find("[data-testid=disposition-form]").Length() != 1 {
		t.Fatal("the patient page has no disposition form")
	}
	if sec.Find("option[value=released], option[value=renested]").Length() != 0 {
		t.Error("a staff member is offered release kinds")
	}
	if sec.Find("[data-testid=release-restricted]").Length() != 1 || sec.Find("[data-testid=disposition-caution]").Length() == 0 {
		t.Error("the form does not say who records releases, or shows no caution")
	}
	if sec.Find("[data-testid=patient-exports]").Length() != 0 {
		t.Error("a staff member is offered the patient's export")
	}
	resp, doc = a.post("/patients/"+p.CaseNumber+"/disposition", url.Values{"kind": {"died"}, "date": {"2026-06-15"},
		"place": {"ICU"}})
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if msg := dispFieldErr(doc, "disp-reason"); !strings.Contains(msg, "cause of death") {
		t.Errorf("reason error %q, want one asking for the cause", msg)
	}
	if got, _ := doc.Find("#disp-place").Attr("value"); got != "ICU" {
		t.Errorf("place re-rendered as %q, want what was typed", got)
	}
	resp, _ = a.post("/patients/"+p.CaseNumber+"/disposition", url.Values{"kind": {"died"}, "date": {"2026-06-15"},
		"place": {"ICU"}, "reason": {"=cmd|' /C calc'!A0"}})
	wantStatus(t, resp, http.StatusSeeOther)
	if loc := resp.Header.Get("Location"); loc != "/patients/"+p.CaseNumber+"#disposition" {
		t.Errorf("redirect to %q", loc)
	}
	_, doc = a.get("/patients/" + p.CaseNumber)
	if got := doc.Find("[data-testid=disposition-kind]").Text(); got != "Died in care" {
		t.Errorf("disposition shown %q, want Died in care", got)
	}
	if got := doc.Find("[data-testid=patient-status]").Text(); !strings.Contains(got, "died") {
		t.Errorf("status badge %q, want died", got)
	}
	_, doc = a.get("/patients?status=in-care")
	if doc.Find("[data-testid=patient-link]").Length() != 0 {
		t.Error("the patient is still on the in-care list")
	}
}

func TestDisposition_Errors(t *testing.T) {
	cases := []struct {
		name, field, value, id, want string
	}{
		{"ErrKindEmpty", "kind", "", "disp-kind", "choose what became"},
		{"ErrDate", "date", "15/06/2026", "disp-date", "YYYY-MM-DD"},
		{"ErrDateFuture", "date", "2026-06-17", "disp-date", "future"},
		{"ErrDateBeforeAdmission", "date", "2026-06-01", "disp-date", "before the bird was admitted"},
		{"ErrPlace", "place", "", "disp-place", "say where"},
		{"ErrLatText", "lat", "north", "disp-lat", "enter a number"},
		{"ErrLonRange", "lon", "-276.5", "disp-lon", "longitude"},
		{"ErrNoReportReason", "no_report_reason", "", "disp-no-report", "say why"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			a.login("rita", records.RoleRehabilitator)
			p := dispPatient(t, a)
			a.get("/patients/" + p.CaseNumber)
			f := releaseForm()
			f.Set(tc.field, tc.value)
			resp, doc := a.post("/patients/"+p.CaseNumber+"/disposition", f)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			if msg := dispFieldErr(doc, tc.id); !strings.Contains(msg, tc.want) {
				t.Errorf("%s = %q: error %q, want %q", tc.field, tc.value, msg, tc.want)
			}
			got, _ := a.store.Patient(context.Background(), p.ID)
			if !got.InCare() {
				t.Errorf("status %q after a refused form", got.Status)
			}
		})
	}
}

func TestDisposition_ReleaseNeedsRehabilitator(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := dispPatient(t, a)
	a.get("/patients/" + p.CaseNumber)
	for _, kind := range []string{"released", "renested"} {
		f := releaseForm()
		f.Set("kind", kind)
		resp, doc := a.post("/patients/"+p.CaseNumber+"/disposition", f)
		wantStatus(t, resp, http.StatusUnprocessableEntity)
		if msg := dispFieldErr(doc, "disp-kind"); !strings.Contains(msg, "licensed rehabilitator") {
			t.Errorf("%s by staff: kind error %q", kind, msg)
		}
	}
	if got, _ := a.store.Patient(context.Background(), p.ID); !got.InCare() {
		t.Errorf("staff released the bird: status %q", got.Status)
	}
}

func TestDisposition_ReleaseAndCorrect(t *testing.T) {
	a := newTestApp(t)
	a.login("rita", records.RoleRehabilitator, records.RoleStaff)
	p := dispPatient(t, a)
	path := "/patients/" + p.CaseNumber + "/disposition"
	a.get("/patients/" + p.CaseNumber)
	resp, _ := a.post(path, releaseForm())
	wantStatus(t, resp, http.StatusSeeOther)
	d, err := a.store.Disposition(context.Background(), p.ID)
	if err != nil || d.Kind != assess.DispReleased || d.Lon == nil || *d.Lon != -76.5125 || d.PerformedBy != "Test rita" {
		t.Fatalf("stored %+v, %v; want a release at lon -76.5125 by Test rita", d, err)
	}
	resp, _ = a.post(path, releaseForm())
	wantStatus(t, resp, http.StatusConflict)
	resp, doc := a.get("/patients/" + p.CaseNumber)
	wantStatus(t, resp, http.StatusOK)
	if doc.Find("[data-testid=disposition-correct] [data-testid=disposition-form]").Length() != 1 {
		t.Fatal("no correction form on a disposed patient's page")
	}
	if doc.Find("[data-testid=patient-exports] a[download]").Length() != 2 {
		t.Error("the rehabilitator is not offered the patient's CSV and case file")
	}
	fix := releaseForm()
	fix.Set("version", "1")
	fix.Set("place", "Harbour, south slipway")
	resp, doc = a.post(path+"/correct", fix)
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if msg := dispFieldErr(doc, "disp-note"); msg == "" {
		t.Error("a correction without a note was not refused")
	}
	fix.Set("note", "wrong slipway")
	resp, _ = a.post(path+"/correct", fix)
	wantStatus(t, resp, http.StatusSeeOther)
	resp, doc = a.post(path+"/correct", fix) // version 1 is stale now
	wantStatus(t, resp, http.StatusConflict)
	if doc.Find("[data-testid=disposition-problem]").Length() != 1 {
		t.Error("a stale correction shows no message")
	}
	if got, _ := doc.Find("input[name=version]").Attr("value"); got != "2" {
		t.Errorf("the form after a conflict corrects version %q, want 2", got)
	}
	_, doc = a.get("/patients/" + p.CaseNumber)
	if n := doc.Find("[data-testid=disposition-versions] li").Length(); n != 2 {
		t.Errorf("%d versions listed, want 2", n)
	}
	if !strings.Contains(doc.Find("[data-testid=disposition-current]").Text(), "south slipway") {
		t.Error("the current disposition does not show the corrected place")
	}
}

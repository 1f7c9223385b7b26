package web

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"io"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// reportPatient admits a Red-tailed Hawk with a weigh-in, a wing
// measurement and a flight session, so the report has a flight model and
// charts.
func reportPatient(t *testing.T, a *testApp) records.Patient {
	t.Helper()
	ctx := context.Background()
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.FinderName, in.FinderContact = "Finder Not For Print", "555-0199"
	p, err := a.store.AdmitPatient(ctx, 0, in)
	if err != nil {
		t.Fatal(err)
	}
	at := recordstest.Epoch.Add(-24 * time.Hour)
	span, area := 1190.0, 2300.0
	steps := []error{
		func() error {
			_, err := a.store.AddWeighIn(ctx, 0, p.ID, assess.WeighIn{At: at, MassG: 1120, Fed: assess.FedBefore}, records.AddOpts{})
			return err
		}(),
		func() error {
			_, err := a.store.AddWing(ctx, 0, p.ID, assess.WingMeasurement{At: at, SpanMM: &span, AreaCM2: &area,
				AreaMethod: assess.AreaTraced}, records.AddOpts{})
			return err
		}(),
		func() error {
			rec := 70
			_, err := a.store.AddSession(ctx, 0, p.ID, assess.FlightSession{At: at, Exercise: assess.ExerciseCage, Passes: 8,
				LongestRun: 6, Highest: assess.HeightHighPerch, Landings: 8, LandingsControlled: 7, RecoveryS: &rec, Droop: assess.DroopNone}, records.AddOpts{})
			return err
		}(),
	}
	for _, err := range steps {
		if err != nil {
			t.Fatal(err)
		}
	}
	return p
}

// getRaw fetches path and returns the response and its body.
func (a *testApp) getRaw(path string) (*http.Response, []byte) {
	a.t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		a.t.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		a.t.Fatal(err)
	}
	return resp, b
}

// pdfText returns the text of a PDF read back with pdftotext, or "" when
// poppler is not installed (outside CI).
func pdfText(t *testing.T, pdf []byte) string {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("pdftotext is required under CI")
		}
		return ""
	}
	path := filepath.Join(t.TempDir(), "f.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(bin, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return strings.Join(strings.Fields(string(out)), " ")
}

func sha(b []byte) string {
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:])
}

// TestReports_GenerateSignAndFreeze walks the job: staff generate a
// version; staff cannot sign it; the vet's wrong password is refused; the
// vet and the rehabilitator sign it on its hash; the patient's records
// change and the signed version stays byte-identical.
func TestReports_GenerateSignAndFreeze(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := reportPatient(t, a)
	base := "/patients/" + p.CaseNumber

	resp, doc := a.get(base)
	wantStatus(t, resp, http.StatusOK)
	sec := doc.Find("[data-testid=section-reports]")
	if sec.Find("[data-testid=report-generate-form]").Length() != 1 || sec.Find("[data-testid=report-none]").Length() != 1 {
		t.Fatal("the patient page has no report section with a generate form")
	}
	resp, _ = a.post(base+"/reports", url.Values{"page_size": {"A4"}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = a.get(base)
	v1 := doc.Find("[data-testid=report-version-1]")
	if v1.Length() != 1 {
		t.Fatal("version 1 is not listed after generating")
	}
	if v1.Find("form").Length() != 0 {
		t.Error("a staff member is offered a sign-off form")
	}
	hash, _ := v1.Attr("data-sha256")

	resp, pdf := a.getRaw(base + "/reports/1/report.pdf")
	wantStatus(t, resp, http.StatusOK)
	if ct := resp.Header.Get("Content-Type"); ct != "application/pdf" {
		t.Errorf("Content-Type %q, want application/pdf", ct)
	}
	if got := sha(pdf); got != hash {
		t.Fatalf("downloaded PDF has SHA-256 %s, the page lists %s", got, hash)
	}
	if text := pdfText(t, pdf); text != "" {
		for _, want := range []string{"Advisory", p.CaseNumber, "Version 1, frozen for review", "Test kim"} {
			if !strings.Contains(text, want) {
				t.Errorf("the frozen report lacks %q", want)
			}
		}
		if strings.Contains(text, "Finder Not For Print") || strings.Contains(text, "555-0199") {
			t.Error("the report prints the finder")
		}
	}

	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"staff"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusForbidden)
	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusForbidden)

	a.login("vera", records.RoleVet, records.RoleStaff)
	_, doc = a.get(base)
	form := doc.Find("[data-testid=signoff-form-1]")
	if form.Length() != 1 {
		t.Fatal("the vet is not offered a sign-off form")
	}
	if opts := form.Find("select[name=role] option"); opts.Length() != 1 || opts.AttrOr("value", "") != "vet" {
		t.Errorf("the vet's role choices are %d, want only vet", opts.Length())
	}
	resp, doc = a.post(base+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {"not my password"}, "comment": {"ok"}})
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if !strings.Contains(doc.Find(".field-error").Text(), "not your password") {
		t.Errorf("wrong password: field errors %q", doc.Find(".field-error").Text())
	}
	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"rehabilitator"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusForbidden)
	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {recordstest.Password},
		"comment": {"Wing healed; flies level."}})
	wantStatus(t, resp, http.StatusSeeOther)
	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusConflict)

	a.login("rhea", records.RoleRehabilitator)
	resp, _ = a.post(base+"/reports/1/signoffs", url.Values{"role": {"rehabilitator"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = a.get(base)
	v1 = doc.Find("[data-testid=report-version-1]")
	if v1.Find("[data-testid=report-signed]").Length() != 1 || v1.Find("[data-testid=signoff-vet]").Length() != 1 ||
		!strings.Contains(v1.Find("[data-testid=signoff-vet]").Text(), "Wing healed") {
		t.Errorf("version 1 does not show both sign-offs: %q", v1.Text())
	}

	resp, sheet := a.getRaw(base + "/reports/1/signoff-sheet.pdf")
	wantStatus(t, resp, http.StatusOK)
	if text := pdfText(t, sheet); text != "" {
		for _, want := range []string{hash, "Test vera", "Test rhea", "matches the report", "Advisory"} {
			if !strings.Contains(text, want) {
				t.Errorf("the sign-off sheet lacks %q", want)
			}
		}
	}

	// The records change; version 1 stays byte-identical, version 2 differs.
	a.clock.Advance(2 * time.Hour)
	if _, err := a.store.AddWeighIn(context.Background(), 0, p.ID, assess.WeighIn{At: a.clock.Now(), MassG: 1180,
		Fed: assess.FedBefore}, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	resp, _ = a.post(base+"/reports", url.Values{"page_size": {"Letter"}, "elevation_m": {"600"}, "site_name": {"Ridge meadow"}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, again := a.getRaw(base + "/reports/1/report.pdf")
	if sha(again) != hash {
		t.Error("the signed version changed after the patient's records changed")
	}
	_, v2 := a.getRaw(base + "/reports/2/report.pdf")
	if sha(v2) == hash {
		t.Error("version 2 has version 1's bytes")
	}
	stored, err := a.store.ReportVersion(context.Background(), p.ID, 2)
	if err != nil || stored.PageSize != records.PageLetter || stored.Site.ElevationM != 600 || stored.Site.Label != "Ridge meadow" {
		t.Errorf("version 2 stored as %+v, %v", stored, err)
	}
	_, doc = a.get(base)
	if doc.Find("[data-testid=report-version-2] [data-testid=report-awaiting]").Length() != 1 {
		t.Error("version 2 is not shown awaiting sign-off")
	}
}

func TestReports_Forms(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := reportPatient(t, a)
	base := "/patients/" + p.CaseNumber
	cases := []struct {
		name  string
		form  url.Values
		field string
	}{
		{"ErrElevationNotNumber", url.Values{"elevation_m": {"high"}}, "elevation_m"},
		{"ErrElevationOutOfRange", url.Values{"elevation_m": {"9000"}}, "elevation_m"},
		{"ErrTempOutOfRange", url.Values{"elevation_m": {"100"}, "temp_c": {"70"}}, "temp_c"},
		{"ErrNameWithoutElevation", url.Values{"site_name": {"Ridge"}}, "elevation_m"},
		{"ErrPageSize", url.Values{"page_size": {"A3"}}, "page_size"},
		{"ErrUnknownSite", url.Values{"site_id": {"999"}}, "site_id"},
		{"ErrSiteAndElevation", url.Values{"site_id": {"1"}, "elevation_m": {"50"}}, "site_id"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, doc := a.post(base+"/reports", tc.form)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			id := map[string]string{"elevation_m": "report_elevation", "temp_c": "report_temp", "page_size": "report_page",
				"site_id": "report_site"}[tc.field]
			if msg := doc.Find("#"+id).NextFilteredUntil(".field-error", "label").First().Text(); msg == "" {
				t.Errorf("no message beside %s", tc.field)
			}
		})
	}
	if vs, _ := a.store.ReportVersions(context.Background(), p.ID); len(vs) != 0 {
		t.Errorf("%d versions stored from refused forms", len(vs))
	}
	site, err := a.store.AddReleaseSite(context.Background(), 0, records.ReleaseSiteInput{Name: "Saltmarsh Point", ElevationM: 4})
	if err != nil {
		t.Fatal(err)
	}
	_, doc := a.get(base)
	if doc.Find("#report_site option").Length() != 2 {
		t.Errorf("the site list offers %d choices, want the centre and Saltmarsh Point", doc.Find("#report_site option").Length())
	}
	resp, _ := a.post(base+"/reports", url.Values{"site_id": {strconv.FormatInt(site.ID, 10)}, "temp_c": {"9"}})
	wantStatus(t, resp, http.StatusSeeOther)
	v, err := a.store.ReportVersion(context.Background(), p.ID, 1)
	if err != nil || v.Site.Label != "Saltmarsh Point" || v.Site.ElevationM != 4 || v.Site.TempC == nil || *v.Site.TempC != 9 {
		t.Errorf("version 1 stored with site %+v, %v; want Saltmarsh Point, 4 m, 9 °C", v.Site, err)
	}
	resp, pdf := a.getRaw(base + "/reports/preview.pdf")
	wantStatus(t, resp, http.StatusOK)
	if text := pdfText(t, pdf); text != "" && !strings.Contains(text, "Working copy") {
		t.Error("the preview does not say it is a working copy")
	}
	resp, _ = a.getRaw(base + "/reports/9/report.pdf")
	wantStatus(t, resp, http.StatusNotFound)
	resp, _ = a.getRaw(base + "/reports/x/signoff-sheet.pdf")
	wantStatus(t, resp, http.StatusNotFound)
}

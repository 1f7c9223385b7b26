package web

import (
	"bytes"
	"context"
	"encoding/csv"
	"io"
	"net/http"
	"strings"
	"testing"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// exportGet fetches path and returns the response with its body.
func exportGet(t *testing.T, a *testApp, path string) (*http.Response, []byte) {
	t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp, b
}

// exportData admits three patients on 2026-06-15 and disposes two.
func exportData(t *testing.T, a *testApp) {
	t.Helper()
	ctx := context.Background()
	for i, sp := range []string{"Cygnus olor", "Cygnus olor", "Anas platyrhynchos"} {
		in := recordstest.Intake(sp, "", 1000)
		in.FinderName, in.FoundPlace, in.FoundLon, in.FoundLat = "Invented Finder", "@quay", new(-76.5), new(42.4)
		p, err := a.store.AdmitPatient(ctx, 0, in)
		if err != nil {
			t.Fatal(err)
		}
		if i == 2 {
			continue
		}
		_, err = a.store.Dispose(ctx, 0, p.ID, records.DispositionInput{Kind: []assess.Disposition{assess.DispReleased,
			assess.DispDied}[i], Date: "2026-06-15", Place: "harbour", Reason: "unknown", NoReportReason: "test"})
		if err != nil {
			t.Fatal(err)
		}
	}
}

func TestExports_RoleGuard(t *testing.T) {
	cases := []struct {
		name  string
		roles []records.Role
		want  int
	}{
		{"ErrStaff", []records.Role{records.RoleStaff}, http.StatusForbidden},
		{"ErrVet", []records.Role{records.RoleVet, records.RoleStaff}, http.StatusForbidden},
		{"Rehabilitator", []records.Role{records.RoleRehabilitator}, http.StatusOK},
		{"Admin", []records.Role{records.RoleAdmin}, http.StatusOK},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			a.login("tester", tc.roles...)
			exportData(t, a)
			for _, path := range []string{"/exports", "/exports/cases.csv?year=2026", "/exports/summary.csv?year=2026",
				"/exports/patients/2026-0001/record.csv"} {
				resp, _ := exportGet(t, a, path)
				if resp.StatusCode != tc.want {
					t.Errorf("%s: status %d, want %d", path, resp.StatusCode, tc.want)
				}
			}
		})
	}
	a := newTestApp(t)
	if resp, _ := exportGet(t, a, "/exports"); resp.StatusCode != http.StatusSeeOther {
		t.Errorf("anonymous /exports: status %d, want a redirect to log in", resp.StatusCode)
	}
}

func TestExports_PageAndDownloads(t *testing.T) {
	a := newTestApp(t)
	a.login("rita", records.RoleRehabilitator)
	exportData(t, a)
	resp, doc := a.get("/exports")
	wantStatus(t, resp, http.StatusOK)
	if doc.Find("[data-testid=reconciled]").Length() != 1 {
		t.Errorf("the page does not say the listing and summary agree: %q", doc.Find("[data-testid=export-problem]").Text())
	}
	if n := doc.Find("[data-testid=listing-row]").Length(); n != 3 {
		t.Errorf("%d listing rows, want 3", n)
	}
	if got := doc.Find("[data-testid=summary-total] [data-testid=received]").Text(); got != "3" {
		t.Errorf("received in total %q, want 3", got)
	}
	resp, _ = a.get("/exports?year=20x6")
	wantStatus(t, resp, http.StatusUnprocessableEntity)

	resp, body := exportGet(t, a, "/exports/cases.csv?year=2026")
	wantStatus(t, resp, http.StatusOK)
	if ct := resp.Header.Get("Content-Type"); !strings.HasPrefix(ct, "text/csv") {
		t.Errorf("Content-Type %q, want text/csv", ct)
	}
	if cd := resp.Header.Get("Content-Disposition"); cd != `attachment; filename="aloft-cases-2026.csv"` {
		t.Errorf("Content-Disposition %q", cd)
	}
	if bytes.HasPrefix(body, []byte("\uFEFF")) || bytes.Contains(body, []byte("Invented Finder")) {
		t.Error("the default listing has a BOM or the finder's name")
	}
	recs, err := csv.NewReader(bytes.NewReader(body)).ReadAll()
	if err != nil || len(recs) != 4 {
		t.Fatalf("listing CSV: %d records, %v", len(recs), err)
	}
	if recs[1][5] != "'@quay" || recs[1][7] != "-76.5" {
		t.Errorf("found place %q and longitude %q, want '@quay and -76.5", recs[1][5], recs[1][7])
	}
	_, body = exportGet(t, a, "/exports/cases.csv?year=2026&finders=1&bom=1")
	if !bytes.HasPrefix(body, []byte("\uFEFF")) || !bytes.Contains(body, []byte("Invented Finder")) {
		t.Error("asked for finders and a BOM, got neither")
	}
	audit, _ := a.store.Audit(context.Background(), records.AuditFilter{Entity: "export"})
	if len(audit) != 2 || !strings.Contains(audit[0].After, `"include_finders":true`) || audit[0].Username != "rita" {
		t.Errorf("export audit rows %+v, want two, the last by rita with finders", audit)
	}
	resp, body = exportGet(t, a, "/exports/summary.csv?year=2026")
	wantStatus(t, resp, http.StatusOK)
	if !strings.Contains(string(body), "Cygnus olor,,2,0,0,1,0,0,1,0,0,0,2,") {
		t.Errorf("summary CSV lacks the swans' row (2 received: 1 released, 1 died):\n%s", body)
	}
	resp, body = exportGet(t, a, "/exports/patients/2026-0001/record.csv")
	wantStatus(t, resp, http.StatusOK)
	if !strings.Contains(string(body), "disposition") || strings.Contains(string(body), "Invented Finder") {
		t.Errorf("patient CSV:\n%s", body)
	}
	resp, body = exportGet(t, a, "/exports/patients/2026-0001/casefile.json")
	wantStatus(t, resp, http.StatusOK)
	if cd := resp.Header.Get("Content-Disposition"); cd != `attachment; filename="aloft-2026-0001.json"` {
		t.Errorf("case file Content-Disposition %q", cd)
	}
	cf, err := assess.ReadCaseFile(bytes.NewReader(body))
	if err != nil || cf.Patient.CaseNumber != "2026-0001" || cf.Patient.Status != assess.DispReleased || cf.Patient.FinderName != "" {
		t.Errorf("case file read back: %+v, %v; want 2026-0001 released, no finder", cf.Patient, err)
	}
	_, body = exportGet(t, a, "/exports/patients/2026-0001/casefile.json?finders=1")
	if !bytes.Contains(body, []byte("Invented Finder")) {
		t.Error("asked for finders, the case file has none")
	}
	resp, _ = exportGet(t, a, "/exports/patients/1999-0001/record.csv")
	wantStatus(t, resp, http.StatusNotFound)
}

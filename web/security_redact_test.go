package web

import (
	"bytes"
	"context"
	"fmt"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"aloft/records"
)

// TestRedactFinder_NowhereAfterwards extends the redaction tests of
// records and the patient page: once an admin has erased a finder's
// personal data (the right to erasure, GDPR Art. 17), it is in no export
// (the permit listing, the patient's CSV and case file, even when finders
// are asked for), in no API answer, in no report, and in no column of any
// table of the database; and the report frozen before the erasure never
// printed it in the first place.
func TestRedactFinder_NowhereAfterwards(t *testing.T) {
	const name, contact = "Quillon Marraway", "qm-finder@example.org"
	a := newTestApp(t)
	a.login("boss", records.RoleAdmin, records.RoleStaff, records.RoleRehabilitator, records.RoleVet)
	form := intakeForm()
	form.Set("finder_name", name)
	form.Set("finder_contact", contact)
	resp, _ := a.post("/intake", form)
	wantStatus(t, resp, http.StatusSeeOther)
	base := resp.Header.Get("Location")
	caseNo := strings.TrimPrefix(base, "/patients/")
	p, err := a.store.PatientByCase(context.Background(), caseNo)
	if err != nil {
		t.Fatal(err)
	}

	downloads := []string{"/exports/cases.csv?finders=1&year=" + p.AdmittedAt.Format("2006"),
		"/exports/patients/" + caseNo + "/record.csv?finders=1", "/exports/patients/" + caseNo + "/casefile.json?finders=1"}
	// Before the erasure the exports that ask for finders carry them: the
	// checks below would see a leak.
	for _, d := range downloads {
		if _, body := a.getBody(d); !bytes.Contains(body, []byte(name)) {
			t.Errorf("GET %s before the erasure: the finder is missing, so this test could not see a leak", d)
		}
	}
	frozen := false
	if resp, _ := a.post(base+"/reports", url.Values{"page_size": {"A4"}}); resp.StatusCode == http.StatusSeeOther {
		frozen = true
	} else {
		t.Logf("POST %s/reports: %d: the report is not checked", base, resp.StatusCode)
	}

	resp, _ = a.post(base+"/redact-finder", url.Values{"confirm": {"1"}})
	wantStatus(t, resp, http.StatusSeeOther)

	gets := append([]string{base, "/patients", base + "/assessment", "/api/v1/patients/" + caseNo + "/assessment",
		"/api/v1/patients/" + caseNo + "/flight-sessions", base + "/reports/preview.pdf"}, downloads...)
	if frozen {
		gets = append(gets, base+"/reports/1/report.pdf")
	}
	for _, g := range gets {
		resp, body := a.getBody(g)
		if resp.StatusCode != http.StatusOK {
			t.Errorf("GET %s: status %d", g, resp.StatusCode)
			continue
		}
		text := string(body)
		if bytes.HasPrefix(body, []byte("%PDF-")) {
			var ok bool
			if text, ok = plPDFText(t, body); !ok {
				continue
			}
		}
		for _, secret := range []string{name, contact, "Quillon", "Marraway"} {
			if strings.Contains(text, secret) {
				t.Errorf("GET %s after the erasure still shows %q", g, secret)
			}
		}
	}

	// No column of any table holds it (report PDFs are checked as text
	// above: their streams may be compressed).
	rows, err := a.store.DB().Query(`SELECT name FROM sqlite_master WHERE type = 'table'`)
	if err != nil {
		t.Fatal(err)
	}
	var tables []string
	for rows.Next() {
		var n string
		rows.Scan(&n)
		tables = append(tables, n)
	}
	rows.Close()
	for _, table := range tables {
		cols, err := a.store.DB().Query(fmt.Sprintf(`SELECT name FROM pragma_table_info('%s')`, table))
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for cols.Next() {
			var n string
			cols.Scan(&n)
			names = append(names, n)
		}
		cols.Close()
		for _, col := range names {
			var hits int
			q := fmt.Sprintf(`SELECT count(*) FROM "%s" WHERE instr(CAST("%s" AS TEXT), ?) > 0 OR instr(CAST("%s" AS TEXT), ?) > 0`, table, col, col)
			if err := a.store.DB().QueryRow(q, "Marraway", "qm-finder").Scan(&hits); err != nil {
				t.Fatalf("%s.%s: %v", table, col, err)
			}
			if hits > 0 {
				t.Errorf("%s.%s still holds the finder in %d rows after the erasure", table, col, hits)
			}
		}
	}
}

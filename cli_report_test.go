package main

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"aloft/records"
)

// pdfToText reads a PDF file back with poppler's pdftotext, whitespace
// collapsed; "" when poppler is not installed (outside CI).
func pdfToText(t *testing.T, path string) string {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("pdftotext is required under CI (poppler-utils)")
		}
		return ""
	}
	out, err := exec.Command(bin, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext %s: %v", path, err)
	}
	return strings.Join(strings.Fields(string(out)), " ")
}

func TestReport_Usage(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"ErrNoDB", []string{"--case", "2026-0001", "--out", "r.pdf"}, "--db FILE is required"},
		{"ErrNoCase", []string{"--db", "x.db", "--out", "r.pdf"}, "--case CASE is required"},
		{"ErrNoOut", []string{"--db", "x.db", "--case", "2026-0001"}, "--out FILE.pdf is required"},
		{"ErrSiteAndElevation", []string{"--db", "x.db", "--case", "c", "--out", "r.pdf", "--site", "Ridge", "--elevation-m", "10"}, "not both"},
		{"ErrPageSize", []string{"--db", "x.db", "--case", "c", "--out", "r.pdf", "--page-size", "A3"}, "A4 or Letter"},
		{"ErrArgument", []string{"--db", "x.db", "--case", "c", "--out", "r.pdf", "extra"}, "unexpected arguments"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errs := run(t, nil, append([]string{"report"}, tc.args...)...)
			if code != exitUsage || !strings.Contains(errs, tc.want) {
				t.Errorf("report %v: exit %d, stderr %q; want 2 and %q", tc.args, code, errs, tc.want)
			}
		})
	}
}

// TestReport_Demo writes the report of every demo patient, whatever its
// status, and reads each back: the advisory footer, the case number and the
// working-copy marking are there; a named site is refused until sites
// exist; an elevation and temperature given on the command line are used.
func TestReport_Demo(t *testing.T) {
	db := exportDemo(t)
	store, err := records.Open(context.Background(), db, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	list, err := store.Patients(context.Background(), records.PatientFilter{Limit: 1000})
	store.Close()
	if err != nil || len(list) == 0 {
		t.Fatalf("demo patients: %d, %v", len(list), err)
	}
	dir := t.TempDir()
	statuses := map[string]bool{}
	for _, p := range list {
		out := filepath.Join(dir, p.CaseNumber+".pdf")
		code, stdout, errs := run(t, nil, "report", "--db", db, "--case", p.CaseNumber, "--out", out)
		if code != exitOK || !strings.Contains(stdout, "wrote the pre-release report of "+p.CaseNumber) {
			t.Fatalf("report %s: exit %d, %q %q", p.CaseNumber, code, stdout, errs)
		}
		statuses[string(p.Status)] = true
		b, err := os.ReadFile(out)
		if err != nil || !bytes.HasPrefix(b, []byte("%PDF-")) {
			t.Fatalf("%s is not a PDF: %v", out, err)
		}
		text := pdfToText(t, out)
		if text == "" {
			continue
		}
		for _, want := range []string{"Advisory", p.CaseNumber, "Working copy", "Page 1 of"} {
			if !strings.Contains(text, want) {
				t.Errorf("report of %s lacks %q", p.CaseNumber, want)
			}
		}
	}
	if len(statuses) < 3 {
		t.Errorf("the demo's patients cover statuses %v; want in care, released and died", statuses)
	}
	caseNo := list[0].CaseNumber
	code, _, errs := run(t, nil, "report", "--db", db, "--case", caseNo, "--out", filepath.Join(dir, "x.pdf"), "--site", "North ridge")
	if code != exitFail || !strings.Contains(errs, `unknown site "North ridge"`) { // not one of the demo's sites
		t.Errorf("--site: exit %d, %q", code, errs)
	}
	code, _, errs = run(t, nil, "report", "--db", db, "--case", "1999-9999", "--out", filepath.Join(dir, "x.pdf"))
	if code != exitFail || !strings.Contains(errs, "no patient") {
		t.Errorf("unknown case: exit %d, %q", code, errs)
	}
	store, err = records.Open(context.Background(), db, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	_, err = store.AddReleaseSite(context.Background(), 0, records.ReleaseSiteInput{Name: "Report test ridge", ElevationM: 640})
	store.Close()
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "named.pdf")
	code, _, errs = run(t, nil, "report", "--db", db, "--case", caseNo, "--out", out, "--site", "report test ridge", "--temp-c", "12")
	if code != exitOK {
		t.Fatalf("--site: exit %d, %q", code, errs)
	}
	if text := pdfToText(t, out); text != "" && !strings.Contains(text, "Report test ridge: 640 m elevation, air 12 °C") {
		t.Errorf("the report does not use the named site")
	}
	out = filepath.Join(dir, "high.pdf")
	code, _, errs = run(t, nil, "report", "--db", db, "--case", caseNo, "--out", out, "--elevation-m", "1800", "--temp-c", "28",
		"--page-size", "Letter")
	if code != exitOK {
		t.Fatalf("--elevation-m: exit %d, %q", code, errs)
	}
	b, _ := os.ReadFile(out)
	if !bytes.Contains(b, []byte("/MediaBox [0 0 612.00 792.00]")) { // US Letter, 8.5 × 11 in
		t.Error("--page-size Letter: the PDF is not US Letter")
	}
	if text := pdfToText(t, out); text != "" && !strings.Contains(text, "1800 m elevation, air 28 °C") {
		t.Errorf("the report does not use the elevation and temperature given")
	}
}

package reports_test

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/reports"
)

// caseNow is the instant the case files are assessed at: the day after
// their last records, as in package assess's own tests.
var caseNow = time.Date(2025, 6, 20, 12, 0, 0, 0, time.UTC)

// fixedTime is written as the PDF's dates in byte-stable tests.
var fixedTime = time.Date(2025, 6, 20, 12, 30, 0, 0, time.UTC)

// testCautions stands for CAUTIONS.md: the real file, read from the top of
// the repository.
func testCautions(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "CAUTIONS.md"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// caseInput builds a report's input from one of package assess's case
// files (assess/testdata/cases), assessed at its own site at caseNow.
func caseInput(t *testing.T, name string) reports.ReportInput {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "assess", "testdata", "cases", name+".json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cf, err := assess.ReadCaseFile(f)
	if err != nil {
		t.Fatalf("read case %s: %v", name, err)
	}
	a, err := cf.Evaluate(assess.Thresholds{}, nil, caseNow)
	if err != nil {
		t.Fatalf("evaluate case %s: %v", name, err)
	}
	cp := cf.Patient
	p := records.Patient{ID: 1, CaseNumber: cp.CaseNumber, SpeciesScientific: cp.SpeciesScientific, SpeciesCommon: cp.SpeciesCommon,
		AgeClass: cp.AgeClass, Sex: cp.Sex, FoundDate: cp.FoundDate, FoundPlace: cp.FoundPlace, FoundLat: cp.FoundLat, FoundLon: cp.FoundLon,
		FinderName: "Finder Name Not For Print", FinderContact: "finder@example.invalid", Reason: cp.Reason,
		IntakeCondition: cp.IntakeCondition, IntakeMassG: cp.IntakeMassG, AdmittedAt: cp.AdmittedAt, Status: cp.Status, StatusDate: cp.StatusDate}
	label := "release site"
	if cf.Site != nil && cf.Site.Name != "" {
		label = cf.Site.Name
	}
	return reports.ReportInput{Centre: records.Centre{Name: "Test centre for case files", ElevationM: 120}, Patient: p,
		Assessment: a, Records: cf.Inputs, SiteLabel: label, Cautions: testCautions(t), Version: 2,
		GeneratedAt: caseNow, GeneratedBy: "Report Tester"}
}

// testOptions are byte-stable options: fixed dates, UTC, no compression.
func testOptions(size string) reports.Options {
	return reports.Options{PageSize: size, Time: fixedTime, Location: time.UTC, Uncompressed: true}
}

func render(t *testing.T, in reports.ReportInput, opts reports.Options) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := reports.Render(&buf, in, opts); err != nil {
		t.Fatalf("Render: %v", err)
	}
	return buf.Bytes()
}

// poppler returns the path of a poppler tool, or skips the test when it is
// missing outside CI (under CI=true a missing tool fails the test).
func poppler(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is required under CI (apt-get install poppler-utils): %v", name, err)
		}
		t.Skipf("%s not installed (poppler-utils)", name)
	}
	return p
}

// pdfPages returns the text of each page of pdf, read back with poppler's
// pdftotext in reading order.
func pdfPages(t *testing.T, pdf []byte) []string {
	t.Helper()
	bin := poppler(t, "pdftotext")
	path := filepath.Join(t.TempDir(), "report.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(bin, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(string(out), "\f")
	if n := len(pages); n > 0 && strings.TrimSpace(pages[n-1]) == "" {
		pages = pages[:n-1]
	}
	return pages
}

// keepPDF writes pdf and a 60 dpi PNG of each page to $REPORTS_OUT/name
// when that variable is set, for a person to look at.
func keepPDF(t *testing.T, name string, pdf []byte) {
	t.Helper()
	dir := os.Getenv("REPORTS_OUT")
	if dir == "" {
		return
	}
	path := filepath.Join(dir, name+".pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	if ppm, err := exec.LookPath("pdftoppm"); err == nil {
		if out, err := exec.Command(ppm, "-png", "-r", "60", path, filepath.Join(dir, name)).CombinedOutput(); err != nil {
			t.Errorf("pdftoppm: %v\n%s", err, out)
		}
	}
}

package reports_test

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/reports"
)

var update = flag.Bool("update", false, "rewrite the golden PDFs under testdata/")

// golden compares got with testdata/name, rewriting it under -update.
func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./reports -run %s -update to create it)", err, t.Name())
	}
	if !bytes.Equal(got, want) {
		dir := t.TempDir()
		_ = os.WriteFile(filepath.Join(dir, name), got, 0o644)
		t.Errorf("%s differs from the golden file (%d bytes, want %d); the new output is in %s; "+
			"look at it and rerun with -update if the change is intended", name, len(got), len(want), dir)
	}
}

// goldenCautions stands for CAUTIONS.md in the golden file, so that an edit
// of the cautions does not change it (TestRender_Text prints the real file).
const goldenCautions = `# Cautions
## Advice, not a decision
- The licensed rehabilitator and the veterinarian make every decision; Aloft only advises.
## Handling
- Raptors injure handlers mainly with their talons: keep clear of the feet.
`

// TestRender_Golden pins the report's bytes: fixed dates, catalog sort and
// no compression make fpdf's output byte-stable.
func TestRender_Golden(t *testing.T) {
	in := caseInput(t, "osprey-ready")
	in.Cautions = goldenCautions
	pdf := render(t, in, testOptions(records.PageA4))
	keepPDF(t, "osprey-ready", pdf)
	golden(t, "report_osprey_ready.pdf", pdf)
}

// TestRender_Deterministic renders each page size twice, compressed and
// not: the same input gives the same bytes.
func TestRender_Deterministic(t *testing.T) {
	in := caseInput(t, "kestrel-drooping-wing")
	for _, size := range []string{records.PageA4, records.PageLetter} {
		for _, compressed := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/compressed=%v", size, compressed), func(t *testing.T) {
				opts := testOptions(size)
				opts.Uncompressed = !compressed
				a, b := render(t, in, opts), render(t, in, opts)
				if !bytes.Equal(a, b) {
					t.Errorf("two renderings differ (%d and %d bytes)", len(a), len(b))
				}
			})
		}
	}
}

// TestRender_PageSize checks each page size's media box: A4 is
// 210 × 297 mm = 595.28 × 841.89 pt (ISO 216), US Letter 8.5 × 11 in =
// 612 × 792 pt (ANSI/ASME Y14.1).
func TestRender_PageSize(t *testing.T) {
	in := caseInput(t, "osprey-new-intake")
	cases := []struct {
		size, box string
	}{
		{"", "/MediaBox [0 0 595.28 841.89]"},
		{records.PageA4, "/MediaBox [0 0 595.28 841.89]"},
		{records.PageLetter, "/MediaBox [0 0 612.00 792.00]"},
	}
	for _, tc := range cases {
		t.Run("size="+tc.size, func(t *testing.T) {
			pdf := render(t, in, testOptions(tc.size))
			if !bytes.Contains(pdf, []byte(tc.box)) {
				t.Errorf("page size %q: no %q in the PDF", tc.size, tc.box)
			}
		})
	}
	var buf bytes.Buffer
	if err := reports.Render(&buf, in, testOptions("A3")); err == nil {
		t.Error("page size A3: no error")
	}
}

// TestRender_Text reads every page back with pdftotext: each page carries
// "Advisory", the statement that the licensed rehabilitator and the
// veterinarian decide, and its number; page 1 has the case number, the
// outcome and the V_mp figure as the assessment gives it, rounded as
// printed; the finder never appears.
func TestRender_Text(t *testing.T) {
	for _, name := range []string{"osprey-ready", "kestrel-drooping-wing", "osprey-new-intake", "swan-high-site"} {
		t.Run(name, func(t *testing.T) {
			in := caseInput(t, name)
			for _, size := range []string{records.PageA4, records.PageLetter} {
				pdf := render(t, in, testOptions(size))
				pages := pdfPages(t, pdf)
				checkEveryPage(t, pages)
				checkFirstPage(t, in, pages[0], layoutPage1(t, pdf))
				if len(pages) < 5 {
					t.Errorf("%s: %d pages, want at least 5", size, len(pages))
				}
				all := strings.Join(strings.Fields(strings.Join(pages, " ")), " ")
				for _, bad := range []string{in.Patient.FinderName, in.Patient.FinderContact} {
					if strings.Contains(all, bad) {
						t.Errorf("%s: the finder's %q is printed", size, bad)
					}
				}
				for _, want := range []string{"Criteria", "Flight model at the release site", "Records", "Clinical clearance",
					"Release site and parameter set", "Sources", "Cautions", "Review and signatures",
					"Lasiewski & Dawson 1967", "International Standard Atmosphere", "common practice",
					"Highly pathogenic avian influenza", "Licensed rehabilitator", "Veterinarian"} {
					if !strings.Contains(all, want) {
						t.Errorf("%s: the report lacks %q", size, want)
					}
				}
			}
		})
	}
}

func checkEveryPage(t *testing.T, pages []string) {
	t.Helper()
	if len(pages) == 0 {
		t.Fatal("no pages")
	}
	for i, p := range pages {
		flat := strings.Join(strings.Fields(p), " ")
		for _, want := range []string{"Advisory", reports.AdvisoryStatement, fmt.Sprintf("Page %d of %d", i+1, len(pages))} {
			if !strings.Contains(flat, want) {
				t.Errorf("page %d lacks %q", i+1, want)
			}
		}
	}
}

// vmpRe finds the key-figures row of V_mp in pdftotext -layout output.
var vmpRe = regexp.MustCompile(`Minimum-power speed V_mp\s+([0-9]+\.[0-9]) m/s`)

func checkFirstPage(t *testing.T, in reports.ReportInput, text, layout string) {
	t.Helper()
	a := in.Assessment
	flat := strings.Join(strings.Fields(text), " ")
	for _, want := range []string{in.Patient.CaseNumber, a.Outcome.Label, "ADVISORY OUTCOME", in.Centre.Name, in.Patient.SpeciesScientific} {
		if !strings.Contains(flat, want) {
			t.Errorf("page 1 lacks %q", want)
		}
	}
	if a.Physics == nil {
		return
	}
	m := vmpRe.FindStringSubmatch(layout)
	if m == nil {
		t.Fatalf("page 1 has no V_mp figure:\n%s", layout)
	}
	if want := fmt.Sprintf("%.1f", a.Physics.MinPowerSpeedMS); m[1] != want {
		t.Errorf("V_mp printed %s m/s, want %s (the assessment's %g rounded to 0.1)", m[1], want, a.Physics.MinPowerSpeedMS)
	}
}

// layoutPage1 is page 1's text with its layout kept, table rows on one line.
func layoutPage1(t *testing.T, pdf []byte) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "r.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(poppler(t, "pdftotext"), "-layout", "-enc", "UTF-8", "-f", "1", "-l", "1", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext -layout: %v", err)
	}
	return string(out)
}

// TestRender_UTF8 prints names with letters outside cp1252's core fonts'
// reach in fpdf's default setup: pdftotext must read them back unchanged.
func TestRender_UTF8(t *testing.T) {
	table, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := table.Find("Picus viridis")
	if err != nil {
		t.Fatal(err)
	}
	admitted := time.Date(2025, 5, 2, 9, 0, 0, 0, time.UTC)
	recs := assess.CaseInputs{Sex: assess.SexUnknown, AgeClass: "adult", AdmittedAt: admitted,
		WeighIns: []assess.WeighIn{{At: admitted.Add(time.Hour), MassG: sp.MassG.Pooled, Fed: assess.FedBefore}}}
	a, err := assess.Evaluate(recs, sp, assess.Thresholds{}, assess.Site{ElevationM: 20}, admitted.AddDate(0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	in := reports.ReportInput{
		Centre: records.Centre{Name: "Centre de soins de l'Île-d'Orléans"},
		Patient: records.Patient{CaseNumber: "2025-0042", SpeciesScientific: sp.ScientificName, SpeciesCommon: "Grünspecht",
			AgeClass: "adult", Sex: assess.SexUnknown, FoundDate: "2025-05-02", FoundPlace: "Île-d'Orléans, chemin Royal",
			Reason: "Fensteranprall (window strike)", AdmittedAt: admitted, Status: assess.DispInCare},
		Assessment: a, Records: recs, SiteLabel: "Île-d'Orléans, rive sud", Cautions: testCautions(t),
		GeneratedAt: admitted.AddDate(0, 0, 1)}
	pages := pdfPages(t, render(t, in, testOptions(records.PageA4)))
	all := strings.Join(strings.Fields(strings.Join(pages, " ")), " ")
	for _, want := range []string{"Grünspecht", "Île-d'Orléans", "Centre de soins de l'Île-d'Orléans", "Fensteranprall",
		"Working copy", "kg/m³", "°C", "Åkesson & Hedenström", "Ward et al."} {
		if !strings.Contains(all, want) {
			t.Errorf("the report lacks %q", want)
		}
	}
	checkEveryPage(t, pages)
}

// TestRender_NoRecords renders a patient with no records at all: the model
// cannot run, every chart is missing, and the report still says so.
func TestRender_NoRecords(t *testing.T) {
	in := caseInput(t, "osprey-new-intake")
	in.Records = assess.CaseInputs{Sex: in.Records.Sex, AgeClass: in.Records.AgeClass, AdmittedAt: in.Records.AdmittedAt}
	table, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := table.Find(in.Patient.SpeciesScientific)
	if err != nil {
		t.Fatal(err)
	}
	if in.Assessment, err = assess.Evaluate(in.Records, sp, assess.Thresholds{}, assess.Site{}, caseNow); err != nil {
		t.Fatal(err)
	}
	if in.Assessment.Physics != nil {
		t.Fatal("the model ran without a weigh-in")
	}
	pages := pdfPages(t, render(t, in, testOptions(records.PageLetter)))
	all := strings.Join(strings.Fields(strings.Join(pages, " ")), " ")
	for _, want := range []string{"Too little evidence to advise yet", "The flight model was not run", "No weigh-ins are recorded.",
		"No flight sessions are recorded.", "No takeoff trials are recorded."} {
		if !strings.Contains(all, want) {
			t.Errorf("the report lacks %q", want)
		}
	}
	checkEveryPage(t, pages)
}

// signOffSheetInput is a frozen version of the osprey case's report with a
// vet's sign-off on its hash and a forged one on another hash.
func signOffSheetInput(t *testing.T) (reports.SignOffSheetInput, []byte) {
	t.Helper()
	in := caseInput(t, "osprey-ready")
	in.Cautions = goldenCautions
	pdf := render(t, in, testOptions(records.PageA4))
	sum := sha256.Sum256(pdf)
	hash := hex.EncodeToString(sum[:])
	v := records.ReportVersion{ID: 7, PatientID: 1, Version: 2, CreatedAt: caseNow, CreatedBy: 3, CreatedByName: "Report Tester",
		SHA256: hash, SizeBytes: len(pdf), Site: in.Site(), PageSize: records.PageA4,
		SignOffs: []records.SignOff{
			{ID: 1, ReportVersionID: 7, UserID: 4, UserName: "Dr Vet Tester", Role: records.RoleVet, At: caseNow.Add(2 * time.Hour),
				Comment: "Wing sound; flies level. Agree: ready for the release decision.", SHA256: hash},
			{ID: 2, ReportVersionID: 7, UserID: 5, UserName: "Someone Else", Role: records.RoleVet, At: caseNow.Add(3 * time.Hour),
				SHA256: strings.Repeat("0", 64)},
		}}
	return reports.SignOffSheetInput{Centre: in.Centre, Patient: in.Patient, Version: v, GeneratedAt: caseNow.Add(4 * time.Hour)}, pdf
}

func TestRenderSignOffSheet(t *testing.T) {
	in, _ := signOffSheetInput(t)
	if b, err := os.ReadFile(filepath.Join("testdata", "report_osprey_ready.pdf")); err == nil && !*update {
		if sum := sha256.Sum256(b); hex.EncodeToString(sum[:]) != in.Version.SHA256 {
			t.Errorf("the sheet names %s, not the SHA-256 of the golden report %x", in.Version.SHA256, sum)
		}
	}
	var buf bytes.Buffer
	if err := reports.RenderSignOffSheet(&buf, in, testOptions(records.PageA4)); err != nil {
		t.Fatal(err)
	}
	keepPDF(t, "signoff-sheet", buf.Bytes())
	golden(t, "signoff_sheet.pdf", buf.Bytes())
	pages := pdfPages(t, buf.Bytes())
	if len(pages) != 1 {
		t.Fatalf("%d pages, want 1", len(pages))
	}
	checkEveryPage(t, pages)
	flat := strings.Join(strings.Fields(pages[0]), " ")
	h := in.Version.SHA256
	for _, want := range []string{"Sign-off sheet", in.Patient.CaseNumber, h, h[:32], h[32:], "Dr Vet Tester", "matches the report",
		"DIFFERS FROM THE REPORT", "Licensed rehabilitator", "not signed yet", "Wing sound; flies level.", "Report version"} {
		if !strings.Contains(flat, want) {
			t.Errorf("the sign-off sheet lacks %q:\n%s", want, flat)
		}
	}
}

// TestRender_ThresholdTable checks that the score tables print as one row
// each while the centre has not changed them, and apart once it has.
func TestRender_ThresholdTable(t *testing.T) {
	in := caseInput(t, "osprey-ready")
	all := strings.Join(strings.Fields(strings.Join(pdfPages(t, render(t, in, testOptions(""))), " ")), " ")
	if !strings.Contains(all, "Fat fraction for fat scores 0 to 8 on the 0–8 scale") {
		t.Error("the 0–8 fat fractions are not one row")
	}
	th := assess.DefaultThresholds()
	if err := th.Set(assess.ThFatFractionKaiser+"3", "", 0.08, "Ada", caseNow); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join("..", "assess", "testdata", "cases", "osprey-ready.json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cf, err := assess.ReadCaseFile(f)
	if err != nil {
		t.Fatal(err)
	}
	if in.Assessment, err = cf.Evaluate(th, nil, caseNow); err != nil {
		t.Fatal(err)
	}
	all = strings.Join(strings.Fields(strings.Join(pdfPages(t, render(t, in, testOptions(""))), " ")), " ")
	for _, want := range []string{"Fat fraction for fat score 3 on the 0–8 scale", "centre setting by Ada on 2025-06-20"} {
		if !strings.Contains(all, want) {
			t.Errorf("after a centre change the report lacks %q", want)
		}
	}
}

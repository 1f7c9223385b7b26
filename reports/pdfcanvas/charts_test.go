package pdfcanvas

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/reports/charts"

	"github.com/go-pdf/fpdf"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// fontFace returns gonum's Liberation Sans at size points.
func fontFace(t *testing.T, size vg.Length) font.Face {
	t.Helper()
	f := font.DefaultCache.Lookup(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
	if f.Face == nil {
		t.Fatal("gonum's Liberation Sans is not in the font cache")
	}
	return f
}

// testCharts returns the four charts built from test input: a course of
// care made up for the test, the species table's Red-tailed Hawk (female
// range, feather counts) and the flight model's result for it.
func testCharts(t *testing.T) []*charts.Chart {
	t.Helper()
	table, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := table.Find("Red-tailed Hawk")
	if err != nil {
		t.Fatal(err)
	}
	day0 := time.Date(2026, 11, 2, 9, 0, 0, 0, time.UTC)
	lo, hi := sp.MassRangeG(assess.SexFemale)
	var ws []assess.WeighIn
	var ss []assess.FlightSession
	for i, g := range []float64{742, 760, 795, 820, 861, 902, 951} {
		at := day0.AddDate(0, 0, 4*i)
		ws = append(ws, assess.WeighIn{At: at, MassG: g, Fed: assess.FedBefore})
		rec := 200 - 20*i
		ss = append(ss, assess.FlightSession{At: at, Passes: 4 + 3*i, LongestRun: 2 + 2*i, RecoveryS: &rec})
	}
	mass, err := charts.Mass(charts.MassInput{Weighins: ws, RangeLoG: lo, RangeHiG: hi, Sex: assess.SexFemale})
	if err != nil {
		t.Fatal(err)
	}
	target := 10
	stamina, err := charts.Stamina(charts.StaminaInput{Sessions: ss, TargetPasses: &target})
	if err != nil {
		t.Fatal(err)
	}
	intact := func(n int) []assess.FeatherStatus {
		s := make([]assess.FeatherStatus, n)
		for i := range s {
			s[i] = assess.FeatherIntact
		}
		return s
	}
	fm := assess.FeatherMap{LeftPrimaries: intact(sp.Primaries), LeftSecondaries: intact(sp.Secondaries),
		RightPrimaries: intact(sp.Primaries), RightSecondaries: intact(sp.Secondaries),
		TailLeft: intact(sp.Rectrices / 2), TailRight: intact(sp.Rectrices / 2)}
	fm.LeftPrimaries[8], fm.RightSecondaries[2], fm.TailLeft[0] = assess.FeatherBroken, assess.FeatherImped, assess.FeatherPin
	feathers, err := charts.Feathers(charts.FeatherInput{Map: fm, Primaries: sp.Primaries, Secondaries: sp.Secondaries, Rectrices: sp.Rectrices})
	if err != nil {
		t.Fatal(err)
	}
	ref := sp.Reference(assess.SexFemale)
	temp := 12.0
	r, err := assess.Flight(assess.FlightInput{MassKg: 0.95, SpanM: sp.SpanMM / 1000, Reference: &ref,
		Site: assess.Site{ElevationM: 300, TempC: &temp}})
	if err != nil {
		t.Fatal(err)
	}
	power, err := charts.Power(charts.PowerInput{Result: r, SiteLabel: "release site, 300 m, 12 °C"})
	if err != nil {
		t.Fatal(err)
	}
	return []*charts.Chart{mass, stamina, feathers, power}
}

// drawCharts draws each test chart into its own box of the current page
// through the adapter: mass and stamina side by side, the feathers and the
// power curve below, half an A4 text width each, as a report lays them out.
func drawCharts(t *testing.T, pdf *fpdf.Fpdf) []*charts.Chart {
	t.Helper()
	boxes := [][4]float64{{15, 15, 88, 80}, {107, 15, 88, 100}, {15, 125, 88, 115}, {107, 125, 88, 130}}
	cs := testCharts(t)
	for i, ch := range cs {
		b := boxes[i]
		c := New(pdf, b[0], b[1], b[2], b[3])
		w, h := c.Size()
		if err := ch.Draw(c, w, h, charts.PrintStyle()); err != nil {
			t.Fatal(err)
		}
		c.Close()
	}
	return cs
}

// tool returns the path of a poppler tool, or skips the test when it is
// missing outside CI (under CI=true a missing tool fails the test).
func tool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is required under CI (apt-get install poppler-utils): %v", name, err)
		}
		t.Skipf("%s not installed (poppler-utils); skipping the PDF text check", name)
	}
	return p
}

// TestCharts_PDF draws each chart into its own box of an A4 page through
// the adapter, then reads the PDF back with poppler's pdftotext: the axis
// labels, units and key values must be there as text, in UTF-8. Set
// PDFCANVAS_OUT to a directory to keep the PDF and a 60 dpi PNG of it.
func TestCharts_PDF(t *testing.T) {
	pdftotext := tool(t, "pdftotext")
	pdf := newDoc(t)
	cs := drawCharts(t, pdf)
	dir := os.Getenv("PDFCANVAS_OUT")
	if dir == "" {
		dir = t.TempDir()
	}
	path := filepath.Join(dir, "charts.pdf")
	if err := os.WriteFile(path, output(t, pdf), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(pdftotext, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	text := string(out)
	for _, want := range []string{
		"Mass (g)", "Date (2026)", "Typical range, female", "Passes (lengths)", "Recovery (s)", "Target: 10 unbroken",
		"Left wing (seen from above)", "Primaries", "Secondaries", "B: broken", "G: growing (pin or blood feather)",
		"Airspeed (m/s)", "Power (W)", "Mechanical power", "Chemical (fuel) power", "At release site, 300 m, 12 °C",
		"Vmp " + strings.Fields(cs[3].Alt()[strings.Index(cs[3].Alt(), "V_mp ")+5:])[0] + " m/s",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("pdftotext output lacks %q", want)
		}
	}
	if t.Failed() {
		t.Logf("pdftotext output:\n%s", text)
	}
	if ppm, err := exec.LookPath("pdftoppm"); err == nil {
		if out, err := exec.Command(ppm, "-png", "-r", "60", "-singlefile", path, strings.TrimSuffix(path, ".pdf")).CombinedOutput(); err != nil {
			t.Errorf("pdftoppm: %v\n%s", err, out)
		}
	}
}

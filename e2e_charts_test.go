package main

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"aloft/web/browsertest"
)

// chartIDs are the patient page's charts, in page order.
var chartIDs = []string{"mass", "stamina", "feathers", "power"}

// inkShare measures a screenshot of a chart: the share of its pixels that
// are near black (a chart whose inline styles were blocked by the page's
// content security policy draws every shape with SVG's default black fill)
// and the share that are coloured (the species' band, the curves; without
// their styles nothing is coloured).
func inkShare(img image.Image) (dark, coloured float64) {
	b := img.Bounds()
	var nDark, nColour, n int
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			r, g, bl = r>>8, g>>8, bl>>8
			n++
			if r < 60 && g < 60 && bl < 60 {
				nDark++
			}
			if max(r, g, bl)-min(r, g, bl) > 40 {
				nColour++
			}
		}
	}
	if n == 0 {
		return 0, 0
	}
	return float64(nDark) / float64(n), float64(nColour) / float64(n)
}

// demoCases returns the case numbers of every demo patient, from the list.
func demoCases(t *testing.T, b *browsertest.Browser, base string) []string {
	t.Helper()
	b.Open(base+"/patients", "[data-testid=patient-list]")
	cases := browsertest.Eval[[]string](b, `[...document.querySelectorAll("[data-testid=patient-link] .case")].map(e => e.textContent.trim())`)
	if len(cases) < 10 {
		t.Fatalf("the demo lists %d patients, want at least 10", len(cases))
	}
	return cases
}

// TestE2E_ChartsEveryDemoPatient opens every demo patient's page in
// Chromium on a 360-px phone and a 1280-px desktop, under the server's real
// headers, and checks the four charts: each image loaded, and a screenshot
// of each is drawn with its styles (coloured, not filled black); a chart
// whose records are missing is replaced by a sentence saying so. Some
// screenshots are kept under ALOFT_SCREENSHOTS for people to look at.
func TestE2E_ChartsEveryDemoPatient(t *testing.T) {
	base := startDemo(t)
	sizes := []struct {
		name string
		opt  browsertest.Option
	}{
		{"phone", browsertest.Phone()},
		{"desktop", browsertest.WindowSize(1280, 900)},
	}
	for _, sz := range sizes {
		t.Run(sz.name, func(t *testing.T) {
			b := browsertest.New(t, sz.opt, browsertest.Timeout(4*time.Minute))
			b.Open(base+"/login", "#username")
			b.Fill("#username", "vet")
			b.Fill("#password", "demo-vet-2026")
			b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
			drawn := map[string]int{}
			cases := demoCases(t, b, base)
			for i, c := range cases {
				checkPatientCharts(t, b, base, c, sz.name, i == 0 || i == len(cases)/2, drawn)
			}
			// Each chart opened on its own, as "open image in a new tab"
			// does: its document's own policy must let its styles apply.
			for _, id := range chartIDs {
				checkChartDocument(t, b, base+"/patients/"+cases[len(cases)/2]+"/charts/"+id+".svg", sz.name+"-"+id)
			}
			// Most demo patients have flight sessions and a feather map.
			for _, id := range chartIDs {
				if drawn[id] < len(cases)/2 {
					t.Errorf("%s: the %s chart is drawn for %d of %d demo patients", sz.name, id, drawn[id], len(cases))
				}
			}
		})
	}
}

// checkPatientCharts opens one patient's page and checks its charts,
// counting those drawn in drawn; full keeps screenshots.
func checkPatientCharts(t *testing.T, b *browsertest.Browser, base, caseNo, size string, full bool, drawn map[string]int) {
	t.Helper()
	b.Open(base+"/patients/"+caseNo, "[data-testid=section-pictures]")
	// Wait until every chart image has finished loading, or failed.
	loaded := browsertest.Eval[bool](b, `Promise.all([...document.querySelectorAll("img.chart")].map(i =>
		i.complete ? true : new Promise(r => { i.onload = i.onerror = () => r(true); }))).then(() => true)`)
	if !loaded {
		t.Fatalf("%s: chart images did not settle", caseNo)
	}
	b.NoHorizontalScroll()
	if full {
		shot(t, b, "charts-"+size+"-"+caseNo)
	}
	for _, id := range chartIDs {
		sel := "[data-testid=chart-" + id + "] img.chart"
		if b.Count(sel) != 1 {
			// Without the records a chart needs, the page says so instead;
			// every demo patient has weigh-ins, so mass and power are drawn.
			if id == "mass" || id == "power" || b.Count("[data-testid=chart-"+id+"] [data-testid=chart-missing]") != 1 {
				t.Errorf("%s %s: no %s chart (%q)", size, caseNo, id, b.Text("[data-testid=chart-"+id+"]"))
			}
			continue
		}
		drawn[id]++
		w := browsertest.Eval[int](b, fmt.Sprintf(`document.querySelector(%q).naturalWidth`, sel))
		if w <= 0 {
			t.Errorf("%s %s: the %s chart did not load (naturalWidth %d)", size, caseNo, id, w)
			continue
		}
		if box := b.Box(sel); box.Width > float64(browsertest.PhoneWidth) && size == "phone" {
			t.Errorf("%s %s: the %s chart is %.0f px wide on a phone", size, caseNo, id, box.Width)
		}
		pngBytes, err := chromedp.Run(b.Ctx(), chromedp.Screenshot(chromedp.CSS(sel)))
		if err != nil {
			t.Fatalf("%s %s: screenshot of the %s chart: %v", size, caseNo, id, err)
		}
		img, err := png.Decode(bytes.NewReader(pngBytes))
		if err != nil {
			t.Fatalf("%s %s: the %s screenshot is not a PNG: %v", size, caseNo, id, err)
		}
		dark, coloured := inkShare(img)
		// A styled chart is mostly white with thin dark lines and text
		// (measured: a few per cent dark); one drawn without its styles is
		// black shapes on no colour.
		if dark > 0.25 || coloured < 0.002 {
			t.Errorf("%s %s: the %s chart looks unstyled: %.1f %% near-black, %.2f %% coloured pixels", size, caseNo, id, dark*100, coloured*100)
		}
		if full {
			keepPNG(t, "chart-"+size+"-"+caseNo+"-"+id, pngBytes)
		}
	}
	if alt := browsertest.Eval[string](b, `document.querySelector("[data-testid=chart-power] img.chart")?.alt ?? ""`); !strings.Contains(alt, "V_mp") {
		t.Errorf("%s %s: the power chart's text alternative %q gives no V_mp", size, caseNo, alt)
	}
}

// checkChartDocument opens a chart's SVG document in the tab and checks a
// screenshot of it is drawn with its styles.
func checkChartDocument(t *testing.T, b *browsertest.Browser, url, name string) {
	t.Helper()
	b.Open(url, "svg")
	pngBytes, err := chromedp.Run(b.Ctx(), chromedp.Screenshot(chromedp.CSS("svg")))
	if err != nil {
		t.Fatalf("screenshot of %s: %v", url, err)
	}
	img, err := png.Decode(bytes.NewReader(pngBytes))
	if err != nil {
		t.Fatalf("%s: the screenshot is not a PNG: %v", url, err)
	}
	if dark, coloured := inkShare(img); dark > 0.25 || coloured < 0.002 {
		t.Errorf("%s opened on its own looks unstyled: %.1f %% near-black, %.2f %% coloured pixels", url, dark*100, coloured*100)
	}
	keepPNG(t, "chart-document-"+name, pngBytes)
}

// keepPNG writes png under ALOFT_SCREENSHOTS, when set.
func keepPNG(t *testing.T, name string, png []byte) {
	t.Helper()
	dir := strings.TrimSpace(getenv("ALOFT_SCREENSHOTS"))
	if dir == "" {
		return
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, name+".png"), png, 0o644); err != nil {
		t.Errorf("keep %s: %v", name, err)
	}
}

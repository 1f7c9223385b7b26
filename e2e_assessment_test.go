package main

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/web/browsertest"
)

// TestE2E_AssessmentPage opens a demo patient's assessment from its page
// on a phone and a desktop: the outcome comes first, then the criteria, the
// power curve (loaded) and the numbers; the site form, a plain GET form,
// redraws it all at another elevation and temperature.
func TestE2E_AssessmentPage(t *testing.T) {
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
			b := browsertest.New(t, sz.opt)
			b.Open(base+"/login", "#username")
			b.Fill("#username", "rehab")
			b.Fill("#password", "demo-rehab-2026")
			b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
			b.Open(base+"/patients?q=Osprey", "[data-testid=patient-list]")
			b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
			summary := b.Text("[data-testid=outcome-summary]")
			b.ClickAndWait("[data-testid=assessment-link]", "[data-testid=assessment-outcome]")
			if got := b.Text("[data-testid=assessment-outcome] [data-testid=outcome-label]"); got == "" || !strings.Contains(summary, got) {
				t.Errorf("assessment outcome %q, the patient page's summary %q", got, summary)
			}
			order := browsertest.Eval[[]string](b, `[...document.querySelectorAll("main > section")].map(s => s.dataset.testid)`)
			if strings.Join(order, " ") != "assessment-outcome assessment-criteria assessment-power assessment-physics assessment-cautions" {
				t.Errorf("sections in order %v", order)
			}
			if n := b.Count("[data-testid=criterion]"); n < 10 {
				t.Errorf("%d criteria, want the whole table", n)
			}
			waitImages(t, b)
			if w := browsertest.Eval[int](b, `document.querySelector("[data-testid=assessment-power] img.chart").naturalWidth`); w <= 0 {
				t.Error("the power chart did not load")
			}
			b.NoHorizontalScroll()
			shot(t, b, "assessment-"+sz.name)

			b.Fill("#elevation_m", "1500")
			b.Fill("#temp_c", "25")
			b.ClickAndWait("[data-testid=site-submit]", "[data-testid=assessment-outcome]")
			if u := b.URL(); !strings.Contains(u, "elevation_m=1500") || !strings.Contains(u, "temp_c=25") {
				t.Errorf("site form went to %s", u)
			}
			if got := b.Text("[data-testid=site-elevation]"); !strings.Contains(got, "1500 m") {
				t.Errorf("site elevation reads %q", got)
			}
			if got := b.Text("[data-testid=site-temp]"); !strings.Contains(got, "25 °C") {
				t.Errorf("site temperature reads %q", got)
			}
			waitImages(t, b)
			src := browsertest.Eval[string](b, `document.querySelector("[data-testid=assessment-power] img.chart").getAttribute("src")`)
			if !strings.HasSuffix(src, "/charts/power.svg?elevation_m=1500&temp_c=25") {
				t.Errorf("power chart src %q does not carry the site", src)
			}
			if w := browsertest.Eval[int](b, `document.querySelector("[data-testid=assessment-power] img.chart").naturalWidth`); w <= 0 {
				t.Error("the power chart at the site did not load")
			}
			b.NoHorizontalScroll()
			shot(t, b, "assessment-site-"+sz.name)
		})
	}
}

// waitImages waits until every image of the page has loaded or failed.
func waitImages(t *testing.T, b *browsertest.Browser) {
	t.Helper()
	browsertest.Eval[bool](b, `Promise.all([...document.images].map(i =>
		i.complete ? true : new Promise(r => { i.onload = i.onerror = () => r(true); }))).then(() => true)`)
}

// TestAssessDemo_EveryOutcomeLevel: among the demo centre's patients in
// care there is at least one at each outcome level, so every way the
// advice can read is on show (issue 9).
func TestAssessDemo_EveryOutcomeLevel(t *testing.T) {
	db := filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != exitOK {
		t.Fatalf("demo --seed-only: %d %s", code, errs)
	}
	ctx := context.Background()
	store, err := records.Open(ctx, db, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer store.Close()
	ps, err := store.Patients(ctx, records.PatientFilter{Status: string(assess.DispInCare)})
	if err != nil {
		t.Fatal(err)
	}
	byLevel := map[assess.OutcomeLevel][]string{}
	now := time.Now()
	for _, p := range ps {
		a, err := store.Assess(ctx, p, nil, now)
		if err != nil {
			t.Errorf("%s: %v", p.CaseNumber, err)
			continue
		}
		byLevel[a.Outcome.Level] = append(byLevel[a.Outcome.Level], p.CaseNumber+" "+p.SpeciesCommon)
	}
	for _, l := range []assess.OutcomeLevel{assess.OutcomeReady, assess.OutcomeContinue, assess.OutcomeRefer, assess.OutcomeInsufficient} {
		if len(byLevel[l]) == 0 {
			t.Errorf("no demo patient in care is assessed %q (%s); by level: %v", l, assess.OutcomeLabel(l), byLevel)
		}
	}
}

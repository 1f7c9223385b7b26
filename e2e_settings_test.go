package main

import (
	"strings"
	"testing"
	"time"

	"aloft/web/browsertest"
)

// TestE2E_SettingsWhatIf: on a phone, a staff member opens a demo
// patient's what-if page, types a mass and a span loss, and whatif.js
// swaps in the recomputed result and power curve as they type, the address
// following; the demo centre's release site can be chosen. An admin's
// thresholds page and a vet's species page fit a phone's width.
func TestE2E_SettingsWhatIf(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())
	b.Open(base+"/login", "#username")
	b.Fill("#username", "staff")
	b.Fill("#password", "demo-staff-2026")
	b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
	b.Open(base+"/patients?q=Osprey", "[data-testid=patient-list]")
	b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
	caseNumber := strings.TrimSpace(b.Text("[data-testid=case-number]"))
	b.Open(base+"/patients/"+caseNumber+"/what-if", "#whatif-form")
	if b.Count("[data-testid=whatif-nochange]") != 1 {
		t.Error("the blank what-if does not say nothing has changed")
	}
	b.Fill("#mass_g", "1100")
	b.Fill("#span_loss_pct", "12")
	b.SetValue("#site", "Tarnwhistle Moor")
	deadline := time.Now().Add(10 * time.Second)
	for time.Now().Before(deadline) && !strings.Contains(b.Text("[data-testid=whatif-result]"), "Tarnwhistle Moor") {
		time.Sleep(100 * time.Millisecond)
	}
	changes := b.Text("[data-testid=whatif-changes]")
	for _, want := range []string{"1100 g", "12 % less", "Tarnwhistle Moor"} {
		if !strings.Contains(changes, want) {
			t.Errorf("the changes read %q, want %q in them", changes, want)
		}
	}
	if u := b.URL(); !strings.Contains(u, "mass_g=1100") || !strings.Contains(u, "span_loss_pct=12") {
		t.Errorf("the address did not follow the form: %s", u)
	}
	waitImages(t, b)
	if w := browsertest.Eval[int](b, `document.querySelector("[data-testid=chart-whatif-power] img.chart").naturalWidth`); w <= 0 {
		t.Error("the what-if power curve did not load")
	}
	b.NoHorizontalScroll()
	shot(t, b, "whatif-phone")

	b.ClickAndWait(`form[action="/logout"] button`, "#username")
	b.Fill("#username", "admin")
	b.Fill("#password", "demo-admin-2026")
	b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
	b.Open(base+"/settings/thresholds", "[data-testid=thresholds-intro]")
	if got := b.Text(`[data-testid=threshold][data-threshold=passes][data-group=gull] [data-testid=threshold-current]`); got != "8" {
		t.Errorf("the demo centre's pass count for gulls reads %q, want 8", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "thresholds-phone")
	b.Open(base+"/species/Anas-platyrhynchos", "[data-testid=species-detail]")
	if b.Count(`[data-testid=species-value][data-override=true]`) == 0 {
		t.Error("the demo vet's Mallard values are not shown as the centre's")
	}
	b.NoHorizontalScroll()
	shot(t, b, "species-phone")
}

package main

import (
	"strings"
	"testing"

	"aloft/web/browsertest"
)

// On a phone, the licensed rehabilitator records a transfer through the
// patient page's form, sees it, and reads the year's summary on the exports
// page; a staff member is refused the exports page.
func TestE2E_DispositionAndExports(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())
	login := func(user, password string) {
		b.Open(base+"/login", "#username")
		b.Fill("#username", user)
		b.Fill("#password", password)
		b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
	}
	login("rehab", "demo-rehab-2026")
	b.Open(base+"/patients?q=Cooper", "[data-testid=patient-list]")
	b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
	b.Click("[data-testid=disposition-new] summary")
	b.WaitVisible("[data-testid=disposition-form]")
	b.SetValue("#disp-kind", "transferred")
	b.Fill("#disp-place", "Handed over at the centre's door")
	b.Fill("#disp-receiver", "Hillcrest Raptor Unit (invented)")
	b.NoHorizontalScroll()
	shot(t, b, "disposition-form")
	if code := b.ClickAndWait("[data-testid=disposition-submit]", "[data-testid=disposition-current]"); code != 200 {
		t.Fatalf("recording the transfer: status %d", code)
	}
	if got := b.Text("[data-testid=disposition-kind]"); got != "Transferred to another holder" {
		t.Errorf("disposition shown %q after the transfer", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "disposition-recorded")

	b.Open(base+"/exports", "[data-testid=export-summary]")
	b.WaitVisible("[data-testid=reconciled]")
	if got := b.Text("[data-testid=export-summary]"); !strings.Contains(got, "Cooper's Hawk") {
		t.Errorf("the summary does not list the Cooper's Hawk: %q", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "exports")

	b.ClickAndWait("form[action='/logout'] button", "#username")
	login("staff", "demo-staff-2026")
	b.Open(base+"/exports", "main")
	if b.Count("[data-testid=export-summary]") != 0 {
		t.Error("staff see the exports page")
	}
}

package main

import (
	"strings"
	"testing"

	"aloft/web/browsertest"
)

// TestE2E_ConditioningRecords records a weigh-in, a wing measurement with a
// feather map, a takeoff trial and a flight session through the forms on a
// phone, corrects the weigh-in, and reads them back on the timeline.
func TestE2E_ConditioningRecords(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())
	b.Open(base+"/login", "#username")
	b.Fill("#username", "staff")
	b.Fill("#password", "demo-staff-2026")
	b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")

	// The demo's Cooper's hawk, in conditioning.
	b.Open(base+"/patients?q=Cooper", "[data-testid=patient-list]")
	b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
	patient := b.URL()
	if n := b.Count("[data-testid=timeline-item]"); n < 10 {
		t.Errorf("demo Cooper's hawk has %d conditioning records, want a history", n)
	}
	b.NoHorizontalScroll()
	shot(t, b, "cond-patient")

	// Weigh-in.
	b.ClickAndWait("[data-testid=add-weigh-in]", "[data-testid=form-weigh-in]")
	b.NoHorizontalScroll()
	shot(t, b, "cond-weigh-in")
	b.Fill("#mass_g", "338")
	b.SetValue("#fed", "before-feed")
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=timeline]"); code != 200 {
		t.Fatalf("weigh-in: status %d", code)
	}
	if got := b.Text("[data-testid=timeline-item]"); !strings.Contains(got, "338 g, before feeding") || !strings.Contains(got, "Priya Lindqvist") {
		t.Errorf("newest timeline entry %q, want the 338 g weigh-in by the staff member", got)
	}

	// Wing measurement with a feather map: left P8 missing, right S2 in pin.
	b.Open(patient, "[data-testid=add-wing]")
	b.ClickAndWait("[data-testid=add-wing]", "[data-testid=form-wing]")
	b.Fill("#span_mm", "826")
	b.Fill("#area_cm2", "1190")
	b.SetValue("#area_method", "traced")
	b.Fill("#chord_mm", "247")
	b.Click("[data-testid=tract-lp] summary")
	b.WaitVisible("#lp8")
	b.SetValue("#lp8", "missing")
	b.Click("[data-testid=tract-rs] summary")
	b.WaitVisible("#rs2")
	b.SetValue("#rs2", "pin")
	if box := b.Box("#lp8"); box.Height < 44 {
		t.Errorf("feather select is %.0f px tall, want a tap target of at least 44 px", box.Height)
	}
	b.NoHorizontalScroll()
	shot(t, b, "cond-wing")
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=timeline]"); code != 200 {
		t.Fatalf("wing: status %d", code)
	}
	b.Open(patient+"?kind=wing#conditioning-history", "[data-testid=timeline]")
	if got := b.Text("[data-testid=timeline-item]"); !strings.Contains(got, "P8 missing") || !strings.Contains(got, "S2 growing (pin)") {
		t.Errorf("wing entry %q does not list the feathers", got)
	}

	// Takeoff trial: two attempts.
	b.Open(patient, "[data-testid=add-trial]")
	b.ClickAndWait("[data-testid=add-trial]", "[data-testid=form-trial]")
	if !strings.Contains(b.Text("[data-testid=drop-caution]"), "1 m") {
		t.Error("trial form shows no drop cap")
	}
	b.SetValue("#mode", "standing")
	b.Fill("#surface", "aviary floor")
	b.SetValue("#wind", "calm")
	b.SetValue("#attempt_1", "level")
	b.SetValue("#attempt_2", "climbed")
	b.NoHorizontalScroll()
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=timeline]"); code != 200 {
		t.Fatalf("trial: status %d", code)
	}

	// Flight session: refused first (a longer run than passes), then fixed.
	b.Open(patient, "[data-testid=add-flight-session]")
	b.ClickAndWait("[data-testid=add-flight-session]", "[data-testid=form-flight-session]")
	b.SetValue("#exercise", "cage")
	b.SetValue("#enclosure", "Flight cage B")
	b.Fill("#air_temp_c", "17")
	b.Fill("#duration_min", "12")
	b.Fill("#passes", "11")
	b.Fill("#longest_run", "14")
	b.Fill("#landings", "9")
	b.Fill("#landings_controlled", "8")
	b.SetValue("#highest", "high-perch")
	b.Fill("#recovery_s", "95")
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=err-longest_run]"); code != 422 {
		t.Fatalf("inconsistent session: status %d, want 422", code)
	}
	if got := b.Value("#recovery_s"); got != "95" {
		t.Errorf("refused session form lost the recovery time: %q", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "cond-session-refused")
	b.Fill("#longest_run", "9")
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=timeline]"); code != 200 {
		t.Fatalf("session: status %d", code)
	}
	if got := b.Text("[data-testid=timeline-item]"); !strings.Contains(got, "11 passes, longest unbroken run 9") {
		t.Errorf("newest entry %q, want the session", got)
	}

	// Correct the weigh-in: a new version, the old one kept.
	b.Open(patient+"?kind=weigh-in#conditioning-history", "[data-testid=timeline]")
	b.ClickAndWait("[data-testid=timeline-item] [data-testid=correct-link]", "[data-testid=form-weigh-in]")
	if got := b.Value("#mass_g"); got != "338" {
		t.Fatalf("correction form shows %q, want the recorded 338", got)
	}
	b.Fill("#mass_g", "333")
	b.SetValue("#note", "scale re-zeroed")
	if code := b.ClickAndWait("[data-testid=cond-submit]", "[data-testid=timeline]"); code != 200 {
		t.Fatalf("correction: status %d", code)
	}
	b.Open(patient+"?kind=weigh-in#conditioning-history", "[data-testid=timeline]")
	first := b.Text("[data-testid=timeline-item]")
	if !strings.Contains(first, "333 g") || !strings.Contains(first, "corrected") {
		t.Errorf("corrected entry %q", first)
	}
	b.Click("[data-testid=timeline-item] [data-testid=versions] summary")
	if got := b.Text("[data-testid=timeline-item] [data-testid=versions]"); !strings.Contains(got, "338 g") || !strings.Contains(got, "Version 2") {
		t.Errorf("versions %q, want the original 338 g kept", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "cond-corrected")

	b.Open(base+"/enclosures", "[data-testid=enclosures]")
	if got := b.Text("[data-testid=enclosures]"); !strings.Contains(got, "Long flight North") || !strings.Contains(got, "30.5 × 6.1 × 4.9 m") {
		t.Errorf("enclosures page %q", got)
	}
	b.NoHorizontalScroll()
}

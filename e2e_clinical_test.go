package main

import (
	"strings"
	"testing"

	"aloft/web/browsertest"
)

// clinicalLogin logs in through the login form and waits for the patient list.
func clinicalLogin(t *testing.T, b *browsertest.Browser, base, user, password string) {
	t.Helper()
	b.Open(base+"/login", "#username")
	b.Fill("#username", user)
	b.Fill("#password", password)
	b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
}

// clinicalOpenPatient finds a demo patient by a search term and opens its page.
func clinicalOpenPatient(t *testing.T, b *browsertest.Browser, base, query string) string {
	t.Helper()
	b.Open(base+"/patients?q="+query, "[data-testid=patient-list]")
	b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
	return b.URL()
}

// A vet clears an item through the form on a phone and sees who cleared it;
// staff see the panel without the form, and a forged post is refused.
func TestE2E_ClinicalClearance(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())

	clinicalLogin(t, b, base, "vet", "demo-vet-2026")
	if got := b.Text("#meds-due"); !strings.Contains(got, "Common Loon") {
		t.Errorf("medications due today do not list the loon's course: %q", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "clinical-meds-due")

	page := clinicalOpenPatient(t, b, base, "Cooper")
	b.WaitVisible("[data-testid=clearance-form]")
	if got := clinicalAttr(b, "[data-testid=clearance-vision]", "data-state"); got != "not-cleared" {
		t.Errorf("demo Cooper's Hawk vision is %q, want not-cleared (pending re-check)", got)
	}
	b.SetValue("#clearance_item", "perching-preening")
	b.Click("[data-testid=state-cleared]")
	b.SetValue("#clearance_note", "Perches on the high bar and preens normally.") // an empty textarea cannot be cleared key by key
	if code := b.ClickAndWait("[data-testid=clearance-submit]", "[data-testid=clearance-perching-preening]"); code != 200 {
		t.Fatalf("saving clearance: status %d", code)
	}
	if got := clinicalAttr(b, "[data-testid=clearance-perching-preening]", "data-state"); got != "cleared" {
		t.Errorf("perching and preening is %q after the vet cleared it", got)
	}
	if got := b.Text("[data-testid=clearance-perching-preening] [data-testid=clearance-who]"); !strings.Contains(got, "Dr Casimir Venn (vet)") {
		t.Errorf("who cleared it: %q, want the demo vet", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "clinical-clearance-vet")

	b.ClickAndWait("form[action='/logout'] button", "#username")
	clinicalLogin(t, b, base, "staff", "demo-staff-2026")
	b.Open(page, "[data-testid=section-clearance]")
	if n := b.Count("[data-testid=clearance-form]"); n != 0 {
		t.Errorf("staff see %d clearance forms, want none", n)
	}
	b.WaitVisible("[data-testid=clearance-readonly]")
	status := browsertest.Eval[int](b, `fetch(location.pathname + "/clearance", {
		method: "POST", redirect: "manual",
		headers: {"Content-Type": "application/x-www-form-urlencoded",
			"X-CSRF-Token": document.querySelector("meta[name=csrf-token]").content},
		body: "item=vision&state=cleared&note=forged"}).then(r => r.status)`)
	if status != 403 {
		t.Errorf("forged clearance post by staff: status %d, want 403", status)
	}
	b.Open(page, "[data-testid=section-clearance]")
	if got := clinicalAttr(b, "[data-testid=clearance-vision]", "data-state"); got != "not-cleared" {
		t.Errorf("vision is %q after the refused post, want it unchanged (not-cleared)", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "clinical-clearance-staff")
}

// clinicalAttr returns attribute name of the first element matching sel ("" when absent).
func clinicalAttr(b *browsertest.Browser, sel, name string) string {
	return browsertest.Eval[string](b, `(document.querySelector(`+clinicalJSQuote(sel)+`)?.getAttribute(`+clinicalJSQuote(name)+`)) ?? ""`)
}

func clinicalJSQuote(s string) string {
	return `"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`).Replace(s) + `"`
}

// A vet prescribes through the form on a phone: a zero dose is refused
// beside the field with what was typed kept; the corrected course is listed
// on the patient page and in today's due list. The exam form fits the phone.
func TestE2E_ClinicalMedicationForm(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())
	clinicalLogin(t, b, base, "vet", "demo-vet-2026")
	page := clinicalOpenPatient(t, b, base, "Heron")

	b.ClickAndWait("[data-testid=add-exam]", "[data-testid=clinical-form]")
	b.NoHorizontalScroll()
	shot(t, b, "clinical-exam-form")

	b.Open(page, "[data-testid=add-medication]")
	b.ClickAndWait("[data-testid=add-medication]", "[data-testid=clinical-form]")
	if got := b.Value("#prescriber"); got != "Dr Casimir Venn" {
		t.Errorf("prescriber defaults to %q, want the logged-in vet", got)
	}
	b.Fill("#drug", "e2e test suspension")
	b.Fill("#dose", "0")
	b.SetValue("#dose_unit", "mg/kg")
	b.SetValue("#route", "PO")
	if code := b.ClickAndWait("[data-testid=clinical-submit]", "[data-testid=form-error]"); code != 422 {
		t.Fatalf("zero dose: status %d, want 422", code)
	}
	if got := b.Text("#dose ~ .field-error"); !strings.Contains(got, "above 0") {
		t.Errorf("dose message %q", got)
	}
	if got := b.Value("#drug"); got != "e2e test suspension" {
		t.Errorf("drug after the error %q, want what was typed", got)
	}
	b.NoHorizontalScroll()
	shot(t, b, "clinical-medication-error")

	b.Fill("#dose", "2")
	b.ClickAndWait("[data-testid=clinical-submit]", "[data-testid=section-clinical]")
	if got := b.Text("[data-testid=medications]"); !strings.Contains(got, "e2e test suspension") || !strings.Contains(got, "2 mg/kg PO") {
		t.Errorf("medications list %q does not show the new course", got)
	}
	b.Open(base+"/patients", "#meds-due")
	if got := b.Text("#meds-due"); !strings.Contains(got, "e2e test suspension") {
		t.Errorf("today's due list %q does not show the new course", got)
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"aloft/records"
)

func intakeForm() url.Values {
	return url.Values{"species": {"Red-tailed Hawk (Buteo jamaicensis)"}, "age_class": {"adult"}, "sex": {"female"},
		"found_date": {"2026-06-14"}, "found_place": {"Field by the A6"}, "reason": {"hit by car"},
		"intake_mass_g": {"1150"}, "finder_name": {"Ada Finder"}}
}

func TestIntake_AdmitsAndShowsPatient(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	resp, doc := a.get("/intake")
	wantStatus(t, resp, http.StatusOK)
	if doc.Find("#species-list option").Length() < 300 {
		t.Errorf("species datalist has %d options, want the whole table", doc.Find("#species-list option").Length())
	}
	resp, _ = a.post("/intake", intakeForm())
	wantStatus(t, resp, http.StatusSeeOther)
	loc := resp.Header.Get("Location")
	if loc != "/patients/2026-0001" {
		t.Fatalf("redirect to %q", loc)
	}
	resp, doc = a.get(loc)
	wantStatus(t, resp, http.StatusOK)
	if got := doc.Find("[data-testid=case-number]").Text(); got != "2026-0001" {
		t.Errorf("case number shown %q", got)
	}
	if got := doc.Find("[data-testid=intake-mass]").Text(); !strings.Contains(got, "1150 g") {
		t.Errorf("intake mass shown %q, want 1150 g", got)
	}
	if doc.Find("[data-testid=species-reference] td.source").Length() == 0 {
		t.Error("species reference shows no sources")
	}
	if !strings.Contains(doc.Find("[data-testid=audit-history]").Text(), "create patient") {
		t.Error("audit history does not show the intake")
	}
	resp, doc = a.get("/patients?q=hawk")
	wantStatus(t, resp, http.StatusOK)
	if doc.Find("[data-testid=patient-link]").Length() != 1 {
		t.Error("search for hawk does not list the patient")
	}
}

func TestIntake_Validation(t *testing.T) {
	cases := []struct {
		name, field, value, want string
	}{
		{"ErrSpeciesUnknown", "species", "Dodo", "not in the reference table"},
		{"ErrMassEmpty", "intake_mass_g", "", "required"},
		{"ErrMassText", "intake_mass_g", "heavy", "enter a number"},
		{"ErrMassKilograms", "intake_mass_g", "1.2", "did you mean kilograms"},
		{"ErrMassMilligrams", "intake_mass_g", "350000", "grams"},
		{"ErrDate", "found_date", "yesterday", "YYYY-MM-DD"},
		{"ErrReason", "reason", "", "admitted"},
		{"ErrLatitude", "found_lat", "123", "latitude"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			a.login("kim", records.RoleStaff)
			a.get("/intake")
			f := intakeForm()
			f.Set(tc.field, tc.value)
			if tc.field == "found_lat" {
				f.Set("found_lon", "2")
			}
			resp, doc := a.post("/intake", f)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			msg := doc.Find("#"+tc.field).NextFilteredUntil(".field-error", "label").First().Text()
			if msg == "" {
				msg = doc.Find(".field-error").Text()
			}
			if !strings.Contains(msg, tc.want) {
				t.Errorf("message %q, want it to contain %q", msg, tc.want)
			}
			if got, _ := doc.Find("#found_place").Attr("value"); got != "Field by the A6" {
				t.Errorf("refused form lost what was typed: found_place %q", got)
			}
			list, _ := a.store.Patients(context.Background(), records.PatientFilter{})
			if len(list) != 0 {
				t.Errorf("%d patients stored, want 0", len(list))
			}
		})
	}
}

func TestIntake_ImplausibleMassNeedsConfirmation(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	a.get("/intake")
	f := intakeForm()
	f.Set("intake_mass_g", "450") // under half a female red-tail's lower bound
	resp, doc := a.post("/intake", f)
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if doc.Find("[data-testid=mass-confirm]").Length() != 1 {
		t.Fatal("no confirmation box for an implausible mass")
	}
	if !strings.Contains(doc.Find(".field-error").Text(), "kilograms") {
		t.Errorf("message %q does not suggest a unit mix-up", doc.Find(".field-error").Text())
	}
	f.Set("confirm_mass", "1")
	f.Set("mass_note", "severely emaciated, weighed twice")
	resp, _ = a.post("/intake", f)
	wantStatus(t, resp, http.StatusSeeOther)
	p, err := a.store.PatientByCase(context.Background(), "2026-0001")
	if err != nil || p.MassNote == "" || p.IntakeMassG != 450 {
		t.Errorf("confirmed intake = %+v, %v", p, err)
	}
}

func TestPatient_NotFound(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	resp, _ := a.get("/patients/1999-9999")
	wantStatus(t, resp, http.StatusNotFound)
}

func TestRedactFinder_AdminOnly(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	a.get("/intake")
	resp, _ := a.post("/intake", intakeForm())
	wantStatus(t, resp, http.StatusSeeOther)
	resp, _ = a.post("/patients/2026-0001/redact-finder", url.Values{"confirm": {"1"}})
	wantStatus(t, resp, http.StatusForbidden)

	b := newTestApp(t)
	b.login("boss", records.RoleAdmin, records.RoleStaff)
	b.get("/intake")
	b.post("/intake", intakeForm())
	_, doc := b.get("/patients/2026-0001")
	if !strings.Contains(doc.Find("[data-testid=finder]").Text(), "Ada Finder") {
		t.Fatal("finder not shown to staff on the patient page")
	}
	resp, _ = b.post("/patients/2026-0001/redact-finder", url.Values{"confirm": {"1"}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = b.get("/patients/2026-0001")
	if strings.Contains(doc.Text(), "Ada Finder") {
		t.Error("the finder's name is still on the page (record or history) after redaction")
	}
	if !strings.Contains(doc.Find("[data-testid=audit-history]").Text(), "redact") {
		t.Error("the history does not say a redaction happened")
	}
}

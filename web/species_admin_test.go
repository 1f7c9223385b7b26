package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"aloft/assess"
	"aloft/records"
)

// TestSpeciesAdmin_OverrideBesideShipped: a vet sets the Mallard's span;
// the species page shows the shipped 880 mm (Alerstam et al. 2007, as
// shipped) beside the centre's 950 mm and who set it; the list marks the
// change; the engine's species uses it; the change is audited; one click
// brings the shipped value back.
func TestSpeciesAdmin_OverrideBesideShipped(t *testing.T) {
	a := newTestApp(t)
	vet := a.login("vic", records.RoleVet)
	ctx := context.Background()
	resp, doc := a.get("/species/Anas-platyrhynchos/override")
	wantStatus(t, resp, http.StatusOK)
	if got := doc.Find(`[data-field=span_mm] [data-testid=field-shipped]`).Text(); !strings.Contains(got, "880 mm") {
		t.Errorf("the form's shipped span: got %q", got)
	}
	if doc.Find(`[data-field=group]`).Length() != 0 {
		t.Error("the form offers to change a shipped species' group")
	}
	resp, _ = a.post("/species/Anas-platyrhynchos/override", url.Values{"span_mm": {"950"}, "note": {"our own birds"}})
	wantStatus(t, resp, http.StatusSeeOther)
	_, doc = a.get("/species/Anas-platyrhynchos")
	row := doc.Find(`[data-testid=species-value][data-field=span_mm]`)
	if row.AttrOr("data-override", "") != "true" || strings.TrimSpace(row.Find("[data-testid=shipped-value]").Text()) != "880 mm" ||
		strings.TrimSpace(row.Find("[data-testid=current-value]").Text()) != "950 mm" ||
		!strings.Contains(row.Find("[data-testid=override-by]").Text(), vet.DisplayName) {
		t.Errorf("species page row: %q", strings.Join(strings.Fields(row.Text()), " "))
	}
	_, doc = a.get("/species?q=mallard")
	if got := doc.Find(`[data-species="Anas platyrhynchos"] [data-testid=species-centre]`).Text(); got != "1 value of the centre's" {
		t.Errorf("list: got %q", got)
	}
	sp, err := a.store.SpeciesFor(ctx, "Anas platyrhynchos")
	if err != nil || sp.SpanMM != 950 || sp.Sources["span_mm"].Provenance != assess.ProvCentreSetting {
		t.Errorf("engine's species: span %v, source %+v, %v", sp.SpanMM, sp.Sources["span_mm"], err)
	}
	if audit, _ := a.store.Audit(ctx, records.AuditFilter{Entity: "species_override"}); len(audit) != 1 || audit[0].UserID != vet.ID {
		t.Errorf("audit: %+v", audit)
	}
	a.get("/species/Anas-platyrhynchos/override")
	resp, _ = a.post("/species/Anas-platyrhynchos/override/reset", url.Values{"field": {"span_mm"}})
	wantStatus(t, resp, http.StatusSeeOther)
	if sp, _ := a.store.SpeciesFor(ctx, "Anas platyrhynchos"); sp.SpanMM != 880 {
		t.Errorf("after the reset: span %v, want 880", sp.SpanMM)
	}
}

// TestSpeciesAdmin_Refused: a bad value re-renders the form with what was
// typed and the reason beside the field (422); nothing is stored.
func TestSpeciesAdmin_Refused(t *testing.T) {
	a := newTestApp(t)
	a.login("rae", records.RoleRehabilitator)
	a.get("/species/Anas-platyrhynchos/override")
	resp, doc := a.post("/species/Anas-platyrhynchos/override", url.Values{"span_mm": {"9 m"}, "mass_range_g.male.min": {"1200"},
		"mass_range_g.male.max": {"900"}})
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if got := doc.Find("input[name=span_mm]").AttrOr("value", ""); got != "9 m" {
		t.Errorf("typed span kept: got %q", got)
	}
	for _, f := range []string{"span_mm", "mass_range_g.male"} {
		if doc.Find(`[data-field="`+f+`"] .field-error`).Length() != 1 {
			t.Errorf("no message beside %s", f)
		}
	}
	if settingsCount(t, a.store, "species_overrides") != 0 {
		t.Error("a refused form stored values")
	}
}

// TestSpeciesAdmin_AddSpecies: a species that is not shipped is added with
// its required values and then found by intake's table and the list.
// Values: Black Swan about 5 kg with a span about 1.8 m [from memory]; the
// area is the Mute Swan's 6504 cm² × (1800/2300)² [derived, SCIENCE.md §2].
func TestSpeciesAdmin_AddSpecies(t *testing.T) {
	a := newTestApp(t)
	a.login("ada", records.RoleAdmin)
	a.get("/species/new")
	form := url.Values{"scientific_name": {"Cygnus atratus"}, "common_name": {"Black Swan"}, "group": {"swan-goose"},
		"passerine": {"no"}, "migrant": {"no"}, "mass_g.pooled": {"5000"}, "span_mm": {"1800"}, "area_cm2": {"3983"},
		"launch_mode": {"run-up-water"}, "note": {"escaped collection birds (values from memory)"}}
	missing := url.Values{}
	for k, v := range form {
		if k != "span_mm" {
			missing[k] = v
		}
	}
	resp, doc := a.post("/species/new", missing)
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if doc.Find(`[data-field=span_mm] .field-error`).Length() != 1 || doc.Find("input[name=scientific_name]").AttrOr("value", "") != "Cygnus atratus" {
		t.Error("without a span: no message beside it, or the name typed was lost")
	}
	resp, _ = a.post("/species/new", form)
	wantStatus(t, resp, http.StatusSeeOther)
	tab, _ := a.store.SpeciesTable(context.Background())
	if sp, err := tab.Find("Black Swan"); err != nil || !tab.Added(sp.ScientificName) {
		t.Fatalf("added species not found: %v", err)
	}
	_, doc = a.get("/species?q=black+swan")
	if got := doc.Find(`[data-species="Cygnus atratus"] [data-testid=species-centre]`).Text(); got != "added by the centre" {
		t.Errorf("list: got %q", got)
	}
	_, doc = a.get("/species/Cygnus-atratus")
	if doc.Find("[data-testid=species-added]").Length() != 1 {
		t.Error("the species page does not say the centre added it")
	}
}

package web

import (
	"context"
	"net/http"
	"net/url"
	"os"
	"strings"
	"testing"

	"aloft/assess"
	"aloft/records"
	"aloft/records/demo"
	"aloft/records/recordstest"
)

// settingsDemo is a test app holding the invented demo centre, seeded at
// the test clock's time.
func settingsDemo(t *testing.T) *testApp {
	t.Helper()
	a := newTestApp(t)
	sc, err := demo.Load(os.DirFS("../testdata/demo"))
	if err != nil {
		t.Fatal(err)
	}
	if err := demo.Seed(context.Background(), a.store, speciesTable, sc, a.clock.Now()); err != nil {
		t.Fatal(err)
	}
	return a
}

// settingsCount counts the rows of a table.
func settingsCount(t *testing.T, s *records.Store, table string) int {
	t.Helper()
	var n int
	if err := s.DB().QueryRow(`SELECT count(*) FROM ` + table).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

// readyWithPasses finds a demo patient in care whose advice is "ready" and
// whose stamina criterion is met against its group's pass count.
func readyWithPasses(t *testing.T, a *testApp) (records.Patient, assess.Group) {
	t.Helper()
	ctx := context.Background()
	ps, err := a.store.Patients(ctx, records.PatientFilter{Status: string(assess.DispInCare)})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range ps {
		got, err := a.store.Assess(ctx, p, nil, a.clock.Now())
		if err != nil || got.Outcome.Level != assess.OutcomeReady {
			continue
		}
		if c, ok := got.Criterion(assess.CritStamina); ok && c.Status == assess.StatusMet {
			return p, got.Species.Species.Group
		}
	}
	t.Fatal("no demo patient in care is ready on its passes")
	return records.Patient{}, ""
}

// TestSettings_ThresholdChangeChangesOutcome: an admin raising the pass
// count of a ready demo patient's group beyond its best run turns its
// advice from ready to keep conditioning, at once, visibly on the
// thresholds page (centre setting, by whom) and with an audit row; one
// click on reset brings the default back.
func TestSettings_ThresholdChangeChangesOutcome(t *testing.T) {
	a := settingsDemo(t)
	ctx := context.Background()
	p, group := readyWithPasses(t, a)
	admin := a.login("ada", records.RoleAdmin)
	a.get("/settings/thresholds")
	before := settingsCount(t, a.store, "audit_log")
	resp, _ := a.post("/settings/thresholds", url.Values{"threshold": {"passes"}, "group": {string(group)}, "value": {"100"},
		"note": {"a test of the bar"}})
	wantStatus(t, resp, http.StatusSeeOther)
	got, err := a.store.Assess(ctx, p, nil, a.clock.Now())
	if err != nil {
		t.Fatal(err)
	}
	if got.Outcome.Level != assess.OutcomeContinue {
		t.Errorf("%s after 100 passes: outcome %s, want continue", p.CaseNumber, got.Outcome.Level)
	}
	if c, _ := got.Criterion(assess.CritStamina); c.Status != assess.StatusUnmet || c.Provenance.Kind != assess.ProvCentreSetting {
		t.Errorf("stamina: got %s (%s), want unmet as a centre setting", c.Status, c.Provenance.Kind)
	}
	audit, _ := a.store.Audit(ctx, records.AuditFilter{Entity: "threshold_setting", Limit: 1})
	if settingsCount(t, a.store, "audit_log") != before+1 || len(audit) != 1 || audit[0].UserID != admin.ID {
		t.Errorf("audit: %d new rows, latest %+v", settingsCount(t, a.store, "audit_log")-before, audit)
	}
	_, doc := a.get("/settings/thresholds")
	row := doc.Find(`[data-testid=threshold][data-threshold=passes][data-group="` + string(group) + `"]`)
	if row.AttrOr("data-changed", "") != "true" || strings.TrimSpace(row.Find("[data-testid=threshold-current]").Text()) != "100" ||
		!strings.Contains(row.Find("[data-testid=threshold-setby]").Text(), admin.DisplayName) {
		t.Errorf("thresholds page row: changed %q, current %q, by %q", row.AttrOr("data-changed", ""),
			row.Find("[data-testid=threshold-current]").Text(), row.Find("[data-testid=threshold-setby]").Text())
	}
	resp, _ = a.post("/settings/thresholds/reset", url.Values{"threshold": {"passes"}, "group": {string(group)}})
	wantStatus(t, resp, http.StatusSeeOther)
	if got, _ := a.store.Assess(ctx, p, nil, a.clock.Now()); got.Outcome.Level == assess.OutcomeContinue {
		t.Errorf("after the reset: outcome %s", got.Outcome.Level)
	}
}

// TestSettings_ThresholdsPage: every threshold is shown with its default
// and provenance (PRACTICE.md: 7 days of staleness and a 1 m drop cap, each
// common practice; 10 passes for raptors), including the flight model's
// tables (SCIENCE.md §5: muscle factor 0.45 for score 0).
func TestSettings_ThresholdsPage(t *testing.T) {
	a := newTestApp(t)
	a.login("ada", records.RoleAdmin)
	resp, doc := a.get("/settings/thresholds")
	wantStatus(t, resp, http.StatusOK)
	if n, want := doc.Find("[data-testid=threshold-section]").Length(), 8; n != want {
		t.Errorf("%d sections, want %d", n, want)
	}
	cases := []struct {
		id, group, def, kind string
	}{
		{"stale-days", "", "7", "Common practice"},
		{"drop-height-cap", "", "1", "Common practice"},
		{"passes", "raptor", "10", "Common practice"},
		{"passes", "gull", "none", ""},
		{"muscle-factor-0", "", "0.45", "Aloft's default"},
		{"fat-fraction-0-8-8", "", "0.36", "Aloft's default"},
	}
	for _, tc := range cases {
		t.Run(tc.id+"/"+tc.group, func(t *testing.T) {
			sel := `[data-testid=threshold][data-threshold="` + tc.id + `"]`
			if tc.group != "" {
				sel += `[data-group="` + tc.group + `"]`
			}
			row := doc.Find(sel)
			if row.Length() != 1 {
				t.Fatalf("%d rows", row.Length())
			}
			if got := strings.TrimSpace(row.Find("[data-testid=threshold-default]").Text()); got != tc.def {
				t.Errorf("default: got %q, want %q", got, tc.def)
			}
			if !strings.Contains(row.Find("td.source").Text(), tc.kind) {
				t.Errorf("provenance: got %q, want %q", row.Find("td.source").Text(), tc.kind)
			}
			if row.Find("[data-testid=threshold-form]").Length() != 1 {
				t.Error("no form to change it")
			}
		})
	}
}

// TestSettings_ThresholdRefused: a value out of range is refused (422),
// with the value typed kept and the reason beside the row; nothing is
// written.
func TestSettings_ThresholdRefused(t *testing.T) {
	a := newTestApp(t)
	a.login("ada", records.RoleAdmin)
	a.get("/settings/thresholds")
	before := settingsCount(t, a.store, "audit_log")
	for _, value := range []string{"400", "ten"} {
		resp, doc := a.post("/settings/thresholds", url.Values{"threshold": {"stale-days"}, "value": {value}})
		wantStatus(t, resp, http.StatusUnprocessableEntity)
		row := doc.Find(`[data-testid=threshold][data-threshold="stale-days"]`)
		if got := row.Find("input[name=value]").AttrOr("value", ""); got != value {
			t.Errorf("typed %q: the form holds %q", value, got)
		}
		if row.Find(".field-error").Length() != 1 || doc.Find("[data-testid=form-error]").Length() != 1 {
			t.Errorf("typed %q: no message beside the row", value)
		}
	}
	if settingsCount(t, a.store, "audit_log") != before || settingsCount(t, a.store, "threshold_settings") != 0 {
		t.Error("a refused change wrote something")
	}
}

// TestSettings_Roles: only an admin changes thresholds; vets,
// rehabilitators and admins set species values; rehabilitators and admins
// change release sites; everyone reads the species and the sites. A refused
// change writes nothing.
func TestSettings_Roles(t *testing.T) {
	cases := []struct {
		name    string
		method  string
		path    string
		form    url.Values
		allowed []records.Role
	}{
		{"ThresholdsPage", http.MethodGet, "/settings/thresholds", nil, []records.Role{records.RoleAdmin}},
		{"SetThreshold", http.MethodPost, "/settings/thresholds", url.Values{"threshold": {"stale-days"}, "value": {"5"}}, []records.Role{records.RoleAdmin}},
		{"ResetThreshold", http.MethodPost, "/settings/thresholds/reset", url.Values{"threshold": {"stale-days"}}, []records.Role{records.RoleAdmin}},
		{"Override", http.MethodPost, "/species/Anas-platyrhynchos/override", url.Values{"span_mm": {"900"}}, speciesEditors},
		{"OverrideForm", http.MethodGet, "/species/Anas-platyrhynchos/override", nil, speciesEditors},
		{"AddSpecies", http.MethodPost, "/species/new", url.Values{"scientific_name": {"Cygnus atratus"}}, speciesEditors},
		{"AddSite", http.MethodPost, "/sites", url.Values{"name": {"Ridge"}, "elevation_m": {"300"}}, siteEditors},
		{"SpeciesList", http.MethodGet, "/species", nil, records.AllRoles},
		{"SpeciesDetail", http.MethodGet, "/species/Anas-platyrhynchos", nil, records.AllRoles},
		{"Sites", http.MethodGet, "/sites", nil, records.AllRoles},
		{"Settings", http.MethodGet, "/settings", nil, records.AllRoles},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			for _, role := range records.AllRoles {
				a.login("u-"+string(role), role)
				before := settingsCount(t, a.store, "audit_log")
				var resp *http.Response
				if tc.method == http.MethodGet {
					resp, _ = a.get(tc.path)
				} else {
					form := url.Values{}
					for k, v := range tc.form {
						form[k] = v
					}
					resp, _ = a.post(tc.path, form)
				}
				allowed := false
				for _, r := range tc.allowed {
					allowed = allowed || r == role
				}
				switch {
				case allowed && resp.StatusCode == http.StatusForbidden:
					t.Errorf("%s as %s: 403, want it allowed", tc.path, role)
				case !allowed && resp.StatusCode != http.StatusForbidden:
					t.Errorf("%s as %s: status %d, want 403", tc.path, role, resp.StatusCode)
				case !allowed && settingsCount(t, a.store, "audit_log") != before:
					t.Errorf("%s as %s was refused but wrote audit rows", tc.path, role)
				}
			}
		})
	}
}

// TestSettings_DropCapOnTrialForm: the takeoff-trial form offers drop tests
// up to the centre's cap, not Aloft's default of 1 m (PRACTICE.md, common
// practice).
func TestSettings_DropCapOnTrialForm(t *testing.T) {
	a := newTestApp(t)
	admin := a.login("ada", records.RoleAdmin, records.RoleStaff)
	ctx := context.Background()
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.AdmittedAt = recordstest.Epoch
	p, err := a.store.AdmitPatient(ctx, admin.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := a.store.SetThreshold(ctx, admin.ID, assess.ThDropCapM, "", 0.5, ""); err != nil {
		t.Fatal(err)
	}
	resp, doc := a.get("/patients/" + p.CaseNumber + "/trials/new")
	wantStatus(t, resp, http.StatusOK)
	if !strings.Contains(doc.Text(), "from at most 0.5 m") {
		t.Error("the trial form does not show the centre's drop cap of 0.5 m")
	}
}

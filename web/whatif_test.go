package web

import (
	"context"
	"encoding/json"
	"io"
	"math"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// whatIfTables are the tables a what-if must never write to.
var whatIfTables = []string{"audit_log", "entries", "patients", "threshold_settings", "species_overrides", "release_sites", "report_versions"}

func whatIfCounts(t *testing.T, s *records.Store) map[string]int {
	t.Helper()
	out := map[string]int{}
	for _, tab := range whatIfTables {
		out[tab] = settingsCount(t, s, tab)
	}
	return out
}

// whatIfHawk is a centre 100 m up with a release site 900 m up, a staff
// login, and a female red-tailed hawk with invented records: weigh-ins, a
// condition score, a traced wing, a takeoff trial and a flight session.
func whatIfHawk(t *testing.T) (*testApp, records.Patient) {
	t.Helper()
	a := newTestApp(t)
	a.clock.Advance(10 * 24 * time.Hour)
	ctx := context.Background()
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.Sex, in.AdmittedAt = assess.SexFemale, recordstest.Epoch
	p, err := a.store.AdmitPatient(ctx, 0, in)
	if err != nil {
		t.Fatal(err)
	}
	day := func(d int) time.Time { return recordstest.Epoch.Add(time.Duration(d*24+2) * time.Hour) }
	must := func(_ records.Entry, err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	for i, g := range []float64{1100, 1140, 1170} {
		must(a.store.AddWeighIn(ctx, 0, p.ID, assess.WeighIn{At: day(3 * i), MassG: g, Fed: assess.FedBefore}, records.AddOpts{}))
	}
	fat, muscle := 3, 3
	must(a.store.AddCondition(ctx, 0, p.ID, assess.ConditionScore{At: day(8), FatScore: &fat, FatScale: "0-8", MuscleScore: &muscle}, records.AddOpts{}))
	span, area := 1195.0, 2250.0
	must(a.store.AddWing(ctx, 0, p.ID, assess.WingMeasurement{At: day(2), SpanMM: &span, AreaCM2: &area, AreaMethod: assess.AreaTraced}, records.AddOpts{}))
	must(a.store.AddTrial(ctx, 0, p.ID, assess.TakeoffTrial{At: day(8), Mode: assess.LaunchStanding, Surface: "grass",
		Wind: assess.WindCalm, WindDir: assess.WindNone, Attempts: []assess.AttemptResult{assess.AttemptClimbed}}, records.AddOpts{}))
	length, rec := 15.0, 90
	must(a.store.AddSession(ctx, 0, p.ID, assess.FlightSession{At: day(9), Exercise: assess.ExerciseCage, EnclosureName: "Flight cage 1",
		EnclosureLengthM: &length, Passes: 12, LongestRun: 10, Highest: assess.HeightHighPerch, Landings: 12, LandingsControlled: 11,
		RecoveryS: &rec, Droop: assess.DroopNone}, records.AddOpts{}))
	if _, err := a.store.AddReleaseSite(ctx, 0, records.ReleaseSiteInput{Name: "Upland Gate", ElevationM: 900}); err != nil {
		t.Fatal(err)
	}
	a.login("sam", records.RoleStaff)
	return a, p
}

// TestWhatIf_NeverWrites: the page, its fragment and its chart, with every
// kind of change, write nothing to the records or the audit trail.
func TestWhatIf_NeverWrites(t *testing.T) {
	a, p := whatIfHawk(t)
	before := whatIfCounts(t, a.store)
	q := "?mass_g=950&span_loss_pct=10&area_loss_pct=15&muscle_score=1&site=Upland+Gate&temp_c=25"
	base := a.srv.URL + "/patients/" + p.CaseNumber
	for _, u := range []string{"/what-if" + q, "/what-if", "/charts/what-if.svg" + q, "/what-if?mass_g=-3"} {
		resp, err := a.client.Get(base + u)
		if err != nil {
			t.Fatal(err)
		}
		io.Copy(io.Discard, resp.Body)
		resp.Body.Close()
	}
	req, _ := http.NewRequest(http.MethodGet, base+"/what-if"+q, nil)
	req.Header.Set(whatIfFragmentHeader, "whatif")
	if resp, err := a.client.Do(req); err == nil {
		resp.Body.Close()
	}
	after := whatIfCounts(t, a.store)
	for _, tab := range whatIfTables {
		if after[tab] != before[tab] {
			t.Errorf("%s: %d rows before, %d after a what-if", tab, before[tab], after[tab])
		}
	}
}

// TestWhatIf_Page: the page works without JavaScript (a GET form) and shows
// the assessment as recorded beside the what-if's: a muscle score of 0
// makes the pectoral-muscle criterion unmet (PRACTICE.md: 0–1 unmet, common
// practice) while the record's own stays as it was; the chart is the
// what-if's, served under the chart policy; the fragment comes without the
// page around it.
func TestWhatIf_Page(t *testing.T) {
	a, p := whatIfHawk(t)
	path := "/patients/" + p.CaseNumber + "/what-if?muscle_score=0&site=Upland+Gate"
	resp, doc := a.get(path)
	wantStatus(t, resp, http.StatusOK)
	form := doc.Find("form#whatif-form")
	if form.AttrOr("method", "") != "get" || form.Find("select[name=site] option[value='Upland Gate']").AttrOr("selected", "x") == "x" {
		t.Error("no GET form with the site chosen")
	}
	row := doc.Find(`[data-testid=whatif-criterion][data-criterion=pectoral-muscle]`)
	if row.AttrOr("data-alt", "") != string(assess.StatusUnmet) || row.AttrOr("data-base", "") == string(assess.StatusUnmet) {
		t.Errorf("pectoral muscle: as recorded %q, what if %q", row.AttrOr("data-base", ""), row.AttrOr("data-alt", ""))
	}
	if !strings.Contains(doc.Find("[data-testid=whatif-alt]").Text(), "Upland Gate") {
		t.Error("the what-if does not name the release site")
	}
	if doc.Find(`script[src="/static/whatif.js"]`).Length() != 1 {
		t.Error("no whatif.js")
	}
	src := doc.Find(`[data-testid=chart-whatif-power] img`).AttrOr("src", "")
	if !strings.Contains(src, "/charts/what-if.svg?") || !strings.Contains(src, "muscle_score=0") {
		t.Fatalf("what-if chart src %q", src)
	}
	cr, err := a.client.Get(a.srv.URL + src)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(cr.Body)
	cr.Body.Close()
	if cr.StatusCode != http.StatusOK || cr.Header.Get("Content-Type") != "image/svg+xml" || cr.Header.Get("Content-Security-Policy") != ChartCSP ||
		!strings.Contains(string(body), "<svg") {
		t.Errorf("chart: %d %s %q", cr.StatusCode, cr.Header.Get("Content-Type"), cr.Header.Get("Content-Security-Policy"))
	}
	req, _ := http.NewRequest(http.MethodGet, a.srv.URL+path, nil)
	req.Header.Set(whatIfFragmentHeader, "whatif")
	fr, err := a.client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	frag, _ := goquery.NewDocumentFromReader(fr.Body)
	fr.Body.Close()
	if frag.Find("form#whatif-form").Length() != 0 || frag.Find("[data-testid=whatif-outcomes]").Length() != 1 {
		t.Error("the fragment is not just the result")
	}
}

// TestWhatIf_Refused: bad input is 422 with the message beside the field,
// the record's own assessment still shown.
func TestWhatIf_Refused(t *testing.T) {
	a, p := whatIfHawk(t)
	cases := []struct{ query, field string }{
		{"mass_g=-3", "mass_g"},
		{"span_loss_pct=80", "span_loss_pct"},
		{"muscle_score=4", "muscle_score"},
		{"site=Nowhere", "site"},
		{"temp_c=hot", "temp_c"},
		{"site=Upland+Gate&temp_c=70", "temp_c"},
	}
	for _, tc := range cases {
		t.Run(tc.field, func(t *testing.T) {
			resp, doc := a.get("/patients/" + p.CaseNumber + "/what-if?" + tc.query)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			if doc.Find("#"+tc.field).Parent().Find(".field-error").Length() != 1 {
				t.Errorf("no message beside %s", tc.field)
			}
			if doc.Find("[data-testid=whatif-base] [data-testid=outcome-level]").Length() != 1 {
				t.Error("the record's own assessment is not shown")
			}
		})
	}
}

// TestWhatIf_DirectionOfEffects checks the what-if against SCIENCE.md §5's
// direction of effects: a shorter span lowers the power margin; less area
// at the same span leaves the margin alone and raises the minimum speed; a
// lower muscle score lowers the margin; a higher site lowers the healthy
// margin at the site.
func TestWhatIf_DirectionOfEffects(t *testing.T) {
	a, p := whatIfHawk(t)
	ctx := context.Background()
	sp, _ := a.store.SpeciesFor(ctx, p.SpeciesScientific)
	in, _ := a.store.CaseInputs(ctx, p)
	th, _ := a.store.Thresholds(ctx)
	now := a.clock.Now()
	eval := func(w whatIf) *assess.Physics {
		t.Helper()
		alt, _ := applyWhatIf(in, sp, w, now)
		site := assess.Site{ElevationM: 100}
		if w.site != nil {
			site = *w.site
		}
		got, err := assess.Evaluate(alt, sp, th, site, now)
		if err != nil || got.Physics == nil {
			t.Fatalf("evaluate %+v: %v", w, err)
		}
		return got.Physics
	}
	pct := func(x float64) *float64 { return &x }
	zero := 0
	base := eval(whatIf{})
	span := eval(whatIf{spanLoss: pct(15)})
	area := eval(whatIf{areaLoss: pct(20)})
	muscle := eval(whatIf{muscle: &zero})
	high := eval(whatIf{site: &assess.Site{ElevationM: 2000}})
	if !(span.PowerMargin < base.PowerMargin) {
		t.Errorf("15 %% less span: margin %.3f, recorded %.3f, want lower", span.PowerMargin, base.PowerMargin)
	}
	if d := area.PowerMargin - base.PowerMargin; d > 1e-9 || d < -1e-9 || !(area.MinSpeedMS > base.MinSpeedMS) {
		t.Errorf("20 %% less area: margin %.4f (recorded %.4f), V_min %.3f (recorded %.3f)", area.PowerMargin, base.PowerMargin, area.MinSpeedMS, base.MinSpeedMS)
	}
	if !(muscle.PowerMargin < base.PowerMargin) {
		t.Errorf("muscle score 0: margin %.3f, recorded %.3f", muscle.PowerMargin, base.PowerMargin)
	}
	if !(high.ExpectedMarginSite < base.ExpectedMarginSite) {
		t.Errorf("2000 m: healthy margin %.3f, at 100 m %.3f", high.ExpectedMarginSite, base.ExpectedMarginSite)
	}
	// The records themselves are untouched by applyWhatIf.
	if again, _ := a.store.CaseInputs(ctx, p); len(again.WeighIns) != len(in.WeighIns) || len(in.Wings) != 1 {
		t.Error("applyWhatIf changed the records")
	}
}

// TestSites_PageAndNamedSite: a rehabilitator adds a release site; it is
// listed with its air density (U.S. Standard Atmosphere 1976: 1.1117 kg/m³
// at 1000 m), offered by name, and ?site=NAME assesses there.
func TestSites_PageAndNamedSite(t *testing.T) {
	a, p := whatIfHawk(t)
	a.login("rae", records.RoleRehabilitator)
	a.get("/sites")
	resp, _ := a.post("/sites", url.Values{"name": {"High Fell"}, "elevation_m": {"1000"}, "notes": {"heath"}})
	wantStatus(t, resp, http.StatusSeeOther)
	resp, doc := a.post("/sites", url.Values{"name": {"high fell"}, "elevation_m": {"10"}})
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if doc.Find("#site-name").Parent().Find(".field-error").Length() == 0 {
		t.Error("a duplicate name has no message")
	}
	_, doc = a.get("/sites")
	row := doc.Find(`[data-testid=site][data-site="High Fell"]`)
	if rho := whatIfDensity(row.Find("td").Eq(2).Text()); math.Abs(rho-1.1117) > 2e-4 {
		t.Errorf("site row's air density: got %v, want 1.1117 ± 0.0002", rho)
	}
	_, doc = a.get("/patients/" + p.CaseNumber + "/what-if?site=High+Fell")
	var alt float64
	doc.Find("[data-testid=whatif-number]").Each(func(_ int, r *goquery.Selection) {
		if strings.HasPrefix(r.Find("td").First().Text(), "Air density") {
			alt = whatIfDensity(r.Find("td").Eq(2).Text())
		}
	})
	if math.Abs(alt-1.1117) > 2e-4 {
		t.Errorf("the what-if at High Fell: air density %v, want 1.1117 ± 0.0002", alt)
	}
	// The assessment API takes the site by name too (issue 10): the same
	// density as the what-if's.
	api := func(query string) (int, float64) {
		resp, err := a.client.Get(a.srv.URL + "/api/v1/patients/" + p.CaseNumber + "/assessment?" + query)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		var body struct {
			Site struct {
				ElevationM float64 `json:"elevation_m"`
			} `json:"site"`
		}
		json.NewDecoder(resp.Body).Decode(&body)
		return resp.StatusCode, body.Site.ElevationM
	}
	if code, el := api("site=High+Fell"); code != http.StatusOK || el != 1000 {
		t.Errorf("API ?site=High Fell: status %d, elevation %v, want 200 and 1000", code, el)
	}
	if code, _ := api("site=Nowhere"); code != http.StatusUnprocessableEntity {
		t.Errorf("API ?site=Nowhere: status %d, want 422", code)
	}
	_, doc = a.get("/sites")
	edit := doc.Find(`[data-site="High Fell"] [data-testid=edit-site]`).AttrOr("href", "")
	_, doc = a.get(edit)
	action := doc.Find("[data-testid=site-edit-form]").AttrOr("action", "")
	resp, _ = a.post(action, url.Values{"name": {"High Fell"}, "elevation_m": {"980"}, "version": {"1"}, "retired": {"1"}})
	wantStatus(t, resp, http.StatusSeeOther)
	if active, _ := a.store.ReleaseSites(context.Background(), false); len(active) != 1 {
		t.Errorf("after retiring: %d active sites, want 1", len(active))
	}
}

// whatIfDensity reads the first number of a cell ("1.1116 kg/m³").
func whatIfDensity(cell string) float64 {
	f := strings.Fields(cell)
	if len(f) == 0 {
		return 0
	}
	v, _ := strconv.ParseFloat(f[0], 64)
	return v
}

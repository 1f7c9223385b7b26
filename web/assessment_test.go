package web

import (
	"context"
	"encoding/json"
	"io"
	"math"
	"net/http"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// assessFixture is a logged-in vet at a centre 100 m up with one named
// release site, High Moor Gate at 1350 m, and two patients:
// a female red-tailed hawk with a fortnight of invented records (weigh-ins,
// a condition score, a wing with a feather map, a takeoff trial, flight
// sessions), and a Cooper's hawk with none. The clock stands still, so the
// page and the API assess at the same instant.
func assessFixture(t *testing.T) (a *testApp, rich, bare records.Patient) {
	t.Helper()
	a = newTestApp(t)
	a.clock.Advance(14 * 24 * time.Hour)
	a.login("vera", records.RoleVet, records.RoleStaff)
	ctx := context.Background()
	admit := func(sci, common string, massG float64, sex assess.Sex) records.Patient {
		in := recordstest.Intake(sci, common, massG)
		in.Sex, in.AdmittedAt = sex, recordstest.Epoch
		p, err := a.store.AdmitPatient(ctx, 0, in)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	rich = admit("Buteo jamaicensis", "Red-tailed Hawk", 1100, assess.SexFemale)
	bare = admit("Accipiter cooperii", "Cooper's Hawk", 420, assess.SexFemale)
	day := func(d, h int) time.Time { return recordstest.Epoch.Add(time.Duration(d*24+h) * time.Hour) }
	must := func(_ records.Entry, err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	for i, g := range []float64{1100, 1135, 1160, 1178} {
		must(a.store.AddWeighIn(ctx, 0, rich.ID, assess.WeighIn{At: day(i*4, 0), MassG: g, Fed: assess.FedBefore}, records.AddOpts{}))
	}
	fat, muscle := 3, 2
	must(a.store.AddCondition(ctx, 0, rich.ID, assess.ConditionScore{At: day(12, 1), FatScore: &fat, FatScale: assess.FatScale("0-8"), MuscleScore: &muscle}, records.AddOpts{}))
	span, area := 1195.0, 2250.0
	intact := func(n int) []assess.FeatherStatus {
		s := make([]assess.FeatherStatus, n)
		for i := range s {
			s[i] = assess.FeatherIntact
		}
		return s
	}
	fm := &assess.FeatherMap{LeftPrimaries: intact(10), RightPrimaries: intact(10), LeftSecondaries: intact(13),
		RightSecondaries: intact(13), TailLeft: intact(6), TailRight: intact(6)}
	fm.LeftPrimaries[8] = assess.FeatherImped
	fm.RightSecondaries[3] = assess.FeatherPin
	must(a.store.AddWing(ctx, 0, rich.ID, assess.WingMeasurement{At: day(3, 2), SpanMM: &span, AreaCM2: &area,
		AreaMethod: assess.AreaTraced, Feathers: fm}, records.AddOpts{}))
	must(a.store.AddTrial(ctx, 0, rich.ID, assess.TakeoffTrial{At: day(11, 3), Mode: assess.LaunchStanding, Surface: "grass",
		Wind: assess.WindLight, WindDir: assess.WindHead, Attempts: []assess.AttemptResult{assess.AttemptClimbed, assess.AttemptShort}}, records.AddOpts{}))
	length := 15.0
	for i, passes := range []int{6, 9, 12} {
		rec := 120 - 20*i
		must(a.store.AddSession(ctx, 0, rich.ID, assess.FlightSession{At: day(8+2*i, 4), Exercise: assess.ExerciseCage,
			EnclosureName: "Flight cage 1", EnclosureLengthM: &length, Passes: passes, LongestRun: passes - 2,
			Highest: assess.HeightHighPerch, Landings: passes, LandingsControlled: passes - 1, RecoveryS: &rec,
			Droop: assess.DroopNone}, records.AddOpts{}))
	}
	if _, err := a.store.AddReleaseSite(ctx, 0, records.ReleaseSiteInput{Name: "High Moor Gate", ElevationM: 1350}); err != nil {
		t.Fatal(err)
	}
	return a, rich, bare
}

// getJSON fetches an API path with the test client and decodes the body.
func (a *testApp) getJSON(path string) (*http.Response, []byte, any) {
	a.t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		a.t.Fatal(err)
	}
	defer resp.Body.Close()
	body, _ := io.ReadAll(resp.Body)
	var v any
	if err := json.Unmarshal(body, &v); err != nil {
		a.t.Fatalf("GET %s: not JSON (%v): %.200s", path, err, body)
	}
	return resp, body, v
}

// jsonAt returns the value at a dot-separated path ("physics.speed_window_m_s.0").
func jsonAt(v any, path string) (any, bool) {
	for _, k := range strings.Split(path, ".") {
		switch x := v.(type) {
		case map[string]any:
			var ok bool
			if v, ok = x[k]; !ok {
				return nil, false
			}
		case []any:
			i, err := strconv.Atoi(k)
			if err != nil || i < 0 || i >= len(x) {
				return nil, false
			}
			v = x[i]
		default:
			return nil, false
		}
	}
	return v, true
}

// checkNumbers compares every number of the page tagged with a JSON path
// with the API's value there, rounded to the digits the page shows (a
// tolerance of half the last digit shown). It returns how many it checked.
func checkNumbers(t *testing.T, doc *goquery.Document, api any) int {
	t.Helper()
	n := 0
	doc.Find("[data-testid=num]").Each(func(_ int, el *goquery.Selection) {
		path, _ := el.Attr("data-json")
		scale, err := strconv.ParseFloat(el.AttrOr("data-scale", "1"), 64)
		if err != nil {
			t.Errorf("%s: data-scale %q", path, el.AttrOr("data-scale", ""))
			return
		}
		shown := strings.TrimSpace(el.Text())
		got, err := strconv.ParseFloat(shown, 64)
		if err != nil {
			t.Errorf("%s: the page shows %q, not a number", path, shown)
			return
		}
		raw, ok := jsonAt(api, path)
		want, isNum := raw.(float64)
		if !ok || !isNum {
			t.Errorf("%s: the API JSON has %v there, not a number", path, raw)
			return
		}
		digits := 0
		if i := strings.IndexByte(shown, '.'); i >= 0 {
			digits = len(shown) - i - 1
		}
		tol := 0.5*math.Pow(10, -float64(digits)) + 1e-9*math.Abs(want*scale)
		if math.Abs(got-want*scale) > tol {
			t.Errorf("%s: the page shows %s, the API %v (×%g): not equal to %d decimals", path, shown, want, scale, digits)
		}
		n++
	})
	return n
}

func TestAssessmentPage_MatchesAPI(t *testing.T) {
	a, rich, bare := assessFixture(t)
	cases := []struct {
		name     string
		p        records.Patient
		query    string
		minNums  int // numbers the page must show at least
		physics  bool
		elevText string
	}{
		{"RecordedAtCentre", rich, "", 29, true, "100"},
		{"RecordedHighWarmSite", rich, "?elevation_m=1500&temp_c=25", 30, true, "1500"},
		{"TemperatureOnly", rich, "?temp_c=-5", 30, true, "100"},
		{"NamedSite", rich, "?site=High+Moor+Gate&temp_c=8", 30, true, "1350"},
		{"NamedSiteWinsOverElevation", rich, "?site=High+Moor+Gate&elevation_m=20", 29, true, "1350"},
		{"NoRecords", bare, "", 7, false, "100"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, doc := a.get("/patients/" + tc.p.CaseNumber + "/assessment" + tc.query)
			wantStatus(t, resp, http.StatusOK)
			aresp, _, api := a.getJSON("/api/v1/patients/" + tc.p.CaseNumber + "/assessment" + tc.query)
			wantStatus(t, aresp, http.StatusOK)
			level, _ := jsonAt(api, "outcome.level")
			if got := doc.Find("[data-testid=assessment-outcome] [data-testid=outcome-level]").AttrOr("data-level", ""); got != level {
				t.Errorf("outcome level %q, API %q", got, level)
			}
			label, _ := jsonAt(api, "outcome.label")
			if got := doc.Find("[data-testid=assessment-outcome] [data-testid=outcome-label]").Text(); got != label {
				t.Errorf("outcome label %q, API %q", got, label)
			}
			reasons, _ := jsonAt(api, "outcome.reasons")
			if got, want := doc.Find("[data-testid=assessment-outcome] [data-testid=outcome-reason]").Length(), len(reasons.([]any)); got != want || want == 0 {
				t.Errorf("%d reasons shown, API %d (want at least one)", got, want)
			}
			// The outcome comes first, then the criteria, the chart, the numbers.
			var order []string
			doc.Find("main > section").Each(func(_ int, s *goquery.Selection) { order = append(order, s.AttrOr("data-testid", "")) })
			if want := "assessment-outcome assessment-criteria assessment-power assessment-physics assessment-cautions"; strings.Join(order, " ") != want {
				t.Errorf("sections %v, want %s", order, want)
			}
			if !strings.Contains(doc.Find("[data-testid=advisory]").Text(), "the licensed rehabilitator and the veterinarian decide") {
				t.Error("no advisory line")
			}
			checkCriteria(t, doc, api)
			if n := checkNumbers(t, doc, api); n < tc.minNums {
				t.Errorf("%d numbers checked, want at least %d", n, tc.minNums)
			}
			if got := strings.TrimSpace(doc.Find("[data-testid=site-elevation] .num").Text()); got != tc.elevText {
				t.Errorf("site elevation shown %q, want %q", got, tc.elevText)
			}
			if got := doc.Find("[data-testid=no-physics]").Length() == 0; got != tc.physics {
				t.Errorf("physics shown %v, want %v", got, tc.physics)
			}
			cautions, _ := jsonAt(api, "cautions")
			if got := doc.Find("[data-testid=case-caution]").Length(); got != len(cautions.([]any)) {
				t.Errorf("%d cautions shown, API %d", got, len(cautions.([]any)))
			}
			if doc.Find("[data-testid=assessment-cautions] a[href='/cautions']").Length() != 1 {
				t.Error("no link to the cautions page")
			}
		})
	}
}

// checkCriteria compares the criteria table with the API's criteria: the
// same criteria in the same order, each status, threshold, reason, stale
// marker and evidence text.
func checkCriteria(t *testing.T, doc *goquery.Document, api any) {
	t.Helper()
	raw, _ := jsonAt(api, "criteria")
	crit := raw.([]any)
	rows := doc.Find("[data-testid=criterion]")
	if rows.Length() != len(crit) || len(crit) == 0 {
		t.Fatalf("%d criteria rows, API %d", rows.Length(), len(crit))
	}
	rows.Each(func(i int, row *goquery.Selection) {
		c := crit[i].(map[string]any)
		if got := row.AttrOr("data-criterion", ""); got != c["id"] {
			t.Errorf("row %d is %q, API %q", i, got, c["id"])
		}
		if got := row.AttrOr("data-status", ""); got != c["status"] {
			t.Errorf("%s: status %q, API %q", c["id"], got, c["status"])
		}
		if got, want := row.Find("[data-testid=criterion-status]").Text(), statusWordsFor(c["status"].(string)); got != want {
			t.Errorf("%s: status words %q, want %q", c["id"], got, want)
		}
		if got := strings.TrimSpace(row.Find("[data-testid=criterion-threshold]").Text()); got != c["threshold"] {
			t.Errorf("%s: threshold %q, API %q", c["id"], got, c["threshold"])
		}
		if got := row.Find("[data-testid=criterion-reason]").Text(); !strings.HasPrefix(strings.TrimSpace(got), c["reason"].(string)) {
			t.Errorf("%s: reason %q, API %q", c["id"], got, c["reason"])
		}
		if got := row.Find("[data-testid=criterion-stale]").Length() == 1; got != c["stale"] {
			t.Errorf("%s: stale marker %v, API %v", c["id"], got, c["stale"])
		}
		ev := c["evidence"].([]any)
		texts := row.Find("[data-testid=evidence-text]")
		if texts.Length() != len(ev) {
			t.Errorf("%s: %d evidence items, API %d", c["id"], texts.Length(), len(ev))
			return
		}
		texts.Each(func(j int, s *goquery.Selection) {
			if want := ev[j].(map[string]any)["text"]; s.Text() != want {
				t.Errorf("%s: evidence %q, API %q", c["id"], s.Text(), want)
			}
		})
	})
}

func statusWordsFor(s string) string {
	return map[string]string{"met": "Met", "borderline": "Borderline", "unmet": "Not met", "not-assessed": "Not assessed"}[s]
}

func TestAssessmentPage_PowerChartSameNumbers(t *testing.T) {
	a, rich, _ := assessFixture(t)
	for _, q := range []string{"", "?elevation_m=2200&temp_c=30"} {
		_, doc := a.get("/patients/" + rich.CaseNumber + "/assessment" + q)
		img := doc.Find("[data-testid=assessment-power] img.chart")
		src := img.AttrOr("src", "")
		if want := "/patients/" + rich.CaseNumber + "/charts/power.svg" + q; src != want {
			t.Errorf("power chart src %q, want %q", src, want)
		}
		alt := img.AttrOr("alt", "")
		vmp := strings.TrimSpace(doc.Find("[data-testid=phys-vmp] .num").Text())
		vmr := strings.TrimSpace(doc.Find("[data-testid=phys-vmr] .num").Text())
		if vmp == "" || !strings.Contains(alt, "V_mp "+vmp+" m/s") || !strings.Contains(alt, "V_mr "+vmr+" m/s") {
			t.Errorf("%q: the chart's alt %q does not carry the page's V_mp %s and V_mr %s", q, alt, vmp, vmr)
		}
		// The SVG document served at src says the same in its <desc>.
		resp, err := a.client.Get(a.srv.URL + src)
		if err != nil {
			t.Fatal(err)
		}
		svg := parseSVGDoc(t, resp)
		if svg.Desc != alt {
			t.Errorf("%q: the SVG's desc differs from the page's alt:\n%s\n%s", q, svg.Desc, alt)
		}
	}
}

func TestAssessmentPage_BadSite(t *testing.T) {
	a, rich, _ := assessFixture(t)
	cases := []struct {
		name, query, field string
	}{
		{"ErrElevationText", "?elevation_m=high", "elevation_m"},
		{"ErrElevationRange", "?elevation_m=9000", "elevation_m"},
		{"ErrTemperatureRange", "?elevation_m=100&temp_c=70", "temp_c"},
		{"ErrTemperatureText", "?temp_c=warm", "temp_c"},
		{"ErrUnknownSite", "?site=Nowhere+Ridge", "site"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, doc := a.get("/patients/" + rich.CaseNumber + "/assessment" + tc.query)
			wantStatus(t, resp, http.StatusUnprocessableEntity)
			if doc.Find("[data-testid=site-form] .field-error").Length() != 1 {
				t.Error("no field error beside the site form")
			}
			if doc.Find("[data-testid=criterion]").Length() == 0 {
				t.Error("the assessment at the centre's site is not shown under the error")
			}
			aresp, _, v := a.getJSON("/api/v1/patients/" + rich.CaseNumber + "/assessment" + tc.query)
			wantStatus(t, aresp, http.StatusUnprocessableEntity)
			if f, _ := jsonAt(v, "field"); f != tc.field {
				t.Errorf("API error field %v, want %s (%v)", f, tc.field, v)
			}
			if e, _ := jsonAt(v, "error"); !strings.HasPrefix(e.(string), tc.field) {
				t.Errorf("API error %q does not name %s", e, tc.field)
			}
			cresp, err := a.client.Get(a.srv.URL + "/patients/" + rich.CaseNumber + "/charts/power.svg" + tc.query)
			if err != nil {
				t.Fatal(err)
			}
			cresp.Body.Close()
			wantStatus(t, cresp, http.StatusUnprocessableEntity)
		})
	}
}

func TestAssessmentAPI_Errors(t *testing.T) {
	a, rich, _ := assessFixture(t)
	resp, _, v := a.getJSON("/api/v1/patients/1999-0001/assessment")
	wantStatus(t, resp, http.StatusNotFound)
	if e, _ := jsonAt(v, "error"); !strings.Contains(e.(string), "1999-0001") {
		t.Errorf("404 error %v does not name the case", v)
	}
	if ct := resp.Header.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		t.Errorf("404 Content-Type %q", ct)
	}
	// Without a login, 401 in JSON; with a bearer token, the assessment.
	anon, err := http.Get(a.srv.URL + "/api/v1/patients/" + rich.CaseNumber + "/assessment")
	if err != nil {
		t.Fatal(err)
	}
	anon.Body.Close()
	wantStatus(t, anon, http.StatusUnauthorized)
	vet, err := a.store.UserByName(context.Background(), "vera")
	if err != nil {
		t.Fatal(err)
	}
	admin := recordstest.AddUser(t, a.store, "root", records.RoleAdmin)
	secret, _, err := a.store.IssueAPIToken(context.Background(), admin, vet.ID, "assessment test")
	if err != nil {
		t.Fatal(err)
	}
	req, _ := http.NewRequest(http.MethodGet, a.srv.URL+"/api/v1/patients/"+rich.CaseNumber+"/assessment", nil)
	req.Header.Set("Authorization", "Bearer "+secret)
	tok, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	byToken, _ := io.ReadAll(tok.Body)
	tok.Body.Close()
	wantStatus(t, tok, http.StatusOK)
	_, bySession, _ := a.getJSON("/api/v1/patients/" + rich.CaseNumber + "/assessment")
	if string(byToken) != string(bySession) {
		t.Error("the token and the session get different bytes")
	}
}

// TestAssessmentAPI_EncodedOnce: the API body is assess.EncodeAssessment's
// bytes for the store's assessment at the same instant.
func TestAssessmentAPI_EncodedOnce(t *testing.T) {
	a, rich, _ := assessFixture(t)
	_, body, _ := a.getJSON("/api/v1/patients/" + rich.CaseNumber + "/assessment?elevation_m=800")
	want, err := a.store.Assess(context.Background(), rich, &assess.Site{ElevationM: 800}, a.clock.Now())
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := assess.EncodeAssessment(&b, want); err != nil {
		t.Fatal(err)
	}
	if string(body) != b.String() {
		t.Errorf("API body differs from EncodeAssessment:\n%.300s\n%.300s", body, b.String())
	}
}

func TestPatientPage_OutcomeAndPictures(t *testing.T) {
	a, rich, bare := assessFixture(t)
	cases := []struct {
		name    string
		p       records.Patient
		imgs    int      // charts drawn
		missing []string // sentences instead of charts
	}{
		{"Recorded", rich, 4, nil},
		{"NoRecords", bare, 0, []string{"No weigh-ins yet.", "No flight sessions yet.", "No feather map recorded yet.", "No power curve: the flight model needs a weigh-in."}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, doc := a.get("/patients/" + tc.p.CaseNumber)
			wantStatus(t, resp, http.StatusOK)
			var order []string
			doc.Find("main > section").Each(func(_ int, s *goquery.Selection) { order = append(order, s.AttrOr("data-testid", "")) })
			if len(order) < 3 || order[0] != "patient-details" || order[1] != "section-assessment" || order[2] != "section-pictures" {
				t.Errorf("page sections %v: want the details, the assessment, then the pictures", order)
			}
			_, _, api := a.getJSON("/api/v1/patients/" + tc.p.CaseNumber + "/assessment")
			level, _ := jsonAt(api, "outcome.level")
			if got := doc.Find("[data-testid=outcome-summary] [data-testid=outcome-level]").AttrOr("data-level", ""); got != level {
				t.Errorf("summary level %q, API %q", got, level)
			}
			if href := doc.Find("[data-testid=assessment-link]").AttrOr("href", ""); href != "/patients/"+tc.p.CaseNumber+"/assessment" {
				t.Errorf("assessment link %q", href)
			}
			imgs := doc.Find("[data-testid=section-pictures] img.chart")
			if imgs.Length() != tc.imgs {
				t.Errorf("%d chart images, want %d", imgs.Length(), tc.imgs)
			}
			imgs.Each(func(_ int, img *goquery.Selection) {
				alt, words := img.AttrOr("alt", ""), img.Parent().Find("[data-testid=chart-alt]").Text()
				if alt == "" || alt != words {
					t.Errorf("%s: alt %q, the words under it %q", img.AttrOr("src", ""), alt, words)
				}
				if img.AttrOr("width", "") != "360" || img.AttrOr("height", "") == "" {
					t.Errorf("%s: size %s×%s, want 360 wide", img.AttrOr("src", ""), img.AttrOr("width", ""), img.AttrOr("height", ""))
				}
			})
			var missing []string
			doc.Find("[data-testid=section-pictures] [data-testid=chart-missing]").Each(func(_ int, s *goquery.Selection) {
				missing = append(missing, s.Text())
			})
			if strings.Join(missing, "|") != strings.Join(tc.missing, "|") {
				t.Errorf("missing charts %q, want %q", missing, tc.missing)
			}
		})
	}
}

func TestAssessmentPage_NamedSite(t *testing.T) {
	a, rich, _ := assessFixture(t)
	resp, doc := a.get("/patients/" + rich.CaseNumber + "/assessment?site=High+Moor+Gate&temp_c=8")
	wantStatus(t, resp, http.StatusOK)
	const label = "High Moor Gate (release site), 1350 m, 8 °C"
	if got := doc.Find("[data-testid=assessment-power] h2").Text(); !strings.Contains(got, label) {
		t.Errorf("power heading %q lacks %q", got, label)
	}
	if got := doc.Find("#site option[selected]").AttrOr("value", ""); got != "High Moor Gate" {
		t.Errorf("site picker shows %q chosen", got)
	}
	src := doc.Find("[data-testid=assessment-power] img.chart").AttrOr("src", "")
	if !strings.HasSuffix(src, "/charts/power.svg?site=High+Moor+Gate&temp_c=8") {
		t.Errorf("power chart src %q does not name the site", src)
	}
	cresp, err := a.client.Get(a.srv.URL + src)
	if err != nil {
		t.Fatal(err)
	}
	if svg := parseSVGDoc(t, cresp); !strings.Contains(svg.Title, label) {
		t.Errorf("chart title %q lacks %q", svg.Title, label)
	}
}

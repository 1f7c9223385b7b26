package web

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/url"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// The values in these tests are invented: they exercise the cage-side
// page's handling of a session, not a reference number.

// admit stores a patient (a Red-tailed Hawk, unless species is given) and
// returns it.
func (a *testApp) admit(species, common string, massG float64) records.Patient {
	a.t.Helper()
	p, err := a.store.AdmitPatient(context.Background(), 0, recordstest.Intake(species, common, massG))
	if err != nil {
		a.t.Fatalf("admit %s: %v", common, err)
	}
	return p
}

// postJSON posts body as JSON with the CSRF header token and returns the
// response and its body.
func (a *testApp) postJSON(path string, body any, token string) (*http.Response, []byte) {
	a.t.Helper()
	b, err := json.Marshal(body)
	if err != nil {
		a.t.Fatal(err)
	}
	req, _ := http.NewRequest(http.MethodPost, a.srv.URL+path, bytes.NewReader(b))
	req.Header.Set("Content-Type", "application/json")
	if token != "" {
		req.Header.Set(csrfHeader, token)
	}
	resp, err := a.client.Do(req)
	if err != nil {
		a.t.Fatal(err)
	}
	out, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	return resp, out
}

// sessions returns the patient's stored current flight sessions.
func (a *testApp) sessions(p records.Patient) []assess.FlightSession {
	a.t.Helper()
	fs, err := a.store.Sessions(context.Background(), p.ID)
	if err != nil {
		a.t.Fatal(err)
	}
	return fs
}

func fptr(f float64) *float64 { return &f }
func iptr(i int) *int         { return &i }

// goodSession is a cage session as cage.js sends it: 10 passes in one
// unbroken run, one controlled landing, 42 s to recover.
func goodSession(at time.Time) assess.FlightSession {
	return assess.FlightSession{At: at, Exercise: assess.ExerciseCage, EnclosureName: "Long flight", EnclosureLengthM: fptr(30),
		AirTempC: fptr(14.5), Passes: 10, LongestRun: 10, Landings: 1, LandingsControlled: 1, RecoveryS: iptr(42),
		Highest: assess.HeightHighPerch, Droop: assess.DroopNone}
}

func apiPath(p records.Patient) string {
	return "/api/v1/patients/" + p.CaseNumber + "/flight-sessions"
}

const testKey = "3f2b8c1e-6a4d-4c2e-9b7a-1d2e3f4a5b6c"

func TestCageAPI_CreateThenDuplicate(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.admit("Buteo jamaicensis", "Red-tailed Hawk", 1150)
	in := cageInput{IdempotencyKey: testKey, Session: goodSession(recordstest.Epoch)}

	resp, body := a.postJSON(apiPath(p), in, a.csrf)
	if resp.StatusCode != http.StatusCreated {
		t.Fatalf("first send: status %d, want 201: %s", resp.StatusCode, body)
	}
	var first cageResponse
	if err := json.Unmarshal(body, &first); err != nil {
		t.Fatal(err)
	}
	resp, body = a.postJSON(apiPath(p), in, a.csrf)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("same key again: status %d, want 200: %s", resp.StatusCode, body)
	}
	var again cageResponse
	if err := json.Unmarshal(body, &again); err != nil {
		t.Fatal(err)
	}
	if again.Entry.ID != first.Entry.ID || !again.Duplicate {
		t.Errorf("same key again: got entry %d (duplicate %v), want the stored %d (duplicate true)", again.Entry.ID, again.Duplicate, first.Entry.ID)
	}
	got := a.sessions(p)
	if len(got) != 1 {
		t.Fatalf("stored %d sessions after two sends with one key, want 1", len(got))
	}
	s := got[0]
	if s.Passes != 10 || s.LongestRun != 10 || s.Landings != 1 || s.LandingsControlled != 1 || *s.RecoveryS != 42 ||
		s.Highest != assess.HeightHighPerch || *s.AirTempC != 14.5 || s.Group {
		t.Errorf("stored session %+v, want what was sent", s)
	}
	audit, err := a.store.Audit(context.Background(), records.AuditFilter{PatientID: p.ID, Entity: string(records.KindSession)})
	if err != nil || len(audit) != 1 {
		t.Errorf("audit rows for the session: got %d (%v), want 1", len(audit), err)
	}
	resp, list := a.getBody(apiPath(p))
	wantStatus(t, resp, http.StatusOK)
	var entries []records.Entry
	if err := json.Unmarshal(list, &entries); err != nil || len(entries) != 1 {
		t.Errorf("GET %s: %d entries (%v), want 1", apiPath(p), len(entries), err)
	}
}

// getBody fetches path and returns the raw body.
func (a *testApp) getBody(path string) (*http.Response, []byte) {
	a.t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		a.t.Fatal(err)
	}
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	return resp, b
}

func TestCageAPI_Refusals(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.admit("Buteo jamaicensis", "Red-tailed Hawk", 1150)
	with := func(f func(*cageInput)) cageInput {
		in := cageInput{IdempotencyKey: testKey, Session: goodSession(recordstest.Epoch)}
		f(&in)
		return in
	}
	cases := []struct {
		name   string
		path   string
		body   any
		token  string
		status int
		field  string // the field a 422 must name
	}{
		{"ErrBadCSRF", apiPath(p), with(func(*cageInput) {}), "not-the-token", http.StatusForbidden, ""},
		{"ErrNoCSRF", apiPath(p), with(func(*cageInput) {}), "", http.StatusForbidden, ""},
		{"ErrUnknownPatient", "/api/v1/patients/2026-9999/flight-sessions", with(func(*cageInput) {}), "", http.StatusNotFound, ""},
		{"ErrRunLongerThanPasses", apiPath(p), with(func(in *cageInput) { in.Session.LongestRun = 11 }), "", http.StatusUnprocessableEntity, "longest_run"},
		{"ErrNoHighest", apiPath(p), with(func(in *cageInput) { in.Session.Highest = "" }), "", http.StatusUnprocessableEntity, "highest"},
		{"ErrAirTempFahrenheit", apiPath(p), with(func(in *cageInput) { in.Session.AirTempC = fptr(68) }), "", http.StatusUnprocessableEntity, "air_temp_c"},
		{"ErrControlledOverLandings", apiPath(p), with(func(in *cageInput) { in.Session.LandingsControlled = 2 }), "", http.StatusUnprocessableEntity, "landings_controlled"},
		{"ErrNoKey", apiPath(p), with(func(in *cageInput) { in.IdempotencyKey = "" }), "", http.StatusUnprocessableEntity, "idempotency_key"},
		{"ErrFuture", apiPath(p), with(func(in *cageInput) { in.Session.At = recordstest.Epoch.Add(2 * time.Hour) }), "", http.StatusUnprocessableEntity, "at"},
		{"ErrGroupWithoutThisBird", apiPath(p), with(func(in *cageInput) { in.Session.GroupCases = []string{"2026-0100", "2026-0101"} }), "", http.StatusUnprocessableEntity, "group_cases"},
		{"ErrBirdsWithoutGroup", apiPath(p), with(func(in *cageInput) { in.Birds = map[string]cageBirdObs{p.CaseNumber: {OpenMouth: true}} }), "", http.StatusUnprocessableEntity, "birds"},
		{"ErrPassesText", apiPath(p), map[string]any{"idempotency_key": testKey, "session": map[string]any{"passes": "ten"}}, "", http.StatusUnprocessableEntity, "passes"},
		{"ErrUnknownField", apiPath(p), map[string]any{"idempotency_key": testKey, "sesion": map[string]any{}}, "", http.StatusUnprocessableEntity, "body"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tok := tc.token
			if tok == "" && tc.status != http.StatusForbidden {
				tok = a.csrf
			}
			resp, body := a.postJSON(tc.path, tc.body, tok)
			if resp.StatusCode != tc.status {
				t.Fatalf("status %d, want %d: %s", resp.StatusCode, tc.status, body)
			}
			if tc.field != "" {
				var eb cageErrorBody
				if err := json.Unmarshal(body, &eb); err != nil || eb.Fields[tc.field] == "" {
					t.Errorf("422 body %s: want a message for field %q", body, tc.field)
				}
			}
		})
	}
	if n := len(a.sessions(p)); n != 0 {
		t.Errorf("stored %d sessions from refused requests, want 0", n)
	}
}

func TestCageAPI_LoggedOut(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.admit("Buteo jamaicensis", "Red-tailed Hawk", 1150)
	stale := a.csrf
	resp, _ := a.post("/logout", url.Values{})
	wantStatus(t, resp, http.StatusSeeOther)

	// The page still holds the ended login's token: the answer must say
	// "logged out" (401), not "bad form" (403), so the page offers a login.
	resp, body := a.postJSON(apiPath(p), cageInput{IdempotencyKey: testKey, Session: goodSession(recordstest.Epoch)}, stale)
	if resp.StatusCode != http.StatusUnauthorized {
		t.Fatalf("logged out: status %d, want 401: %s", resp.StatusCode, body)
	}
	resp, _ = a.getBody("/api/v1/csrf")
	if resp.StatusCode != http.StatusUnauthorized {
		t.Errorf("GET /api/v1/csrf logged out: status %d, want 401", resp.StatusCode)
	}
	resp, _ = a.getBody(apiPath(p))
	if resp.StatusCode != http.StatusUnauthorized {
		t.Errorf("GET %s logged out: status %d, want 401", apiPath(p), resp.StatusCode)
	}
	resp, _ = a.get("/cage/" + p.CaseNumber)
	wantStatus(t, resp, http.StatusSeeOther)
	if loc := resp.Header.Get("Location"); loc != "/login?next="+url.QueryEscape("/cage/"+p.CaseNumber) {
		t.Errorf("GET /cage logged out redirects to %q, want the login page returning here", loc)
	}

	// Logged in again: a fresh token from /api/v1/csrf lets the kept draft in, once.
	a.get("/login")
	resp, _ = a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusSeeOther)
	resp, body = a.getBody("/api/v1/csrf")
	wantStatus(t, resp, http.StatusOK)
	var tok struct {
		CSRFToken string `json:"csrf_token"`
	}
	if err := json.Unmarshal(body, &tok); err != nil || tok.CSRFToken == "" || tok.CSRFToken == stale {
		t.Fatalf("GET /api/v1/csrf: %s, want a fresh token", body)
	}
	for _, want := range []int{http.StatusCreated, http.StatusOK} {
		resp, body = a.postJSON(apiPath(p), cageInput{IdempotencyKey: testKey, Session: goodSession(recordstest.Epoch)}, tok.CSRFToken)
		if resp.StatusCode != want {
			t.Fatalf("send after login: status %d, want %d: %s", resp.StatusCode, want, body)
		}
	}
	if n := len(a.sessions(p)); n != 1 {
		t.Errorf("stored %d sessions, want 1", n)
	}
}

func TestCageAPI_GroupStoresOnePerBird(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	robin := a.admit("Turdus migratorius", "American Robin", 77)
	robin2 := a.admit("Turdus migratorius", "American Robin", 80)
	other := a.admit("Bombycilla cedrorum", "Cedar Waxwing", 32)
	cases := []string{robin.CaseNumber, robin2.CaseNumber}
	s := goodSession(recordstest.Epoch)
	s.Passes, s.LongestRun, s.GroupCases, s.Group = 8, 6, cases, true
	s.Notes = "flew as a pair"
	in := cageInput{IdempotencyKey: testKey, Session: s,
		Birds: map[string]cageBirdObs{robin2.CaseNumber: {Droop: assess.DroopLeft, Notes: "left wing low after pass 6"}}}

	for _, want := range []int{http.StatusCreated, http.StatusOK} {
		resp, body := a.postJSON(apiPath(robin), in, a.csrf)
		if resp.StatusCode != want {
			t.Fatalf("group send: status %d, want %d: %s", resp.StatusCode, want, body)
		}
		var r cageResponse
		if err := json.Unmarshal(body, &r); err != nil || len(r.Entries) != 2 || r.Entry.PatientID != robin.ID {
			t.Fatalf("group answer %s: want 2 entries, the first %s's", body, robin.CaseNumber)
		}
	}
	for _, p := range []records.Patient{robin, robin2} {
		got := a.sessions(p)
		if len(got) != 1 {
			t.Fatalf("%s: stored %d sessions, want 1", p.CaseNumber, len(got))
		}
		g := got[0]
		if !g.Group || g.GroupSize != 2 || strings.Join(g.GroupCases, ",") != strings.Join(cases, ",") || g.Passes != 8 {
			t.Errorf("%s: session %+v, want a group of 2 naming %v", p.CaseNumber, g, cases)
		}
		perBird := p.ID == robin2.ID
		if g.PerBird != perBird {
			t.Errorf("%s: PerBird %v, want %v", p.CaseNumber, g.PerBird, perBird)
		}
		if perBird && (g.Droop != assess.DroopLeft || !strings.Contains(g.Notes, "flew as a pair") || !strings.Contains(g.Notes, "This bird: left wing low")) {
			t.Errorf("%s: droop %q notes %q, want the bird's own observation added to the group's", p.CaseNumber, g.Droop, g.Notes)
		}
		if !perBird && g.Droop != assess.DroopNone {
			t.Errorf("%s: droop %q, want none (only the other bird drooped)", p.CaseNumber, g.Droop)
		}
	}
	if n := len(a.sessions(other)); n != 0 {
		t.Errorf("bird outside the group got %d sessions, want 0", n)
	}

	bad := in
	bad.IdempotencyKey = "aaaaaaaa-1111-4222-8333-444444444444"
	bad.Session.GroupCases = []string{robin.CaseNumber, "2026-0999"}
	resp, body := a.postJSON(apiPath(robin), bad, a.csrf)
	if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(string(body), "2026-0999") {
		t.Errorf("group with an unknown case: status %d %s, want 422 naming it", resp.StatusCode, body)
	}
}

func TestCagePage_Prefills(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	hawk := a.admit("Buteo jamaicensis", "Red-tailed Hawk", 1150)
	falcon := a.admit("Falco peregrinus", "Peregrine Falcon", 850)

	resp, doc := a.get("/cage/" + falcon.CaseNumber)
	wantStatus(t, resp, http.StatusOK)
	if v, _ := doc.Find("#air_temp_c").Attr("value"); v != "" {
		t.Errorf("air temperature before any session today: %q, want empty", v)
	}
	for _, sel := range []string{"[data-testid=cage-tap]", "[data-testid=pass-plus]", "[data-testid=pass-minus]",
		"[data-testid=land-controlled]", "[data-testid=watch-toggle]", "[data-testid=highest-ceiling]",
		"[data-testid=switch-open_mouth]", "[data-testid=switch-tail_bobbing]", "[data-testid=droop-left]",
		"[data-testid=droop-right]", "[data-testid=switch-asymmetry]", "[data-testid=save]", "#passes", "#recovery_s",
		"script[src='/static/cage.js']", "link[href='/static/cage.css']", "[data-testid=cage-cautions] li"} {
		if doc.Find(sel).Length() == 0 {
			t.Errorf("cage page lacks %s", sel)
		}
	}
	if n := doc.Find("script:not([src]), [style]").Length(); n != 0 {
		t.Errorf("cage page has %d inline scripts or style attributes, want 0 (CSP)", n)
	}
	if key, _ := doc.Find("input[name=idempotency_key]").Attr("value"); !uuidRe.MatchString(key) {
		t.Errorf("plain form's idempotency key %q, want a UUID", key)
	}

	// A session of another patient today sets the air temperature.
	a.clock.Advance(30 * time.Minute)
	s := goodSession(a.clock.Now())
	s.AirTempC = fptr(17.5)
	if _, err := a.store.AddSession(context.Background(), 0, hawk.ID, s, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	encl := assess.Housing{From: recordstest.Epoch, EnclosureName: "Flight cage B", Kind: assess.EnclosureFlightCage,
		LengthM: 30.5, WidthM: 6.1, HeightM: 4.9, Prerelease: true}
	if _, err := a.store.AddHousing(context.Background(), 0, falcon.ID, encl, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	_, doc = a.get("/cage/" + falcon.CaseNumber)
	if v, _ := doc.Find("#air_temp_c").Attr("value"); v != "17.5" {
		t.Errorf("air temperature: %q, want 17.5 from the hawk's session today", v)
	}
	if !strings.Contains(doc.Find("[data-testid=air-temp-note]").Text(), hawk.CaseNumber) {
		t.Errorf("air temperature note %q does not name its session", doc.Find("[data-testid=air-temp-note]").Text())
	}
	if v, _ := doc.Find("#enclosure").Attr("value"); v != "Flight cage B" {
		t.Errorf("enclosure: %q, want the falcon's housing", v)
	}
	if v, _ := doc.Find("#length_m").Attr("value"); v != "30.5" {
		t.Errorf("flight length: %q, want 30.5 from the housing", v)
	}

	// Tomorrow the air temperature starts empty again.
	a.clock.Advance(24 * time.Hour)
	_, doc = a.get("/cage/" + falcon.CaseNumber)
	if v, _ := doc.Find("#air_temp_c").Attr("value"); v != "" {
		t.Errorf("air temperature the next day: %q, want empty", v)
	}
}

func TestCageForm_PlainPost(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	p := a.admit("Falco peregrinus", "Peregrine Falcon", 850)
	_, doc := a.get("/cage/" + p.CaseNumber)
	key, _ := doc.Find("input[name=idempotency_key]").Attr("value")
	at, _ := doc.Find("input[name=at]").Attr("value")
	form := func(highest string) url.Values {
		return url.Values{"idempotency_key": {key}, "at": {at}, "exercise": {"cage"}, "passes": {"10"},
			"longest_run": {"10"}, "landings": {"1"}, "landings_controlled": {"1"}, "recovery_s": {"35"},
			"highest": {highest}, "droop": {"none"}, "open_mouth": {"1"}, "air_temp_c": {"12,5"}, "enclosure": {"Flight cage B"}}
	}

	resp, doc := a.post("/cage/"+p.CaseNumber, form(""))
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if doc.Find("[data-error-for=highest]").Text() == "" {
		t.Error("missing highest point: no message beside the field")
	}
	if v, _ := doc.Find("#passes").Attr("value"); v != "10" {
		t.Errorf("refused form lost the passes: got %q", v)
	}
	if doc.Find("input[name=open_mouth][checked]").Length() != 1 {
		t.Error("refused form lost the open-mouth switch")
	}

	for range 2 { // the same form sent twice stores one session
		resp, _ = a.post("/cage/"+p.CaseNumber, form("ceiling"))
		wantStatus(t, resp, http.StatusSeeOther)
	}
	if loc := resp.Header.Get("Location"); loc != "/cage/"+p.CaseNumber+"?saved=1" {
		t.Errorf("redirect to %q", loc)
	}
	got := a.sessions(p)
	if len(got) != 1 {
		t.Fatalf("stored %d sessions, want 1", len(got))
	}
	if got[0].Highest != assess.HeightCeiling || *got[0].AirTempC != 12.5 || !got[0].OpenMouth || *got[0].RecoveryS != 35 {
		t.Errorf("stored %+v, want the form's values (12,5 °C read as 12.5)", got[0])
	}
	_, doc = a.get("/cage/" + p.CaseNumber + "?saved=1")
	if doc.Find("[data-testid=cage-saved-notice]").Length() != 1 {
		t.Error("no notice after saving")
	}
}

func TestCageGroupPage(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	r1 := a.admit("Turdus migratorius", "American Robin", 77)
	r2 := a.admit("Turdus migratorius", "American Robin", 80)
	cases := []struct {
		name, query string
		status      int
	}{
		{"Pair", r1.CaseNumber + "," + r2.CaseNumber, http.StatusOK},
		{"PairAsTwoValues", r1.CaseNumber + "&cases=" + r2.CaseNumber, http.StatusOK},
		{"ErrOneBird", r1.CaseNumber, http.StatusUnprocessableEntity},
		{"ErrUnknownBird", r1.CaseNumber + ",2026-0999", http.StatusUnprocessableEntity},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, doc := a.get("/cage/group?cases=" + tc.query)
			wantStatus(t, resp, tc.status)
			if tc.status == http.StatusOK && doc.Find("[data-testid=per-bird] details").Length() != 2 {
				t.Errorf("group page shows %d per-bird blocks, want 2", doc.Find("[data-testid=per-bird] details").Length())
			}
		})
	}

	_, doc := a.get("/cage/group?cases=" + r1.CaseNumber + "," + r2.CaseNumber)
	key, _ := doc.Find("input[name=idempotency_key]").Attr("value")
	resp, _ := a.post("/cage/group?cases="+r1.CaseNumber+","+r2.CaseNumber, url.Values{"idempotency_key": {key},
		"group_cases": {r1.CaseNumber + "," + r2.CaseNumber}, "exercise": {"cage"}, "passes": {"6"}, "longest_run": {"6"},
		"highest": {"high-perch"}, "droop": {"none"}, "bird_" + r2.CaseNumber + "_tail_bobbing": {"1"},
		"bird_" + r1.CaseNumber + "_droop": {"none"}})
	wantStatus(t, resp, http.StatusSeeOther)
	for _, p := range []records.Patient{r1, r2} {
		got := a.sessions(p)
		if len(got) != 1 || got[0].GroupSize != 2 || got[0].TailBobbing != (p.ID == r2.ID) {
			t.Errorf("%s: sessions %+v, want one group session, tail bobbing only on %s", p.CaseNumber, got, r2.CaseNumber)
		}
	}
}

func TestPatientPage_CageLinks(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	r1 := a.admit("Turdus migratorius", "American Robin", 77)
	r2 := a.admit("Turdus migratorius", "American Robin", 80)
	_, doc := a.get("/patients/" + r1.CaseNumber)
	if href, _ := doc.Find("[data-testid=cage-link]").Attr("href"); href != "/cage/"+r1.CaseNumber {
		t.Errorf("cage link %q, want /cage/%s", href, r1.CaseNumber)
	}
	if doc.Find("[data-testid=cage-group-link]").Length() != 0 {
		t.Error("group link shown without shared housing")
	}
	aviary := assess.Housing{From: recordstest.Epoch, EnclosureName: "Songbird aviary", Kind: assess.EnclosureOutdoorAviary,
		LengthM: 4.9, WidthM: 2.4, HeightM: 2.4, Prerelease: true}
	for _, p := range []records.Patient{r1, r2} {
		if _, err := a.store.AddHousing(context.Background(), 0, p.ID, aviary, records.AddOpts{}); err != nil {
			t.Fatal(err)
		}
	}
	_, doc = a.get("/patients/" + r1.CaseNumber)
	want := "/cage/group?cases=" + r1.CaseNumber + "," + r2.CaseNumber
	if href, _ := doc.Find("[data-testid=cage-group-link]").Attr("href"); href != want {
		t.Errorf("group link %q, want %q", href, want)
	}
}

func TestCageStatic(t *testing.T) {
	a := newTestApp(t)
	for path, ctype := range map[string]string{"/static/cage.js": "javascript", "/static/cage.css": "text/css"} {
		resp, body := a.getBody(path)
		wantStatus(t, resp, http.StatusOK)
		if !strings.Contains(resp.Header.Get("Content-Type"), ctype) || len(body) < 100 {
			t.Errorf("%s: %s, %d bytes", path, resp.Header.Get("Content-Type"), len(body))
		}
	}
}

package web

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"slices"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// The security tests: login, CSRF, roles, API tokens, the login throttle,
// session ids and cookies, and the security headers. What they check is the
// OWASP guidance named beside each test (OWASP Cheat Sheet Series:
// "Cross-Site Request Forgery Prevention", "Session Management",
// "Authentication", "Content Security Policy", "HTTP Headers",
// "Unvalidated Redirects and Forwards"); the numbers (10 failures in 15
// minutes) are the project's own, from the issue.

// mutatingRoutes lists every registered unsafe route, with path parameters
// filled with plausible values, so new routes are covered automatically.
func mutatingRoutes(t *testing.T, a *testApp) []string {
	t.Helper()
	s := a.srv.Config.Handler.(*Server)
	seen := map[string]bool{}
	var out []string
	for _, r := range s.echo.Routes() {
		if r.Method != http.MethodPost && r.Method != http.MethodPut && r.Method != http.MethodDelete && r.Method != http.MethodPatch {
			continue
		}
		p := r.Path
		for _, seg := range strings.Split(p, "/") {
			if strings.HasPrefix(seg, ":") {
				val := "1"
				if seg == ":case" {
					val = "2026-0001"
				}
				p = strings.Replace(p, seg, val, 1)
			}
		}
		p = strings.ReplaceAll(p, "*", "x")
		key := r.Method + " " + p
		if !seen[key] {
			seen[key] = true
			out = append(out, key)
		}
	}
	if len(out) < 5 {
		t.Fatalf("only %d mutating routes found: %v", len(out), out)
	}
	return out
}

func send(t *testing.T, a *testApp, methodPath, csrf string) *http.Response {
	t.Helper()
	return sendHeader(t, a, methodPath, csrf, "")
}

// sendHeader is send with the token in the X-CSRF-Token header as well
// (header "" sends none).
func sendHeader(t *testing.T, a *testApp, methodPath, csrf, header string) *http.Response {
	t.Helper()
	method, path, _ := strings.Cut(methodPath, " ")
	form := url.Values{"reason": {"x"}}
	if csrf != "" {
		form.Set("_csrf", csrf)
	}
	req, _ := http.NewRequest(method, a.srv.URL+path, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	if header != "" {
		req.Header.Set(csrfHeader, header)
	}
	resp, err := a.client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	return resp
}

func countRows(t *testing.T, s *records.Store, table string) int {
	t.Helper()
	var n int
	if err := s.DB().QueryRow(`SELECT count(*) FROM ` + table).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

// TestSecurity_EveryMutatingRouteNeedsLoginAndCSRF: with no session (or a
// session id the server never issued) every unsafe route answers 401 or
// redirects to the login page; logged in, a missing, wrong or another
// login's CSRF token gets 403 — and nothing is written either way (OWASP
// CSRF Prevention: synchroniser token pattern).
func TestSecurity_EveryMutatingRouteNeedsLoginAndCSRF(t *testing.T) {
	a := newTestApp(t)
	public := map[string]bool{"POST /login": true, "POST /logout": true, "POST /setup": true}
	routes := mutatingRoutes(t, a)
	before := countRows(t, a.store, "audit_log")
	anonymous := func(label string) {
		for _, r := range routes {
			if public[r] {
				continue
			}
			resp := send(t, a, r, "")
			loc := resp.Header.Get("Location")
			if resp.StatusCode != http.StatusUnauthorized && !(resp.StatusCode == http.StatusSeeOther && strings.HasPrefix(loc, "/login")) {
				t.Errorf("%s %s: status %d (Location %q), want 401 or a redirect to /login", r, label, resp.StatusCode, loc)
			}
		}
	}
	anonymous("without a session")
	u, _ := url.Parse(a.srv.URL)
	a.client.Jar.SetCookies(u, []*http.Cookie{{Name: sessionCookie, Value: records.NewToken(), Path: "/"}})
	anonymous("with a session id the server never issued")

	// Another person's login, whose token must not work for this one.
	jar, _ := cookiejar.New(nil)
	other := &testApp{t: t, store: a.store, srv: a.srv, clock: a.clock,
		client: &http.Client{Jar: jar, CheckRedirect: a.client.CheckRedirect}}
	other.login("lee", records.RoleStaff)
	a.login("boss", records.RoleAdmin, records.RoleVet, records.RoleRehabilitator, records.RoleStaff)
	if other.csrf == a.csrf || other.csrf == "" {
		t.Fatalf("two logins share the CSRF token %q", a.csrf)
	}
	before = countRows(t, a.store, "audit_log")
	for _, r := range routes {
		if r == "POST /login" || r == "POST /setup" {
			continue
		}
		for _, tc := range []struct{ field, header string }{{"", ""}, {"forged-token", ""}, {"", "forged-token"},
			{other.csrf, ""}, {"", other.csrf}} {
			if resp := sendHeader(t, a, r, tc.field, tc.header); resp.StatusCode != http.StatusForbidden {
				t.Errorf("%s with CSRF field %q, header %q: status %d, want 403", r, tc.field, tc.header, resp.StatusCode)
			}
		}
	}
	if after := countRows(t, a.store, "audit_log"); after != before {
		t.Errorf("refused requests wrote %d audit rows", after-before)
	}
}

// TestSecurity_LoginPostWithoutCSRF: the public forms need the pre-login token.
func TestSecurity_LoginPostWithoutCSRF(t *testing.T) {
	a := newTestApp(t)
	for _, r := range []string{"POST /login", "POST /setup"} {
		if resp := send(t, a, r, "nope"); resp.StatusCode != http.StatusForbidden {
			t.Errorf("%s with a wrong token: %d, want 403", r, resp.StatusCode)
		}
	}
}

// secEnv is a centre with one patient in care, a second person (the
// target of the user routes), an API token, an enclosure and, when asked
// for (and the report route exists), a frozen report version.
type secEnv struct {
	a                    *testApp
	p                    records.Patient
	admin, victim        records.User
	tokenID, enclosureID int64
	reportVersion        bool
}

func newSecEnv(t *testing.T, withReport bool) *secEnv {
	t.Helper()
	ctx := context.Background()
	a := newTestApp(t)
	e := &secEnv{a: a}
	e.admin = recordstest.AddUser(t, a.store, "setup.admin", records.RoleAdmin, records.RoleStaff)
	e.victim = recordstest.AddUser(t, a.store, "victim", records.RoleStaff)
	var err error
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.FinderName = "Finder Person"
	if e.p, err = a.store.AdmitPatient(ctx, 0, in); err != nil {
		t.Fatal(err)
	}
	_, tok, err := a.store.IssueAPIToken(ctx, e.admin, e.victim.ID, "nightly export")
	if err != nil {
		t.Fatal(err)
	}
	e.tokenID = tok.ID
	encl, err := a.store.AddEnclosure(ctx, 0, records.EnclosureInput{Name: "Flight cage 1", Kind: assess.EnclosureFlightCage,
		LengthM: 15, WidthM: 3, HeightM: 3.6})
	if err != nil {
		t.Fatal(err)
	}
	e.enclosureID = encl.ID
	if !withReport {
		return e
	}
	a.login("report.maker", records.RoleStaff)
	resp, _ := a.post("/patients/"+e.p.CaseNumber+"/reports", url.Values{"page_size": {"A4"}})
	e.reportVersion = resp.StatusCode == http.StatusSeeOther
	if !e.reportVersion {
		t.Logf("no report version could be frozen (POST /patients/:case/reports: %d): the sign-off rows are skipped", resp.StatusCode)
	}
	return e
}

func (e *secEnv) path(p string) string {
	return strings.NewReplacer("{case}", e.p.CaseNumber, "{victim}", fmt.Sprint(e.victim.ID),
		"{token}", fmt.Sprint(e.tokenID), "{enclosure}", fmt.Sprint(e.enclosureID)).Replace(p)
}

// secGuarded lists the actions only some roles may take (DESIGN.md: staff
// record; the vet and the licensed rehabilitator clear and sign; admins
// manage people and settings).
var secGuarded = []struct {
	name, route string
	form        url.Values
	allowed     []records.Role
	refused     int // the status of a refusal: 403 unless the form itself refuses (422)
	needsReport bool
}{
	{name: "sign a report", route: "POST /patients/{case}/reports/1/signoffs", needsReport: true,
		form: url.Values{"role": {string(records.SignOffRoles[0])}, "password": {recordstest.Password}}, allowed: records.SignOffRoles},
	{name: "set clinical clearance", route: "POST /patients/{case}/clearance",
		form: url.Values{"item": {"vision"}, "state": {"cleared"}}, allowed: records.ClearanceRoles},
	{name: "list people", route: "GET /users", allowed: []records.Role{records.RoleAdmin}},
	{name: "add a person", route: "POST /users", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"username": {"newcomer"}, "display_name": {"New Comer"}, "password": {"a long password"}, "roles": {"admin"}}},
	{name: "disable a person", route: "POST /users/{victim}/disable", allowed: []records.Role{records.RoleAdmin}},
	{name: "enable a person", route: "POST /users/{victim}/enable", allowed: []records.Role{records.RoleAdmin}},
	{name: "reset a password", route: "POST /users/{victim}/password", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"password": {"a new long password"}}},
	{name: "issue an API token", route: "POST /users/{victim}/tokens", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"label": {"spreadsheet"}}},
	{name: "revoke an API token", route: "POST /tokens/{token}/revoke", allowed: []records.Role{records.RoleAdmin}},
	{name: "erase a finder's data", route: "POST /patients/{case}/redact-finder", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"confirm": {"1"}}},
	{name: "add an enclosure", route: "POST /enclosures", allowed: []records.Role{records.RoleAdmin, records.RoleRehabilitator},
		form: url.Values{"name": {"Aviary 2"}, "kind": {"outdoor-aviary"}, "length": {"6"}, "width": {"3"}, "height": {"3"}, "unit": {"m"}}},
	{name: "edit an enclosure", route: "POST /enclosures/{enclosure}", allowed: []records.Role{records.RoleAdmin, records.RoleRehabilitator},
		form: url.Values{"name": {"Flight cage 1"}, "kind": {"flight-cage"}, "length": {"16"}, "width": {"3"}, "height": {"3.6"}, "unit": {"m"}, "version": {"1"}}},
	{name: "download the permit exports", route: "GET /exports/cases.csv", allowed: []records.Role{records.RoleRehabilitator, records.RoleAdmin}},
	{name: "change a threshold", route: "POST /settings/thresholds", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"threshold": {"stale-days"}, "value": {"5"}, "note": {"weekly rounds"}}},
	{name: "reset a threshold", route: "POST /settings/thresholds/reset", allowed: []records.Role{records.RoleAdmin},
		form: url.Values{"threshold": {"stale-days"}}},
	{name: "add a release site", route: "POST /sites", allowed: []records.Role{records.RoleRehabilitator, records.RoleAdmin},
		form: url.Values{"name": {"Ridge meadow"}, "elevation_m": {"300"}}},
	{name: "override a species value", route: "POST /species/Anas-platyrhynchos/override",
		allowed: []records.Role{records.RoleVet, records.RoleRehabilitator, records.RoleAdmin},
		form:    url.Values{"span_mm": {"900"}, "note": {"our own birds"}}},
	{name: "record a release", route: "POST /patients/{case}/disposition", refused: http.StatusUnprocessableEntity,
		allowed: records.ReleaseRoles, form: url.Values{"kind": {"released"}, "date": {"2026-06-15"}, "place": {"Ridge meadow"},
			"no_report_reason": {"judged in person"}}},
}

// TestSecurity_RoleGuards: each guarded action is refused to every role
// that may not take it, with nothing written (no audit row, no change), and
// works for a role that may (so the guard is not refusing everyone). The
// settings pages, when registered, are the admin's only.
func TestSecurity_RoleGuards(t *testing.T) {
	for _, g := range secGuarded {
		t.Run(g.name, func(t *testing.T) {
			e := newSecEnv(t, g.needsReport)
			if g.needsReport && !e.reportVersion {
				t.Skip("no report version")
			}
			refused := g.refused
			if refused == 0 {
				refused = http.StatusForbidden
			}
			method, path, _ := strings.Cut(e.path(g.route), " ")
			do := func() *http.Response {
				if method == http.MethodGet {
					resp, _ := e.a.get(path)
					return resp
				}
				form := url.Values{}
				for k, v := range g.form {
					form[k] = slices.Clone(v)
				}
				resp, _ := e.a.post(path, form)
				return resp
			}
			for _, role := range records.AllRoles {
				if slices.Contains(g.allowed, role) {
					continue
				}
				e.a.login("only."+string(role), role)
				audit, entries, users := countRows(t, e.a.store, "audit_log"), countRows(t, e.a.store, "entries"), countRows(t, e.a.store, "users")
				if resp := do(); resp.StatusCode != refused {
					t.Errorf("%s as %s: status %d, want %d", g.route, role, resp.StatusCode, refused)
				}
				if a, en, u := countRows(t, e.a.store, "audit_log"), countRows(t, e.a.store, "entries"), countRows(t, e.a.store, "users"); a != audit || en != entries || u != users {
					t.Errorf("%s as %s was refused but wrote %d audit rows, %d entries, %d users", g.route, role, a-audit, en-entries, u-users)
				}
			}
			e.a.login("may."+string(g.allowed[0]), g.allowed[0])
			if resp := do(); resp.StatusCode >= 400 {
				t.Errorf("%s as %s: status %d, want it allowed", g.route, g.allowed[0], resp.StatusCode)
			}
		})
	}
}

// TestSecurity_StaffCannotChangeSettings: every unsafe route of the
// centre's settings (thresholds, species reference, release sites) refuses
// a staff member, whatever the form, and writes nothing. (Which other roles
// may is TestSecurity_RoleGuards's and the settings tests' business.)
func TestSecurity_StaffCannotChangeSettings(t *testing.T) {
	e := newSecEnv(t, false)
	var routes []string
	for _, r := range mutatingRoutes(t, e.a) {
		_, p, _ := strings.Cut(r, " ")
		for _, prefix := range []string{"/settings", "/sites", "/species"} {
			if p == prefix || strings.HasPrefix(p, prefix+"/") {
				routes = append(routes, r)
			}
		}
	}
	if len(routes) == 0 {
		t.Skip("no settings routes are registered yet")
	}
	e.a.login("only.staff", records.RoleStaff)
	before := countRows(t, e.a.store, "audit_log")
	for _, r := range routes {
		if resp := send(t, e.a, r, e.a.csrf); resp.StatusCode != http.StatusForbidden {
			t.Errorf("%s as staff: status %d, want 403", r, resp.StatusCode)
		}
	}
	if after := countRows(t, e.a.store, "audit_log"); after != before {
		t.Errorf("refused settings changes wrote %d audit rows", after-before)
	}
}

// secGet fetches path with the logged-in client and returns the response,
// its body read and closed.
func secGet(t *testing.T, a *testApp, path string) *http.Response {
	t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		t.Fatal(err)
	}
	io.Copy(io.Discard, resp.Body)
	resp.Body.Close()
	return resp
}

// bearer sends a request with an API token and returns the status and body.
func bearer(t *testing.T, a *testApp, method, path, secret string, body any) (int, []byte) {
	t.Helper()
	var rd io.Reader
	if body != nil {
		b, err := json.Marshal(body)
		if err != nil {
			t.Fatal(err)
		}
		rd = bytes.NewReader(b)
	}
	req, _ := http.NewRequest(method, a.srv.URL+path, rd)
	req.Header.Set("Authorization", "Bearer "+secret)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	out, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, out
}

// TestSecurity_APIToken: a token acts with its user's roles under /api/ only
// (the same answer as that user's logged-in session on every API route,
// and no CSRF token needed since no cookie is involved), is stored only as
// a hash, and stops working when revoked or when its user is disabled.
func TestSecurity_APIToken(t *testing.T) {
	ctx := context.Background()
	a := newTestApp(t)
	admin := recordstest.AddUser(t, a.store, "boss", records.RoleAdmin)
	staff := a.login("kim", records.RoleStaff)
	p, err := a.store.AdmitPatient(ctx, 0, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	if err != nil {
		t.Fatal(err)
	}
	secret, tok, err := a.store.IssueAPIToken(ctx, admin, staff.ID, "cage tablet")
	if err != nil {
		t.Fatal(err)
	}

	if code, _ := bearer(t, a, http.MethodGet, "/patients", secret, nil); code != http.StatusUnauthorized {
		t.Errorf("token on a page: %d, want 401", code)
	}
	for _, bad := range []string{"aloft_" + records.NewToken(), records.NewToken(), "", secret + "x"} {
		if code, _ := bearer(t, a, http.MethodGet, "/api/v1/csrf", bad, nil); code != http.StatusUnauthorized {
			t.Errorf("unknown token %q: %d, want 401", bad, code)
		}
	}

	// Every API route answers the token as it answers the user's session.
	s := a.srv.Config.Handler.(*Server)
	for _, r := range s.echo.Routes() {
		if r.Method != http.MethodGet || !strings.HasPrefix(r.Path, "/api/") {
			continue
		}
		path := strings.ReplaceAll(r.Path, ":case", p.CaseNumber)
		session := secGet(t, a, path)
		code, body := bearer(t, a, http.MethodGet, path, secret, nil)
		if code != session.StatusCode {
			t.Errorf("GET %s: token %d, the same user's session %d: want the same answer (%s)", r.Path, code, session.StatusCode, body)
		}
	}

	// A write needs no CSRF token with a bearer token, and is the user's.
	in := cageInput{IdempotencyKey: testKey, Session: goodSession(recordstest.Epoch)}
	code, body := bearer(t, a, http.MethodPost, apiPath(p), secret, in)
	if code != http.StatusCreated {
		t.Fatalf("token POST %s: %d, want 201: %s", apiPath(p), code, body)
	}
	audit, _ := a.store.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: string(records.KindSession)})
	if len(audit) != 1 || audit[0].UserID != staff.ID {
		t.Errorf("audit of the token's write: %+v, want one row by %s", audit, staff.Username)
	}

	// Only a hash is kept: the secret is nowhere in the database.
	var hits int
	for _, q := range []string{`SELECT count(*) FROM api_tokens WHERE token_hash = ? OR label = ?`,
		`SELECT count(*) FROM audit_log WHERE instr(COALESCE(after_json, ''), ?) > 0 OR instr(COALESCE(before_json, ''), ?) > 0`} {
		var n int
		if err := a.store.DB().QueryRow(q, secret, secret).Scan(&n); err != nil {
			t.Fatal(err)
		}
		hits += n
	}
	if hits != 0 {
		t.Errorf("the token's secret is stored in the clear (%d rows)", hits)
	}

	if err := a.store.SetDisabled(ctx, admin.ID, staff.ID, true); err != nil {
		t.Fatal(err)
	}
	if code, _ := bearer(t, a, http.MethodGet, "/api/v1/csrf", secret, nil); code != http.StatusUnauthorized {
		t.Errorf("token of a disabled user: %d, want 401", code)
	}
	if err := a.store.SetDisabled(ctx, admin.ID, staff.ID, false); err != nil {
		t.Fatal(err)
	}
	if code, _ := bearer(t, a, http.MethodGet, "/api/v1/csrf", secret, nil); code != http.StatusOK {
		t.Errorf("token of a re-enabled user: %d, want 200", code)
	}
	if err := a.store.RevokeAPIToken(ctx, admin, tok.ID); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/api/v1/csrf", "/api/v1/anything", apiPath(p)} {
		if code, _ := bearer(t, a, http.MethodGet, path, secret, nil); code != http.StatusUnauthorized {
			t.Errorf("revoked token on %s: %d, want 401", path, code)
		}
	}
	in.IdempotencyKey = "a1b2c3d4-0000-4000-8000-000000000001"
	if code, _ := bearer(t, a, http.MethodPost, apiPath(p), secret, in); code != http.StatusUnauthorized {
		t.Errorf("revoked token writing: %d, want 401", code)
	}
	if n := len(a.sessions(p)); n != 1 {
		t.Errorf("%d sessions stored, want 1 (the revoked token's write refused)", n)
	}
}

// secLoginAs posts the login form from a fresh browser (its own cookies)
// with the X-Forwarded-For header a proxy would send ("" for none), and
// returns the status.
func secLoginAs(t *testing.T, a *testApp, username, password, xff string) int {
	t.Helper()
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, CheckRedirect: a.client.CheckRedirect}
	resp, err := c.Get(a.srv.URL + "/login")
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	m := csrfRe.FindSubmatch(b)
	if m == nil {
		t.Fatal("the login page has no CSRF token")
	}
	form := url.Values{"username": {username}, "password": {password}, "_csrf": {string(m[1])}}
	req, _ := http.NewRequest(http.MethodPost, a.srv.URL+"/login", strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	if xff != "" {
		req.Header.Set("X-Forwarded-For", xff)
	}
	resp, err = c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	return resp.StatusCode
}

// TestSecurity_LoginThrottle: at most 10 failed logins in 15 minutes per
// account and per address (OWASP Authentication Cheat Sheet: "Protect
// against automated attacks"), where the address is the one the proxy saw
// (a client cannot pick it by writing its own X-Forwarded-For entry); and
// nobody is locked out for good: attempts refused while throttled do not
// extend the block, and the real user logs in once the window has passed.
func TestSecurity_LoginThrottle(t *testing.T) {
	const window = 15 * time.Minute
	type step struct {
		user, password, xff string
		want                int
	}
	wrong := "wrong wrong wrong"
	cases := []struct {
		name     string
		failures func(i int) (user, xff string)
		after    []step // straight after the 10 failures
		later    []step // after the window has passed
	}{
		{name: "per address, across usernames",
			failures: func(i int) (string, string) { return fmt.Sprintf("guess%d", i), "198.51.100.7" },
			after: []step{{"kim", recordstest.Password, "198.51.100.7", http.StatusTooManyRequests},
				{"kim", recordstest.Password, "198.51.100.8", http.StatusSeeOther}},
			later: []step{{"kim", recordstest.Password, "198.51.100.7", http.StatusSeeOther}}},
		{name: "per address, client-written forwarding entries ignored",
			failures: func(i int) (string, string) {
				return fmt.Sprintf("guess%d", i), fmt.Sprintf("10.9.%d.1, 203.0.113.5", i)
			},
			after: []step{{"kim", recordstest.Password, "192.0.2.200, 203.0.113.5", http.StatusTooManyRequests},
				{"kim", recordstest.Password, "203.0.113.6", http.StatusSeeOther}},
			later: []step{{"kim", recordstest.Password, "192.0.2.201, 203.0.113.5", http.StatusSeeOther}}},
		{name: "per account, across addresses",
			failures: func(i int) (string, string) { return "kim", fmt.Sprintf("198.51.100.%d", 20+i) },
			after: []step{{"kim", recordstest.Password, "198.51.100.99", http.StatusTooManyRequests},
				{"KIM", recordstest.Password, "198.51.100.98", http.StatusTooManyRequests},
				{"lee", recordstest.Password, "198.51.100.99", http.StatusSeeOther}},
			later: []step{{"kim", recordstest.Password, "198.51.100.99", http.StatusSeeOther}}},
		{name: "hammering while blocked does not extend the block",
			failures: func(i int) (string, string) { return "kim", "198.51.100.50" },
			after: []step{{"kim", wrong, "198.51.100.50", http.StatusTooManyRequests},
				{"kim", wrong, "198.51.100.51", http.StatusTooManyRequests}},
			later: []step{{"kim", recordstest.Password, "198.51.100.50", http.StatusSeeOther}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := newTestApp(t)
			recordstest.AddUser(t, a.store, "kim", records.RoleStaff)
			recordstest.AddUser(t, a.store, "lee", records.RoleStaff)
			// Sprayed usernames: real accounts but the last (an unknown name
			// costs a full-cost bcrypt comparison, slow under -race).
			for i := range 9 {
				recordstest.AddUser(t, a.store, fmt.Sprintf("guess%d", i), records.RoleStaff)
			}
			for i := range 10 {
				user, xff := tc.failures(i)
				if got := secLoginAs(t, a, user, wrong, xff); got != http.StatusUnauthorized {
					t.Fatalf("failure %d (%s from %s): status %d, want 401", i+1, user, xff, got)
				}
			}
			run := func(steps []step, when string) {
				for _, s := range steps {
					if got := secLoginAs(t, a, s.user, s.password, s.xff); got != s.want {
						t.Errorf("%s: %s from %q: status %d, want %d", when, s.user, s.xff, got, s.want)
					}
				}
			}
			run(tc.after, "after 10 failures")
			// Keep trying where blocked, every three minutes, until the
			// window since the failures has passed.
			for range 4 {
				a.clock.Advance(3 * time.Minute)
				for _, s := range tc.after {
					if s.want == http.StatusTooManyRequests {
						if got := secLoginAs(t, a, s.user, wrong, s.xff); got != http.StatusTooManyRequests {
							t.Fatalf("%s from %q while blocked: status %d, want 429", s.user, s.xff, got)
						}
					}
				}
			}
			a.clock.Advance(window - 12*time.Minute + time.Second)
			run(tc.later, "once the window has passed")
		})
	}
}

// TestSecurity_SessionIDs: a session id the browser brings (planted by an
// attacker) is never adopted: login issues a fresh random id, and the
// cookies are HttpOnly, SameSite=Lax, host-wide, and Secure when configured
// (OWASP Session Management Cheat Sheet: "Renew the Session ID After Any
// Privilege Level Change", "Cookies").
func TestSecurity_SessionIDs(t *testing.T) {
	for _, secure := range []bool{false, true} {
		t.Run(fmt.Sprintf("secure=%v", secure), func(t *testing.T) {
			a := newTestApp(t)
			s := New(Config{Now: a.clock.Now, SecureCookies: secure}, a.store, speciesTable)
			a.srv.Config.Handler = s
			recordstest.AddUser(t, a.store, "kim", records.RoleStaff)
			u, _ := url.Parse(a.srv.URL)
			planted := records.NewToken()
			a.client.Jar.SetCookies(u, []*http.Cookie{{Name: sessionCookie, Value: planted, Path: "/"}})
			resp, _ := a.get("/login")
			checkCookies(t, resp, secure)
			form := url.Values{"username": {"kim"}, "password": {recordstest.Password}, "_csrf": {a.csrf}}
			req, _ := http.NewRequest(http.MethodPost, a.srv.URL+"/login", strings.NewReader(form.Encode()))
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			resp, err := a.client.Do(req)
			if err != nil {
				t.Fatal(err)
			}
			resp.Body.Close()
			wantStatus(t, resp, http.StatusSeeOther)
			checkCookies(t, resp, secure)
			var got string
			for _, c := range resp.Cookies() {
				if c.Name == sessionCookie {
					got = c.Value
				}
			}
			if got == "" || got == planted || len(got) < 40 {
				t.Errorf("session id after login %q (planted %q): want a fresh random id", got, planted)
			}
			if _, err := a.store.LoginSessionByToken(context.Background(), planted); err == nil {
				t.Error("the planted session id authenticates")
			}
			var raw int
			a.store.DB().QueryRow(`SELECT count(*) FROM login_sessions WHERE token_hash = ?`, got).Scan(&raw)
			if raw != 0 {
				t.Error("the session id is stored in the clear")
			}
		})
	}
}

func checkCookies(t *testing.T, resp *http.Response, secure bool) {
	t.Helper()
	for _, c := range resp.Cookies() {
		if c.MaxAge < 0 || c.Value == "" {
			continue
		}
		if !c.HttpOnly || c.SameSite != http.SameSiteLaxMode || c.Path != "/" || c.Secure != secure {
			t.Errorf("cookie %s: HttpOnly %v, SameSite %v, Path %q, Secure %v; want HttpOnly, Lax, /, Secure %v",
				c.Name, c.HttpOnly, c.SameSite, c.Path, c.Secure, secure)
		}
	}
}

// TestSecurity_LoginNextStaysOnSite: the page a login returns to is always
// on this site, however next is written (OWASP Unvalidated Redirects and
// Forwards; browsers drop tabs and line breaks inside a URL, so "/\t/evil"
// is "//evil").
func TestSecurity_LoginNextStaysOnSite(t *testing.T) {
	a := newTestApp(t)
	recordstest.AddUser(t, a.store, "kim", records.RoleStaff)
	for _, next := range []string{"//evil.example/", "/\\evil.example", "\\\\evil.example", "https://evil.example/",
		"/\t/evil.example", "/\n/evil.example", "/\r/evil.example", " //evil.example", "javascript:alert(1)", "/%09/evil.example"} {
		jar, _ := cookiejar.New(nil)
		a.client.Jar = jar
		a.get("/login")
		resp, _ := a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}, "next": {next}})
		wantStatus(t, resp, http.StatusSeeOther)
		loc := resp.Header.Get("Location")
		cleaned := strings.Map(func(r rune) rune {
			if r < 0x20 || r == 0x7f {
				return -1
			}
			return r
		}, loc)
		if !strings.HasPrefix(cleaned, "/") || strings.HasPrefix(cleaned, "//") || strings.Contains(cleaned, "\\") {
			t.Errorf("next %q: redirected to %q, want a path on this site", next, loc)
		}
	}
}

// secPolicy parses a Content-Security-Policy into its directives.
func secPolicy(csp string) map[string][]string {
	out := map[string][]string{}
	for _, d := range strings.Split(csp, ";") {
		f := strings.Fields(d)
		if len(f) > 0 {
			out[strings.ToLower(f[0])] = f[1:]
		}
	}
	return out
}

// checkPageHeaders checks the headers every response carries (OWASP HTTP
// Headers Cheat Sheet; CSP Level 3 for script-src and frame-ancestors).
func checkPageHeaders(t *testing.T, what string, h http.Header, chart bool) {
	t.Helper()
	pol := secPolicy(h.Get("Content-Security-Policy"))
	scripts, ok := pol["script-src"]
	if !ok {
		scripts = pol["default-src"]
	}
	if chart {
		if _, has := pol["script-src"]; has || !slices.Equal(pol["default-src"], []string{"'none'"}) {
			t.Errorf("%s: chart CSP %q, want default-src 'none' and no script source", what, h.Get("Content-Security-Policy"))
		}
	} else {
		if len(scripts) == 0 || !slices.Equal(pol["frame-ancestors"], []string{"'none'"}) || !slices.Equal(pol["object-src"], []string{"'none'"}) {
			t.Errorf("%s: CSP %q, want script-src, frame-ancestors 'none', object-src 'none'", what, h.Get("Content-Security-Policy"))
		}
		if !slices.Contains([]string{"'none'", "'self'"}, strings.Join(pol["base-uri"], " ")) {
			t.Errorf("%s: CSP base-uri %v, want 'none' or 'self'", what, pol["base-uri"])
		}
	}
	for _, s := range scripts {
		if s == "'unsafe-inline'" || s == "'unsafe-eval'" || s == "*" || s == "data:" || s == "http:" || s == "https:" {
			t.Errorf("%s: script source %s allowed", what, s)
		}
	}
	if h.Get("X-Content-Type-Options") != "nosniff" {
		t.Errorf("%s: X-Content-Type-Options %q, want nosniff", what, h.Get("X-Content-Type-Options"))
	}
	if rp := h.Get("Referrer-Policy"); !slices.Contains([]string{"no-referrer", "same-origin", "strict-origin", "strict-origin-when-cross-origin"}, rp) {
		t.Errorf("%s: Referrer-Policy %q, want one that keeps paths (case numbers) on this site", what, rp)
	}
	if !chart && h.Get("X-Frame-Options") != "DENY" {
		t.Errorf("%s: X-Frame-Options %q, want DENY", what, h.Get("X-Frame-Options"))
	}
}

// TestSecurity_HeadersOnEveryRoute: every GET route, logged in or not,
// answered or refused, carries the security headers; chart documents carry
// the chart policy, which allows inline styles and no script at all.
func TestSecurity_HeadersOnEveryRoute(t *testing.T) {
	e := newSecEnv(t, true)
	a := e.a
	anon := &http.Client{CheckRedirect: a.client.CheckRedirect}
	fill := strings.NewReplacer(":case", e.p.CaseNumber, ":kind", string(records.KindDiagnosis), ":key", "1",
		":id", fmt.Sprint(e.enclosureID), ":version", "1", "*", "app.css")
	a.login("boss", records.RoleAdmin, records.RoleVet, records.RoleRehabilitator, records.RoleStaff)
	s := a.srv.Config.Handler.(*Server)
	paths := []string{"/no/such/page", "/api/v1/no/such"}
	for _, r := range s.echo.Routes() {
		if r.Method == http.MethodGet {
			paths = append(paths, fill.Replace(r.Path))
		}
	}
	for _, p := range paths {
		chart := strings.Contains(p, "/charts/")
		resp := secGet(t, a, p)
		checkPageHeaders(t, "GET "+p+" (logged in, "+fmt.Sprint(resp.StatusCode)+")", resp.Header, chart && resp.StatusCode == http.StatusOK)
		ar, err := anon.Get(a.srv.URL + p)
		if err != nil {
			t.Fatal(err)
		}
		ar.Body.Close()
		checkPageHeaders(t, "GET "+p+" (anonymous, "+fmt.Sprint(ar.StatusCode)+")", ar.Header, false)
	}
	code, _ := bearer(t, a, http.MethodGet, "/patients", "aloft_nope", nil)
	if code != http.StatusUnauthorized {
		t.Errorf("bearer on a page: %d, want 401", code)
	}
}

package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"

	"aloft/records"
)

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
	method, path, _ := strings.Cut(methodPath, " ")
	form := url.Values{"reason": {"x"}}
	if csrf != "" {
		form.Set("_csrf", csrf)
	}
	req, _ := http.NewRequest(method, a.srv.URL+path, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	resp, err := a.client.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	return resp
}

// TestSecurity_EveryMutatingRouteNeedsLoginAndCSRF: with no session every
// unsafe route answers 401 or redirects to the login page; logged in, a
// missing or wrong CSRF token gets 403 — and nothing is written either way.
func TestSecurity_EveryMutatingRouteNeedsLoginAndCSRF(t *testing.T) {
	a := newTestApp(t)
	public := map[string]bool{"POST /login": true, "POST /logout": true, "POST /setup": true}
	routes := mutatingRoutes(t, a)
	countAudit := func() int {
		var n int
		a.store.DB().QueryRow(`SELECT count(*) FROM audit_log`).Scan(&n)
		return n
	}
	before := countAudit()
	for _, r := range routes {
		if public[r] {
			continue
		}
		resp := send(t, a, r, "")
		loc := resp.Header.Get("Location")
		if resp.StatusCode != http.StatusUnauthorized && !(resp.StatusCode == http.StatusSeeOther && strings.HasPrefix(loc, "/login")) {
			t.Errorf("%s without a session: status %d (Location %q), want 401 or a redirect to /login", r, resp.StatusCode, loc)
		}
	}
	a.login("boss", records.RoleAdmin, records.RoleVet, records.RoleRehabilitator, records.RoleStaff)
	before = countAudit()
	for _, r := range routes {
		if r == "POST /login" || r == "POST /setup" {
			continue
		}
		for _, tok := range []string{"", "forged-token"} {
			if resp := send(t, a, r, tok); resp.StatusCode != http.StatusForbidden {
				t.Errorf("%s with CSRF token %q: status %d, want 403", r, tok, resp.StatusCode)
			}
		}
	}
	if after := countAudit(); after != before {
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

// TestSecurity_APIToken: a token acts with its user's roles under /api/ only
// and stops working when revoked.
func TestSecurity_APIToken(t *testing.T) {
	a := newTestApp(t)
	admin := a.login("boss", records.RoleAdmin)
	staff, _ := a.store.UserByName(t.Context(), "boss")
	_ = staff
	secret, tok, err := a.store.IssueAPIToken(t.Context(), admin, admin.ID, "test")
	if err != nil {
		t.Fatal(err)
	}
	get := func(path string) int {
		req, _ := http.NewRequest(http.MethodGet, a.srv.URL+path, nil)
		req.Header.Set("Authorization", "Bearer "+secret)
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		return resp.StatusCode
	}
	if code := get("/patients"); code != http.StatusUnauthorized {
		t.Errorf("token on a page: %d, want 401", code)
	}
	if err := a.store.RevokeAPIToken(t.Context(), admin, tok.ID); err != nil {
		t.Fatal(err)
	}
	if code := get("/api/v1/anything"); code != http.StatusUnauthorized {
		t.Errorf("revoked token: %d, want 401", code)
	}
}

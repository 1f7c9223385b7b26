package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"aloft/records"
	"aloft/records/recordstest"
)

func TestSetup_FirstAdminOnlyOnce(t *testing.T) {
	clock := recordstest.NewClock(recordstest.Epoch)
	store := recordstest.Open(t, clock)
	a := newTestApp(t)
	a.store = store
	a.srv.Config.Handler = New(Config{Now: clock.Now}, store, speciesTable)

	resp, _ := a.get("/login")
	wantStatus(t, resp, http.StatusSeeOther)
	if loc := resp.Header.Get("Location"); loc != "/setup" {
		t.Fatalf("empty database: /login redirects to %q, want /setup", loc)
	}
	resp, doc := a.get("/setup")
	wantStatus(t, resp, http.StatusOK)
	if doc.Find("input[name=password]").Length() != 1 {
		t.Fatal("set-up page has no password field")
	}
	bad := url.Values{"centre_name": {"Hill Centre"}, "elevation_m": {"9000"}, "username": {"boss"},
		"display_name": {"Boss"}, "password": {"short"}, "password2": {"short"}}
	resp, doc = a.post("/setup", bad)
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	for _, field := range []string{"elevation_m", "password"} {
		if !strings.Contains(doc.Find("#"+field).Parent().Text(), "") || doc.Find(".field-error").Length() < 2 {
			t.Errorf("set-up errors: want a message beside %s", field)
		}
	}
	if got, _ := doc.Find("#centre_name").Attr("value"); got != "Hill Centre" {
		t.Errorf("refused set-up lost the centre name: got %q", got)
	}
	good := url.Values{"centre_name": {"Hill Centre"}, "elevation_m": {"250"}, "username": {"boss"},
		"display_name": {"Boss Person"}, "password": {"a long enough pass"}, "password2": {"a long enough pass"}}
	resp, _ = a.post("/setup", good)
	wantStatus(t, resp, http.StatusSeeOther)
	u, err := store.UserByName(context.Background(), "boss")
	if err != nil || !u.Has(records.RoleAdmin) {
		t.Fatalf("first user = %+v, %v; want an admin", u, err)
	}
	resp, _ = a.post("/setup", good)
	wantStatus(t, resp, http.StatusForbidden)
	resp, _ = a.get("/setup")
	wantStatus(t, resp, http.StatusSeeOther)
}

func TestLogin_FreshSessionAndLogout(t *testing.T) {
	a := newTestApp(t)
	recordstest.AddUser(t, a.store, "kim", records.RoleStaff)
	resp, _ := a.get("/patients")
	wantStatus(t, resp, http.StatusSeeOther)
	if !strings.HasPrefix(resp.Header.Get("Location"), "/login") {
		t.Fatalf("anonymous /patients redirects to %q, want /login", resp.Header.Get("Location"))
	}
	a.get("/login")
	resp, doc := a.post("/login", url.Values{"username": {"kim"}, "password": {"not the password"}})
	wantStatus(t, resp, http.StatusUnauthorized)
	if doc.Find("[data-testid=login-error]").Length() != 1 {
		t.Error("wrong password: no error shown")
	}
	cookieOf := func() string {
		u, _ := url.Parse(a.srv.URL)
		for _, c := range a.client.Jar.Cookies(u) {
			if c.Name == sessionCookie {
				return c.Value
			}
		}
		return ""
	}
	resp, _ = a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusSeeOther)
	first := cookieOf()
	a.get("/patients") // the logged-in page's CSRF token
	resp, _ = a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}})
	if resp.StatusCode != http.StatusSeeOther {
		// A logged-in user posting /login with the session's CSRF token is fine too.
		t.Logf("second login status %d", resp.StatusCode)
	}
	if second := cookieOf(); second == "" || second == first {
		t.Errorf("session id not renewed at login: %q then %q", first, second)
	}
	if _, err := a.store.LoginSessionByToken(context.Background(), first); err == nil {
		t.Error("the old session still works after a new login")
	}
	resp, _ = a.get("/patients")
	wantStatus(t, resp, http.StatusOK)
	resp, _ = a.post("/logout", url.Values{})
	wantStatus(t, resp, http.StatusSeeOther)
	resp, _ = a.get("/patients")
	wantStatus(t, resp, http.StatusSeeOther)
}

func TestCSRF_RefusesMissingOrWrongToken(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	for _, tok := range []string{"", "wrong-token"} {
		resp, _ := a.post("/intake", url.Values{"_csrf": {tok}, "species": {"Mallard"}})
		wantStatus(t, resp, http.StatusForbidden)
	}
	list, _ := a.store.Patients(context.Background(), records.PatientFilter{})
	if len(list) != 0 {
		t.Errorf("%d patients stored by forged posts, want 0", len(list))
	}
}

func TestSecurityHeaders(t *testing.T) {
	a := newTestApp(t)
	resp, _ := a.get("/login")
	h := resp.Header
	csp := h.Get("Content-Security-Policy")
	if !strings.Contains(csp, "script-src 'self'") || strings.Contains(csp, "unsafe-inline") || !strings.Contains(csp, "frame-ancestors 'none'") {
		t.Errorf("CSP = %q", csp)
	}
	if h.Get("X-Content-Type-Options") != "nosniff" || h.Get("Referrer-Policy") == "" {
		t.Errorf("headers = %v", h)
	}
}

func TestLoginThrottle(t *testing.T) {
	a := newTestApp(t)
	recordstest.AddUser(t, a.store, "kim", records.RoleStaff)
	a.get("/login")
	for i := 0; i < 10; i++ {
		a.post("/login", url.Values{"username": {"kim"}, "password": {"wrong wrong wrong"}})
	}
	resp, _ := a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusTooManyRequests)
	a.clock.Advance(16 * 60e9)
	resp, _ = a.post("/login", url.Values{"username": {"kim"}, "password": {recordstest.Password}})
	wantStatus(t, resp, http.StatusSeeOther)
}

func TestUsers_AdminOnly(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff)
	resp, _ := a.get("/users")
	wantStatus(t, resp, http.StatusForbidden)
	resp, _ = a.post("/users", url.Values{"username": {"x1"}, "display_name": {"X"}, "password": {"long password 1"}, "roles": {"admin"}})
	wantStatus(t, resp, http.StatusForbidden)

	b := newTestApp(t)
	b.login("boss", records.RoleAdmin)
	resp, doc := b.post("/users", url.Values{"username": {"new.vet"}, "display_name": {"New Vet"}, "password": {"short"}, "roles": {"vet"}})
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if doc.Find(".field-error").Length() == 0 {
		t.Error("bad password: no message beside the field")
	}
	resp, _ = b.post("/users", url.Values{"username": {"new.vet"}, "display_name": {"New Vet"}, "password": {"long password 1"}, "roles": {"vet"}})
	wantStatus(t, resp, http.StatusSeeOther)
	u, err := b.store.UserByName(context.Background(), "new.vet")
	if err != nil || !u.Has(records.RoleVet) {
		t.Errorf("added user = %+v, %v", u, err)
	}
}

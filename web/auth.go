package web

import (
	"crypto/subtle"
	"errors"
	"net/http"
	"net/url"
	"strings"
	"sync"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// Cookie names.
const (
	sessionCookie = "aloft_session"
	preCSRFCookie = "aloft_precsrf" // double-submit token for forms shown before login
	csrfField     = "_csrf"
	csrfHeader    = "X-CSRF-Token"
)

const ctxSession = "aloft.session"

// session returns the logged-in session, or nil.
func session(c echo.Context) *records.LoginSession {
	ls, _ := c.Get(ctxSession).(*records.LoginSession)
	return ls
}

// currentUser returns the logged-in user; only call behind requireLogin.
func currentUser(c echo.Context) records.User { return session(c).User }

func (s *Server) loadSession(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		// API clients authenticate with a per-user bearer token instead of a
		// cookie; the token acts with its user's roles and needs no CSRF token.
		if auth := c.Request().Header.Get("Authorization"); strings.HasPrefix(auth, "Bearer ") {
			if !isAPI(c) {
				return echo.NewHTTPError(http.StatusUnauthorized, "API tokens work only under /api/.")
			}
			u, err := s.store.UserByAPIToken(c.Request().Context(), strings.TrimPrefix(auth, "Bearer "))
			if errors.Is(err, records.ErrNotFound) {
				return echo.NewHTTPError(http.StatusUnauthorized, "Unknown or revoked API token.")
			}
			if err != nil {
				return err
			}
			c.Set(ctxSession, &records.LoginSession{User: u})
			return next(c)
		}
		if ck, err := c.Cookie(sessionCookie); err == nil && ck.Value != "" {
			ls, err := s.store.LoginSessionByToken(c.Request().Context(), ck.Value)
			switch {
			case err == nil:
				c.Set(ctxSession, &ls)
			case !errors.Is(err, records.ErrNotFound):
				return err
			}
		}
		return next(c)
	}
}

func safeMethod(m string) bool {
	return m == http.MethodGet || m == http.MethodHead || m == http.MethodOptions
}

// checkCSRF refuses every unsafe request whose token does not match: the
// session's token once logged in, else the pre-login double-submit cookie.
// API requests authenticated by bearer token carry no cookie and are exempt.
func (s *Server) checkCSRF(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		r := c.Request()
		if safeMethod(r.Method) || strings.HasPrefix(r.Header.Get("Authorization"), "Bearer ") {
			return next(c)
		}
		got := r.Header.Get(csrfHeader)
		if got == "" {
			got = c.FormValue(csrfField)
		}
		want := ""
		if ls := session(c); ls != nil {
			want = ls.CSRFToken
		} else if ck, err := c.Cookie(preCSRFCookie); err == nil {
			want = ck.Value
		}
		if want == "" || got == "" || subtle.ConstantTimeCompare([]byte(got), []byte(want)) != 1 {
			return echo.NewHTTPError(http.StatusForbidden, "This form has expired or did not come from Aloft. Go back, reload the page and try again; nothing was saved.")
		}
		return next(c)
	}
}

// csrfToken returns the token forms on this page must carry, setting the
// pre-login cookie when nobody is logged in.
func (s *Server) csrfToken(c echo.Context) string {
	if ls := session(c); ls != nil {
		return ls.CSRFToken
	}
	if ck, err := c.Cookie(preCSRFCookie); err == nil && len(ck.Value) >= 32 {
		return ck.Value
	}
	tok := records.NewToken()
	c.SetCookie(&http.Cookie{Name: preCSRFCookie, Value: tok, Path: "/", HttpOnly: true,
		SameSite: http.SameSiteLaxMode, Secure: s.cfg.SecureCookies})
	return tok
}

// requireLogin sends anonymous visitors to the login page (pages) or answers
// 401 (API and other non-GET requests).
func (s *Server) requireLogin(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		if session(c) != nil {
			return next(c)
		}
		if isAPI(c) || c.Request().Method != http.MethodGet {
			return echo.NewHTTPError(http.StatusUnauthorized, "Your login has ended. Log in again; what you typed is still in the form.")
		}
		return c.Redirect(http.StatusSeeOther, "/login?next="+url.QueryEscape(c.Request().URL.RequestURI()))
	}
}

// requireRole allows only users holding one of roles.
func requireRole(roles ...records.Role) echo.MiddlewareFunc {
	return func(next echo.HandlerFunc) echo.HandlerFunc {
		return func(c echo.Context) error {
			if ls := session(c); ls == nil || !ls.User.HasAny(roles...) {
				return echo.NewHTTPError(http.StatusForbidden, "Your role does not allow this. It needs: "+roleList(roles)+".")
			}
			return next(c)
		}
	}
}

func roleList(rs []records.Role) string {
	var ss []string
	for _, r := range rs {
		ss = append(ss, string(r))
	}
	return strings.Join(ss, " or ")
}

// meta is the per-page information the layout needs.
func (s *Server) meta(c echo.Context, title string) views.Meta {
	m := views.Meta{Title: title, Demo: s.cfg.Demo, Path: c.Request().URL.Path}
	if ls := session(c); ls != nil {
		u := ls.User
		m.User = &u
	}
	m.CSRF = s.csrfToken(c)
	if ctr, err := s.store.Centre(c.Request().Context()); err == nil {
		m.Centre = ctr.Name
	}
	return m
}

// loginThrottle limits failed logins per account and per address: at most
// maxFails in window. Old failures age out, so nobody is locked out for good.
type loginThrottle struct {
	mu     sync.Mutex
	fails  map[string][]time.Time
	window time.Duration
	max    int
}

func newLoginThrottle() *loginThrottle {
	return &loginThrottle{fails: map[string][]time.Time{}, window: 15 * time.Minute, max: 10}
}

func (t *loginThrottle) prune(key string, now time.Time) []time.Time {
	var keep []time.Time
	for _, at := range t.fails[key] {
		if now.Sub(at) < t.window {
			keep = append(keep, at)
		}
	}
	if len(keep) == 0 {
		delete(t.fails, key)
	} else {
		t.fails[key] = keep
	}
	return keep
}

// blocked reports whether any key has reached the limit, and until when.
func (t *loginThrottle) blocked(now time.Time, keys ...string) (bool, time.Time) {
	t.mu.Lock()
	defer t.mu.Unlock()
	for _, k := range keys {
		if f := t.prune(k, now); len(f) >= t.max {
			return true, f[0].Add(t.window)
		}
	}
	return false, time.Time{}
}

func (t *loginThrottle) fail(now time.Time, keys ...string) {
	t.mu.Lock()
	defer t.mu.Unlock()
	for _, k := range keys {
		t.fails[k] = append(t.prune(k, now), now)
	}
}

func (s *Server) handleLoginForm(c echo.Context) error {
	if session(c) != nil {
		return c.Redirect(http.StatusSeeOther, "/patients")
	}
	if n, err := s.store.CountUsers(c.Request().Context()); err == nil && n == 0 {
		return c.Redirect(http.StatusSeeOther, "/setup")
	}
	return render(c, http.StatusOK, views.LoginPage(s.meta(c, "Log in"), views.LoginForm{Next: safeNext(c.QueryParam("next"))}, s.demoLogins()))
}

func (s *Server) demoLogins() []views.DemoLogin {
	var out []views.DemoLogin
	for _, d := range s.cfg.DemoLogins {
		out = append(out, views.DemoLogin{Username: d.Username, Password: d.Password, Roles: d.Roles})
	}
	return out
}

// safeNext keeps a post-login redirect on this site. Browsers drop tabs and
// line breaks inside a URL ("/\t/evil" is "//evil"), so control characters
// are refused too.
func safeNext(next string) string {
	if !strings.HasPrefix(next, "/") || strings.HasPrefix(next, "//") || strings.Contains(next, "\\") ||
		strings.ContainsFunc(next, func(r rune) bool { return r < 0x20 || r == 0x7f }) {
		return "/patients"
	}
	return next
}

func (s *Server) handleLogin(c echo.Context) error {
	ctx := c.Request().Context()
	f := views.LoginForm{Username: strings.TrimSpace(c.FormValue("username")), Next: safeNext(c.FormValue("next"))}
	now := s.now()
	keys := []string{"user:" + strings.ToLower(f.Username), "addr:" + c.RealIP()}
	if blocked, until := s.throttle.blocked(now, keys...); blocked {
		f.Error = "Too many failed logins. Try again after " + until.Local().Format("15:04") + ", or ask an administrator to reset your password."
		return render(c, http.StatusTooManyRequests, views.LoginPage(s.meta(c, "Log in"), f, s.demoLogins()))
	}
	u, err := s.store.Authenticate(ctx, f.Username, c.FormValue("password"))
	if errors.Is(err, records.ErrBadLogin) {
		s.throttle.fail(now, keys...)
		f.Error = "Wrong username or password."
		return render(c, http.StatusUnauthorized, views.LoginPage(s.meta(c, "Log in"), f, s.demoLogins()))
	}
	if err != nil {
		return err
	}
	// A fresh session id at every login; any session the browser had is ended.
	if ck, err := c.Cookie(sessionCookie); err == nil {
		_ = s.store.DeleteLoginSession(ctx, ck.Value)
	}
	tok, _, err := s.store.CreateLoginSession(ctx, u.ID)
	if err != nil {
		return err
	}
	c.SetCookie(&http.Cookie{Name: sessionCookie, Value: tok, Path: "/", HttpOnly: true,
		SameSite: http.SameSiteLaxMode, Secure: s.cfg.SecureCookies, MaxAge: int(records.SessionTTL.Seconds())})
	return c.Redirect(http.StatusSeeOther, f.Next)
}

func (s *Server) handleLogout(c echo.Context) error {
	if ck, err := c.Cookie(sessionCookie); err == nil {
		if err := s.store.DeleteLoginSession(c.Request().Context(), ck.Value); err != nil {
			return err
		}
	}
	c.SetCookie(&http.Cookie{Name: sessionCookie, Value: "", Path: "/", MaxAge: -1, HttpOnly: true, SameSite: http.SameSiteLaxMode})
	return c.Redirect(http.StatusSeeOther, "/login")
}

// handleSetupForm serves the one-time set-up of the first admin account.
func (s *Server) handleSetupForm(c echo.Context) error {
	if n, err := s.store.CountUsers(c.Request().Context()); err != nil || n > 0 {
		if err != nil {
			return err
		}
		return c.Redirect(http.StatusSeeOther, "/login")
	}
	return render(c, http.StatusOK, views.SetupPage(s.meta(c, "Set up Aloft"), views.SetupForm{}))
}

func (s *Server) handleSetup(c echo.Context) error {
	ctx := c.Request().Context()
	if n, err := s.store.CountUsers(ctx); err != nil || n > 0 {
		if err != nil {
			return err
		}
		return echo.NewHTTPError(http.StatusForbidden, "Aloft is already set up: log in instead.")
	}
	f := views.SetupForm{CentreName: c.FormValue("centre_name"), Address: c.FormValue("address"),
		Elevation: c.FormValue("elevation_m"), Username: c.FormValue("username"), DisplayName: c.FormValue("display_name")}
	var errs assess.ValidationErrors
	elev, verr := parseFloatField("elevation_m", f.Elevation, true)
	if verr != nil {
		errs = append(errs, verr)
	}
	centre := records.Centre{Name: f.CentreName, Address: f.Address, ElevationM: elev}
	if err := centre.Validate(); err != nil {
		errs = append(errs, asValidation(err)...)
	}
	nu := records.NewUser{Username: f.Username, DisplayName: f.DisplayName, Password: c.FormValue("password"),
		Roles: []records.Role{records.RoleAdmin, records.RoleStaff}}
	if err := nu.Validate(); err != nil {
		errs = append(errs, asValidation(err)...)
	}
	if c.FormValue("password") != c.FormValue("password2") {
		errs = append(errs, &assess.ValidationError{Field: "password2", Message: "the two passwords differ"})
	}
	if len(errs) > 0 {
		f.Errors = errs
		return render(c, http.StatusUnprocessableEntity, views.SetupPage(s.meta(c, "Set up Aloft"), f))
	}
	if err := s.store.SetCentre(ctx, 0, centre); err != nil {
		return err
	}
	if _, err := s.store.AddUser(ctx, 0, nu); err != nil {
		if ve := asValidation(err); ve != nil {
			f.Errors = ve
			return render(c, http.StatusUnprocessableEntity, views.SetupPage(s.meta(c, "Set up Aloft"), f))
		}
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/login")
}

// asValidation returns err's field errors, or nil when it is another error.
func asValidation(err error) assess.ValidationErrors {
	var ve assess.ValidationErrors
	if errors.As(err, &ve) {
		return ve
	}
	var v1 *assess.ValidationError
	if errors.As(err, &v1) {
		return assess.ValidationErrors{v1}
	}
	return nil
}

package web

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"log/slog"
	"net/http"
	"time"

	"github.com/a-h/templ"
	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// Server is the Aloft web application for one centre.
type Server struct {
	store    *records.Store
	species  *assess.SpeciesTable
	cfg      Config
	log      *slog.Logger
	now      func() time.Time
	echo     *echo.Echo
	throttle *loginThrottle

	patientSections []patientSection // blocks of the patient page, in order
	patientsExtras  []pageExtra      // blocks above the patient list
}

// New builds the server and its routes. species may be nil only in tests of
// pages that do not need it.
func New(cfg Config, store *records.Store, species *assess.SpeciesTable) *Server {
	s := &Server{store: store, species: species, cfg: cfg, log: cfg.Logger, now: cfg.Now, throttle: newLoginThrottle()}
	if s.log == nil {
		s.log = slog.Default()
	}
	if s.now == nil {
		s.now = time.Now
	}
	e := echo.New()
	e.HideBanner, e.HidePort = true, true
	e.HTTPErrorHandler = s.handleError
	// The client's address (the login throttle's per-address key) is the
	// nearest untrusted hop of X-Forwarded-For: a proxy on this host or the
	// private network appends the real client, so a client cannot choose the
	// address it is counted under. Echo's default took the header's first,
	// client-written entry.
	e.IPExtractor = echo.ExtractIPFromXFFHeader()
	e.Use(s.recoverMiddleware, securityHeaders, s.loadSession)
	s.echo = e
	s.routes()
	return s
}

// ServeHTTP makes Server an http.Handler.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) { s.echo.ServeHTTP(w, r) }

// render writes a templ component with a status code, buffered so that a
// failing template yields a clean error page rather than half a page.
func render(c echo.Context, status int, t templ.Component) error {
	buf := templ.GetBuffer()
	defer templ.ReleaseBuffer(buf)
	if err := t.Render(c.Request().Context(), buf); err != nil {
		return err
	}
	return c.HTMLBlob(status, buf.Bytes())
}

// incidentID returns a short random id to quote in logs and to the user.
func incidentID() string {
	b := make([]byte, 6)
	_, _ = rand.Read(b)
	return hex.EncodeToString(b)
}

// handleError is the one Echo error handler: HTTP errors show their own
// message; every other error is logged with an incident id and the person
// sees a plain sentence quoting it, never the error text.
func (s *Server) handleError(err error, c echo.Context) {
	if c.Response().Committed {
		return
	}
	status := http.StatusInternalServerError
	msg := ""
	var he *echo.HTTPError
	switch {
	case errors.As(err, &he):
		status = he.Code
		if m, ok := he.Message.(string); ok {
			msg = m
		} else {
			msg = http.StatusText(status)
		}
	case errors.Is(err, records.ErrNotFound):
		status, msg = http.StatusNotFound, "There is no such record."
	case errors.Is(err, records.ErrForbidden):
		status, msg = http.StatusForbidden, "Your role does not allow this."
	case errors.Is(err, context.Canceled):
		return
	}
	if status >= 500 {
		id := incidentID()
		s.log.Error("request failed", "incident", id, "method", c.Request().Method, "path", c.Request().URL.Path, "err", err)
		msg = "Something went wrong on our side and nothing was changed by this request. If it happens again, quote incident " + id + " to your administrator."
	}
	if isAPI(c) {
		_ = c.JSON(status, map[string]string{"error": msg})
		return
	}
	_ = render(c, status, views.ErrorPage(s.meta(c, http.StatusText(status)), status, msg))
}

func (s *Server) recoverMiddleware(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) (err error) {
		defer func() {
			if r := recover(); r != nil {
				id := incidentID()
				s.log.Error("panic", "incident", id, "path", c.Request().URL.Path, "panic", r)
				err = errors.New("panic recovered: incident " + id)
			}
		}()
		return next(c)
	}
}

func isAPI(c echo.Context) bool {
	p := c.Request().URL.Path
	return len(p) >= 5 && p[:5] == "/api/"
}

// securityHeaders sets the content security policy and its companions on
// every response. Pages allow only the app's own scripts and styles; chart
// documents override the policy to allow their inline styles.
func securityHeaders(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		h := c.Response().Header()
		h.Set("Content-Security-Policy", PageCSP)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "same-origin")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		h.Set("Permissions-Policy", "camera=(), microphone=(), geolocation=()")
		return next(c)
	}
}

// Content security policies.
const (
	PageCSP = "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; " +
		"object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"
	// ChartCSP is for SVG chart documents, whose library writes inline styles.
	ChartCSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; frame-ancestors 'self'"
)

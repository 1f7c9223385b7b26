package web

import (
	"log/slog"
	"time"
)

// Config configures the server. Zero values take the defaults noted.
type Config struct {
	// Demo marks a demo centre: the pages say so and show the public logins.
	Demo bool
	// DemoLogins are shown on the login page of a demo centre.
	DemoLogins []DemoLogin
	// SecureCookies sets the Secure flag on cookies (under TLS, or behind a
	// TLS-terminating proxy). Default off, for plain-HTTP localhost use.
	SecureCookies bool
	// Logger for requests and incidents; nil means slog.Default().
	Logger *slog.Logger
	// Now is the clock; nil means time.Now.
	Now func() time.Time
	// Cautions is CAUTIONS.md's text, shown on the cautions page.
	Cautions string
}

// DemoLogin is one public login of a demo centre.
type DemoLogin struct {
	Username, Password, Roles string
}

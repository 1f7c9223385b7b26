// Package views holds Aloft's templ pages and the view models they render.
package views

import (
	"aloft/assess"
	"aloft/records"
)

// Meta is what the layout needs on every page.
type Meta struct {
	Title  string
	Centre string
	User   *records.User // nil when nobody is logged in
	CSRF   string
	Demo   bool
	Path   string
}

// Can reports whether the user holds any of roles.
func (m Meta) Can(roles ...records.Role) bool { return m.User != nil && m.User.HasAny(roles...) }

// DemoLogin is a public login of a demo centre.
type DemoLogin struct{ Username, Password, Roles string }

// LoginForm is the login page's form.
type LoginForm struct {
	Username, Next, Error string
}

// SetupForm is the first-run set-up form.
type SetupForm struct {
	CentreName, Address, Elevation, Username, DisplayName string
	Errors                                                assess.ValidationErrors
}

func errFor(errs assess.ValidationErrors, field string) string { return errs.Field(field) }

func navClass(m Meta, prefix string) string {
	if len(m.Path) >= len(prefix) && m.Path[:len(prefix)] == prefix {
		return "nav-link current"
	}
	return "nav-link"
}

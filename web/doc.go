// Package web is Aloft's HTTP adapter: an Echo server with login sessions,
// CSRF protection, role checks and security headers, serving templ pages,
// static assets and chart documents, and a small JSON API.
package web

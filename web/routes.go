package web

import (
	"net/http"

	"github.com/labstack/echo/v4"

	"aloft/records"
)

func (s *Server) routes() {
	e := s.echo
	e.GET("/healthz", s.handleHealth)
	e.GET("/static/*", s.handleStatic)
	e.GET("/login", s.handleLoginForm)
	e.POST("/login", s.handleLogin, s.checkCSRF)
	e.POST("/logout", s.handleLogout, s.checkCSRF)
	e.GET("/setup", s.handleSetupForm)
	e.POST("/setup", s.handleSetup, s.checkCSRF)
	e.GET("/cautions", s.handleCautions)

	// Everything else needs a login first (401 or a redirect to the login
	// page), then a valid CSRF token on every unsafe request (403).
	app := e.Group("", s.requireLogin, s.checkCSRF)
	app.GET("/", func(c echo.Context) error { return c.Redirect(http.StatusSeeOther, "/patients") })
	app.GET("/patients", s.handlePatients)
	app.GET("/intake", s.handleIntakeForm)
	app.POST("/intake", s.handleIntake)
	app.GET("/patients/:case", s.handlePatient)

	admin := app.Group("", requireRole(records.RoleAdmin))
	admin.GET("/users", s.handleUsers)
	admin.POST("/users", s.handleAddUser)
	admin.POST("/users/:id/disable", s.handleDisableUser)
	admin.POST("/users/:id/enable", s.handleEnableUser)
	admin.POST("/users/:id/password", s.handleResetPassword)
	admin.POST("/users/:id/tokens", s.handleIssueToken)
	admin.POST("/tokens/:id/revoke", s.handleRevokeToken)
	admin.POST("/patients/:case/redact-finder", s.handleRedactFinder)

	s.sections()
	for _, add := range s.featureRoutes() {
		add(app)
	}
}

// featureRoutes lists the route sets of the record features, each adding
// its own routes to the logged-in group.
func (s *Server) featureRoutes() []func(*echo.Group) {
	return []func(*echo.Group){s.conditioningRoutes, s.clinicalRoutes, s.cageRoutes, s.dispositionRoutes, s.exportRoutes, s.chartRoutes, s.assessmentRoutes, s.reportRoutes, s.settingsRoutes, s.whatIfRoutes}
}

// sections lists, in page order, the feature blocks of the patient page and
// of the patient list.
func (s *Server) sections() {
	s.patientSections = append(s.patientSections, s.assessmentSections()...)
	s.patientSections = append(s.patientSections, s.conditioningSections()...)
	s.patientSections = append(s.patientSections, s.clinicalSections()...)
	s.patientSections = append(s.patientSections, s.cageSections()...)
	s.patientSections = append(s.patientSections, s.dispositionSections()...)
	s.patientSections = append(s.patientSections, s.reportSections()...)
	s.patientsExtras = append(s.patientsExtras, s.clinicalExtras()...)
}

func (s *Server) handleHealth(c echo.Context) error {
	if err := s.store.DB().PingContext(c.Request().Context()); err != nil {
		return c.JSON(http.StatusServiceUnavailable, map[string]string{"status": "database unavailable"})
	}
	return c.JSON(http.StatusOK, map[string]string{"status": "ok"})
}

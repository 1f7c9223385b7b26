package web

import "github.com/labstack/echo/v4"

// clinicalRoutes adds the clinical-record routes.
func (s *Server) clinicalRoutes(g *echo.Group) {}

// clinicalSections renders the clinical blocks of the patient page.
func (s *Server) clinicalSections() []patientSection { return nil }

// clinicalExtras renders blocks above the patient list (today's medications).
func (s *Server) clinicalExtras() []pageExtra { return nil }

package web

import "github.com/labstack/echo/v4"

// conditioningRoutes adds the conditioning-record routes.
func (s *Server) conditioningRoutes(g *echo.Group) {}

// conditioningSections renders the conditioning blocks of the patient page.
func (s *Server) conditioningSections() []patientSection { return nil }

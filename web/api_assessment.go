package web

import (
	"bytes"
	"net/http"

	"github.com/labstack/echo/v4"

	"aloft/assess"
)

// apiError is the JSON body of a refused API request; Field names the
// query parameter at fault, when one is.
type apiError struct {
	Error string `json:"error"`
	Field string `json:"field,omitempty"`
	Value string `json:"value,omitempty"`
}

// handleAssessmentAPI serves GET /api/v1/patients/{case}/assessment
// [?elevation_m=…|site=NAME][&temp_c=…]: the assessment as JSON, byte for byte what
// `aloft assess --json` prints for the same case, site and instant (both
// encode with assess.EncodeAssessment). An unknown case is 404 and a bad
// site 422, each with a JSON error naming the parameter.
func (s *Server) handleAssessmentAPI(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	cs, verrs, err := s.site(c, siteQueryOf(c))
	if err != nil {
		return err
	}
	if len(verrs) > 0 {
		v := verrs[0]
		return c.JSON(http.StatusUnprocessableEntity, apiError{Error: v.Field + ": " + v.Message, Field: v.Field, Value: v.Value})
	}
	a, err := s.assessment(c, p, cs.site)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := assess.EncodeAssessment(&buf, a); err != nil {
		return err
	}
	c.Response().Header().Set("Cache-Control", "private, no-cache")
	return c.Blob(http.StatusOK, echo.MIMEApplicationJSON, buf.Bytes())
}

package web

import (
	"net/http"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/records"
	"aloft/web/views"
)

// handleCentreForm shows the centre's details (admin).
func (s *Server) handleCentreForm(c echo.Context) error {
	ctr, err := s.store.Centre(c.Request().Context())
	if err != nil {
		return err
	}
	if ctr.PageSize == "" {
		ctr.PageSize = records.PageA4
	}
	f := views.CentreForm{Name: ctr.Name, Address: ctr.Address, Elevation: formatFloat(ctr.ElevationM), PageSize: ctr.PageSize,
		Notice: c.QueryParam("done")}
	return render(c, http.StatusOK, views.CentrePage(s.meta(c, "Centre details"), f))
}

// handleSetCentre changes the centre's details; the change is audited.
func (s *Server) handleSetCentre(c echo.Context) error {
	ctx := c.Request().Context()
	old, err := s.store.Centre(ctx)
	if err != nil {
		return err
	}
	f := views.CentreForm{Name: c.FormValue("centre_name"), Address: c.FormValue("address"),
		Elevation: c.FormValue("elevation_m"), PageSize: strings.TrimSpace(c.FormValue("page_size"))}
	elev, verr := parseFloatField("elevation_m", f.Elevation, false)
	if verr != nil {
		f.Errors = append(f.Errors, verr)
	}
	ctr := records.Centre{Name: f.Name, Address: f.Address, ElevationM: elev, IsDemo: old.IsDemo, PageSize: f.PageSize}
	if err := ctr.Validate(); err != nil && verr == nil {
		f.Errors = append(f.Errors, asValidation(err)...)
	}
	if len(f.Errors) == 0 {
		err = s.store.SetCentre(ctx, currentUser(c).ID, ctr)
		if ve := asValidation(err); ve != nil {
			f.Errors = ve
		} else if err != nil {
			return err
		}
	}
	if len(f.Errors) > 0 {
		return render(c, http.StatusUnprocessableEntity, views.CentrePage(s.meta(c, "Centre details"), f))
	}
	return c.Redirect(http.StatusSeeOther, "/settings/centre?done=saved")
}

// formatFloat writes a stored number back into a form field as typed.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

package web

import (
	"errors"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// siteEditors may add, change and retire release sites.
var siteEditors = []records.Role{records.RoleRehabilitator, records.RoleAdmin}

// siteRoutes adds the release sites: every logged-in user sees them;
// rehabilitators and admins change them.
func (s *Server) siteRoutes(g *echo.Group) {
	ed := requireRole(siteEditors...)
	g.GET("/sites", s.handleSites)
	g.POST("/sites", s.handleAddSite, ed)
	g.GET("/sites/:id/edit", s.handleEditSiteForm, ed)
	g.POST("/sites/:id", s.handleEditSite, ed)
}

// siteFromQuery reads a named release site from ?site=NAME, at the air
// temperature ?temp_c= (°C; empty: the standard atmosphere). It returns
// nil, "", nil when the request names no site, so the caller falls back
// to its own (?elevation_m=, or the centre's). An unknown name or a bad
// temperature is assess.ValidationErrors naming "site" or "temp_c"; any
// other error is internal. The string is the site's name.
func (s *Server) siteFromQuery(c echo.Context) (*assess.Site, string, error) {
	name := strings.TrimSpace(c.QueryParam("site"))
	if name == "" {
		return nil, "", nil
	}
	r, err := s.store.ReleaseSiteByName(c.Request().Context(), name)
	if errors.Is(err, records.ErrNotFound) {
		return nil, "", assess.ValidationErrors{{Field: "site", Value: name, Message: "no release site has this name: choose one of the centre's sites"}}
	}
	if err != nil {
		return nil, "", err
	}
	temp, verr := parseOptFloat("temp_c", c.QueryParam("temp_c"))
	if verr != nil {
		return nil, "", assess.ValidationErrors{verr}
	}
	st := r.Site(temp)
	if err := st.Validate(); err != nil {
		return nil, "", asValidation(err)
	}
	return &st, r.Name, nil
}

func canEditSites(c echo.Context) bool {
	ls := session(c)
	return ls != nil && ls.User.HasAny(siteEditors...)
}

func (s *Server) sitesView(c echo.Context, f views.SiteEditForm) (views.SitesView, error) {
	list, err := s.store.ReleaseSites(c.Request().Context(), true)
	if err != nil {
		return views.SitesView{}, err
	}
	v := views.SitesView{CanEdit: canEditSites(c), Form: f}
	for _, r := range list {
		rho, _ := r.Site(nil).Density()
		v.List = append(v.List, views.SiteRow{ID: r.ID, Name: r.Name, Elevation: strconv.FormatFloat(r.ElevationM, 'f', -1, 64),
			Density: strconv.FormatFloat(rho, 'f', 4, 64), Notes: r.Notes, Retired: r.Retired})
	}
	return v, nil
}

func (s *Server) handleSites(c echo.Context) error {
	v, err := s.sitesView(c, views.SiteEditForm{})
	if err != nil {
		return err
	}
	if saved := c.QueryParam("saved"); saved != "" {
		v.Notice = "Saved " + saved + "."
	}
	return render(c, http.StatusOK, views.SitesPage(s.meta(c, "Release sites"), v))
}

func siteFormOf(c echo.Context) views.SiteEditForm {
	return views.SiteEditForm{Name: strings.TrimSpace(c.FormValue("name")), Elevation: c.FormValue("elevation_m"),
		Notes: c.FormValue("notes"), Retired: c.FormValue("retired") == "1"}
}

// siteInput converts the typed form and checks it.
func siteInput(f views.SiteEditForm) (records.ReleaseSiteInput, assess.ValidationErrors) {
	in := records.ReleaseSiteInput{Name: f.Name, Notes: f.Notes, Retired: f.Retired}
	var errs assess.ValidationErrors
	v, verr := parseFloatField("elevation_m", f.Elevation, false)
	if verr != nil {
		errs = append(errs, verr)
	}
	in.ElevationM = v
	if err := in.Validate(); err != nil {
		for _, e := range asValidation(err) {
			if errs.Field(e.Field) == "" {
				errs = append(errs, e)
			}
		}
	}
	return in, errs
}

func (s *Server) handleAddSite(c echo.Context) error {
	f := siteFormOf(c)
	in, errs := siteInput(f)
	if len(errs) == 0 {
		r, err := s.store.AddReleaseSite(c.Request().Context(), currentUser(c).ID, in)
		if err == nil {
			return c.Redirect(http.StatusSeeOther, "/sites?saved="+url.QueryEscape(r.Name))
		}
		if errs = asValidation(err); errs == nil {
			return err
		}
	}
	f.Errors = errs
	v, err := s.sitesView(c, f)
	if err != nil {
		return err
	}
	return render(c, http.StatusUnprocessableEntity, views.SitesPage(s.meta(c, "Release sites"), v))
}

func (s *Server) siteFromPath(c echo.Context) (records.ReleaseSite, error) {
	id, err := strconv.ParseInt(c.Param("id"), 10, 64)
	if err != nil {
		return records.ReleaseSite{}, echo.NewHTTPError(http.StatusNotFound, "There is no such release site.")
	}
	r, err := s.store.ReleaseSite(c.Request().Context(), id)
	if errors.Is(err, records.ErrNotFound) {
		return r, echo.NewHTTPError(http.StatusNotFound, "There is no such release site.")
	}
	return r, err
}

func (s *Server) handleEditSiteForm(c echo.Context) error {
	r, err := s.siteFromPath(c)
	if err != nil {
		return err
	}
	f := views.SiteEditForm{ID: r.ID, Version: r.Version, Name: r.Name, Elevation: strconv.FormatFloat(r.ElevationM, 'f', -1, 64),
		Notes: r.Notes, Retired: r.Retired}
	return render(c, http.StatusOK, views.SiteEditPage(s.meta(c, "Edit "+r.Name), f))
}

func (s *Server) handleEditSite(c echo.Context) error {
	r, err := s.siteFromPath(c)
	if err != nil {
		return err
	}
	f := siteFormOf(c)
	f.ID = r.ID
	f.Version, _ = strconv.Atoi(c.FormValue("version"))
	in, errs := siteInput(f)
	if len(errs) == 0 {
		saved, err := s.store.UpdateReleaseSite(c.Request().Context(), currentUser(c).ID, r.ID, f.Version, in)
		if err == nil {
			return c.Redirect(http.StatusSeeOther, "/sites?saved="+url.QueryEscape(saved.Name))
		}
		if errors.Is(err, records.ErrConflict) {
			errs = assess.ValidationErrors{{Field: "name", Message: "someone else changed this site meanwhile: reload the page and make your change again"}}
		} else if errs = asValidation(err); errs == nil {
			return err
		}
	}
	f.Errors = errs
	return render(c, http.StatusUnprocessableEntity, views.SiteEditPage(s.meta(c, "Edit "+r.Name), f))
}

// siteOptions lists the release sites in use, for a picker.
func (s *Server) siteOptions(c echo.Context) ([]views.SpeciesOpt, error) {
	list, err := s.store.ReleaseSites(c.Request().Context(), false)
	if err != nil {
		return nil, err
	}
	var out []views.SpeciesOpt
	for _, r := range list {
		out = append(out, views.SpeciesOpt{Value: r.Name, Label: r.Name + " (" + strconv.FormatFloat(r.ElevationM, 'f', -1, 64) + " m)"})
	}
	return out, nil
}

package web

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/reports"
	"aloft/web/views"
)

// reportRoles may generate a report for review: any staff.
var reportRoles = []records.Role{records.RoleStaff, records.RoleRehabilitator, records.RoleVet}

// reportRoutes adds the pre-release report routes: the reports page, a
// working-copy preview, freezing a version for review, a version's stored
// PDF and its sign-off sheet, and signing a version off (vets and
// rehabilitators only, checked here and again by the store).
func (s *Server) reportRoutes(g *echo.Group) {
	g.GET("/patients/:case/reports", s.handleReportsPage)
	g.GET("/patients/:case/reports/preview.pdf", s.handleReportPreview)
	g.POST("/patients/:case/reports", s.handleGenerateReport, requireRole(reportRoles...))
	g.GET("/patients/:case/reports/:version/report.pdf", s.handleReportPDF)
	g.GET("/patients/:case/reports/:version/signoff-sheet.pdf", s.handleSignOffSheet)
	g.POST("/patients/:case/reports/:version/signoffs", s.handleSignReport, requireRole(records.SignOffRoles...))
}

// reportSections renders the reports block of the patient page.
func (s *Server) reportSections() []patientSection {
	return []patientSection{func(c echo.Context, p records.Patient) (views.Section, bool, error) {
		panel, err := s.reportsPanel(c, p, nil, nil)
		if err != nil {
			return views.Section{}, false, err
		}
		return views.Section{ID: "reports", Title: "Pre-release report", Body: views.ReportsBody(panel)}, true, nil
	}}
}

// reportsPanel builds the reports block of p; gen and sign, when not nil,
// are refused submissions to show again.
func (s *Server) reportsPanel(c echo.Context, p records.Patient, gen *views.ReportForm, sign *views.SignOffForm) (views.ReportsPanel, error) {
	ctx := c.Request().Context()
	u := currentUser(c)
	vs, err := s.store.ReportVersions(ctx, p.ID)
	if err != nil {
		return views.ReportsPanel{}, err
	}
	slices.Reverse(vs)
	site, err := s.defaultReportSite(ctx)
	if err != nil {
		return views.ReportsPanel{}, err
	}
	sites, err := s.store.ReleaseSites(ctx, false)
	if err != nil {
		return views.ReportsPanel{}, err
	}
	panel := views.ReportsPanel{Case: p.CaseNumber, Sites: sites, CSRF: s.csrfToken(c), CanGenerate: u.HasAny(reportRoles...), Versions: vs,
		DefaultSite: fmt.Sprintf("%s, %s m", site.Label, strconv.FormatFloat(site.ElevationM, 'f', 0, 64)),
		Generate:    views.ReportForm{PageSize: s.centrePageSize(ctx)}, Cautions: s.cautionsAbout("advi")}
	for _, r := range records.SignOffRoles {
		if u.Has(r) {
			panel.SignRoles = append(panel.SignRoles, r)
		}
	}
	if gen != nil {
		panel.Generate = *gen
	}
	if sign != nil {
		panel.Sign = *sign
	}
	return panel, nil
}

// defaultReportSite is the centre's own elevation in the standard atmosphere.
func (s *Server) defaultReportSite(ctx context.Context) (records.ReportSite, error) {
	site, label, err := s.store.DefaultSite(ctx)
	if err != nil {
		return records.ReportSite{}, err
	}
	return records.ReportSite{Label: label, ElevationM: site.ElevationM, TempC: site.TempC}, nil
}

func (s *Server) handleReportsPage(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	return s.renderReports(c, http.StatusOK, p, nil, nil)
}

func (s *Server) renderReports(c echo.Context, status int, p records.Patient, gen *views.ReportForm, sign *views.SignOffForm) error {
	panel, err := s.reportsPanel(c, p, gen, sign)
	if err != nil {
		return err
	}
	return render(c, status, views.ReportsPage(s.meta(c, p.CaseNumber+" pre-release reports"), p, panel))
}

// reportSiteFrom reads the release site and page size of the generate form:
// one of the centre's release sites, another place by its elevation, or
// the centre's own site; the air temperature, when given, applies to it.
func (s *Server) reportSiteFrom(ctx context.Context, f views.ReportForm) (records.ReportSite, assess.ValidationErrors, error) {
	var errs assess.ValidationErrors
	site, err := s.defaultReportSite(ctx)
	if err != nil {
		return site, nil, err
	}
	name := strings.TrimSpace(f.SiteName)
	elev, verr := parseOptFloat("elevation_m", f.ElevationM)
	if verr != nil {
		errs = append(errs, verr)
	}
	temp, verr := parseOptFloat("temp_c", f.TempC)
	if verr != nil {
		errs = append(errs, verr)
	}
	switch {
	case utf8.RuneCountInString(name) > 120:
		errs = append(errs, &assess.ValidationError{Field: "site_name", Value: name, Message: "keep the name under 120 characters"})
	case name != "" && elev == nil && errs.Field("elevation_m") == "":
		errs = append(errs, &assess.ValidationError{Field: "elevation_m", Message: "give the elevation of the named site, in metres"})
	case f.SiteID != "" && (elev != nil || name != ""):
		errs = append(errs, &assess.ValidationError{Field: "site_id", Value: f.SiteID,
			Message: "choose one of the centre's release sites, or give another place's elevation, not both"})
	}
	if f.SiteID != "" && len(errs) == 0 {
		id, perr := strconv.ParseInt(f.SiteID, 10, 64)
		rs, err := s.store.ReleaseSite(ctx, id)
		switch {
		case perr != nil || errors.Is(err, records.ErrNotFound):
			errs = append(errs, &assess.ValidationError{Field: "site_id", Value: f.SiteID, Message: "choose a release site from the list"})
		case err != nil:
			return site, nil, err
		default:
			site.Label, site.ElevationM = rs.Name, rs.ElevationM
		}
	}
	if elev != nil {
		site.ElevationM, site.Label = *elev, "release site"
		if name != "" {
			site.Label = name
		}
	}
	site.TempC = temp
	if len(errs) == 0 {
		if err := site.Site().Validate(); err != nil {
			errs = append(errs, asValidation(err)...)
		}
	}
	if !slices.Contains(records.PageSizes, f.PageSize) {
		errs = append(errs, &assess.ValidationError{Field: "page_size", Value: f.PageSize, Message: "choose A4 or Letter"})
	}
	return site, errs, nil
}

// handleGenerateReport freezes a new version of the patient's report: the
// assessment now, rendered, stored with its hash.
func (s *Server) handleGenerateReport(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	ctx := c.Request().Context()
	f := views.ReportForm{PageSize: c.FormValue("page_size"), SiteID: c.FormValue("site_id"), ElevationM: c.FormValue("elevation_m"),
		TempC: c.FormValue("temp_c"), SiteName: c.FormValue("site_name")}
	if f.PageSize == "" {
		f.PageSize = s.centrePageSize(c.Request().Context())
	}
	site, errs, err := s.reportSiteFrom(ctx, f)
	if err != nil {
		return err
	}
	if len(errs) > 0 {
		f.Errors = errs
		return s.renderReports(c, http.StatusUnprocessableEntity, p, &f, nil)
	}
	u := currentUser(c)
	v, err := s.store.FreezeReport(ctx, u.ID, records.NewReport{PatientID: p.ID, Site: site, PageSize: f.PageSize},
		func(st records.ReportStamp) ([]byte, error) {
			return s.renderReport(ctx, p, site, st, u.DisplayName, f.PageSize)
		})
	if ve := asValidation(err); ve != nil {
		f.Errors = ve
		return s.renderReports(c, http.StatusUnprocessableEntity, p, &f, nil)
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, fmt.Sprintf("/patients/%s#report-v%d", p.CaseNumber, v.Version))
}

// renderReport renders patient p's report at site as version st (0: a
// working copy).
func (s *Server) renderReport(ctx context.Context, p records.Patient, site records.ReportSite, st records.ReportStamp, by, size string) ([]byte, error) {
	in, err := reports.LoadReportInput(ctx, s.store, reports.ReportRequest{Patient: p, Site: &site, Now: st.CreatedAt,
		Version: st.Version, GeneratedBy: by, Cautions: s.cfg.Cautions})
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := reports.Render(&buf, in, reports.Options{PageSize: size}); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// handleReportPreview sends a working copy of the report, not frozen: it
// cannot be signed, and says so on every page.
func (s *Server) handleReportPreview(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	ctx := c.Request().Context()
	f := views.ReportForm{PageSize: c.QueryParam("page_size"), SiteID: c.QueryParam("site_id"), ElevationM: c.QueryParam("elevation_m"),
		TempC: c.QueryParam("temp_c"), SiteName: c.QueryParam("site_name")}
	if f.PageSize == "" {
		f.PageSize = s.centrePageSize(c.Request().Context())
	}
	site, errs, err := s.reportSiteFrom(ctx, f)
	if err != nil {
		return err
	}
	if len(errs) > 0 {
		f.Errors = errs
		return s.renderReports(c, http.StatusUnprocessableEntity, p, &f, nil)
	}
	b, err := s.renderReport(ctx, p, site, records.ReportStamp{CreatedAt: s.now().UTC()}, currentUser(c).DisplayName, f.PageSize)
	if ve := asValidation(err); ve != nil {
		f.Errors = ve
		return s.renderReports(c, http.StatusUnprocessableEntity, p, &f, nil)
	}
	if err != nil {
		return err
	}
	return sendPDF(c, "aloft-"+p.CaseNumber+"-working-copy.pdf", b, "no-store")
}

// versionFromPath loads the report version named by :case and :version.
func (s *Server) versionFromPath(c echo.Context) (records.Patient, records.ReportVersion, error) {
	p, err := s.patientFromPath(c)
	if err != nil {
		return p, records.ReportVersion{}, err
	}
	n, err := strconv.Atoi(c.Param("version"))
	if err != nil || n < 1 {
		return p, records.ReportVersion{}, echo.NewHTTPError(http.StatusNotFound, "There is no such report version.")
	}
	v, err := s.store.ReportVersion(c.Request().Context(), p.ID, n)
	if errors.Is(err, records.ErrNotFound) {
		return p, v, echo.NewHTTPError(http.StatusNotFound, fmt.Sprintf("Case %s has no report version %d.", p.CaseNumber, n))
	}
	return p, v, err
}

// handleReportPDF sends a frozen version's stored bytes, exactly.
func (s *Server) handleReportPDF(c echo.Context) error {
	p, v, err := s.versionFromPath(c)
	if err != nil {
		return err
	}
	b, err := s.store.ReportPDF(c.Request().Context(), v.ID)
	if err != nil {
		return err
	}
	c.Response().Header().Set("ETag", `"sha256-`+v.SHA256+`"`)
	return sendPDF(c, fmt.Sprintf("aloft-%s-report-v%d.pdf", p.CaseNumber, v.Version), b, "private")
}

// handleSignOffSheet sends the one-page sign-off sheet of a version, made
// now from its sign-off records.
func (s *Server) handleSignOffSheet(c echo.Context) error {
	p, v, err := s.versionFromPath(c)
	if err != nil {
		return err
	}
	centre, err := s.store.Centre(c.Request().Context())
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	in := reports.SignOffSheetInput{Centre: centre, Patient: p, Version: v, GeneratedAt: s.now()}
	if err := reports.RenderSignOffSheet(&buf, in, reports.Options{PageSize: v.PageSize}); err != nil {
		return err
	}
	return sendPDF(c, fmt.Sprintf("aloft-%s-report-v%d-signoffs.pdf", p.CaseNumber, v.Version), buf.Bytes(), "no-store")
}

// sendPDF sends a PDF as a download named name.
func sendPDF(c echo.Context, name string, b []byte, cache string) error {
	h := c.Response().Header()
	h.Set("Content-Disposition", `attachment; filename="`+name+`"`)
	h.Set("Cache-Control", cache)
	return c.Blob(http.StatusOK, "application/pdf", b)
}

// handleSignReport records the current user's sign-off of a version, after
// checking their password again. Wrong passwords count towards the login
// throttle.
func (s *Server) handleSignReport(c echo.Context) error {
	p, v, err := s.versionFromPath(c)
	if err != nil {
		return err
	}
	u := currentUser(c)
	f := views.SignOffForm{Version: v.Version, Role: c.FormValue("role"), Comment: c.FormValue("comment")}
	now := s.now()
	keys := []string{"user:" + strings.ToLower(u.Username), "addr:" + c.RealIP()}
	if blocked, until := s.throttle.blocked(now, keys...); blocked {
		f.Problem = "Too many wrong passwords. Try again after " + until.Local().Format("15:04") + "; nothing was signed."
		return s.renderReports(c, http.StatusTooManyRequests, p, nil, &f)
	}
	_, err = s.store.SignReport(c.Request().Context(), u, v.ID, records.Role(f.Role), c.FormValue("password"), f.Comment)
	switch {
	case errors.Is(err, records.ErrBadLogin):
		s.throttle.fail(now, keys...)
		f.Errors = assess.ValidationErrors{{Field: "password", Message: "That is not your password: nothing was signed. Enter your own login password."}}
		return s.renderReports(c, http.StatusUnprocessableEntity, p, nil, &f)
	case errors.Is(err, records.ErrConflict):
		f.Problem = "You have already signed this version in that role; a sign-off cannot be changed. Generate a new version to sign again."
		return s.renderReports(c, http.StatusConflict, p, nil, &f)
	case errors.Is(err, records.ErrReportCorrupt):
		s.log.Error("stored report does not match its hash", "case", p.CaseNumber, "version", v.Version)
		f.Problem = "The stored file of this version no longer matches its SHA-256, so it cannot be signed. Tell your administrator; nothing was signed."
		return s.renderReports(c, http.StatusConflict, p, nil, &f)
	case asValidation(err) != nil:
		f.Errors = asValidation(err)
		return s.renderReports(c, http.StatusUnprocessableEntity, p, nil, &f)
	case err != nil:
		return err
	}
	return c.Redirect(http.StatusSeeOther, fmt.Sprintf("/patients/%s#report-v%d", p.CaseNumber, v.Version))
}

// centrePageSize is the centre's paper size for reports (A4 when unset).
func (s *Server) centrePageSize(ctx context.Context) string {
	if ctr, err := s.store.Centre(ctx); err == nil && ctr.PageSize != "" {
		return ctr.PageSize
	}
	return records.PageA4
}

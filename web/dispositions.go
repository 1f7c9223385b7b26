package web

import (
	"errors"
	"net/http"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// dispositionRoutes adds the disposition routes: the form page, a first
// disposition and a correction. Any staff member may record one; releases
// (released, renested) need the rehabilitator or admin role, checked here
// and again by the store.
func (s *Server) dispositionRoutes(g *echo.Group) {
	g.GET("/patients/:case/disposition", s.handleDispositionPage)
	g.POST("/patients/:case/disposition", s.handleDispose)
	g.POST("/patients/:case/disposition/correct", s.handleCorrectDisposition)
}

// dispositionSections renders the disposition block of the patient page.
func (s *Server) dispositionSections() []patientSection {
	return []patientSection{s.dispositionSection}
}

func (s *Server) dispositionSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	panel, err := s.dispositionPanel(c, p, nil)
	if err != nil {
		return views.Section{}, false, err
	}
	return views.Section{ID: "disposition", Title: "Disposition", Body: views.DispositionBody(panel)}, true, nil
}

// dispositionPanel builds the block for patient p; typed, when not nil, is
// a refused submission to show again.
func (s *Server) dispositionPanel(c echo.Context, p records.Patient, typed *views.DispositionForm) (views.DispositionPanel, error) {
	u := currentUser(c)
	panel := views.DispositionPanel{Case: p.CaseNumber, Cautions: s.dispositionCautions(),
		CanExport: u.HasAny(exportRoles...)}
	if !p.InCare() {
		cur, err := s.store.Disposition(c.Request().Context(), p.ID)
		if err != nil && !errors.Is(err, records.ErrNotFound) {
			return panel, err
		}
		if err == nil {
			panel.Current = &cur
			if panel.Versions, err = s.store.DispositionVersions(c.Request().Context(), p.ID); err != nil {
				return panel, err
			}
		}
	}
	switch {
	case typed != nil:
		panel.Form = *typed
	case panel.Current != nil:
		panel.Form = formFromDisposition(*panel.Current)
	default:
		panel.Form = views.DispositionForm{Date: s.now().Format(records.DateLayout)}
	}
	panel.Form.Case, panel.Form.CSRF = p.CaseNumber, s.csrfToken(c)
	panel.Form.CanRelease = u.HasAny(records.ReleaseRoles...)
	return panel, nil
}

// dispositionCautions are the sections of CAUTIONS.md that bear on a
// disposition: who decides, and release timing and place.
func (s *Server) dispositionCautions() []views.CautionSection {
	var out []views.CautionSection
	for _, sec := range views.ParseCautions(s.cfg.Cautions) {
		h := strings.ToLower(sec.Heading)
		if strings.Contains(h, "advi") || strings.Contains(h, "release timing") {
			out = append(out, sec)
		}
	}
	return out
}

func formFromDisposition(d records.Disposition) views.DispositionForm {
	f := views.DispositionForm{Kind: string(d.Kind), Date: d.Date, Place: d.Place, Receiver: d.Receiver,
		Reason: d.Reason, NoReportReason: d.NoReportReason, PerformedBy: d.PerformedBy, Version: d.Version}
	if d.Lat != nil && d.Lon != nil {
		f.Lat, f.Lon = formatCoord(*d.Lat), formatCoord(*d.Lon)
	}
	return f
}

func formatCoord(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

func dispositionFormFrom(c echo.Context) views.DispositionForm {
	return views.DispositionForm{Kind: c.FormValue("kind"), Date: c.FormValue("date"), Place: c.FormValue("place"),
		Lat: c.FormValue("lat"), Lon: c.FormValue("lon"), Receiver: c.FormValue("receiver"), Reason: c.FormValue("reason"),
		NoReportReason: c.FormValue("no_report_reason"), PerformedBy: c.FormValue("performed_by"), Note: c.FormValue("note")}
}

// dispositionInput converts the form, collecting the field errors the store
// cannot see (numbers that do not parse, a release by a role that may not).
func dispositionInput(f views.DispositionForm, u records.User) (records.DispositionInput, assess.ValidationErrors) {
	in := records.DispositionInput{Kind: assess.Disposition(strings.TrimSpace(f.Kind)), Date: f.Date, Place: f.Place,
		Receiver: f.Receiver, Reason: f.Reason, NoReportReason: f.NoReportReason, PerformedBy: f.PerformedBy, Note: f.Note}
	var errs assess.ValidationErrors
	var verr *assess.ValidationError
	if in.Lat, verr = parseOptFloat("lat", f.Lat); verr != nil {
		errs = append(errs, verr)
	}
	if in.Lon, verr = parseOptFloat("lon", f.Lon); verr != nil {
		errs = append(errs, verr)
	}
	if records.IsRelease(in.Kind) && !u.HasAny(records.ReleaseRoles...) {
		errs = append(errs, &assess.ValidationError{Field: "kind", Value: f.Kind,
			Message: "releasing a bird is the licensed rehabilitator's decision: ask a rehabilitator or an admin to record it"})
	}
	return in, errs
}

func (s *Server) handleDispositionPage(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	return s.renderDisposition(c, http.StatusOK, p, nil)
}

func (s *Server) renderDisposition(c echo.Context, status int, p records.Patient, typed *views.DispositionForm) error {
	panel, err := s.dispositionPanel(c, p, typed)
	if err != nil {
		return err
	}
	return render(c, status, views.DispositionPage(s.meta(c, p.CaseNumber+" disposition"), panel))
}

func (s *Server) handleDispose(c echo.Context) error {
	return s.saveDisposition(c, false)
}

func (s *Server) handleCorrectDisposition(c echo.Context) error {
	return s.saveDisposition(c, true)
}

// saveDisposition records a first disposition or a correction: 303 to the
// patient page on success, the form again with the field errors (422), or
// with a message when someone else changed it meanwhile (409).
func (s *Server) saveDisposition(c echo.Context, correct bool) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	u := currentUser(c)
	f := dispositionFormFrom(c)
	version := 0
	if correct {
		n, verr := parseIntField("version", c.FormValue("version"), false)
		if verr != nil {
			return echo.NewHTTPError(http.StatusBadRequest, "The form lacks the version it corrects. Reload the page and try again.")
		}
		version, f.Version = n, n
	}
	in, errs := dispositionInput(f, u)
	if len(errs) > 0 {
		f.Errors = errs
		return s.renderDisposition(c, http.StatusUnprocessableEntity, p, &f)
	}
	ctx := c.Request().Context()
	if correct {
		_, err = s.store.CorrectDisposition(ctx, u.ID, p.ID, version, in)
	} else {
		_, err = s.store.Dispose(ctx, u.ID, p.ID, in)
	}
	switch {
	case asValidation(err) != nil:
		f.Errors = asValidation(err)
		return s.renderDisposition(c, http.StatusUnprocessableEntity, p, &f)
	case errors.Is(err, records.ErrConflict):
		f.Problem = "The disposition was recorded or changed by someone else meanwhile; nothing was saved. Check it below, then correct it if needed."
		if fresh, err := s.store.Patient(ctx, p.ID); err == nil {
			p = fresh
		}
		if !p.InCare() {
			if cur, err := s.store.Disposition(ctx, p.ID); err == nil {
				f.Version = cur.Version
			}
		}
		return s.renderDisposition(c, http.StatusConflict, p, &f)
	case err != nil:
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#disposition")
}

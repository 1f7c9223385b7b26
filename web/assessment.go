package web

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// assessmentRoutes adds the assessment page and its API twin. Every logged-in
// user may read an assessment; API clients may use a bearer token.
func (s *Server) assessmentRoutes(g *echo.Group) {
	g.GET("/patients/:case/assessment", s.handleAssessment)
	g.GET("/api/v1/patients/:case/assessment", s.handleAssessmentAPI)
}

// assessmentSections are the patient page's outcome summary and its
// pictures, shown right after the patient's details.
func (s *Server) assessmentSections() []patientSection {
	return []patientSection{s.outcomeSection, s.picturesSection}
}

// siteQuery is the release site a request names, as typed: a named
// release site (?site=), else an elevation (?elevation_m=); either at an
// air temperature (?temp_c=).
type siteQuery struct {
	Name, Elevation, Temp string
}

// siteQueryOf reads the site parameters of a request.
func siteQueryOf(c echo.Context) siteQuery {
	return siteQuery{Name: c.QueryParam("site"), Elevation: c.QueryParam("elevation_m"), Temp: c.QueryParam("temp_c")}
}

// empty reports whether the request names no site: the centre's is meant.
func (q siteQuery) empty() bool {
	return strings.TrimSpace(q.Name) == "" && strings.TrimSpace(q.Elevation) == "" && strings.TrimSpace(q.Temp) == ""
}

// encode returns the query string naming the site, "" for the centre's.
func (q siteQuery) encode() string {
	v := url.Values{}
	for _, kv := range [][2]string{{"site", q.Name}, {"elevation_m", q.Elevation}, {"temp_c", q.Temp}} {
		if t := strings.TrimSpace(kv[1]); t != "" {
			v.Set(kv[0], t)
		}
	}
	if len(v) == 0 {
		return ""
	}
	return "?" + v.Encode()
}

// chosenSite is the release site of a request: nil for the centre's own,
// with the name of a named release site ("" otherwise).
type chosenSite struct {
	site *assess.Site
	name string
}

// site resolves the query to a site within the model's range. A named
// release site wins over an elevation; a temperature alone is at the
// centre's elevation; an empty query is the centre's site (site nil).
// Field errors name the parameter (site, elevation_m, temp_c); any other
// error is internal.
func (s *Server) site(c echo.Context, q siteQuery) (chosenSite, assess.ValidationErrors, error) {
	if q.empty() {
		return chosenSite{}, nil, nil
	}
	if strings.TrimSpace(q.Name) != "" {
		st, name, err := s.siteFromQuery(c)
		if ve := asValidation(err); ve != nil {
			return chosenSite{}, ve, nil
		}
		return chosenSite{site: st, name: name}, nil, err
	}
	var errs assess.ValidationErrors
	st := assess.Site{}
	if strings.TrimSpace(q.Elevation) == "" {
		def, _, err := s.store.DefaultSite(c.Request().Context())
		if err != nil {
			return chosenSite{}, nil, err
		}
		st.ElevationM = def.ElevationM
	} else if v, verr := parseFloatField("elevation_m", q.Elevation, false); verr != nil {
		errs = append(errs, verr)
	} else {
		st.ElevationM = v
	}
	t, verr := parseOptFloat("temp_c", q.Temp)
	if verr != nil {
		errs = append(errs, verr)
	}
	st.TempC = t
	if len(errs) > 0 {
		return chosenSite{}, errs, nil
	}
	if err := st.Validate(); err != nil {
		return chosenSite{}, asValidation(err), nil
	}
	return chosenSite{site: &st}, nil, nil
}

// siteLabel names a site in words for the page and the chart: the centre's
// own (site nil) or "a release site", with its elevation and temperature.
// The what-if page uses it too.
func (s *Server) siteLabel(c echo.Context, site *assess.Site) string {
	var st assess.Site
	name := "a release site"
	if site == nil {
		def, centre, err := s.store.DefaultSite(c.Request().Context())
		if err == nil {
			st, name = def, centre
		}
	} else {
		st = *site
	}
	temp := "standard atmosphere"
	if st.TempC != nil {
		temp = strconv.FormatFloat(*st.TempC, 'f', -1, 64) + " °C"
	}
	return fmt.Sprintf("%s, %s m, %s", name, strconv.FormatFloat(st.ElevationM, 'f', -1, 64), temp)
}

// label names a chosen site in words: a named release site by its name.
func (s *Server) label(c echo.Context, cs chosenSite) string {
	l := s.siteLabel(c, cs.site)
	if cs.site != nil && cs.name != "" {
		l = cs.name + " (release site)" + strings.TrimPrefix(l, "a release site")
	}
	return l
}

// ctxAssessment caches the assessment of a patient at the centre's site for
// one request: the outcome summary and the pictures share it.
const ctxAssessment = "aloft.assessment"

type cachedAssessment struct {
	caseNumber string
	a          assess.Assessment
	err        error
}

// assessment evaluates patient p at site (nil: the centre's) through the
// store's one path to the engine, at the server's clock.
func (s *Server) assessment(c echo.Context, p records.Patient, site *assess.Site) (assess.Assessment, error) {
	if site == nil {
		if got, ok := c.Get(ctxAssessment).(*cachedAssessment); ok && got.caseNumber == p.CaseNumber {
			return got.a, got.err
		}
	}
	a, err := s.store.Assess(c.Request().Context(), p, site, s.now())
	if site == nil {
		c.Set(ctxAssessment, &cachedAssessment{caseNumber: p.CaseNumber, a: a, err: err})
	}
	return a, err
}

// failedSentence logs err with an incident id and returns the sentence a
// person sees instead of the assessment.
func (s *Server) failedSentence(c echo.Context, what string, err error) string {
	id := incidentID()
	level := slog.LevelError
	if errors.Is(err, context.Canceled) {
		level = slog.LevelInfo // the person left before the page was ready: not a fault
	}
	s.log.Log(c.Request().Context(), level, "assessment failed", "incident", id, "path", c.Request().URL.Path, "err", err)
	return fmt.Sprintf("The %s could not be worked out from these records. If it persists, quote incident %s to your administrator.", what, id)
}

// outcomeSection is the patient page's outcome summary. A failing
// assessment is logged and shown as a sentence, and the rest of the page
// still renders.
func (s *Server) outcomeSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	sum := views.OutcomeSummary{Case: p.CaseNumber, InCare: p.InCare(), SiteLabel: s.siteLabel(c, nil)}
	a, err := s.assessment(c, p, nil)
	if err != nil {
		sum.Failed = s.failedSentence(c, "assessment", err)
	} else {
		sum.Outcome, sum.At = a.Outcome, a.EvaluatedAt
	}
	return views.Section{ID: "assessment", Title: "Assessment (advice only)", Body: views.OutcomeSummaryBody(sum)}, true, nil
}

// handleAssessment serves the assessment page at the centre's site or the
// one the query names. A bad site shows the form again with the message
// (422) and the assessment at the centre's site.
func (s *Server) handleAssessment(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	q := siteQueryOf(c)
	cs, verrs, err := s.site(c, q)
	if err != nil {
		return err
	}
	status := http.StatusOK
	if len(verrs) > 0 {
		status, cs = http.StatusUnprocessableEntity, chosenSite{}
	}
	a, err := s.assessment(c, p, cs.site)
	if err != nil {
		return err
	}
	v := views.AssessmentView{Patient: p, A: a, SiteLabel: s.label(c, cs),
		Site:    views.SiteForm{Action: "/patients/" + p.CaseNumber + "/assessment", Name: q.Name, Elevation: q.Elevation, Temp: q.Temp, Errors: verrs},
		Physics: views.PhysicsRows(a), SiteRows: views.SiteRows(a), ParamRows: views.ParamRows(a),
		ModelCautions: s.modelCautions()}
	if v.Site.Sites, err = s.siteChoices(c); err != nil {
		return err
	}
	if strings.TrimSpace(v.Site.Elevation) == "" && strings.TrimSpace(v.Site.Name) == "" {
		v.Site.Elevation = strconv.FormatFloat(a.Site.ElevationM, 'f', -1, 64)
	}
	query := ""
	if cs.site != nil {
		query = q.encode()
	}
	v.Power = powerChartView(p, a, v.SiteLabel, query)
	v.Power.Title = "" // the section's heading names it
	return render(c, status, views.AssessmentPage(s.meta(c, p.CaseNumber+" assessment"), v))
}

// siteChoices lists the centre's release sites in use for the site form.
func (s *Server) siteChoices(c echo.Context) ([]views.SiteChoice, error) {
	list, err := s.store.ReleaseSites(c.Request().Context(), false)
	if err != nil {
		return nil, err
	}
	out := make([]views.SiteChoice, 0, len(list))
	for _, r := range list {
		out = append(out, views.SiteChoice{Name: r.Name, Label: r.Name + " (" + strconv.FormatFloat(r.ElevationM, 'f', -1, 64) + " m)"})
	}
	return out, nil
}

// modelCautions returns CAUTIONS.md's limits of the flight model.
func (s *Server) modelCautions() []string {
	for _, sec := range views.ParseCautions(s.cfg.Cautions) {
		if strings.Contains(strings.ToLower(sec.Heading), "flight model") {
			return sec.Items
		}
	}
	return nil
}

package web

import (
	"bytes"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// whatIfFragmentHeader asks the what-if page for its result fragment only
// (whatif.js sends it).
const whatIfFragmentHeader = "X-Aloft-Fragment"

// whatIfRoutes adds the what-if page and its power chart. Every logged-in
// user may ask; nothing is written.
func (s *Server) whatIfRoutes(g *echo.Group) {
	g.GET("/patients/:case/what-if", s.handleWhatIf)
	g.GET("/patients/:case/charts/what-if.svg", s.handleWhatIfPower)
}

// whatIfQuery is the what-if as typed: ?mass_g=&span_loss_pct=&
// area_loss_pct=&muscle_score=&site=&temp_c=.
type whatIfQuery struct {
	MassG, SpanLossPct, AreaLossPct, MuscleScore, Site, TempC string
}

func whatIfQueryOf(c echo.Context) whatIfQuery {
	q := c.QueryParam
	return whatIfQuery{MassG: q("mass_g"), SpanLossPct: q("span_loss_pct"), AreaLossPct: q("area_loss_pct"),
		MuscleScore: q("muscle_score"), Site: q("site"), TempC: q("temp_c")}
}

// encode is the query string of the what-if, "" when nothing is asked.
func (q whatIfQuery) encode() string {
	v := url.Values{}
	for k, x := range map[string]string{"mass_g": q.MassG, "span_loss_pct": q.SpanLossPct, "area_loss_pct": q.AreaLossPct,
		"muscle_score": q.MuscleScore, "site": q.Site, "temp_c": q.TempC} {
		if t := strings.TrimSpace(x); t != "" {
			v.Set(k, t)
		}
	}
	if len(v) == 0 {
		return ""
	}
	return "?" + v.Encode()
}

// whatIf is a parsed what-if: nil fields are left as recorded.
type whatIf struct {
	massG              *float64
	spanLoss, areaLoss *float64 // per cent
	muscle             *int
	site               *assess.Site // nil: the centre's
	siteName           string
}

// maxLossPct is the largest loss of span or area a what-if takes, %
// [project default: beyond it the wing is not a wing the model describes].
const maxLossPct = 60

// parseWhatIf reads and checks the query; errors name the parameter.
func (s *Server) parseWhatIf(c echo.Context, q whatIfQuery) (whatIf, assess.ValidationErrors, error) {
	var w whatIf
	var errs assess.ValidationErrors
	if m, verr := parseOptFloat("mass_g", q.MassG); verr != nil {
		errs = append(errs, verr)
	} else if m != nil {
		if verr := records.CheckMassG("mass_g", *m); verr != nil {
			errs = append(errs, verr)
		}
		w.massG = m
	}
	for _, p := range []struct {
		field, raw string
		dst        **float64
	}{{"span_loss_pct", q.SpanLossPct, &w.spanLoss}, {"area_loss_pct", q.AreaLossPct, &w.areaLoss}} {
		v, verr := parseOptFloat(p.field, p.raw)
		switch {
		case verr != nil:
			errs = append(errs, verr)
		case v != nil && (*v < 0 || *v > maxLossPct):
			errs = append(errs, &assess.ValidationError{Field: p.field, Value: p.raw, Message: fmt.Sprintf("give a loss from 0 to %d %%", maxLossPct)})
		default:
			*p.dst = v
		}
	}
	if n, verr := parseOptInt("muscle_score", q.MuscleScore); verr != nil {
		errs = append(errs, verr)
	} else if n != nil && (*n < 0 || *n > 3) {
		errs = append(errs, &assess.ValidationError{Field: "muscle_score", Value: q.MuscleScore, Message: "the pectoral muscle score is 0 to 3"})
	} else {
		w.muscle = n
	}
	site, name, err := s.whatIfSite(c, q)
	if verrs := asValidation(err); verrs != nil {
		errs = append(errs, verrs...)
	} else if err != nil {
		return w, nil, err
	}
	w.site, w.siteName = site, name
	return w, errs, nil
}

// whatIfSite is the site of the what-if: a named release site (at ?temp_c=
// when given), else the centre's elevation at ?temp_c=, else nil.
func (s *Server) whatIfSite(c echo.Context, q whatIfQuery) (*assess.Site, string, error) {
	if strings.TrimSpace(q.Site) != "" {
		return s.siteFromQuery(c)
	}
	t, verr := parseOptFloat("temp_c", q.TempC)
	if verr != nil {
		return nil, "", assess.ValidationErrors{verr}
	}
	if t == nil {
		return nil, "", nil
	}
	def, name, err := s.store.DefaultSite(c.Request().Context())
	if err != nil {
		return nil, "", err
	}
	def.TempC = t
	if err := def.Validate(); err != nil {
		return nil, "", asValidation(err)
	}
	return &def, name, nil
}

// latestWing returns the latest wing measurement with a span, or nil.
func latestWing(in assess.CaseInputs) *assess.WingMeasurement {
	var w *assess.WingMeasurement
	for i := range in.Wings {
		x := &in.Wings[i]
		if x.SpanMM != nil && (w == nil || !x.At.Before(w.At)) {
			w = x
		}
	}
	return w
}

// latestMuscle returns the latest pectoral muscle score, or nil.
func latestMuscle(in assess.CaseInputs) *int {
	var at time.Time
	var m *int
	for _, c := range in.Conditions {
		if c.MuscleScore != nil && !c.At.Before(at) {
			at, m = c.At, c.MuscleScore
		}
	}
	return m
}

// applyWhatIf returns a copy of in with the what-if's records added at now
// (a weigh-in before feeding, a muscle score, a wing measurement), and the
// changes in words. in itself is never changed.
//
// Span and area are changed independently: a span loss shortens the span
// and leaves a traced area alone; an area loss reduces the area at the
// span in force. Without a traced area the engine estimates the area from
// the span (SCIENCE.md §2), so a shorter span then has less area as well.
func applyWhatIf(in assess.CaseInputs, sp *assess.Species, w whatIf, now time.Time) (assess.CaseInputs, []string) {
	out := in
	out.WeighIns = slices.Clone(in.WeighIns)
	out.Conditions = slices.Clone(in.Conditions)
	out.Wings = slices.Clone(in.Wings)
	var words []string
	if w.massG != nil {
		out.WeighIns = append(out.WeighIns, assess.WeighIn{At: now, MassG: *w.massG, Fed: assess.FedBefore, Note: "what-if"})
		words = append(words, fmt.Sprintf("weighed %s g now, before feeding", fmtG(*w.massG)))
	}
	if w.muscle != nil {
		m := *w.muscle
		out.Conditions = append(out.Conditions, assess.ConditionScore{At: now, MuscleScore: &m})
		words = append(words, fmt.Sprintf("pectoral muscle score %d now", m))
	}
	if w.spanLoss != nil || w.areaLoss != nil {
		wing, more := whatIfWing(latestWing(in), sp, w, now)
		out.Wings = append(out.Wings, wing)
		words = append(words, more...)
	}
	return out, words
}

// whatIfWing is the wing measurement of a what-if's span and area losses.
func whatIfWing(base *assess.WingMeasurement, sp *assess.Species, w whatIf, now time.Time) (assess.WingMeasurement, []string) {
	span, from := sp.SpanMM, "the species' reference span"
	var area *float64
	method := assess.AreaEstimated
	if base != nil {
		span, from = *base.SpanMM, "the span measured "+base.At.Local().Format("2 Jan")
		if base.AreaCM2 != nil {
			a := *base.AreaCM2
			area, method = &a, base.AreaMethod
		}
	}
	var words []string
	if w.spanLoss != nil {
		span *= 1 - *w.spanLoss/100
		words = append(words, fmt.Sprintf("span %s mm (%s %% less than %s)", fmtG(span), fmtG(*w.spanLoss), from))
	}
	if w.areaLoss != nil {
		a0 := assess.EstimateAreaCM2(span, sp)
		if area != nil {
			a0 = *area
		}
		a := a0 * (1 - *w.areaLoss/100)
		area = &a
		words = append(words, fmt.Sprintf("wing area %s cm² (%s %% less)", fmtG(a), fmtG(*w.areaLoss)))
	}
	wing := assess.WingMeasurement{At: now, SpanMM: &span, AreaCM2: area, Note: "what-if"}
	if area != nil {
		wing.AreaMethod = method
	}
	return wing, words
}

// fmtG shows a number to at most one decimal place, without trailing zeros.
func fmtG(x float64) string { return strconv.FormatFloat(math.Round(x*10)/10, 'f', -1, 64) }

// whatIfRun is one what-if worked out: the assessment as recorded and the
// what-if's, with their site labels.
type whatIfRun struct {
	p              records.Patient
	base, alt      assess.Assessment
	baseErr        error
	altErr         error
	changes        []string
	baseSite, site string
}

// runWhatIf assesses the patient as recorded (at the centre's site) and
// with the what-if applied to a copy of its records. It reads, never writes.
func (s *Server) runWhatIf(c echo.Context, p records.Patient, w whatIf) (*whatIfRun, error) {
	ctx := c.Request().Context()
	now := s.now()
	r := &whatIfRun{p: p, baseSite: s.siteLabel(c, nil), site: s.siteLabel(c, w.site)}
	if w.siteName != "" {
		r.site = strings.Replace(r.site, "a release site", w.siteName, 1)
	}
	r.base, r.baseErr = s.assessment(c, p, nil)
	sp, err := s.store.SpeciesFor(ctx, p.SpeciesScientific)
	if err != nil {
		return nil, err
	}
	in, err := s.store.CaseInputs(ctx, p)
	if err != nil {
		return nil, err
	}
	th, err := s.store.Thresholds(ctx)
	if err != nil {
		return nil, err
	}
	site := w.site
	if site == nil {
		def, _, err := s.store.DefaultSite(ctx)
		if err != nil {
			return nil, err
		}
		site = &def
	}
	var alt assess.CaseInputs
	alt, r.changes = applyWhatIf(in, sp, w, now)
	if w.site != nil {
		r.changes = append(r.changes, "released at "+r.site)
	}
	r.alt, r.altErr = assess.Evaluate(alt, sp, th, *site, now)
	return r, nil
}

// handleWhatIf serves the what-if page, or with the fragment header only
// its result. Bad input is 422 with the messages beside the fields.
func (s *Server) handleWhatIf(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	q := whatIfQueryOf(c)
	w, verrs, err := s.parseWhatIf(c, q)
	if err != nil {
		return err
	}
	status := http.StatusOK
	var run *whatIfRun
	if len(verrs) > 0 {
		status = http.StatusUnprocessableEntity
		run = &whatIfRun{p: p, baseSite: s.siteLabel(c, nil)}
		run.base, run.baseErr = s.assessment(c, p, nil)
		run.altErr = verrs
	} else if run, err = s.runWhatIf(c, p, w); err != nil {
		return err
	}
	res := s.whatIfResult(c, run, q, verrs)
	c.Response().Header().Set("Cache-Control", "private, no-cache")
	if c.Request().Header.Get(whatIfFragmentHeader) != "" {
		return render(c, status, views.WhatIfFragment(res))
	}
	f, err := s.whatIfForm(c, p, q, verrs)
	if err != nil {
		return err
	}
	v := views.WhatIfView{Patient: p, Common: p.SpeciesCommon, Form: f, Result: res}
	return render(c, status, views.WhatIfPage(s.meta(c, p.CaseNumber+" what if"), v))
}

// whatIfForm is the form as typed, with the recorded values as hints.
func (s *Server) whatIfForm(c echo.Context, p records.Patient, q whatIfQuery, verrs assess.ValidationErrors) (views.WhatIfForm, error) {
	ctx := c.Request().Context()
	f := views.WhatIfForm{Action: "/patients/" + p.CaseNumber + "/what-if", MassG: q.MassG, SpanLossPct: q.SpanLossPct,
		AreaLossPct: q.AreaLossPct, MuscleScore: q.MuscleScore, Site: q.Site, TempC: q.TempC, Errors: verrs}
	sites, err := s.siteOptions(c)
	if err != nil {
		return f, err
	}
	f.Sites = sites
	in, err := s.store.CaseInputs(ctx, p)
	if err != nil {
		return f, err
	}
	f.MassHint, f.SpanHint, f.AreaHint, f.MuscleHint = "no weigh-in recorded", "no span measured: the species' reference", "no area traced: estimated from the span", "no muscle score recorded"
	if n := len(in.WeighIns); n > 0 {
		last := in.WeighIns[0]
		for _, wi := range in.WeighIns {
			if !wi.At.Before(last.At) {
				last = wi
			}
		}
		f.MassHint = "latest " + fmtG(last.MassG) + " g"
	}
	if w := latestWing(in); w != nil {
		f.SpanHint = "measured " + fmtG(*w.SpanMM) + " mm"
		if w.AreaCM2 != nil {
			f.AreaHint = "recorded " + fmtG(*w.AreaCM2) + " cm²"
		}
	}
	if m := latestMuscle(in); m != nil {
		f.MuscleHint = "latest " + strconv.Itoa(*m)
	}
	f.SiteHint = s.siteLabel(c, nil)
	return f, nil
}

// whatIfResult lays out the two assessments side by side.
func (s *Server) whatIfResult(c echo.Context, r *whatIfRun, q whatIfQuery, verrs assess.ValidationErrors) views.WhatIfResult {
	res := views.WhatIfResult{Changes: r.changes, Errors: verrs, Base: r.base, BaseSite: r.baseSite, AltSite: r.site}
	if r.baseErr != nil {
		res.Failed = s.failedSentence(c, "assessment", r.baseErr)
		return res
	}
	base := "/patients/" + r.p.CaseNumber
	res.BaseChart = whatIfChart(r.p, r.base, r.baseSite, base+"/charts/power.svg", "As recorded")
	if len(verrs) > 0 {
		return res
	}
	if r.altErr != nil {
		res.Failed = s.failedSentence(c, "what-if", r.altErr)
		return res
	}
	res.Alt, res.HasAlt = r.alt, true
	res.AltChart = whatIfChart(r.p, r.alt, r.site, base+"/charts/what-if.svg"+q.encode(), "What if")
	res.AltChart.ID = "whatif-power"
	for _, bc := range r.base.Criteria {
		ac, ok := r.alt.Criterion(bc.ID)
		if !ok {
			continue
		}
		res.Rows = append(res.Rows, views.WhatIfRow{ID: string(bc.ID), Title: bc.Title, Base: bc.Status, Alt: ac.Status,
			AltReason: ac.Reason, Changed: bc.Status != ac.Status})
	}
	res.Numbers = whatIfNumbers(r.base.Physics, r.alt.Physics)
	return res
}

// whatIfChart is the power chart view of assessment a, drawn from src.
func whatIfChart(p records.Patient, a assess.Assessment, siteLabel, src, title string) views.ChartView {
	cs := &chartSet{p: p, a: a, siteLabel: siteLabel}
	ch, missing, err := cs.power()
	if err != nil {
		missing = "The power curve could not be drawn."
	}
	v := chartView(p, "power", "", ch, missing)
	v.Src, v.Title = src, title+": "+chartTitles["power"]
	return v
}

// whatIfNumbers are the flight model's main numbers, side by side.
func whatIfNumbers(b, a *assess.Physics) []views.WhatIfNum {
	type num struct {
		label string
		get   func(*assess.Physics) string
	}
	f2 := func(x float64) string { return strconv.FormatFloat(x, 'f', 2, 64) }
	nums := []num{
		{"Mass used (g)", func(p *assess.Physics) string { return fmtG(p.Inputs.MassG) }},
		{"Wingspan (mm)", func(p *assess.Physics) string { return strconv.FormatFloat(p.Inputs.SpanMM, 'f', 0, 64) }},
		{"Wing area (cm²)", func(p *assess.Physics) string { return strconv.FormatFloat(p.Inputs.AreaCM2, 'f', 0, 64) }},
		{"Air density (kg/m³)", func(p *assess.Physics) string { return strconv.FormatFloat(p.AirDensityKgM3, 'f', 4, 64) }},
		{"Power margin (× power needed at V_mp)", func(p *assess.Physics) string { return f2(p.PowerMargin) }},
		{"A healthy bird's margin here", func(p *assess.Physics) string { return f2(p.ExpectedMarginSite) }},
		{"Share of a healthy bird's spare power", func(p *assess.Physics) string {
			if p.ExcessPowerFraction == nil {
				return "not defined"
			}
			return strconv.FormatFloat(100**p.ExcessPowerFraction, 'f', 0, 64) + " %"
		}},
		{"Minimum speed over the healthy reference's", func(p *assess.Physics) string { return f2(p.MinSpeedRatio) + " ×" }},
		{"Climb rate at V_mp (m/s)", func(p *assess.Physics) string { return f2(p.ClimbRateMS) }},
		{"Takeoff index", func(p *assess.Physics) string { return f2(p.TakeoffIndex) + ": " + p.TakeoffBandLabel }},
	}
	var out []views.WhatIfNum
	for _, n := range nums {
		row := views.WhatIfNum{Label: n.label, Base: "not worked out", Alt: "not worked out"}
		if b != nil {
			row.Base = n.get(b)
		}
		if a != nil {
			row.Alt = n.get(a)
		}
		out = append(out, row)
	}
	return out
}

// handleWhatIfPower serves the what-if's power chart as its own SVG
// document under the chart content security policy; bad input is 422 with
// an SVG naming the parameter.
func (s *Server) handleWhatIfPower(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	q := whatIfQueryOf(c)
	w, verrs, err := s.parseWhatIf(c, q)
	if err != nil {
		return err
	}
	if len(verrs) > 0 {
		return writeSVG(c, http.StatusUnprocessableEntity, messageSVG(verrs[0].Field+": "+verrs[0].Message))
	}
	run, err := s.runWhatIf(c, p, w)
	if err != nil {
		return err
	}
	if run.altErr != nil {
		return run.altErr
	}
	cs := &chartSet{p: p, a: run.alt, siteLabel: run.site}
	ch, missing, err := cs.power()
	if err != nil {
		return err
	}
	if ch == nil {
		return writeSVG(c, http.StatusOK, messageSVG(missing))
	}
	var buf bytes.Buffer
	if err := ch.SVG(&buf); err != nil {
		return err
	}
	return writeSVG(c, http.StatusOK, buf.Bytes())
}

package web

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"math"
	"net/http"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/reports/charts"
	"aloft/web/views"
)

// chartNames are the patient charts, in page order.
var chartNames = []string{"mass", "stamina", "feathers", "power"}

// chartRoutes adds one SVG document per patient chart; the power curve takes
// the site as ?elevation_m=&temp_c=.
func (s *Server) chartRoutes(g *echo.Group) {
	for _, name := range chartNames {
		g.GET("/patients/:case/charts/"+name+".svg", func(c echo.Context) error { return s.handleChart(c, name) })
	}
}

// chartSet is what the patient charts are drawn from: the patient, its
// species, its records and the assessment at one site.
type chartSet struct {
	p         records.Patient
	sp        *assess.Species
	in        assess.CaseInputs
	th        assess.Thresholds
	siteLabel string
	now       time.Time // the right end of the mass chart's time axis, in care
	a         assess.Assessment
	aErr      error // the assessment's error; only the power chart needs it
}

// chartsFor gathers what the charts of patient p need at site (nil: the
// centre's); withPower also assesses the patient there, for the power
// chart, which reads the same assessment as the page.
func (s *Server) chartsFor(c echo.Context, p records.Patient, site chosenSite, withPower bool) (*chartSet, error) {
	ctx := c.Request().Context()
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
	set := &chartSet{p: p, sp: sp, in: in, th: th, siteLabel: s.label(c, site), now: s.now()}
	if withPower {
		set.a, set.aErr = s.assessment(c, p, site.site)
	}
	return set, nil
}

// build returns the named chart, or the sentence to show when there is
// nothing to draw (the chart's ErrNoData).
func (cs *chartSet) build(name string) (*charts.Chart, string, error) {
	var ch *charts.Chart
	var err error
	switch name {
	case "mass":
		ch, err = charts.Mass(cs.massInput())
	case "stamina":
		ch, err = charts.Stamina(charts.StaminaInput{Sessions: cs.in.Sessions, TargetPasses: cs.targetPasses()})
	case "feathers":
		ch, err = cs.feathers()
	case "power":
		return cs.power()
	default:
		return nil, "", fmt.Errorf("web: no chart named %q", name)
	}
	if errors.Is(err, charts.ErrNoData) {
		return nil, missingText[name], nil
	}
	return ch, "", err
}

// missingText says why a chart is not drawn.
var missingText = map[string]string{
	"mass":     "No weigh-ins yet.",
	"stamina":  "No flight sessions yet.",
	"feathers": "No feather map recorded yet.",
	"power":    "No power curve: the flight model needs a weigh-in.",
}

// massInput is the mass chart's input: the weigh-ins, the species' range
// for the patient's sex, the published release mass, and the right end of
// the time axis (today in care, the disposition date after).
func (cs *chartSet) massInput() charts.MassInput {
	lo, hi := cs.sp.MassRangeG(cs.p.Sex)
	in := charts.MassInput{Weighins: cs.in.WeighIns, RangeLoG: lo, RangeHiG: hi,
		ReleaseMinG: cs.sp.ReleaseMinMassG, Sex: cs.p.Sex, Now: cs.now}
	if !cs.p.InCare() {
		in.Now = time.Time{}
		if d, err := time.ParseInLocation(records.DateLayout, cs.p.StatusDate, time.Local); err == nil {
			in.Now = d
		}
	}
	return in
}

// targetPasses is the unbroken passes wanted for a standard cage: the
// species' own count, else the centre's threshold for its group; nil when
// neither is set.
func (cs *chartSet) targetPasses() *int {
	if cs.sp.MinPasses != nil {
		return cs.sp.MinPasses
	}
	if v, ok := cs.th.Value(assess.ThPasses, cs.sp.Group); ok {
		n := int(math.Ceil(v))
		return &n
	}
	return nil
}

// feathers draws the latest feather map.
func (cs *chartSet) feathers() (*charts.Chart, error) {
	var fm *assess.FeatherMap
	for _, w := range cs.in.Wings { // oldest first: the last map wins
		if w.Feathers != nil {
			fm = w.Feathers
		}
	}
	if fm == nil {
		return nil, fmt.Errorf("web: feather chart: no map: %w", charts.ErrNoData)
	}
	return charts.Feathers(charts.FeatherInput{Map: *fm, Primaries: cs.sp.Primaries,
		Secondaries: cs.sp.Secondaries, Rectrices: cs.sp.Rectrices})
}

// power draws the flight result of the assessment: the same numbers the
// assessment page prints.
func (cs *chartSet) power() (*charts.Chart, string, error) {
	if cs.aErr != nil {
		return nil, "", cs.aErr
	}
	if cs.a.Physics == nil {
		return nil, missingText["power"], nil
	}
	ch, err := charts.Power(charts.PowerInput{Result: cs.a.Physics.FlightResult, SiteLabel: cs.siteLabel})
	if errors.Is(err, charts.ErrNoData) {
		return nil, missingText["power"], nil
	}
	return ch, "", err
}

// chartView is the page's view of one chart: its image URL and text
// alternative, or the sentence when there is nothing to draw.
func chartView(p records.Patient, name, query string, ch *charts.Chart, missing string) views.ChartView {
	v := views.ChartView{ID: name, Title: chartTitles[name], Missing: missing,
		Src: "/patients/" + p.CaseNumber + "/charts/" + name + ".svg" + query}
	if ch != nil {
		w, h := ch.Size()
		v.Alt, v.Width, v.Height = ch.Alt(), int(math.Round(w.Points())), int(math.Round(h.Points()))
	}
	return v
}

// chartTitles head the charts on the pages.
var chartTitles = map[string]string{
	"mass":     "Mass against the species' range",
	"stamina":  "Flight sessions: passes and recovery",
	"feathers": "Flight feathers: both wings and the tail",
	"power":    "Power curve",
}

// powerChartView is the power chart of assessment a at the site query names.
func powerChartView(p records.Patient, a assess.Assessment, siteLabel, query string) views.ChartView {
	cs := &chartSet{p: p, a: a, siteLabel: siteLabel}
	ch, missing, err := cs.power()
	if err != nil {
		missing = "The power curve could not be drawn."
	}
	return chartView(p, "power", query, ch, missing)
}

// picturesSection is the patient page's block of charts at the centre's
// site. A chart that fails is logged and replaced by a sentence.
func (s *Server) picturesSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	pics := views.Pictures{Assessment: "/patients/" + p.CaseNumber + "/assessment"}
	cs, err := s.chartsFor(c, p, chosenSite{}, true)
	for _, name := range chartNames {
		var ch *charts.Chart
		missing := ""
		if err == nil {
			var berr error
			if ch, missing, berr = cs.build(name); berr != nil {
				missing = s.failedSentence(c, "chart", berr)
			}
		} else {
			missing = s.failedSentence(c, "chart", err)
		}
		pics.Charts = append(pics.Charts, chartView(p, name, "", ch, missing))
	}
	return views.Section{ID: "pictures", Title: "Pictures", Body: views.PicturesBody(pics)}, true, nil
}

// handleChart serves one chart as its own SVG document, under the chart
// content security policy that allows the drawing's inline styles. With
// nothing to draw it serves a small SVG saying so; a bad site is 422 with
// an SVG naming the parameter.
func (s *Server) handleChart(c echo.Context, name string) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	var site chosenSite
	if name == "power" {
		var verrs assess.ValidationErrors
		if site, verrs, err = s.site(c, siteQueryOf(c)); err != nil {
			return err
		}
		if len(verrs) > 0 {
			return writeSVG(c, http.StatusUnprocessableEntity, messageSVG(verrs[0].Field+": "+verrs[0].Message))
		}
	}
	cs, err := s.chartsFor(c, p, site, name == "power")
	if err != nil {
		return err
	}
	ch, missing, err := cs.build(name)
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

// writeSVG sends an SVG document with the chart headers.
func writeSVG(c echo.Context, status int, doc []byte) error {
	h := c.Response().Header()
	h.Set("Content-Security-Policy", ChartCSP)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Cache-Control", "private, no-cache")
	return c.Blob(status, "image/svg+xml", doc)
}

// messageSVG is a small SVG document, 360 px wide, carrying one sentence.
func messageSVG(msg string) []byte {
	var esc bytes.Buffer
	_ = xml.EscapeText(&esc, []byte(msg)) // writing to a buffer cannot fail
	return fmt.Appendf(nil, `<?xml version="1.0" encoding="UTF-8"?>
<svg xmlns="http://www.w3.org/2000/svg" width="360" height="48" viewBox="0 0 360 48" role="img" aria-labelledby="msg">
<title id="msg">%s</title>
<rect width="360" height="48" fill="#ffffff" stroke="#d5d0c4"/>
<text x="12" y="29" font-family="'Liberation Sans',Arial,Helvetica,sans-serif" font-size="14" fill="#17242e">%s</text>
</svg>
`, esc.String(), esc.String())
}

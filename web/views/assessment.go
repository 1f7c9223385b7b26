package views

import (
	"context"
	"fmt"
	"html"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/a-h/templ"

	"aloft/assess"
	"aloft/records"
)

// AssessmentView is the assessment page of one patient at one site: the
// advisory outcome, the criteria, the power-curve chart and the physics
// numbers, all from one assess.Assessment.
type AssessmentView struct {
	Patient records.Patient
	A       assess.Assessment
	// Site is the site form as typed; SiteLabel names the site assessed.
	Site      SiteForm
	SiteLabel string
	// Power is the power-curve chart of the same assessment and site.
	Power ChartView
	// Physics, SiteRows and ParamRows are the numbers shown, built by
	// PhysicsRows, SiteRows and ParamRows from A.
	Physics, SiteRows, ParamRows []NumRow
	// ModelCautions are CAUTIONS.md's limits of the flight model.
	ModelCautions []string
}

// SiteForm is the release-site form of the assessment page (a GET form),
// holding what was typed.
type SiteForm struct {
	Action    string       // the page's own URL, without a query
	Sites     []SiteChoice // the centre's named release sites
	Name      string       // the named release site chosen; "" for none
	Elevation string       // metres, when no named site is chosen
	Temp      string       // °C; "" for the standard atmosphere
	Errors    assess.ValidationErrors
}

// SiteChoice is one named release site of the site form.
type SiteChoice struct{ Name, Label string }

// OutcomeSummary is the compact outcome block on the patient page.
type OutcomeSummary struct {
	Case      string
	InCare    bool
	Outcome   assess.Outcome
	SiteLabel string
	At        time.Time
	// Failed is set when the assessment could not be made: the sentence to
	// show instead (with an incident id).
	Failed string
}

// Piece is one part of a value on the assessment page: words, or a number
// with its unit and the JSON path of the assessment value it shows.
type Piece struct {
	Text string // words, or the number as shown
	Unit string // after a number, e.g. "m/s"; "" for words
	// Path is a number's place in the assessment's JSON, dot-separated
	// ("physics.speed_window_m_s.0"); "" for words. Tests read it back.
	Path string
	// Scale: the number shown is the JSON value × Scale (100 for per cent).
	Scale float64
}

// Glued reports whether the piece follows the one before without a space:
// words that start with punctuation.
func (p Piece) Glued() bool {
	return !p.IsNum() && p.Text != "" && strings.ContainsAny(p.Text[:1], ";:,.)")
}

// numPieces writes pieces as HTML: each number in a span tagged with its
// JSON path and scale, followed by its unit; words as text; one space
// between pieces except before punctuation.
func numPieces(ps []Piece) templ.Component {
	return templ.ComponentFunc(func(_ context.Context, w io.Writer) error {
		var b strings.Builder
		for i, p := range ps {
			if i > 0 && !p.Glued() {
				b.WriteByte(' ')
			}
			if !p.IsNum() {
				b.WriteString(html.EscapeString(p.Text))
				continue
			}
			fmt.Fprintf(&b, `<span class="num" data-testid="num" data-json="%s" data-scale="%s">%s</span>`,
				html.EscapeString(p.Path), html.EscapeString(p.ScaleAttr()), html.EscapeString(p.Text))
			if p.Unit != "" {
				b.WriteString(" " + html.EscapeString(p.Unit))
			}
		}
		_, err := io.WriteString(w, b.String())
		return err
	})
}

// IsNum reports whether the piece is a number.
func (p Piece) IsNum() bool { return p.Path != "" }

// ScaleAttr is the data-scale attribute's value.
func (p Piece) ScaleAttr() string { return strconv.FormatFloat(p.Scale, 'g', -1, 64) }

// NumRow is one labelled line of numbers.
type NumRow struct {
	Label  string
	TestID string
	Pieces []Piece
}

// words is a piece of plain text.
func aWords(s string) Piece { return Piece{Text: s} }

// num is a number rounded to decimals places, with its unit and path.
func aNum(path string, v float64, decimals int, unit string) Piece {
	return Piece{Text: strconv.FormatFloat(v, 'f', decimals, 64), Unit: unit, Path: path, Scale: 1}
}

// exact is a number in its shortest exact form.
func aExact(path string, v float64, unit string) Piece {
	return Piece{Text: strconv.FormatFloat(v, 'f', -1, 64), Unit: unit, Path: path, Scale: 1}
}

// sig3 is a number to three significant figures (at least none after the
// point), the precision of a power in watts.
func aSig3(path string, v float64, unit string) Piece {
	d := 0
	if a := math.Abs(v); a > 0 {
		d = max(0, 2-int(math.Floor(math.Log10(a))))
	}
	return aNum(path, v, d, unit)
}

// percent is a fraction shown as a whole per cent.
func aPercent(path string, v float64) Piece {
	return Piece{Text: strconv.FormatFloat(math.Round(v*100), 'f', 0, 64), Unit: "%", Path: path, Scale: 100}
}

// PhysicsRows lays out the flight model's numbers of a with their units; nil
// when the model was not run.
func PhysicsRows(a assess.Assessment) []NumRow {
	p := a.Physics
	if p == nil {
		return nil
	}
	in := p.Inputs
	rows := []NumRow{
		{"Air density at the site", "phys-density", []Piece{aNum("physics.air_density_kg_m3", p.AirDensityKgM3, 4, "kg/m³")}},
		{"Mass used", "phys-mass", append([]Piece{aExact("physics.inputs.mass_g", in.MassG, "g")},
			aWords(fmt.Sprintf("(%s, %s)", aFedWords(in.MassFed), fmtDate(in.MassAt))))},
		{"Wingspan", "phys-span", []Piece{aExact("physics.inputs.span_mm", in.SpanMM, "mm"), aWords(aSpanNote(in))}},
		{"Wing area", "phys-area", []Piece{aNum("physics.inputs.area_cm2", in.AreaCM2, 0, "cm²"), aWords(aAreaNote(in))}},
		{"Wing loading", "phys-wing-loading", []Piece{aNum("physics.wing_loading_n_m2", p.WingLoadingNM2, 1, "N/m²")}},
		{"Minimum speed from wing loading, V_min", "phys-vmin", []Piece{
			aNum("physics.min_speed_m_s", p.MinSpeedMS, 2, "m/s"), aWords("; healthy reference"),
			aNum("physics.reference_min_speed_m_s", p.ReferenceMinSpeedMS, 2, "m/s"), aWords("; ratio"),
			aNum("physics.min_speed_ratio", p.MinSpeedRatio, 2, "× the reference's")}},
		{"Minimum-power speed, V_mp", "phys-vmp", []Piece{aNum("physics.min_power_speed_m_s", p.MinPowerSpeedMS, 1, "m/s")}},
		{"Maximum-range speed, V_mr", "phys-vmr", []Piece{aNum("physics.max_range_speed_m_s", p.MaxRangeSpeedMS, 1, "m/s")}},
		{"Mechanical power needed at V_mp", "phys-pmin", []Piece{aSig3("physics.min_power_mech_w", p.MinPowerMechW, "W")}},
		{"Available power", "phys-pav", []Piece{aSig3("physics.available_power_w", p.AvailablePowerW, "W")}},
		{"Power margin", "phys-margin", []Piece{
			aNum("physics.power_margin", p.PowerMargin, 2, "× the power needed at V_mp"), aWords("; a healthy bird's here"),
			aNum("physics.expected_margin_site", p.ExpectedMarginSite, 2, "×"), aWords("; ratio"),
			aNum("physics.margin_ratio", p.MarginRatio, 2, "of the healthy margin")}},
		{"Excess-power fraction", "phys-excess", aOptional(p.ExcessPowerFraction, "physics.excess_power_fraction", aPercent,
			"not defined: the site is marginal for the species (see the notes)")},
		{"Climb rate at V_mp", "phys-climb", []Piece{aNum("physics.climb_rate_m_s", p.ClimbRateMS, 2, "m/s")}},
		{"Takeoff index", "phys-takeoff", []Piece{aNum("physics.takeoff_index", p.TakeoffIndex, 2, "(available over hover power)"),
			aWords(": " + p.TakeoffBandLabel)}},
		{"Speed window", "phys-window", aWindow(p.SpeedWindowMS)},
		{"Still-air range on its fat", "phys-range", aOptional(p.StillAirRangeKm, "physics.still_air_range_km",
			func(path string, v float64) Piece { return aNum(path, v, 0, "km") }, "shown for migrants with a fat score only")},
		{"Fat", "phys-fat", []Piece{aPercent("physics.fat_fraction", p.FatFraction), aWords("of body mass" + aAssumedWords(p.FatAssumed))}},
	}
	return rows
}

// aOptional shows a nullable number, or words saying why there is none.
func aOptional(v *float64, path string, f func(string, float64) Piece, none string) []Piece {
	if v == nil {
		return []Piece{aWords(none)}
	}
	return []Piece{f(path, *v)}
}

func aWindow(w *[2]float64) []Piece {
	if w == nil {
		return []Piece{aWords("none: by the model the bird cannot sustain level flight at this site (see the notes)")}
	}
	return []Piece{aNum("physics.speed_window_m_s.0", w[0], 1, "m/s"), aWords("to"), aNum("physics.speed_window_m_s.1", w[1], 1, "m/s")}
}

func aAssumedWords(a bool) string {
	if a {
		return " (assumed: no fat score)"
	}
	return " (scored)"
}

func aSpanNote(in assess.PhysicsInputs) string {
	if in.SpanAssumed {
		return "(the species' reference: no span measured)"
	}
	return "(measured " + fmtDate(aDerefTime(in.WingAt)) + ")"
}

func aAreaNote(in assess.PhysicsInputs) string {
	if in.AreaEstimated {
		return "(estimated from the span and the species reference)"
	}
	return "(traced)"
}

func aDerefTime(t *time.Time) time.Time {
	if t == nil {
		return time.Time{}
	}
	return *t
}

// aFedWords says when a weighing was made.
func aFedWords(f assess.FedState) string {
	switch f {
	case assess.FedBefore:
		return "weighed before feeding"
	case assess.FedAfter:
		return "weighed after feeding"
	}
	return "feeding not noted"
}

// SiteRows lays out the site as assessed.
func SiteRows(a assess.Assessment) []NumRow {
	temp := []Piece{aWords("not given: the standard atmosphere's for the elevation")}
	if a.Site.TempC != nil {
		temp = []Piece{aExact("site.temp_c", *a.Site.TempC, "°C")}
	}
	return []NumRow{
		{"Elevation", "site-elevation", []Piece{aExact("site.elevation_m", a.Site.ElevationM, "m")}},
		{"Air temperature", "site-temp", temp},
		{"Air density", "site-density", []Piece{aNum("site.air_density_kg_m3", a.Site.AirDensityKgM3, 4, "kg/m³")}},
	}
}

// ParamRows lays out the flight model's parameter set.
func ParamRows(a assess.Assessment) []NumRow {
	p := a.Params.Flight
	return []NumRow{
		{"Parameter set", "param-name", []Piece{aWords(p.Name)}},
		{"Induced power factor k", "param-k", []Piece{aExact("params.flight.k", p.K, "(no unit)")}},
		{"Body drag coefficient C_Db", "param-cdb", []Piece{aExact("params.flight.c_db", p.CDb, "(no unit)")}},
		{"Profile power constant C_pro", "param-cpro", []Piece{aExact("params.flight.c_pro", p.CPro, "(no unit)")}},
		{"Muscle efficiency η", "param-eta", []Piece{aExact("params.flight.eta", p.Eta, "(mechanical ÷ chemical power)")}},
		{"Respiration and circulation factor R", "param-r", []Piece{aExact("params.flight.r", p.R, "(no unit)")}},
	}
}

// StatusWords names a criterion status in the project's words.
func StatusWords(s assess.Status) string {
	switch s {
	case assess.StatusMet:
		return "Met"
	case assess.StatusBorderline:
		return "Borderline"
	case assess.StatusUnmet:
		return "Not met"
	case assess.StatusNotAssessed:
		return "Not assessed"
	}
	return string(s)
}

// aStatusClass is the badge class of a status.
func aStatusClass(s assess.Status) string { return "badge badge-" + string(s) }

// aLevelClass is the badge class of an outcome level, reusing the status
// colours: ready as met, continue as borderline, refer as unmet.
func aLevelClass(l assess.OutcomeLevel) string {
	switch l {
	case assess.OutcomeReady:
		return "badge badge-met"
	case assess.OutcomeContinue:
		return "badge badge-borderline"
	case assess.OutcomeRefer:
		return "badge badge-unmet"
	}
	return "badge badge-not-assessed"
}

// ProvenanceWords names a provenance in the project's words.
func ProvenanceWords(p assess.Provenance) string {
	switch p {
	case assess.ProvPublished:
		return "Published"
	case assess.ProvDerived:
		return "Derived"
	case assess.ProvCommonPractice:
		return "Common practice"
	case assess.ProvProjectDefault:
		return "Aloft's default"
	case assess.ProvCentreSetting:
		return "Centre setting"
	case assess.ProvFromMemory:
		return "From memory, not checked against a source"
	}
	return string(p)
}

// ProvenanceText is a provenance in words with its source.
func ProvenanceText(b assess.Basis) string {
	if b.Source == "" {
		return ProvenanceWords(b.Kind)
	}
	return ProvenanceWords(b.Kind) + ": " + b.Source
}

// aReasonLine is one reason of an outcome in words.
func aReasonLine(r assess.OutcomeReason) string {
	s := r.Title + " — " + strings.ToLower(StatusWords(r.Status))
	if r.Stale {
		s += ", evidence out of date"
	}
	return s + ": " + r.Text
}

// aEvidenceDate is the date of a piece of evidence, or "" for a reference
// or derived value.
func aEvidenceDate(e assess.Evidence) string {
	if e.At == nil {
		return ""
	}
	return fmtDate(*e.At)
}

// assessmentURL is the assessment page of a case.
func assessmentURL(c string) string { return "/patients/" + c + "/assessment" }

// aSexWords says which reference the species values are for.
func aSexWords(s assess.Sex) string {
	switch s {
	case assess.SexFemale, assess.SexMale:
		return "a " + string(s)
	}
	return "a bird of unknown sex"
}

package charts

import (
	"fmt"
	"slices"
	"strings"
	"time"

	"aloft/assess"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// MassInput is what the mass chart shows: the weigh-ins, the species' typical
// adult range for the bird's sex, and the release guide where one exists.
type MassInput struct {
	// Weighins are the weigh-ins, in any order; at least one. Dates are shown
	// in the location of the first one's At.
	Weighins []assess.WeighIn
	// RangeLoG and RangeHiG are the typical adult mass range for Sex, g
	// (Species.MassRangeG); both 0 = no range.
	RangeLoG, RangeHiG float64
	// ReleaseMinG is the published lowest release mass, g; nil = none.
	ReleaseMinG *float64
	// Sex is the patient's sex, which the range is for.
	Sex assess.Sex
	// Now is the right end of the time axis when later than the last
	// weigh-in (the day the chart is drawn, or a closed case's disposition
	// date), so a gap since the last weighing shows; zero = the last weigh-in.
	Now time.Time
}

// massScreen is the mass chart's design size, points.
var massScreen = [2]vg.Length{360, 300}

// Mass returns the mass-over-time chart: each weigh-in (filled dots weighed
// before feeding, open dots after feeding or not noted), the species' range
// for the bird's sex as a band, the release guide as a dashed line.
func Mass(in MassInput) (*Chart, error) {
	if len(in.Weighins) == 0 {
		return nil, fmt.Errorf("charts: mass chart: no weigh-ins: %w", ErrNoData)
	}
	ws := slices.Clone(in.Weighins)
	slices.SortStableFunc(ws, func(a, b assess.WeighIn) int { return a.At.Compare(b.At) })
	m := massChart{in: in, ws: ws, loc: ws[0].At.Location()}
	return &Chart{name: "mass", title: "Mass over time", alt: m.alt(),
		width: massScreen[0], height: massScreen[1], draw: m.draw}, nil
}

// massChart is a MassInput with its weigh-ins in time order.
type massChart struct {
	in  MassInput
	ws  []assess.WeighIn
	loc *time.Location
}

func (m massChart) hasRange() bool { return m.in.RangeHiG > m.in.RangeLoG && m.in.RangeLoG > 0 }

// sexWords names the bird the range is for.
func sexWords(s assess.Sex) string {
	switch s {
	case assess.SexFemale:
		return "a female"
	case assess.SexMale:
		return "a male"
	}
	return "a bird of unknown sex"
}

// sexShort names the sex in a legend.
func sexShort(s assess.Sex) string {
	if s == assess.SexFemale || s == assess.SexMale {
		return string(s)
	}
	return "sex unknown"
}

// fedWords says when a weighing was made.
func fedWords(f assess.FedState) string {
	switch f {
	case assess.FedBefore:
		return "weighed before feeding"
	case assess.FedAfter:
		return "weighed after feeding"
	}
	return "feeding not noted"
}

// alt returns the text alternative.
func (m massChart) alt() string {
	last, first := m.ws[len(m.ws)-1], m.ws[0]
	lowest := m.ws[0]
	for _, w := range m.ws {
		if w.MassG < lowest.MassG {
			lowest = w
		}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "Mass %s g on %s (%s).", grams(last.MassG), isoDate(last.At.In(m.loc)), fedWords(last.Fed))
	if len(m.ws) > 1 {
		fmt.Fprintf(&b, " %s since %s (%s g); lowest %s g on %s.", plural(len(m.ws), "weigh-in", "weigh-ins"),
			isoDate(first.At.In(m.loc)), grams(first.MassG), grams(lowest.MassG), isoDate(lowest.At.In(m.loc)))
	}
	if m.hasRange() {
		fmt.Fprintf(&b, " Typical range for %s: %s–%s g; the latest mass is %s.", sexWords(m.in.Sex),
			grams(m.in.RangeLoG), grams(m.in.RangeHiG), position(last.MassG, m.in.RangeLoG, m.in.RangeHiG))
	} else {
		b.WriteString(" No typical range for the species.")
	}
	if r := m.in.ReleaseMinG; r != nil {
		fmt.Fprintf(&b, " Release guide %s g; the latest mass is %s.", grams(*r), position(last.MassG, *r, 0))
	}
	return b.String()
}

// position says where g lies against lo…hi (hi 0 = no upper bound).
func position(g, lo, hi float64) string {
	switch {
	case g < lo:
		return grams(lo-g) + " g below it"
	case hi > 0 && g > hi:
		return grams(g-hi) + " g above it"
	case hi > 0:
		return "within it"
	}
	return "at or above it"
}

// styles returns the series styles of the mass chart.
func (m massChart) styles(st Style) (mass, release, edge draw.LineStyle, filled, open draw.GlyphStyle) {
	mass = lineStyle(blue, st.LineWidth)
	release = lineStyle(vermillion, st.LineWidth, dashed...)
	edge = lineStyle(bluishGreen, st.ThinWidth)
	filled = draw.GlyphStyle{Color: blue, Radius: st.MarkerRadius, Shape: draw.CircleGlyph{}}
	open = draw.GlyphStyle{Color: blue, Radius: st.MarkerRadius, Shape: hollowCircle{Width: st.ThinWidth * 1.5}}
	return
}

// legend returns the chart's key.
func (m massChart) legend(st Style) *legend {
	mass, release, edge, filled, open := m.styles(st)
	before, other := 0, 0
	for _, w := range m.ws {
		if w.Fed == assess.FedBefore {
			before++
		} else {
			other++
		}
	}
	l := &legend{st: st}
	switch {
	case before > 0 && other > 0:
		l.add("Mass, before feeding", lineThumb(mass, &filled))
		l.add("after feeding or not noted", lineThumb(mass, &open))
	case before > 0:
		l.add("Mass, weighed before feeding", lineThumb(mass, &filled))
	default:
		l.add("Mass, after feeding or not noted", lineThumb(mass, &open))
	}
	if m.hasRange() {
		l.add(fmt.Sprintf("Typical range, %s: %s–%s g", sexShort(m.in.Sex), grams(m.in.RangeLoG), grams(m.in.RangeHiG)),
			boxThumb(tint(bluishGreen, 0.78), edge))
	}
	if r := m.in.ReleaseMinG; r != nil {
		l.add("Release guide: "+grams(*r)+" g", lineThumb(release, nil))
	}
	return l
}

// yRange returns the mass axis range: the data, the band and the guide,
// with a margin.
func (m massChart) yRange() (lo, hi float64) {
	lo, hi = m.ws[0].MassG, m.ws[0].MassG
	for _, w := range m.ws {
		lo, hi = min(lo, w.MassG), max(hi, w.MassG)
	}
	if m.hasRange() {
		lo, hi = min(lo, m.in.RangeLoG), max(hi, m.in.RangeHiG)
	}
	if r := m.in.ReleaseMinG; r != nil {
		lo, hi = min(lo, *r), max(hi, *r)
	}
	pad := max((hi-lo)*0.08, hi*0.02)
	return max(0, lo-pad), hi + pad
}

// draw draws the chart into c.
func (m massChart) draw(c draw.Canvas, st Style) {
	fillWhite(c)
	leg := m.legend(st)
	last := m.ws[len(m.ws)-1]
	caption := fmt.Sprintf("Latest: %s g on %s (%s)", grams(last.MassG), last.At.In(m.loc).Format("2 Jan"), fedWords(last.Fed))
	pc, lc := layout(c, st, caption, leg)
	ts := make([]time.Time, len(m.ws))
	for i, w := range m.ws {
		ts[i] = w.At
	}
	xlo, xhi := timeRange(ts, m.in.Now)
	p := newPlot(st, dateLabel(unixTime(xlo, m.loc), unixTime(xhi, m.loc)), "Mass (g)")
	p.X.Min, p.X.Max = xlo, xhi
	p.X.Tick.Marker = dayTicks{Loc: m.loc, Max: maxDateLabels(c, st)}
	p.Y.Min, p.Y.Max = m.yRange()
	mass, release, edge, filled, open := m.styles(st)
	filled.Radius = markerFor(st, pc.Max.X-pc.Min.X, len(m.ws))
	open.Radius = filled.Radius
	if m.hasRange() {
		p.Add(band{Lo: m.in.RangeLoG, Hi: m.in.RangeHiG, Fill: tint(bluishGreen, 0.78), Edge: edge})
	}
	if r := m.in.ReleaseMinG; r != nil {
		p.Add(hLine{Y: *r, LineStyle: release})
	}
	var all, before, other plotter.XYs
	for _, w := range m.ws {
		xy := plotter.XY{X: float64(w.At.Unix()), Y: w.MassG}
		all = append(all, xy)
		if w.Fed == assess.FedBefore {
			before = append(before, xy)
		} else {
			other = append(other, xy)
		}
	}
	p.Add(&plotter.Line{XYs: all, LineStyle: mass})
	p.Add(&plotter.Scatter{XYs: before, GlyphStyle: filled}, &plotter.Scatter{XYs: other, GlyphStyle: open})
	p.Draw(pc)
	leg.draw(lc)
}

// maxDateLabels returns how many "30 Nov" labels fit across c with room
// between them.
func maxDateLabels(c draw.Canvas, st Style) int {
	return max(2, int((c.Max.X-c.Min.X)/(st.FontSize*6.5)))
}

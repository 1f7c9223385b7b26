package charts

import (
	"fmt"
	"strings"

	"aloft/assess"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// PowerInput is what the power-curve chart shows: the flight model's result
// for the bird at one site.
type PowerInput struct {
	// Result is assess.Flight's result. The chart reads only what its JSON
	// form carries: the curves, the speeds, the available power and the
	// window, so a stored result draws the same chart.
	Result assess.FlightResult
	// SiteLabel names the site in words, e.g. "release site, 300 m, 12 °C".
	SiteLabel string
}

// powerScreen is the power chart's design size, points.
var powerScreen = [2]vg.Length{360, 500}

// Power returns the power-curve chart in two panels on one airspeed axis.
// Above, mechanical power: the bird's curve, the healthy reference's at the
// same site, the available power as a horizontal line, the speed window
// shaded and the minimum-power speed V_mp marked. Below, the bird's chemical
// (fuel) power with the tangent from the origin that touches it at the
// maximum-range speed V_mr. The two panels have their own power scales
// because chemical power is several times mechanical.
func Power(in PowerInput) (*Chart, error) {
	r := in.Result
	if len(r.Curve) < 2 || len(r.ReferenceCurve) != len(r.Curve) {
		return nil, fmt.Errorf("charts: power chart: the result has no curves: %w", ErrNoData)
	}
	if r.MinPowerSpeedMS <= 0 || r.MaxRangeSpeedMS <= 0 {
		return nil, fmt.Errorf("charts: power chart: the result has no characteristic speeds: %w", ErrNoData)
	}
	p := powerChart{r: r, site: in.SiteLabel}
	p.chemAtVmr = interpolate(r.Curve, r.MaxRangeSpeedMS, chem)
	p.refMin = r.ReferenceCurve[0].PowerMechW
	for _, c := range r.ReferenceCurve {
		p.refMin = min(p.refMin, c.PowerMechW)
	}
	title := "Power curve"
	if in.SiteLabel != "" {
		title += " at " + in.SiteLabel
	}
	return &Chart{name: "power", title: title, alt: p.alt(),
		width: powerScreen[0], height: powerScreen[1], draw: p.draw}, nil
}

// powerChart is a PowerInput with the numbers the chart derives from it.
type powerChart struct {
	r         assess.FlightResult
	site      string
	chemAtVmr float64 // P_chem(V_mr), W, on the drawn curve
	refMin    float64 // the reference's lowest mechanical power on its curve, W
}

// interpolate returns f along curve at speed v, linearly between points;
// the chart's tangent then touches the curve as drawn.
func interpolate(curve []assess.CurvePoint, v float64, f func(assess.CurvePoint) float64) float64 {
	for i := 1; i < len(curve); i++ {
		a, b := curve[i-1], curve[i]
		if v <= b.SpeedMS || i == len(curve)-1 {
			t := (v - a.SpeedMS) / (b.SpeedMS - a.SpeedMS)
			return f(a) + t*(f(b)-f(a))
		}
	}
	return f(curve[0])
}

// tangentSlope returns P_chem(V_mr)/V_mr, W per m/s: the slope of the line
// from the origin that touches the chemical power curve at V_mr.
func (p powerChart) tangentSlope() float64 { return p.chemAtVmr / p.r.MaxRangeSpeedMS }

// alt returns the text alternative.
func (p powerChart) alt() string {
	r := p.r
	var b strings.Builder
	b.WriteString("Power curve")
	if p.site != "" {
		b.WriteString(" at " + p.site)
	}
	fmt.Fprintf(&b, ". This bird: minimum-power speed V_mp %s m/s, needing %s W mechanical power;"+
		" maximum-range speed V_mr %s m/s, where the tangent from the origin touches the chemical power curve at %s W.",
		oneDecimal(r.MinPowerSpeedMS), sig3(r.MinPowerMechW), oneDecimal(r.MaxRangeSpeedMS), sig3(p.chemAtVmr))
	fmt.Fprintf(&b, " Healthy reference at the same site: %s W mechanical at its minimum.", sig3(p.refMin))
	fmt.Fprintf(&b, " Available power %s W, a power margin of %s (a healthy bird's here: %s).",
		sig3(r.AvailablePowerW), twoDecimals(r.PowerMargin), twoDecimals(r.ExpectedMarginSite))
	if w := r.SpeedWindowMS; w != nil {
		fmt.Fprintf(&b, " Speed window %s–%s m/s.", oneDecimal(w[0]), oneDecimal(w[1]))
	} else {
		b.WriteString(" No speed window: by this model the bird cannot sustain level flight here.")
	}
	b.WriteString(" " + modelNote)
	return b.String()
}

// twoDecimals formats a ratio to two decimals.
func twoDecimals(v float64) string { return fmt.Sprintf("%.2f", v) }

// powerStyles are the power chart's series styles: each line differs by
// dash pattern as well as colour.
type powerStyles struct {
	bird, ref, avail, tangent, marker draw.LineStyle
	window                            draw.LineStyle // the window's edges
	touch                             draw.GlyphStyle
}

// newPowerStyles returns the series styles for st.
func newPowerStyles(st Style) powerStyles {
	return powerStyles{
		bird:    lineStyle(blue, st.LineWidth),
		ref:     lineStyle(black, st.LineWidth*0.8, dashed...),
		avail:   lineStyle(vermillion, st.LineWidth, longDash...),
		tangent: lineStyle(black, st.ThinWidth*1.2, dotted...),
		marker:  lineStyle(darkGrey, st.ThinWidth),
		window:  lineStyle(skyBlue, st.ThinWidth),
		touch:   draw.GlyphStyle{Color: black, Radius: st.MarkerRadius, Shape: draw.RingGlyph{}},
	}
}

// modelNote is the power chart's footnote, from CAUTIONS.md ("Limits of the
// flight model"), so the chart carries it even when seen on its own.
const modelNote = "Model estimate, advisory only; people decide."

// windowFill is the tint of the speed window.
var windowFill = tint(skyBlue, 0.72)

// legend returns the chart's key.
func (p powerChart) legend(st Style) *legend {
	s := newPowerStyles(st)
	l := &legend{st: st}
	l.add("This bird", lineThumb(s.bird, nil))
	l.add("Healthy reference, same site", lineThumb(s.ref, nil))
	l.add("Available power "+sig3(p.r.AvailablePowerW)+" W", lineThumb(s.avail, nil))
	if w := p.r.SpeedWindowMS; w != nil {
		l.add(fmt.Sprintf("Speed window %s–%s m/s", oneDecimal(w[0]), oneDecimal(w[1])), boxThumb(windowFill, s.window))
	}
	l.add("Tangent from the origin", lineThumb(s.tangent, nil))
	l.add(modelNote, nil)
	return l
}

// curveXYs returns one power of a curve as plot points.
func curveXYs(curve []assess.CurvePoint, f func(assess.CurvePoint) float64) plotter.XYs {
	xys := make(plotter.XYs, len(curve))
	for i, c := range curve {
		xys[i] = plotter.XY{X: c.SpeedMS, Y: f(c)}
	}
	return xys
}

// mech and chem pick a curve point's mechanical and chemical power, W.
func mech(c assess.CurvePoint) float64 { return c.PowerMechW }
func chem(c assess.CurvePoint) float64 { return c.PowerChemW }

// draw draws the chart into c.
func (p powerChart) draw(c draw.Canvas, st Style) {
	fillWhite(c)
	leg := p.legend(st)
	caption := ""
	if p.site != "" {
		caption = "At " + p.site
	}
	pc, lc := layout(c, st, caption, leg)
	r, s := p.r, newPowerStyles(st)
	xmax := r.Curve[len(r.Curve)-1].SpeedMS
	top := newPlot(st, "", "Power (W)")
	bottom := newPlot(st, "Airspeed (m/s)", "Power (W)")
	top.Title.Text = "Mechanical power"
	bottom.Title.Text = "Chemical (fuel) power"
	for _, pl := range []*plot.Plot{top, bottom} {
		pl.X.Min, pl.X.Max = 0, xmax
		pl.Y.Min = 0
	}
	top.X.Tick.Marker = unlabelled{niceTicks{}}
	top.Y.Max = p.mechTop()
	bottom.Y.Max = p.chemTop()
	label := textStyle(st.FontSize, draw.XLeft, draw.YTop)
	if w := r.SpeedWindowMS; w != nil {
		top.Add(band{Lo: w[0], Hi: w[1], Vertical: true, Fill: windowFill, Edge: s.window})
	}
	top.Add(vLine{X: r.MinPowerSpeedMS, LineStyle: s.marker})
	top.Add(hLine{Y: r.AvailablePowerW, LineStyle: s.avail})
	top.Add(&plotter.Line{XYs: curveXYs(r.ReferenceCurve, mech), LineStyle: s.ref})
	top.Add(&plotter.Line{XYs: curveXYs(r.Curve, mech), LineStyle: s.bird})
	top.Add(note{X: r.MinPowerSpeedMS, Y: top.Y.Max, Text: "Vmp " + oneDecimal(r.MinPowerSpeedMS) + " m/s",
		Style: label, Offs: vg.Point{X: st.FontSize / 4, Y: -st.FontSize / 4}})
	bottom.Add(vLine{X: r.MaxRangeSpeedMS, LineStyle: s.marker})
	bottom.Add(&plotter.Line{XYs: plotter.XYs{{X: 0, Y: 0}, {X: xmax, Y: p.tangentSlope() * xmax}}, LineStyle: s.tangent})
	bottom.Add(&plotter.Line{XYs: curveXYs(r.Curve, chem), LineStyle: s.bird})
	bottom.Add(&plotter.Scatter{XYs: plotter.XYs{{X: r.MaxRangeSpeedMS, Y: p.chemAtVmr}}, GlyphStyle: s.touch})
	bottom.Add(note{X: r.MaxRangeSpeedMS, Y: bottom.Y.Max, Text: "Vmr " + oneDecimal(r.MaxRangeSpeedMS) + " m/s",
		Style: label, Offs: vg.Point{X: st.FontSize / 4, Y: -st.FontSize / 4}})
	drawStack(pc, st, top, bottom)
	leg.draw(lc)
}

// mechTop returns the top of the mechanical panel: room for the available
// power and both curves' minima with their rise on either side, cutting off
// the steep climb towards hovering, which would flatten the rest.
func (p powerChart) mechTop() float64 {
	r := p.r
	last := len(r.Curve) - 1
	top := max(r.AvailablePowerW*1.25, r.MinPowerMechW*2, p.refMin*2,
		r.Curve[last].PowerMechW*1.05, r.ReferenceCurve[last].PowerMechW*1.05)
	return min(top, max(r.Curve[0].PowerMechW, r.ReferenceCurve[0].PowerMechW, r.AvailablePowerW)*1.05)
}

// chemTop returns the top of the chemical panel.
func (p powerChart) chemTop() float64 {
	r := p.r
	last := len(r.Curve) - 1
	top := max(p.chemAtVmr*1.6, r.Curve[last].PowerChemW*1.05)
	return min(top, r.Curve[0].PowerChemW*1.05)
}

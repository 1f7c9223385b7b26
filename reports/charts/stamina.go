package charts

import (
	"fmt"
	"slices"
	"strings"
	"time"

	"aloft/assess"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// StaminaInput is what the stamina chart shows: the flight sessions and the
// target of unbroken passes where the centre has one.
type StaminaInput struct {
	// Sessions are the flight sessions, in any order; at least one. Dates
	// are shown in the location of the first one's At.
	Sessions []assess.FlightSession
	// TargetPasses is the unbroken passes wanted before release review
	// (Species.MinPasses or the centre's setting); nil = none.
	TargetPasses *int
}

// staminaScreen is the stamina chart's design size, points.
var staminaScreen = [2]vg.Length{360, 420}

// Stamina returns the flight-stamina chart in two panels on one date axis:
// passes and the longest unbroken run per session above, with the target as
// a dotted line; breathing recovery time after the session below.
func Stamina(in StaminaInput) (*Chart, error) {
	if len(in.Sessions) == 0 {
		return nil, fmt.Errorf("charts: stamina chart: no sessions: %w", ErrNoData)
	}
	ss := slices.Clone(in.Sessions)
	slices.SortStableFunc(ss, func(a, b assess.FlightSession) int { return a.At.Compare(b.At) })
	s := staminaChart{ss: ss, target: in.TargetPasses, loc: ss[0].At.Location()}
	return &Chart{name: "stamina", title: "Flight sessions: passes and breathing recovery", alt: s.alt(),
		width: staminaScreen[0], height: staminaScreen[1], draw: s.draw}, nil
}

// staminaChart is a StaminaInput with its sessions in time order.
type staminaChart struct {
	ss     []assess.FlightSession
	target *int
	loc    *time.Location
}

// alt returns the text alternative.
func (s staminaChart) alt() string {
	last := s.ss[len(s.ss)-1]
	var b strings.Builder
	fmt.Fprintf(&b, "%s", plural(len(s.ss), "flight session", "flight sessions"))
	if len(s.ss) > 1 {
		fmt.Fprintf(&b, " from %s to %s", isoDate(s.ss[0].At.In(s.loc)), isoDate(last.At.In(s.loc)))
	} else {
		fmt.Fprintf(&b, " on %s", isoDate(last.At.In(s.loc)))
	}
	fmt.Fprintf(&b, ". Latest: %s, longest unbroken run %d, breathing recovery %s.",
		plural(last.Passes, "pass", "passes"), last.LongestRun, recoveryWords(last.RecoveryS))
	best := s.ss[0]
	for _, x := range s.ss {
		if x.LongestRun > best.LongestRun {
			best = x
		}
	}
	if len(s.ss) > 1 {
		fmt.Fprintf(&b, " Longest unbroken run so far %d on %s.", best.LongestRun, isoDate(best.At.In(s.loc)))
	}
	if s.target != nil {
		fmt.Fprintf(&b, " Target %s.", plural(*s.target, "unbroken pass", "unbroken passes"))
	}
	return b.String()
}

func recoveryWords(r *int) string {
	if r == nil {
		return "not timed"
	}
	return fmt.Sprintf("%d s", *r)
}

// staminaStyles returns the stamina chart's series styles.
func staminaStyles(st Style) (passes, run, target, recovery draw.LineStyle, gp, gr, grec draw.GlyphStyle) {
	passes = lineStyle(blue, st.LineWidth)
	run = lineStyle(vermillion, st.LineWidth, dashed...)
	target = lineStyle(black, st.ThinWidth*1.5, dotted...)
	recovery = lineStyle(bluishGreen, st.LineWidth)
	gp = draw.GlyphStyle{Color: blue, Radius: st.MarkerRadius, Shape: draw.CircleGlyph{}}
	gr = draw.GlyphStyle{Color: vermillion, Radius: st.MarkerRadius * 1.15, Shape: draw.PyramidGlyph{}}
	grec = draw.GlyphStyle{Color: bluishGreen, Radius: st.MarkerRadius, Shape: draw.BoxGlyph{}}
	return
}

// legend returns the chart's key.
func (s staminaChart) legend(st Style) *legend {
	passes, run, target, recovery, gp, gr, grec := staminaStyles(st)
	l := &legend{st: st}
	l.add("Passes", lineThumb(passes, &gp))
	l.add("Longest unbroken run", lineThumb(run, &gr))
	if s.target != nil {
		l.add(fmt.Sprintf("Target: %d unbroken", *s.target), lineThumb(target, nil))
	}
	l.add("Breathing recovery", lineThumb(recovery, &grec))
	return l
}

// draw draws the chart into c.
func (s staminaChart) draw(c draw.Canvas, st Style) {
	fillWhite(c)
	leg := s.legend(st)
	last := s.ss[len(s.ss)-1]
	caption := fmt.Sprintf("Latest (%s): %s, run %d, recovery %s", last.At.In(s.loc).Format("2 Jan"),
		plural(last.Passes, "pass", "passes"), last.LongestRun, recoveryWords(last.RecoveryS))
	pc, lc := layout(c, st, caption, leg)
	passes, run, target, recovery, gp, gr, grec := staminaStyles(st)
	r := markerFor(st, pc.Max.X-pc.Min.X, len(s.ss))
	gp.Radius, gr.Radius, grec.Radius = r, r*1.15, r
	ts := make([]time.Time, len(s.ss))
	var pXY, rXY, recXY plotter.XYs
	maxY, maxRec := 5.0, 60.0 // scales for few or no data
	for i, x := range s.ss {
		ts[i] = x.At
		v := float64(x.At.Unix())
		pXY = append(pXY, plotter.XY{X: v, Y: float64(x.Passes)})
		rXY = append(rXY, plotter.XY{X: v, Y: float64(x.LongestRun)})
		maxY = max(maxY, float64(x.Passes))
		if x.RecoveryS != nil {
			recXY = append(recXY, plotter.XY{X: v, Y: float64(*x.RecoveryS)})
			maxRec = max(maxRec, float64(*x.RecoveryS))
		}
	}
	xlo, xhi := timeRange(ts, time.Time{})
	top := newPlot(st, "", "Passes (lengths)")
	bottom := newPlot(st, dateLabel(unixTime(xlo, s.loc), unixTime(xhi, s.loc)), "Recovery (s)")
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = xlo, xhi
		p.X.Tick.Marker = dayTicks{Loc: s.loc, Max: maxDateLabels(c, st)}
		p.Y.Min = 0
	}
	top.X.Tick.Marker = unlabelled{top.X.Tick.Marker}
	if s.target != nil {
		maxY = max(maxY, float64(*s.target))
		top.Add(hLine{Y: float64(*s.target), LineStyle: target})
	}
	top.Y.Max = maxY * 1.1
	top.Y.Tick.Marker = niceTicks{Integer: true}
	bottom.Y.Tick.Marker = niceTicks{Integer: true}
	top.Add(&plotter.Line{XYs: pXY, LineStyle: passes}, &plotter.Scatter{XYs: pXY, GlyphStyle: gp})
	top.Add(&plotter.Line{XYs: rXY, LineStyle: run}, &plotter.Scatter{XYs: rXY, GlyphStyle: gr})
	bottom.Y.Max = maxRec * 1.15
	if len(recXY) > 0 {
		bottom.Add(&plotter.Line{XYs: recXY, LineStyle: recovery}, &plotter.Scatter{XYs: recXY, GlyphStyle: grec})
	} else {
		bottom.Add(note{X: (xlo + xhi) / 2, Y: maxRec / 2, Text: "No recovery times recorded",
			Style: textStyle(st.FontSize, draw.XCenter, draw.YCenter)})
	}
	drawStack(pc, st, top, bottom)
	leg.draw(lc)
}

// drawStack draws plots stacked top to bottom in c with their data areas
// aligned, so a shared x-axis lines up.
func drawStack(c draw.Canvas, st Style, plots ...*plot.Plot) {
	rows := make([][]*plot.Plot, len(plots))
	for i, p := range plots {
		rows[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadY: st.FontSize / 2, PadTop: st.FontSize / 3, PadRight: st.FontSize / 2}
	cs := plot.Align(rows, tiles, c)
	for i, p := range plots {
		p.Draw(cs[i][0])
	}
}

// unlabelled keeps a ticker's tick marks and drops their labels, for the
// upper of stacked panels sharing an x-axis.
type unlabelled struct{ plot.Ticker }

// Ticks implements plot.Ticker.
func (u unlabelled) Ticks(lo, hi float64) []plot.Tick {
	ts := u.Ticker.Ticks(lo, hi)
	for i := range ts {
		ts[i].Label = ""
	}
	return ts
}

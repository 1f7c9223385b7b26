package charts

import (
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The small plotters below draw reference marks across a plot's data area.
// None is a DataRanger: each chart sets its axis ranges itself.

// hLine is a horizontal line at Y across the data area.
type hLine struct {
	Y float64
	draw.LineStyle
}

// Plot implements plot.Plotter.
func (l hLine) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	y := trY(l.Y)
	if y < c.Min.Y || y > c.Max.Y {
		return
	}
	c.StrokeLine2(l.LineStyle, c.Min.X, y, c.Max.X, y)
}

// vLine is a vertical line at X across the data area.
type vLine struct {
	X float64
	draw.LineStyle
}

// Plot implements plot.Plotter.
func (l vLine) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x := trX(l.X)
	if x < c.Min.X || x > c.Max.X {
		return
	}
	c.StrokeLine2(l.LineStyle, x, c.Min.Y, x, c.Max.Y)
}

// band is a filled rectangle: between Lo and Hi on the y-axis across the
// whole width (Vertical false), or between Lo and Hi on the x-axis across
// the whole height (Vertical true). Edges are stroked when Edge has a width.
type band struct {
	Lo, Hi   float64
	Vertical bool
	Fill     color.Color
	Edge     draw.LineStyle
}

// Plot implements plot.Plotter.
func (b band) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	r := c.Rectangle
	if b.Vertical {
		r.Min.X, r.Max.X = max(trX(b.Lo), c.Min.X), min(trX(b.Hi), c.Max.X)
	} else {
		r.Min.Y, r.Max.Y = max(trY(b.Lo), c.Min.Y), min(trY(b.Hi), c.Max.Y)
	}
	if r.Min.X >= r.Max.X || r.Min.Y >= r.Max.Y {
		return
	}
	c.SetColor(b.Fill)
	c.Fill(r.Path())
	if b.Edge.Width <= 0 {
		return
	}
	if b.Vertical {
		c.StrokeLine2(b.Edge, r.Min.X, r.Min.Y, r.Min.X, r.Max.Y)
		c.StrokeLine2(b.Edge, r.Max.X, r.Min.Y, r.Max.X, r.Max.Y)
		return
	}
	c.StrokeLine2(b.Edge, r.Min.X, r.Min.Y, r.Max.X, r.Min.Y)
	c.StrokeLine2(b.Edge, r.Min.X, r.Max.Y, r.Max.X, r.Max.Y)
}

// note is text at a point of the data area. X and Y are data values; a
// Y above the axis maximum pins the text to the top of the data area, and
// text that would run past the right edge moves left. The text gets a white
// backing so lines behind it do not cross it.
type note struct {
	X, Y  float64
	Text  string
	Style text.Style
	Offs  vg.Point
}

// Plot implements plot.Plotter.
func (n note) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := vg.Point{X: trX(n.X), Y: min(trY(n.Y), c.Max.Y)}.Add(n.Offs)
	r := n.Style.Rectangle(n.Text).Add(pt)
	if over := r.Max.X - c.Max.X; over > 0 { // keep it inside the data area
		pt.X -= over
		r = n.Style.Rectangle(n.Text).Add(pt)
	}
	pad := n.Style.Font.Size / 6
	r.Min = r.Min.Sub(vg.Point{X: pad, Y: 0})
	r.Max = r.Max.Add(vg.Point{X: pad, Y: 0})
	c.SetColor(white)
	c.Fill(r.Path())
	c.FillText(n.Style, pt, n.Text)
}

// hollowCircle is a circle marker filled white and outlined: a data point
// of a second kind on the same line as filled ones.
type hollowCircle struct{ Width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g hollowCircle) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*3.141592653589793)
	p.Close()
	c.SetColor(white)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.Width})
	c.Stroke(p)
}

// niceTicks labels a value axis at round steps (1, 2, 2.5 or 5 times a
// power of ten) with at most five labels and no minor ticks: few labels
// stay legible on a phone. Integer axes (counts, seconds) never step below 1.
type niceTicks struct{ Integer bool }

// Ticks implements plot.Ticker.
func (t niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return []plot.Tick{{Value: lo, Label: strconv.FormatFloat(lo, 'f', -1, 64)}}
	}
	step, decimals := niceStep((hi - lo) / 5)
	if t.Integer && step < 1 {
		step, decimals = 1, 0
	}
	var ts []plot.Tick
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi+step*1e-9; k++ {
		v := k * step
		if v == 0 {
			v = 0 // not -0, which would print as "-0"
		}
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', decimals, 64)})
	}
	return ts
}

// niceStep returns the least round step not below raw, and the decimals
// its labels need.
func niceStep(raw float64) (step float64, decimals int) {
	mag := math.Floor(math.Log10(raw))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		step = m * math.Pow(10, mag)
		if step >= raw*(1-1e-9) {
			decimals = max(0, int(-mag))
			if m == 2.5 {
				decimals++
			}
			return step, decimals
		}
	}
	return step, 0
}

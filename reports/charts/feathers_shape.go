package charts

import (
	"image/color"
	"math"

	"aloft/assess"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// featherLook is how one feather state is drawn.
type featherLook struct {
	fill   color.Color // nil: outline only
	edge   draw.LineStyle
	letter string // under the tip; "" for intact
	length float64
	width  float64 // fractions of a whole feather's
	cut    bool    // a jagged end instead of a rounded tip
	bars   bool    // stress bars across the vane
	splice bool    // imped: the join across the shaft
}

// lookOf returns the look of state s.
func lookOf(s assess.FeatherStatus, st Style) featherLook {
	edge := lineStyle(darkGrey, st.ThinWidth*0.8)
	l := featherLook{fill: tint(skyBlue, 0.55), edge: edge, length: 1, width: 1}
	switch s {
	case assess.FeatherIntact:
	case assess.FeatherMissing:
		l.fill, l.letter = nil, "M"
		l.edge = lineStyle(darkGrey, st.ThinWidth, 3, 2)
	case assess.FeatherBroken:
		l.fill, l.letter, l.length, l.cut = vermillion, "B", 0.55, true
	case assess.FeatherPin:
		l.fill, l.letter, l.length, l.width = reddishPurple, "G", 0.6, 0.5
	case assess.FeatherImped:
		l.fill, l.letter, l.splice = blue, "I", true
	case assess.FeatherFrayed:
		l.fill, l.letter = yellow, "F"
	case assess.FeatherStressBars:
		l.fill, l.letter, l.bars = orange, "S", true
	default: // not recorded, or a state this chart does not know
		l.fill, l.letter = nil, "?"
		l.edge = lineStyle(lightGrey, st.ThinWidth, 1, 2)
	}
	return l
}

// featherThumb draws a state's look as a small swatch.
func featherThumb(lk featherLook) func(c draw.Canvas) {
	return func(c draw.Canvas) {
		h := c.Max.Y - c.Min.Y
		x := c.Center().X
		r := vg.Rectangle{Min: vg.Point{X: x - h*0.45*vg.Length(lk.width), Y: c.Min.Y + 1}, Max: vg.Point{X: x + h*0.45*vg.Length(lk.width), Y: c.Max.Y - 1}}
		if lk.fill != nil {
			c.SetColor(lk.fill)
			c.Fill(r.Path())
		}
		c.SetLineStyle(lk.edge)
		c.Stroke(r.Path())
	}
}

// drawFeather draws one feather hanging from (x, y0), w wide and l long:
// a narrow quill widening into the vane, a rounded tip (or a jagged end),
// and the shaft down the middle.
func drawFeather(c draw.Canvas, st Style, lk featherLook, x, y0, w, l vg.Length) {
	hw := w / 2
	shoulder := y0 - min(l*0.2, w*1.2)
	end := y0 - l
	var p vg.Path
	p.Move(vg.Point{X: x - w*0.12, Y: y0})
	p.Line(vg.Point{X: x - hw, Y: shoulder})
	if lk.cut {
		p.Line(vg.Point{X: x - hw, Y: end})
		p.Line(vg.Point{X: x - hw/2, Y: end + hw*0.8})
		p.Line(vg.Point{X: x, Y: end})
		p.Line(vg.Point{X: x + hw/2, Y: end + hw*0.8})
		p.Line(vg.Point{X: x + hw, Y: end})
	} else {
		tip := min(end+hw, shoulder)
		p.Line(vg.Point{X: x - hw, Y: tip})
		p.Arc(vg.Point{X: x, Y: tip}, hw, math.Pi, math.Pi)
	}
	p.Line(vg.Point{X: x + hw, Y: shoulder})
	p.Line(vg.Point{X: x + w*0.12, Y: y0})
	p.Close()
	if lk.fill != nil {
		c.SetColor(lk.fill)
		c.Fill(p)
		c.StrokeLine2(lineStyle(darkGrey, st.ThinWidth*0.6), x, y0, x, end+hw)
	}
	if lk.splice {
		c.StrokeLine2(lineStyle(white, st.ThinWidth*2), x-hw, y0-l*0.45, x+hw, y0-l*0.45)
	}
	if lk.bars {
		for _, f := range []vg.Length{0.4, 0.58, 0.76} {
			c.StrokeLine2(lineStyle(black, st.ThinWidth*0.8), x-hw, y0-l*f, x+hw, y0-l*f)
		}
	}
	c.SetLineStyle(lk.edge)
	c.Stroke(p)
}

package pdfcanvas

import (
	"math"

	"gonum.org/v1/plot/vg"
)

// affine is a 2-D affine transform: (x, y) ↦ (a·x + c·y + e, b·x + d·y + f).
type affine struct{ a, b, c, d, e, f float64 }

var identity = affine{a: 1, d: 1}

// apply maps a point.
func (m affine) apply(x, y float64) (float64, float64) {
	return m.a*x + m.c*y + m.e, m.b*x + m.d*y + m.f
}

// translate returns m after a translation by (tx, ty): the translation
// applies first, as vg.Canvas's transforms do.
func (m affine) translate(tx, ty float64) affine {
	m.e, m.f = m.a*tx+m.c*ty+m.e, m.b*tx+m.d*ty+m.f
	return m
}

// scale returns m after a scaling by (sx, sy).
func (m affine) scale(sx, sy float64) affine {
	m.a, m.b, m.c, m.d = m.a*sx, m.b*sx, m.c*sy, m.d*sy
	return m
}

// rotate returns m after a rotation by rad, counter-clockwise.
func (m affine) rotate(rad float64) affine {
	s, co := math.Sincos(rad)
	return affine{a: m.a*co + m.c*s, b: m.b*co + m.d*s, c: -m.a*s + m.c*co, d: -m.b*s + m.d*co, e: m.e, f: m.f}
}

// scaleFactor is the transform's mean scale, √|det|: how much it grows a
// line width or a font size.
func (m affine) scaleFactor() float64 { return math.Sqrt(math.Abs(m.a*m.d - m.b*m.c)) }

// path adds p to the document's current path under the current transform,
// arcs as cubic Bézier curves, and reports whether there was anything to
// draw.
func (c *Canvas) path(p vg.Path) bool {
	m := c.top().m
	pt := func(q vg.Point) (float64, float64) { return c.page(m.apply(q.X.Points(), q.Y.Points())) }
	open, drew := false, false
	for _, comp := range p {
		switch comp.Type {
		case vg.MoveComp:
			c.pdf.MoveTo(pt(comp.Pos))
			open = true
		case vg.LineComp:
			x, y := pt(comp.Pos)
			if !open {
				c.pdf.MoveTo(x, y)
				open = true
				continue
			}
			c.pdf.LineTo(x, y)
			drew = true
		case vg.ArcComp:
			x0, y0 := arcPoint(comp, comp.Start)
			x, y := pt(vg.Point{X: vg.Length(x0), Y: vg.Length(y0)})
			if open {
				c.pdf.LineTo(x, y)
			} else {
				c.pdf.MoveTo(x, y)
				open = true
			}
			c.arc(comp, pt)
			drew = true
		case vg.CurveComp:
			ex, ey := pt(comp.Pos)
			switch len(comp.Control) {
			case 1:
				cx, cy := pt(comp.Control[0])
				c.pdf.CurveTo(cx, cy, ex, ey)
			case 2:
				c1x, c1y := pt(comp.Control[0])
				c2x, c2y := pt(comp.Control[1])
				c.pdf.CurveBezierCubicTo(c1x, c1y, c2x, c2y, ex, ey)
			default:
				c.pdf.LineTo(ex, ey)
			}
			drew = true
		case vg.CloseComp:
			if open {
				c.pdf.ClosePath() // the current point returns to (sx, sy)
			}
		}
	}
	return drew
}

// arcPoint returns the point of an arc component at angle a, in points.
func arcPoint(comp vg.PathComp, a float64) (x, y float64) {
	r := comp.Radius.Points()
	return comp.Pos.X.Points() + r*math.Cos(a), comp.Pos.Y.Points() + r*math.Sin(a)
}

// arc adds an arc as cubic Bézier segments of at most a quarter turn each;
// the path is already at its start. Control points lie at 4/3·tan(θ/4)
// radii along the tangents, the standard circle approximation (error
// below 0.03 % of the radius for a quarter turn).
func (c *Canvas) arc(comp vg.PathComp, pt func(vg.Point) (float64, float64)) {
	n := max(1, int(math.Ceil(math.Abs(comp.Angle)/(math.Pi/2)-1e-9)))
	step := comp.Angle / float64(n)
	k := 4.0 / 3 * math.Tan(step/4) * comp.Radius.Points()
	for i := range n {
		a0 := comp.Start + float64(i)*step
		a1 := a0 + step
		x0, y0 := arcPoint(comp, a0)
		x1, y1 := arcPoint(comp, a1)
		c1 := vg.Point{X: vg.Length(x0 - k*math.Sin(a0)), Y: vg.Length(y0 + k*math.Cos(a0))}
		c2 := vg.Point{X: vg.Length(x1 + k*math.Sin(a1)), Y: vg.Length(y1 - k*math.Cos(a1))}
		c1x, c1y := pt(c1)
		c2x, c2y := pt(c2)
		ex, ey := pt(vg.Point{X: vg.Length(x1), Y: vg.Length(y1)})
		c.pdf.CurveBezierCubicTo(c1x, c1y, c2x, c2y, ex, ey)
	}
}

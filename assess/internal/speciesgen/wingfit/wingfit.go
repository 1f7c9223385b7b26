// Package wingfit estimates a bird's wingspan and wing area from its body
// mass and wing chord when neither was measured, by ordinary least squares on
// logarithms within the bird's group, and measures the estimate's error on
// species held out of the fit.
//
// The model, fitted separately for span b (mm) and area S (cm²):
//
//	ln y = β0 + β1·ln m + β2·ln c
//
// with m the body mass (g) and c the unflattened wing chord (mm, AVONET's
// Wing.Length). A group with fewer than MinPoints measured species borrows the
// fit of its fallback pool (the AVONET order, then all measured species) and
// shifts its intercept by the mean residual of its own measured species,
// shrunk towards zero by n/(n+1) (n of them): a few birds of the group tell
// how it departs from the pool without being trusted alone.
// Power laws of span and area on mass are the standard allometric form
// (e.g. Alerstam et al. 2007, PLoS Biol. 5:e197, span ∝ m^0.39 among
// migrants); adding the chord carries the shape of the wing within a group.
//
// It is used by the species generator (estimates for the table) and by the
// assess tests (the hold-out check); it imports nothing of Aloft's.
package wingfit

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
)

// MinPoints is the fewest measured species a pool needs for its own fit
// (three coefficients plus a margin) [project default].
const MinPoints = 15

// Point is one species.
type Point struct {
	Name     string  // scientific name, for messages
	Group    string  // the species group (first pool)
	Order    string  // the AVONET order (fallback pool)
	MassG    float64 // body mass, g (> 0)
	ChordMM  float64 // unflattened wing chord, mm (> 0)
	SpanMM   float64 // measured wingspan tip to tip, mm; 0 = not measured
	AreaCM2  float64 // measured wing area with the body strip, cm²; 0 = not measured
	Measured bool    // span and area are both measured
}

// Coef is one fitted log-linear model.
type Coef struct {
	B0, BMass, BChord float64
	N                 int    // points in the fit
	Pool              string // "group:NAME", "order:NAME" or "all"
}

// Eval returns exp(B0 + BMass·ln m + BChord·ln c).
func (c Coef) Eval(massG, chordMM float64) float64 {
	return math.Exp(c.B0 + c.BMass*math.Log(massG) + c.BChord*math.Log(chordMM))
}

// Estimate is the span and area estimated for one species, with the pools used.
type Estimate struct {
	SpanMM, AreaCM2 float64
	Span, Area      Coef
	// SpanOffset and AreaOffset are the group's shrunk mean residuals added
	// to ln y when the group borrows a pool (0 otherwise).
	SpanOffset, AreaOffset float64
	OffsetN                int // the group's measured species behind the offsets
}

// Model holds the fits of every pool, built from measured points.
type Model struct {
	span, area map[string]Coef
	groupPts   map[string][]Point // measured points per group
}

// ErrTooFew is returned when not even all points together reach MinPoints.
var ErrTooFew = errors.New("wingfit: too few measured species to fit")

// Fit fits span and area models for every group and order pool with at least
// MinPoints measured points, and one over all measured points.
func Fit(points []Point) (*Model, error) {
	m := &Model{span: map[string]Coef{}, area: map[string]Coef{}, groupPts: map[string][]Point{}}
	pools := map[string][]Point{}
	for _, p := range points {
		if !p.Measured {
			continue
		}
		pools["group:"+p.Group] = append(pools["group:"+p.Group], p)
		m.groupPts[p.Group] = append(m.groupPts[p.Group], p)
		pools["order:"+p.Order] = append(pools["order:"+p.Order], p)
		pools["all"] = append(pools["all"], p)
	}
	if len(pools["all"]) < MinPoints {
		return nil, ErrTooFew
	}
	for key, ps := range pools {
		if len(ps) < MinPoints {
			continue
		}
		s, err := ols(ps, func(p Point) float64 { return p.SpanMM })
		if err != nil {
			return nil, fmt.Errorf("wingfit: span, %s: %w", key, err)
		}
		a, err := ols(ps, func(p Point) float64 { return p.AreaCM2 })
		if err != nil {
			return nil, fmt.Errorf("wingfit: area, %s: %w", key, err)
		}
		s.Pool, a.Pool = key, key
		m.span[key], m.area[key] = s, a
	}
	return m, nil
}

// Estimate returns p's span and area from the first pool that has a fit:
// its group, its order, then all.
func (m *Model) Estimate(p Point) Estimate {
	var e Estimate
	for _, key := range []string{"group:" + p.Group, "order:" + p.Order, "all"} {
		if c, ok := m.span[key]; ok {
			e.Span, e.Area = c, m.area[key]
			break
		}
	}
	if e.Span.Pool != "group:"+p.Group {
		var rs, ra float64
		gp := m.groupPts[p.Group]
		for _, q := range gp {
			rs += math.Log(q.SpanMM / e.Span.Eval(q.MassG, q.ChordMM))
			ra += math.Log(q.AreaCM2 / e.Area.Eval(q.MassG, q.ChordMM))
		}
		n := float64(len(gp))
		e.SpanOffset, e.AreaOffset, e.OffsetN = rs/(n+1), ra/(n+1), len(gp)
	}
	e.SpanMM = e.Span.Eval(p.MassG, p.ChordMM) * math.Exp(e.SpanOffset)
	e.AreaCM2 = e.Area.Eval(p.MassG, p.ChordMM) * math.Exp(e.AreaOffset)
	return e
}

// HoldOut is the result of leave-one-out validation.
type HoldOut struct {
	N                      int       // measured species tested
	SpanErrors, AreaErrors []float64 // |estimate/measured − 1| per species, sorted
	MedianSpan, MedianArea float64   // median absolute relative error
}

// LeaveOneOut fits the model once per measured point with that point left
// out, estimates the point, and reports the absolute relative errors.
func LeaveOneOut(points []Point) (HoldOut, error) {
	var h HoldOut
	rest := make([]Point, 0, len(points))
	for i, p := range points {
		if !p.Measured {
			continue
		}
		rest = rest[:0]
		rest = append(rest, points[:i]...)
		rest = append(rest, points[i+1:]...)
		m, err := Fit(rest)
		if err != nil {
			return h, err
		}
		e := m.Estimate(p)
		h.SpanErrors = append(h.SpanErrors, math.Abs(e.SpanMM/p.SpanMM-1))
		h.AreaErrors = append(h.AreaErrors, math.Abs(e.AreaCM2/p.AreaCM2-1))
	}
	h.N = len(h.SpanErrors)
	if h.N == 0 {
		return h, ErrTooFew
	}
	sort.Float64s(h.SpanErrors)
	sort.Float64s(h.AreaErrors)
	h.MedianSpan, h.MedianArea = median(h.SpanErrors), median(h.AreaErrors)
	return h, nil
}

func median(sorted []float64) float64 {
	n := len(sorted)
	if n%2 == 1 {
		return sorted[n/2]
	}
	return (sorted[n/2-1] + sorted[n/2]) / 2
}

// ols fits ln y = b0 + b1 ln m + b2 ln c by the normal equations.
func ols(ps []Point, y func(Point) float64) (Coef, error) {
	var xtx [3][3]float64
	var xty [3]float64
	for _, p := range ps {
		x := [3]float64{1, math.Log(p.MassG), math.Log(p.ChordMM)}
		ly := math.Log(y(p))
		for i := range 3 {
			for j := range 3 {
				xtx[i][j] += x[i] * x[j]
			}
			xty[i] += x[i] * ly
		}
	}
	b, err := solve3(xtx, xty)
	if err != nil {
		return Coef{}, err
	}
	return Coef{B0: b[0], BMass: b[1], BChord: b[2], N: len(ps)}, nil
}

// solve3 solves a 3×3 system by Gaussian elimination with partial pivoting.
func solve3(a [3][3]float64, b [3]float64) ([3]float64, error) {
	for col := range 3 {
		piv := col
		for r := col + 1; r < 3; r++ {
			if math.Abs(a[r][col]) > math.Abs(a[piv][col]) {
				piv = r
			}
		}
		if math.Abs(a[piv][col]) < 1e-12 {
			return b, errors.New("singular system")
		}
		a[col], a[piv] = a[piv], a[col]
		b[col], b[piv] = b[piv], b[col]
		for r := col + 1; r < 3; r++ {
			f := a[r][col] / a[col][col]
			for k := col; k < 3; k++ {
				a[r][k] -= f * a[col][k]
			}
			b[r] -= f * b[col]
		}
	}
	var x [3]float64
	for r := 2; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < 3; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, nil
}

// Pools lists the pools that have their own fit, sorted.
func (m *Model) Pools() []string {
	var ks []string
	for k := range m.span {
		ks = append(ks, k)
	}
	slices.Sort(ks)
	return ks
}

// Span returns the span fit of pool key.
func (m *Model) Span(key string) (Coef, bool) { c, ok := m.span[key]; return c, ok }

// Area returns the area fit of pool key.
func (m *Model) Area(key string) (Coef, bool) { c, ok := m.area[key]; return c, ok }

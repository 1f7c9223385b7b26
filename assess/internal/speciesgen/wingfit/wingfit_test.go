package wingfit

import (
	"errors"
	"fmt"
	"math"
	"testing"
)

// powerLaw makes n measured points of one group on y = k·m^a·c^b exactly
// (span) and 0.5·y^1.6 (area) [derived test data, no outside source].
func powerLaw(group, order string, n int, offset float64) []Point {
	var ps []Point
	for i := range n {
		m := 10 * math.Pow(1.7, float64(i))
		c := 60 * math.Pow(1.3, float64(i)) * (1 + 0.05*float64(i%3)) // not collinear with m
		span := 8 * math.Pow(m, 0.1) * math.Pow(c, 0.8) * math.Exp(offset)
		ps = append(ps, Point{Name: fmt.Sprintf("%s %d", group, i), Group: group, Order: order,
			MassG: m, ChordMM: c, SpanMM: span, AreaCM2: 0.5 * math.Pow(span, 1.6) * math.Exp(offset), Measured: true})
	}
	return ps
}

func TestFit_RecoversPowerLaw(t *testing.T) {
	m, err := Fit(powerLaw("g", "O", 20, 0))
	if err != nil {
		t.Fatal(err)
	}
	c, ok := m.Span("group:g")
	// derived: ln span = ln 8 + 0.1 ln m + 0.8 ln c; tolerance 1e-9.
	if !ok || math.Abs(c.B0-math.Log(8)) > 1e-9 || math.Abs(c.BMass-0.1) > 1e-9 || math.Abs(c.BChord-0.8) > 1e-9 {
		t.Errorf("span fit got %+v, want b0 %g, 0.1, 0.8", c, math.Log(8))
	}
	h, err := LeaveOneOut(powerLaw("g", "O", 20, 0))
	if err != nil || h.N != 20 || h.MedianSpan > 1e-9 || h.MedianArea > 1e-9 {
		t.Errorf("LeaveOneOut on exact data got %+v, %v; want 20 points, zero error", h, err)
	}
}

func TestModel_Estimate_Fallback(t *testing.T) {
	// 20 points of group "big" and 3 of group "small" whose spans are e^0.2
	// larger: "small" borrows the order's fit plus 3/4 of its mean residual.
	pts := append(powerLaw("big", "O", 20, 0), powerLaw("small", "O", 3, 0.2)...)
	m, err := Fit(pts)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name     string
		group    string
		wantPool string
	}{
		{"own fit", "big", "group:big"},
		{"borrows order, shrunk offset", "small", "order:O"},
		{"unknown group borrows order", "none", "order:O"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			e := m.Estimate(Point{Group: tc.group, Order: "O", MassG: 50, ChordMM: 100})
			if e.Span.Pool != tc.wantPool {
				t.Errorf("pool got %s, want %s", e.Span.Pool, tc.wantPool)
			}
			if tc.group == "small" && (e.OffsetN != 3 || e.SpanOffset <= 0 || e.SpanOffset >= 0.2) {
				t.Errorf("offset got %g from %d points, want between 0 and 0.2 from 3", e.SpanOffset, e.OffsetN)
			}
		})
	}
}

func TestFit_ErrTooFew(t *testing.T) {
	if _, err := Fit(powerLaw("g", "O", MinPoints-1, 0)); !errors.Is(err, ErrTooFew) {
		t.Errorf("Fit with %d points got %v, want ErrTooFew", MinPoints-1, err)
	}
}

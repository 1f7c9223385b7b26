package assess

import (
	"math"
	"testing"
)

func newTestBird(t *testing.T, massKg, spanM, areaM2 float64) Bird {
	t.Helper()
	b, err := NewBird(Body{MassKg: massKg, SpanM: spanM, AreaM2: areaM2}, SeaLevelDensityKgM3, defaultParams())
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// shapeBirds span small to large birds and aspect ratios 3 to 15.
var shapeBirds = []struct {
	name                  string
	massKg, spanM, areaM2 float64
}{
	{"Pinned", 0.1, 0.4, 0.03},
	{"Wren", 0.01, 0.15, 0.0075},       // AR 3
	{"Swift", 0.038, 0.40, 0.0168},     // AR 9.5
	{"Buzzard", 0.9, 1.2, 0.25},        // AR 5.8
	{"Albatross", 8.5, 3.0, 0.60},      // AR 15
	{"MuteSwan", 10.597, 2.30, 0.6504}, // AR 8.1
}

func TestBird_HighSpeedFormMinimum(t *testing.T) {
	// Derived (SCIENCE.md §3, §4): the numeric minimum of a/V + c·V³ is
	// V* = (a/(3c))^¼ to 10⁻⁶ m/s, and V*, P_am match the published rounded
	// forms with the exact constants 0.8071369 and 1.0516510.
	for _, sb := range shapeBirds {
		t.Run(sb.name, func(t *testing.T) {
			b := newTestBird(t, sb.massKg, sb.spanM, sb.areaM2)
			highSpeed := func(v float64) float64 { return b.hsA/v + b.hsC*v*v*v }
			got := goldenMin(highSpeed, 0, 4*b.vStar, 1e-9)
			if math.Abs(got-b.vStar) > 1e-6 {
				t.Errorf("numeric minimum %.9f m/s, V* %.9f m/s: differ by more than 1e-6", got, b.vStar)
			}
			p := b.Params()
			mg, rho, sbcd := sb.massKg*GravityMS2, b.Density(), b.BodyFrontalArea()*p.CDb
			vStar := 0.8071369 * math.Pow(p.K, 0.25) * math.Sqrt(mg) / (math.Sqrt(rho*sb.spanM) * math.Pow(sbcd, 0.25))
			pam := 1.0516510 * math.Pow(p.K, 0.75) * math.Pow(mg, 1.5) * math.Pow(sbcd, 0.25) / (math.Sqrt(rho) * math.Pow(sb.spanM, 1.5))
			if !within(b.AbsoluteMinPowerSpeed(), vStar, 1e-6) || !within(b.AbsoluteMinPower(), pam, 1e-6) {
				t.Errorf("V* %g, P_am %g; closed forms give %g, %g", b.AbsoluteMinPowerSpeed(), b.AbsoluteMinPower(), vStar, pam)
			}
		})
	}
}

func TestBird_MinPowerSpeedNearVStar(t *testing.T) {
	// SCIENCE.md §4 [derived]: the exact-form V_mp lies within 0.2 % of V* for AR ≥ 3.
	for _, sb := range shapeBirds {
		t.Run(sb.name, func(t *testing.T) {
			b := newTestBird(t, sb.massKg, sb.spanM, sb.areaM2)
			if !within(b.MinPowerSpeed(), b.AbsoluteMinPowerSpeed(), 0.002) {
				t.Errorf("V_mp %g, V* %g: more than 0.2 %% apart", b.MinPowerSpeed(), b.AbsoluteMinPowerSpeed())
			}
		})
	}
}

func TestBird_MinimaAreMinima(t *testing.T) {
	// Derived: each speed minimises its function; neighbours 10⁻³ m/s away are
	// higher.
	b := newTestBird(t, 0.1, 0.4, 0.03)
	fns := []struct {
		name string
		v    float64
		f    func(float64) float64
	}{
		{"V_mp", b.MinPowerSpeed(), b.PowerMech},
		{"V_mr", b.MaxRangeSpeed(), func(v float64) float64 { return b.PowerChem(v) / v }},
		{"V_mr,mech", b.MaxRangeSpeedMech(), func(v float64) float64 { return b.PowerMech(v) / v }},
	}
	for _, fn := range fns {
		if fn.f(fn.v-1e-3) < fn.f(fn.v) || fn.f(fn.v+1e-3) < fn.f(fn.v) {
			t.Errorf("%s = %g is not a minimum", fn.name, fn.v)
		}
	}
}

func TestBird_CurveShape(t *testing.T) {
	// Common practice (SCIENCE.md §8): P_mech has one interior minimum;
	// P_mech(0) and P_hover lie above P_mech(V_mp); V_mr > V_mp.
	for _, sb := range shapeBirds {
		for _, name := range ParamSetNames {
			t.Run(sb.name+"/"+name, func(t *testing.T) {
				p, _ := ParamSet(name)
				b, err := NewBird(Body{MassKg: sb.massKg, SpanM: sb.spanM, AreaM2: sb.areaM2}, 1.0, p)
				if err != nil {
					t.Fatal(err)
				}
				turns, prev := 0, b.PowerMech(0)
				falling := true
				for v := 0.05; v < 3*b.MaxRangeSpeed(); v += 0.05 {
					cur := b.PowerMech(v)
					if falling && cur > prev {
						falling = false
						turns++
					} else if !falling && cur < prev {
						turns++
					}
					prev = cur
				}
				pmin := b.PowerMech(b.MinPowerSpeed())
				if turns != 1 {
					t.Errorf("P_mech changes direction %d times, want once", turns)
				}
				if !(b.PowerMech(0) > pmin && b.HoverPower() > pmin && b.HoverPower() >= b.PowerMech(0)) {
					t.Errorf("P_mech(0) %g, P_hover %g, P_mech(V_mp) %g", b.PowerMech(0), b.HoverPower(), pmin)
				}
				if !(b.MaxRangeSpeed() > b.MinPowerSpeed() && b.MaxRangeSpeedMech() > b.MinPowerSpeed()) {
					t.Errorf("V_mr %g, V_mr,mech %g, V_mp %g", b.MaxRangeSpeed(), b.MaxRangeSpeedMech(), b.MinPowerSpeed())
				}
			})
		}
	}
}

func TestBird_InducedPower(t *testing.T) {
	// Derived from momentum theory: v_i(0) = v_h, and at high speed
	// P_ind → 2k(mg)²/(πρb²V).
	b := newTestBird(t, 0.1, 0.4, 0.03)
	if got := b.InducedVelocity(0); !within(got, b.vh, 1e-15) {
		t.Errorf("v_i(0) = %g, want v_h = %g", got, b.vh)
	}
	v := 200.0
	if got, want := b.PowerInduced(v), b.hsA/v; !within(got, want, 1e-6) {
		t.Errorf("P_ind(%g) = %g, want the high-speed form %g", v, got, want)
	}
	// The cancellation-free form agrees with the textbook form where both are
	// accurate.
	v = 3.0
	textbook := math.Sqrt(-v*v/2 + math.Sqrt(v*v*v*v/4+b.vh4))
	if got := b.InducedVelocity(v); !within(got, textbook, 1e-12) {
		t.Errorf("v_i(%g) = %g, textbook form %g", v, got, textbook)
	}
}

func TestBird_PowerChemAndHover(t *testing.T) {
	// SCIENCE.md §4 and §6 by definition: P_chem = R(P_mech/η + P_met) with
	// Lasiewski & Dawson 1967's P_met; P_hover uses max(k, 1).
	b := newTestBird(t, 0.1, 0.4, 0.03)
	want := 1.1 * (b.PowerMech(7)/0.23 + 3.79*math.Pow(0.1, 0.723))
	if got := b.PowerChem(7); !within(got, want, 1e-14) {
		t.Errorf("P_chem(7) = %g, want %g", got, want)
	}
	if got, want := BasalMetabolicRate(0.02, true), 6.25*math.Pow(0.02, 0.724); got != want {
		t.Errorf("passerine P_met = %g, want %g", got, want)
	}
	p13, _ := ParamSet(ParamsPennycuick2013)
	b13, _ := NewBird(Body{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}, SeaLevelDensityKgM3, p13)
	if got, want := b13.HoverPower(), b13.weight*b13.vh+b13.ProfilePower(); !within(got, want, 1e-15) {
		t.Errorf("k 0.9: P_hover = %g, want W·v_h + P_pro = %g", got, want)
	}
	if !(b13.HoverPower() > b13.PowerMech(0)) {
		t.Errorf("k 0.9: P_hover %g not above P_mech(0) %g", b13.HoverPower(), b13.PowerMech(0))
	}
}

func TestBird_ProfilePowerUsesIntactWing(t *testing.T) {
	// SCIENCE.md §3: P_pro = (C_pro/AR_intact)·P_am; a damaged wing with the
	// intact aspect ratio keeps the intact profile power.
	body := Body{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.024, IntactAspectRatio: 0.16 / 0.03}
	b, err := NewBird(body, SeaLevelDensityKgM3, defaultParams())
	if err != nil {
		t.Fatal(err)
	}
	want := 8.4 / (0.16 / 0.03) * b.AbsoluteMinPower()
	if got := b.ProfilePower(); !within(got, want, 1e-14) {
		t.Errorf("P_pro = %g, want %g", got, want)
	}
}

func TestShape(t *testing.T) {
	// Definitions, SCIENCE.md §2.
	if got := DiscLoading(0.1, 0.4); !within(got, 0.981/(math.Pi*0.04), 1e-15) {
		t.Errorf("DiscLoading = %g", got)
	}
	ref := Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}
	if got := EstimatedWingArea(0.36, ref); !within(got, 0.03*0.81, 1e-14) {
		t.Errorf("EstimatedWingArea(0.36) = %g, want %g", got, 0.03*0.81)
	}
}

func TestNewBird_Errors(t *testing.T) {
	good := Body{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}
	if _, err := NewBird(good, 0.2, defaultParams()); err == nil {
		t.Error("density 0.2: no error")
	}
	if _, err := NewBird(good, 1.2, Params{Name: "x", K: 1.2, CDb: 0.1, CPro: 8.4, Eta: 0, R: 1.1}); err == nil {
		t.Error("η 0: no error")
	}
	if _, err := NewBird(Body{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, IntactAspectRatio: 30}, 1.2, defaultParams()); err == nil {
		t.Error("intact aspect ratio 30: no error")
	}
}

// goldenMin returns the x in [lo, hi] minimising the unimodal f to within
// tol by golden-section search: an independent check on the production
// searches, which find roots of derivatives.
func goldenMin(f func(float64) float64, lo, hi, tol float64) float64 {
	const invPhi = 0.6180339887498949 // (√5 − 1)/2
	x1, x2 := hi-invPhi*(hi-lo), lo+invPhi*(hi-lo)
	f1, f2 := f(x1), f(x2)
	for i := 0; i < 200 && hi-lo > tol; i++ {
		if f1 <= f2 {
			hi, x2, f2 = x2, x1, f1
			x1 = hi - invPhi*(hi-lo)
			f1 = f(x1)
		} else {
			lo, x1, f1 = x1, x2, f2
			x2 = lo + invPhi*(hi-lo)
			f2 = f(x2)
		}
	}
	return (lo + hi) / 2
}

func TestBird_SpeedsAgainstGoldenSection(t *testing.T) {
	// SCIENCE.md §4: V_mp, V_mr and V_mr,mech are the numeric minima of P_mech,
	// P_chem/V and P_mech/V to 10⁻⁴ m/s; compared here with a plain
	// golden-section search on the functions themselves.
	for _, sb := range shapeBirds {
		t.Run(sb.name, func(t *testing.T) {
			b := newTestBird(t, sb.massKg, sb.spanM, sb.areaM2)
			cases := []struct {
				name string
				got  float64
				f    func(float64) float64
			}{
				{"V_mp", b.MinPowerSpeed(), b.PowerMech},
				{"V_mr", b.MaxRangeSpeed(), func(v float64) float64 { return b.PowerChem(v) / v }},
				{"V_mr,mech", b.MaxRangeSpeedMech(), func(v float64) float64 { return b.PowerMech(v) / v }},
			}
			for _, c := range cases {
				want := goldenMin(c.f, 0.1, 10*b.AbsoluteMinPowerSpeed(), 1e-8)
				if math.Abs(c.got-want) > 1e-4 {
					t.Errorf("%s = %.7f m/s, golden-section minimum %.7f m/s", c.name, c.got, want)
				}
			}
		})
	}
}

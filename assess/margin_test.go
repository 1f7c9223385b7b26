package assess

import (
	"errors"
	"math"
	"testing"
)

// refBird is the fixed healthy reference of the property tests (the pinned
// bird's shape); patient varies the patient around it.
var refBird = Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}

func patient(massKg, spanM, areaM2 float64, fat, muscle int, elevationM float64) FlightInput {
	ref := refBird
	return FlightInput{MassKg: massKg, SpanM: spanM, AreaM2: areaM2, Reference: &ref,
		FatScore: ptr(fat), FatScale: FatScaleKaiser, MuscleScore: ptr(muscle), Site: Site{ElevationM: elevationM}}
}

func TestFlight_MoreFatSameMuscleLowersMargin(t *testing.T) {
	// SCIENCE.md §5: more fat at the same muscle lowers M. Lean mass held at the
	// reference's 95 g; each fat class adds fat on top.
	prev := math.Inf(1)
	for score := 0; score <= 8; score++ {
		phi, _ := FatFraction(score, FatScaleKaiser, nil)
		r := mustFlight(t, patient(0.095/(1-phi), 0.4, 0.03, score, 3, 0))
		if !(r.PowerMargin < prev) {
			t.Errorf("fat score %d: margin %.4f, not below %.4f at the score before", score, r.PowerMargin, prev)
		}
		prev = r.PowerMargin
	}
}

func TestFlight_LowerMuscleScoreLowersMargin(t *testing.T) {
	// SCIENCE.md §5: a lower muscle score lowers M.
	prev := math.Inf(1)
	for score := 3; score >= 0; score-- {
		r := mustFlight(t, patient(0.1, 0.4, 0.03, 2, score, 0))
		if !(r.PowerMargin < prev) {
			t.Errorf("muscle score %d: margin %.4f, not below %.4f", score, r.PowerMargin, prev)
		}
		prev = r.PowerMargin
	}
}

func TestFlight_ShorterSpanLowersMargin(t *testing.T) {
	// SCIENCE.md §5: a shorter span raises induced power and lowers M, whether
	// the area stays or shrinks with it.
	for _, area := range []string{"SameArea", "AreaWithSpan"} {
		t.Run(area, func(t *testing.T) {
			prev := math.Inf(1)
			for _, span := range []float64{0.40, 0.38, 0.36, 0.34} {
				s := 0.03
				if area == "AreaWithSpan" {
					s = 0.03 * span / 0.4
				}
				r := mustFlight(t, patient(0.1, span, s, 2, 3, 0))
				if !(r.PowerMargin < prev && r.Bird.PowerInduced(r.MinPowerSpeedMS) > 0) {
					t.Errorf("span %.2f m: margin %.4f, not below %.4f", span, r.PowerMargin, prev)
				}
				prev = r.PowerMargin
			}
		})
	}
}

func TestFlight_LessAreaSameSpan(t *testing.T) {
	// SCIENCE.md §5: less area at the same span leaves M alone and raises V_min.
	full := mustFlight(t, patient(0.1, 0.4, 0.03, 2, 3, 0))
	for _, s := range []float64{0.027, 0.024, 0.021} {
		r := mustFlight(t, patient(0.1, 0.4, s, 2, 3, 0))
		if r.PowerMargin != full.PowerMargin {
			t.Errorf("area %g m²: margin %.6f, want %.6f unchanged", s, r.PowerMargin, full.PowerMargin)
		}
		if !(r.MinSpeedMS > full.MinSpeedMS) || r.ReferenceMinSpeedMS != full.ReferenceMinSpeedMS {
			t.Errorf("area %g m²: V_min %.3f (reference %.3f), want above %.3f", s, r.MinSpeedMS, r.ReferenceMinSpeedMS, full.MinSpeedMS)
		}
	}
}

func TestFlight_HigherSite(t *testing.T) {
	// SCIENCE.md §5: a higher site lowers M and M_ref,site alike, but a healthy
	// bird keeps E = 1; the altitude penalty shows as M_ref,site < M_ref.
	prevM, prevRef := math.Inf(1), math.Inf(1)
	for _, h := range []float64{0, 1000, 2500, 4000} {
		r := mustFlight(t, patient(0.1, 0.4, 0.03, 2, 3, h))
		if !(r.PowerMargin < prevM && r.ExpectedMarginSite < prevRef) {
			t.Errorf("%g m: M %.4f, M_ref,site %.4f, want both below %.4f, %.4f", h, r.PowerMargin, r.ExpectedMarginSite, prevM, prevRef)
		}
		if r.ExcessPowerFraction == nil || math.Abs(*r.ExcessPowerFraction-1) > 1e-12 {
			t.Errorf("%g m: healthy bird's E = %v, want 1", h, r.ExcessPowerFraction)
		}
		if h > 0 && !(r.ExpectedMarginSite < r.ExpectedMargin) {
			t.Errorf("%g m: M_ref,site %.4f not below M_ref %.4f", h, r.ExpectedMarginSite, r.ExpectedMargin)
		}
		prevM, prevRef = r.PowerMargin, r.ExpectedMarginSite
	}
}

func TestFlight_MarginalSite(t *testing.T) {
	// SCIENCE.md §5: when M_ref,site ≤ 1.05, E is null with a reason. A heavy
	// swan-like reference with a margin of 1.1 has less than that at 4000 m.
	ref := Reference{MassKg: 10.6, SpanM: 2.3, AreaM2: 0.65, ExpectedMargin: 1.1}
	r := mustFlight(t, FlightInput{MassKg: 10.6, SpanM: 2.3, AreaM2: 0.65, Reference: &ref, Site: Site{ElevationM: 4000}})
	if r.ExpectedMarginSite > 1.05 {
		t.Fatalf("M_ref,site %.3f, want a marginal site", r.ExpectedMarginSite)
	}
	if r.ExcessPowerFraction != nil || !hasNote(r, "excess_power_fraction:") {
		t.Errorf("E = %v, notes %q: want null with a reason", r.ExcessPowerFraction, r.Notes)
	}
}

func TestFlight_NoWindowBelowMarginOne(t *testing.T) {
	// SCIENCE.md §5: M < 1 means no window (null, with a reason) and a negative
	// climb rate.
	r := mustFlight(t, patient(0.16, 0.30, 0.02, 8, 0, 3000))
	if r.PowerMargin >= 1 {
		t.Fatalf("margin %.3f, want a case below 1", r.PowerMargin)
	}
	if r.SpeedWindowMS != nil || !hasNote(r, "speed_window_m_s:") || r.ClimbRateMS >= 0 {
		t.Errorf("window %v, climb %.3f, notes %q", r.SpeedWindowMS, r.ClimbRateMS, r.Notes)
	}
}

func TestBird_SpeedWindow(t *testing.T) {
	// Derived: the window's ends satisfy P_mech = P_av, or the low end is V_min.
	b := newTestBird(t, 0.1, 0.4, 0.03)
	pmin := b.PowerMech(b.MinPowerSpeed())
	tests := []struct {
		name      string
		pav       float64
		slow      bool
		wantErr   error
		lowIsVMin bool
	}{
		{"Narrow", 1.1 * pmin, false, nil, false},
		{"Wide", 0.99 * b.HoverPower(), false, nil, true},
		{"AboveHover", 1.01 * b.HoverPower(), true, nil, true},
		{"BelowOne", 0.99 * pmin, false, ErrNoLevelFlight, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			w, err := b.SpeedWindow(tc.pav)
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("error %v, want %v", err, tc.wantErr)
			}
			if err != nil {
				return
			}
			if w.SlowUnresolved != tc.slow {
				t.Errorf("SlowUnresolved %v, want %v", w.SlowUnresolved, tc.slow)
			}
			if math.Abs(b.PowerMech(w.HighMS)-tc.pav) > 1e-6 {
				t.Errorf("P_mech(high %.4f) = %.6f, want P_av %.6f", w.HighMS, b.PowerMech(w.HighMS), tc.pav)
			}
			if tc.lowIsVMin && w.LowMS != b.MinSpeed() {
				t.Errorf("low %.4f, want V_min %.4f", w.LowMS, b.MinSpeed())
			}
			if !tc.lowIsVMin && math.Abs(b.PowerMech(w.LowMS)-tc.pav) > 1e-6 {
				t.Errorf("P_mech(low %.4f) = %.6f, want P_av %.6f", w.LowMS, b.PowerMech(w.LowMS), tc.pav)
			}
		})
	}
}

func TestDefaultExpectedMargin(t *testing.T) {
	// SCIENCE.md §5 [project default]: 1.8·m^(−1/6), clamped to [1.1, 4.0].
	tests := []struct {
		massKg, want float64
	}{
		{0.1, 1.8 * math.Pow(0.1, -1.0/6)},
		{0.001, 4.0},
		{60, 1.1},
	}
	for _, tc := range tests {
		if got := DefaultExpectedMargin(tc.massKg); !within(got, tc.want, 1e-15) {
			t.Errorf("DefaultExpectedMargin(%g) = %g, want %g", tc.massKg, got, tc.want)
		}
	}
}

func TestMuscleFactor(t *testing.T) {
	// SCIENCE.md §5 [project default]: 3 → 1.00, 2 → 0.85, 1 → 0.65, 0 → 0.45.
	for score, want := range []float64{0.45, 0.65, 0.85, 1.00} {
		if got, err := MuscleFactor(score, nil); err != nil || got != want {
			t.Errorf("MuscleFactor(%d) = %g, %v; want %g", score, got, err, want)
		}
	}
	if got, _ := MuscleFactor(2, &[4]float64{0.5, 0.6, 0.7, 1}); got != 0.7 {
		t.Errorf("centre table: MuscleFactor(2) = %g, want 0.7", got)
	}
	for _, score := range []int{-1, 4} {
		var ve *ValidationError
		if _, err := MuscleFactor(score, nil); !errors.As(err, &ve) || ve.Field != "muscle_score" {
			t.Errorf("MuscleFactor(%d) error %v, want muscle_score", score, err)
		}
	}
	if _, err := MuscleFactor(3, &[4]float64{0, 0.6, 0.7, 1}); err == nil {
		t.Error("a factor of 0: no error")
	}
}

func hasNote(r FlightResult, prefix string) bool {
	for _, n := range r.Notes {
		if len(n) >= len(prefix) && n[:len(prefix)] == prefix {
			return true
		}
	}
	return false
}

func TestBird_SpeedWindowBelowMinSpeed(t *testing.T) {
	// Derived: lost area raises V_min above every sustainable speed.
	b, err := NewBird(Body{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.007, IntactAspectRatio: 0.16 / 0.03}, SeaLevelDensityKgM3, defaultParams())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := b.SpeedWindow(1.001 * b.PowerMech(b.MinPowerSpeed())); !errors.Is(err, ErrMinSpeedAboveWindow) {
		t.Errorf("V_min %.2f m/s, V_mp %.2f m/s: error %v, want ErrMinSpeedAboveWindow", b.MinSpeed(), b.MinPowerSpeed(), err)
	}
}

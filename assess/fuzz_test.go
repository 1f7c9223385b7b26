package assess

import (
	"encoding/json"
	"errors"
	"math"
	"testing"
)

// FuzzFlight feeds valid and invalid input to Flight: it must never panic,
// must reject bad input with ValidationErrors only, and a result must hold
// no NaN or Inf (encoding/json refuses both) and keep its invariants.
func FuzzFlight(f *testing.F) {
	type seed struct {
		massG, spanMM, areaCM2, elevM, tempC float64
		hasTemp                              bool
		fat, muscle                          int
		hasFat, hasMuscle                    bool
		scale, params                        uint8
		passerine, migrant                   bool
		refScale, refMargin, refMuscle       float64
	}
	seeds := []seed{
		{100, 400, 300, 0, 15, false, 0, 3, false, false, 0, 0, false, false, 0, 0, 0},
		{100, 400, 300, 2500, 30, true, 6, 2, true, true, 0, 1, true, true, 1.1, 2.5, 0.18},
		{10597, 2300, 6504, 4000, 40, true, 8, 0, true, true, 0, 0, false, true, 1, 1.1, 0.2},
		{38, 400, 0, 0, 0, false, 5, 1, true, true, 1, 0, false, true, 1, 0, 0},
		{0, 0, 0, 0, 0, false, -1, -1, true, true, 7, 9, false, false, 0, 0, 0},
		{math.NaN(), math.Inf(1), -1, math.NaN(), math.Inf(-1), true, 99, 99, true, true, 0, 0, true, true, math.NaN(), -1, 2},
		{1e300, 1e-300, 1e300, -1e300, 1e300, true, 0, 0, false, false, 0, 0, false, false, 1e300, 1e300, 1e300},
		{0.5, 10, 0.5, -500, -40, true, 0, 0, true, true, 1, 0, true, false, 0, 0, 0},
	}
	for _, s := range seeds {
		f.Add(s.massG, s.spanMM, s.areaCM2, s.elevM, s.tempC, s.hasTemp, s.fat, s.muscle, s.hasFat, s.hasMuscle,
			s.scale, s.params, s.passerine, s.migrant, s.refScale, s.refMargin, s.refMuscle)
	}
	f.Fuzz(func(t *testing.T, massG, spanMM, areaCM2, elevM, tempC float64, hasTemp bool, fat, muscle int,
		hasFat, hasMuscle bool, scale, params uint8, passerine, migrant bool, refScale, refMargin, refMuscle float64) {
		in := FlightInput{MassKg: massG / 1000, SpanM: spanMM / 1000, AreaM2: areaCM2 / 1e4,
			Passerine: passerine, Migrant: migrant, Site: Site{ElevationM: elevM}}
		if hasTemp {
			in.Site.TempC = &tempC
		}
		if hasFat {
			in.FatScore = &fat
			in.FatScale = []FatScale{FatScaleKaiser, FatScaleHelmsDrury, "", "0-3"}[scale%4]
		}
		if hasMuscle {
			in.MuscleScore = &muscle
		}
		if p, err := ParamSet([]string{"", ParamsPennycuick2008, ParamsPennycuick2013}[params%3]); err == nil {
			in.Params = p
		}
		if refScale != 0 {
			// A reference scaled from the patient: a larger or smaller bird.
			in.Reference = &Reference{MassKg: in.MassKg * refScale * refScale * refScale, SpanM: in.SpanM * refScale,
				AreaM2: math.Abs(in.AreaM2) * refScale * refScale, ExpectedMargin: refMargin, FlightMuscleFraction: refMuscle}
			if in.AreaM2 == 0 {
				in.Reference.AreaM2 = in.SpanM * in.SpanM / 7 * refScale * refScale
			}
		}
		r, err := Flight(in)
		if err != nil {
			var ves ValidationErrors
			if !errors.As(err, &ves) || len(ves) == 0 {
				t.Fatalf("Flight(%+v) error %v, want ValidationErrors", in, err)
			}
			return
		}
		if _, err := json.Marshal(r); err != nil {
			t.Fatalf("Flight(%+v): %v", in, err)
		}
		checkInvariants(t, in, r)
	})
}

func checkInvariants(t *testing.T, in FlightInput, r FlightResult) {
	t.Helper()
	for _, v := range []float64{0, r.MinPowerSpeedMS, r.MaxRangeSpeedMS, 100} {
		if !finite(r.Bird.PowerMech(v), r.Bird.PowerChem(v), r.ReferenceBird.PowerMech(v)) {
			t.Fatalf("non-finite power at %g m/s for %+v", v, in)
		}
	}
	if !(r.MaxRangeSpeedMS > r.MinPowerSpeedMS && r.HoverPowerW > r.MinPowerMechW && r.TakeoffIndex > 0) {
		t.Fatalf("V_mr %g, V_mp %g, P_hover %g, P_min %g, T %g for %+v", r.MaxRangeSpeedMS, r.MinPowerSpeedMS,
			r.HoverPowerW, r.MinPowerMechW, r.TakeoffIndex, in)
	}
	if w := r.SpeedWindowMS; w != nil && !(w[0] <= w[1] && r.PowerMargin >= 1) {
		t.Fatalf("window %v with margin %g for %+v", *w, r.PowerMargin, in)
	}
	if (r.ExcessPowerFraction == nil) != (r.ExpectedMarginSite <= marginalSiteMargin) {
		t.Fatalf("E %v with M_ref,site %g", r.ExcessPowerFraction, r.ExpectedMarginSite)
	}
	if len(r.Curve) < 2 || len(r.Curve) > 2000 {
		t.Fatalf("curve of %d points for %+v", len(r.Curve), in)
	}
}

// FuzzFlightValid folds arbitrary numbers into the model's valid domain
// (mass 0.5 g–100 kg, aspect ratio 2–25, wing loading 1–1000 N/m², every
// site, score and parameter set), so the fuzzer explores its corners rather
// than its error paths. Valid input must give a finite result.
func FuzzFlightValid(f *testing.F) {
	f.Add(0.5, 0.3, 0.2, 0.0, 0.5, 3, 3, uint8(0), 0.0, 0.0)
	f.Add(1.0, 1.0, 1.0, 1.0, 1.0, 8, 0, uint8(5), 1.0, 1.0)
	f.Add(0.0, 0.0, 0.0, 0.999, 0.0, 0, 1, uint8(2), 0.5, 0.0)
	f.Fuzz(func(t *testing.T, mass, ar, q, elev, temp float64, fat, muscle int, flags uint8, refScale, refMargin float64) {
		// Just inside each limit: rounding must not push a value out.
		const in1 = 1 + 1e-9
		massKg := math.Exp(lerp(math.Log(minMassKg*in1), math.Log(maxMassKg/in1), mass))
		areaM2 := massKg * GravityMS2 / math.Exp(lerp(math.Log(minWingLoading*in1), math.Log(maxWingLoading/in1), q))
		spanM := math.Sqrt(lerp(MinAspectRatio*in1, MaxAspectRatio/in1, ar) * areaM2)
		if spanM < minSpanM || spanM > maxSpanM {
			t.Skip("span outside the domain")
		}
		p, _ := ParamSet(ParamSetNames[flags%2])
		in := FlightInput{MassKg: massKg, SpanM: spanM, AreaM2: areaM2, Params: p,
			Passerine: flags&2 != 0, Migrant: flags&4 != 0,
			FatScore: ptr(abs(fat) % 9), FatScale: FatScaleKaiser, MuscleScore: ptr(abs(muscle) % 4),
			Site: Site{ElevationM: lerp(MinElevationM, MaxElevationM, elev), TempC: ptr(lerp(MinTempC, MaxTempC, temp))}}
		if flags&8 != 0 {
			s := lerp(0.8, 1.25, refScale)
			in.Reference = &Reference{MassKg: massKg * s * s * s, SpanM: spanM * s, AreaM2: areaM2 * s * s,
				ExpectedMargin: lerp(1, 10, refMargin), FlightMuscleFraction: lerp(0, 0.3, refMargin)}
			if flags&16 != 0 {
				in.AreaM2 = 0
			}
			if validateReference(in.Reference) != nil {
				t.Skip("reference outside the domain")
			}
		}
		r, err := Flight(in)
		if err != nil {
			t.Fatalf("Flight(%+v) = %v, want a result for valid input", in, err)
		}
		if _, err := json.Marshal(r); err != nil {
			t.Fatalf("Flight(%+v): %v", in, err)
		}
		checkInvariants(t, in, r)
	})
}

// lerp maps the fractional part of x onto [lo, hi]; NaN and ±Inf map to lo.
func lerp(lo, hi, x float64) float64 {
	frac := x - math.Floor(x)
	if !(frac >= 0 && frac < 1) {
		frac = 0
	}
	return lo + frac*(hi-lo)
}

func abs(n int) int {
	if n < 0 {
		return -(n + 1) // no overflow at math.MinInt
	}
	return n
}

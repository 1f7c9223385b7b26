package assess

import (
	"errors"
	"math"
	"testing"
)

func TestFatFraction(t *testing.T) {
	// SCIENCE.md §7 [project default] tables.
	tests := []struct {
		name  string
		score int
		scale FatScale
		want  float64
	}{
		{"Kaiser0", 0, FatScaleKaiser, 0.01},
		{"Kaiser4", 4, FatScaleKaiser, 0.09},
		{"Kaiser8", 8, FatScaleKaiser, 0.36},
		{"HelmsDrury3", 3, FatScaleHelmsDrury, 0.10},
		{"HelmsDrury5", 5, FatScaleHelmsDrury, 0.30},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got, err := FatFraction(tc.score, tc.scale, nil); err != nil || got != tc.want {
				t.Errorf("FatFraction(%d, %q) = %g, %v; want %g", tc.score, tc.scale, got, err, tc.want)
			}
		})
	}
	own := DefaultFatFractions()
	own.HelmsDrury[2] = 0.07
	if got, _ := FatFraction(2, FatScaleHelmsDrury, &own); got != 0.07 {
		t.Errorf("centre table: got %g, want 0.07", got)
	}
	if defaultFatHelmsDrury[2] != 0.06 {
		t.Error("DefaultFatFractions shares the package's table")
	}
}

func TestFatFraction_Errors(t *testing.T) {
	bad := DefaultFatFractions()
	bad.Kaiser[8] = 0.9
	tests := []struct {
		name   string
		score  int
		scale  FatScale
		tables *FatFractions
		field  string
	}{
		{"ErrKaiser9", 9, FatScaleKaiser, nil, "fat_score"},
		{"ErrHelmsDrury6", 6, FatScaleHelmsDrury, nil, "fat_score"},
		{"ErrNegative", -1, FatScaleKaiser, nil, "fat_score"},
		{"ErrNoScale", 3, "", nil, "fat_scale"},
		{"ErrTable", 1, FatScaleKaiser, &bad, "fat_fractions"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var ve *ValidationError
			if _, err := FatFraction(tc.score, tc.scale, tc.tables); !errors.As(err, &ve) || ve.Field != tc.field {
				t.Errorf("error %v, want a ValidationError on %s", err, tc.field)
			}
		})
	}
}

func TestStillAirRange_PigeonIdentity(t *testing.T) {
	// SCIENCE.md §7 [derived from published inputs]: with Pennycuick 1968's
	// pigeon (400 g, lift:drag 5.9, η 0.2), e·η·N/(m·g) = 11.73 km per gram of
	// fat, against his 11.8 (Pennycuick 1968, J. Exp. Biol. 49:527). The
	// Breguet form's slope at zero fat is that per-gram figure.
	const massKg, n, eta = 0.4, 5.9, 0.2
	perGramKm := FatEnergyJKg * eta * n / (massKg * GravityMS2) / 1000 / 1000
	if math.Abs(perGramKm-11.73) > 0.005 {
		t.Errorf("per-gram form %.4f km/g, want 11.73", perGramKm)
	}
	if !within(perGramKm, 11.8, 0.01) {
		t.Errorf("per-gram form %.3f km/g, more than 1 %% from Pennycuick's 11.8", perGramKm)
	}
	phi := 1e-7 // 40 µg of fat on 400 g: the slope at zero fat
	slope := StillAirRangeM(n, eta, phi) / (phi * massKg * 1000) / 1000
	if !within(slope, perGramKm, 1e-6) {
		t.Errorf("Breguet slope %.5f km/g, per-gram form %.5f km/g", slope, perGramKm)
	}
}

func TestFlight_StillAirRange(t *testing.T) {
	// SCIENCE.md §7: migrants with a fat score only; null with a reason otherwise.
	in := pinnedBird()
	in.Migrant, in.FatScore, in.FatScale = true, ptr(6), FatScaleKaiser
	r := mustFlight(t, in)
	want := FatEnergyJKg * 0.23 * r.EffectiveLiftDrag / GravityMS2 * math.Log(1/(1-0.20)) / 1000
	if r.StillAirRangeKm == nil || !within(*r.StillAirRangeKm, want, 1e-12) {
		t.Errorf("range %v km, want %g", r.StillAirRangeKm, want)
	}
	in.FatScore = nil
	if r := mustFlight(t, in); r.StillAirRangeKm != nil || !hasNote(r, "still_air_range_km:") {
		t.Errorf("no fat score: range %v, notes %q", r.StillAirRangeKm, r.Notes)
	}
	in.FatScore, in.Migrant = ptr(6), false
	if r := mustFlight(t, in); r.StillAirRangeKm != nil || !hasNote(r, "still_air_range_km:") {
		t.Errorf("not a migrant: range %v, notes %q", r.StillAirRangeKm, r.Notes)
	}
}

package assess

import (
	"math"
	"testing"
)

func TestTakeoffBandOf(t *testing.T) {
	// SCIENCE.md §6 [project default]: T ≥ 1.2; 0.9–1.2; < 0.9.
	tests := []struct {
		t    float64
		want TakeoffBand
	}{
		{2.2, TakeoffPowered}, {1.2, TakeoffPowered}, {1.1999, TakeoffAssisted},
		{0.9, TakeoffAssisted}, {0.8999, TakeoffShort}, {0, TakeoffShort},
	}
	for _, tc := range tests {
		if got := TakeoffBandOf(tc.t); got != tc.want {
			t.Errorf("TakeoffBandOf(%g) = %q, want %q", tc.t, got, tc.want)
		}
	}
	for _, b := range TakeoffBands {
		if b.Label() == string(b) || b.Label() == "" {
			t.Errorf("band %q has no label", b)
		}
	}
}

func TestTakeoffIndex(t *testing.T) {
	// SCIENCE.md §6: T = 1.94·P_av/P_hover, 1.94 = 20.4 W / 10.5 W in the pigeon
	// (Pennycuick 1968, from memory).
	if !within(BurstFactor, 20.4/10.5, 2e-3) {
		t.Errorf("BurstFactor %g, pigeon ratio %g", BurstFactor, 20.4/10.5)
	}
	if got := TakeoffIndex(3, 2); got != 1.94*1.5 {
		t.Errorf("TakeoffIndex(3, 2) = %g", got)
	}
}

func TestFlight_MardenLiftRatio(t *testing.T) {
	// SCIENCE.md §6: Marden's 57 N per kg of flight muscle (Marden & Allen
	// 2002, in Schilder & Marden 2004); a healthy bird at its reference mass
	// with flight muscle g/57 of its mass has a ratio of exactly 1.
	ref := Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, FlightMuscleFraction: GravityMS2 / MardenLiftNKg}
	r := mustFlight(t, FlightInput{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, Reference: &ref})
	if r.MardenLiftRatio == nil || math.Abs(*r.MardenLiftRatio-1) > 1e-12 {
		t.Fatalf("Marden lift ratio %v, want 1", r.MardenLiftRatio)
	}
	weak := mustFlight(t, FlightInput{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, Reference: &ref, MuscleScore: ptr(1)})
	if !(*weak.MardenLiftRatio < 1) {
		t.Errorf("muscle score 1: Marden lift ratio %g, want below 1", *weak.MardenLiftRatio)
	}
	if none := mustFlight(t, pinnedBird()); none.MardenLiftRatio != nil || !hasNote(none, "marden_lift_ratio:") {
		t.Errorf("no muscle fraction: ratio %v, notes %q; want null with a reason", none.MardenLiftRatio, none.Notes)
	}
}

package assess

import "testing"

func TestFlight_PinnedVector(t *testing.T) {
	// SCIENCE.md §8, pinned vector: 100 g non-passerine, b 0.40 m, S 0.030 m²,
	// sea level, pennycuick2008 [derived from the specification; relative
	// tolerance 10⁻⁴].
	const tol = 1e-4
	r := mustFlight(t, pinnedBird())
	b := r.Bird
	tests := []struct {
		name      string
		got, want float64
	}{
		{"AspectRatio", r.AspectRatio, 5.33333},
		{"WingLoading", r.WingLoadingNM2, 32.700},
		{"BodyFrontalArea", b.BodyFrontalArea(), 0.00175425},
		{"AbsoluteMinPower", r.AbsoluteMinPowerW, 0.481533},
		{"ProfilePower", r.ProfilePowerW, 0.758414},
		{"MinPowerSpeed", r.MinPowerSpeedMS, 10.3805},
		{"VStar", b.AbsoluteMinPowerSpeed(), 10.3862},
		{"MinPowerMech", r.MinPowerMechW, 1.23979},
		{"MinPowerChem", r.MinPowerChemW, 6.71834},
		{"MaxRangeSpeed", r.MaxRangeSpeedMS, 18.3681},
		{"MaxRangeSpeedMech", r.MaxRangeSpeedMechMS, 17.6581},
		{"HoverPower", r.HoverPowerW, 2.85976},
		{"WingbeatFrequency", r.WingbeatHz, 9.47914},
		{"EffectiveLiftDrag", r.EffectiveLiftDrag, 9.13384},
		{"MinSpeed", r.MinSpeedMS, 5.77645},
		{"ExpectedMargin", r.ExpectedMargin, 2.64204},
		{"AvailablePower", r.AvailablePowerW, 3.27557},
		{"ClimbRate", r.ClimbRateMS, 2.07521},
		{"TakeoffIndex", r.TakeoffIndex, 2.22208},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if !within(tc.got, tc.want, tol) {
				t.Errorf("got %.7g, want %.7g (relative tolerance %g)", tc.got, tc.want, tol)
			}
		})
	}
	if r.Params.Name != ParamsPennycuick2008 {
		t.Errorf("params %q, want the default %q", r.Params.Name, ParamsPennycuick2008)
	}
}

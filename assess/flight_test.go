package assess

import (
	"encoding/json"
	"errors"
	"math"
	"slices"
	"testing"
)

func TestFlightInput_Validate(t *testing.T) {
	ref := Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}
	tests := []struct {
		name   string
		edit   func(*FlightInput)
		fields []string
	}{
		{"ErrMassZero", func(in *FlightInput) { in.MassKg = 0 }, []string{"mass_g"}},
		{"ErrMassNegative", func(in *FlightInput) { in.MassKg = -0.1 }, []string{"mass_g"}},
		{"ErrMassNaN", func(in *FlightInput) { in.MassKg = math.NaN() }, []string{"mass_g"}},
		{"ErrSpanZero", func(in *FlightInput) { in.SpanM = 0 }, []string{"span_mm"}},
		{"ErrAreaNegative", func(in *FlightInput) { in.AreaM2 = -0.03 }, []string{"area_cm2"}},
		{"ErrAreaMissing", func(in *FlightInput) { in.AreaM2 = 0 }, []string{"area_cm2"}},
		{"ErrAspectRatioHigh", func(in *FlightInput) { in.AreaM2 = 0.003 }, []string{"aspect_ratio"}},
		{"ErrAspectRatioLow", func(in *FlightInput) { in.AreaM2 = 0.1 }, []string{"aspect_ratio"}},
		{"ErrWingLoading", func(in *FlightInput) { in.MassKg = 50 }, []string{"wing_loading_n_m2"}},
		{"ErrElevation", func(in *FlightInput) { in.Site.ElevationM = 5001 }, []string{"elevation_m"}},
		{"ErrTemp", func(in *FlightInput) { in.Site.TempC = ptr(-41.0) }, []string{"temp_c"}},
		{"ErrFatScore", func(in *FlightInput) { in.FatScore, in.FatScale = ptr(6), FatScaleHelmsDrury }, []string{"fat_score"}},
		{"ErrFatScale", func(in *FlightInput) { in.FatScore = ptr(3) }, []string{"fat_scale"}},
		{"ErrMuscleScore", func(in *FlightInput) { in.MuscleScore = ptr(4) }, []string{"muscle_score"}},
		{"ErrParams", func(in *FlightInput) { in.Params = Params{Name: "x", K: 9} }, []string{"params"}},
		{"ErrReferenceMass", func(in *FlightInput) { in.Reference = &Reference{SpanM: 0.4, AreaM2: 0.03} }, []string{"reference_mass_g"}},
		{"ErrReferenceMargin", func(in *FlightInput) {
			in.Reference = &Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, ExpectedMargin: 0.5}
		}, []string{"reference_expected_margin"}},
		{"ErrSeveral", func(in *FlightInput) { in.MassKg, in.Site.ElevationM, in.MuscleScore = 0, -600, ptr(-1) },
			[]string{"mass_g", "elevation_m", "muscle_score"}},
		{"EstimatedArea", func(in *FlightInput) { in.AreaM2, in.Reference = 0, &ref }, nil},
		{"RangeEnds", func(in *FlightInput) {
			in.Site = Site{ElevationM: 5000, TempC: ptr(50.0)}
			in.FatScore, in.FatScale, in.MuscleScore = ptr(5), FatScaleHelmsDrury, ptr(0)
		}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := pinnedBird()
			tc.edit(&in)
			err := in.Validate()
			if tc.fields == nil {
				if err != nil {
					t.Fatalf("Validate() = %v, want nil", err)
				}
				return
			}
			var ves ValidationErrors
			if !errors.As(err, &ves) {
				t.Fatalf("Validate() = %v, want ValidationErrors", err)
			}
			var got []string
			for _, e := range ves {
				got = append(got, e.Field)
				if e.Message == "" {
					t.Errorf("%s: empty message", e.Field)
				}
			}
			if !slices.Equal(got, tc.fields) {
				t.Errorf("fields %q, want %q (%v)", got, tc.fields, err)
			}
			if _, ferr := Flight(in); ferr == nil {
				t.Error("Flight accepted input Validate rejects")
			}
		})
	}
}

func TestFlight_JSONKeys(t *testing.T) {
	// The `aloft curve --json` contract: these keys, never renamed.
	want := []string{"air_density_kg_m3", "aspect_ratio", "wing_loading_n_m2", "disc_loading_n_m2",
		"wing_area_estimated", "min_speed_m_s", "min_power_speed_m_s", "max_range_speed_m_s",
		"max_range_speed_mech_m_s", "absolute_min_power_w", "profile_power_w", "min_power_mech_w",
		"min_power_chem_w", "hover_power_w", "wingbeat_hz", "effective_lift_drag", "expected_margin",
		"expected_margin_site", "available_power_w", "power_margin", "margin_ratio",
		"excess_power_fraction", "climb_rate_m_s", "speed_window_m_s", "takeoff_index", "takeoff_band",
		"fat_fraction", "fat_assumed", "muscle_assumed", "still_air_range_km", "params",
		"reference_min_speed_m_s", "marden_lift_ratio", "notes", "curve", "reference_curve"}
	data, err := json.Marshal(mustFlight(t, pinnedBird()))
	if err != nil {
		t.Fatal(err)
	}
	var obj map[string]json.RawMessage
	if err := json.Unmarshal(data, &obj); err != nil {
		t.Fatal(err)
	}
	for _, k := range want {
		if _, ok := obj[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	if len(obj) != len(want) {
		t.Errorf("%d keys, want %d", len(obj), len(want))
	}
	var params map[string]any
	_ = json.Unmarshal(obj["params"], &params)
	for _, k := range []string{"name", "k", "c_db", "c_pro", "eta", "r"} {
		if _, ok := params[k]; !ok {
			t.Errorf("params.%s missing", k)
		}
	}
	var window [2]float64
	if err := json.Unmarshal(obj["speed_window_m_s"], &window); err != nil || !(window[0] < window[1]) {
		t.Errorf("speed_window_m_s = %s, want [low, high]", obj["speed_window_m_s"])
	}
}

func TestFlight_Curves(t *testing.T) {
	// The issue: from 0 to 1.5 × V_mr in steps of at most 0.25 m/s; the
	// reference's curve at the same speeds.
	ref := Reference{MassKg: 0.11, SpanM: 0.42, AreaM2: 0.032}
	r := mustFlight(t, FlightInput{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03, Reference: &ref, Site: Site{ElevationM: 1500}})
	c, h := r.Curve, r.ReferenceCurve
	if len(c) != len(h) || c[0].SpeedMS != 0 || !within(c[len(c)-1].SpeedMS, 1.5*r.MaxRangeSpeedMS, 1e-12) {
		t.Fatalf("curve of %d points from %g to %g m/s; reference %d points; V_mr %g", len(c), c[0].SpeedMS, c[len(c)-1].SpeedMS, len(h), r.MaxRangeSpeedMS)
	}
	for i := range c {
		if i > 0 && c[i].SpeedMS-c[i-1].SpeedMS > 0.25+1e-12 {
			t.Errorf("step %d: %g m/s", i, c[i].SpeedMS-c[i-1].SpeedMS)
		}
		if h[i].SpeedMS != c[i].SpeedMS || c[i].PowerMechW != r.Bird.PowerMech(c[i].SpeedMS) ||
			h[i].PowerChemW != r.ReferenceBird.PowerChem(c[i].SpeedMS) {
			t.Errorf("point %d: %+v / %+v", i, c[i], h[i])
		}
	}
}

func TestFlight_EstimatedArea(t *testing.T) {
	// SCIENCE.md §2: S = S_ref·(b/b_ref)², flagged.
	ref := Reference{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}
	r := mustFlight(t, FlightInput{MassKg: 0.1, SpanM: 0.36, Reference: &ref})
	if !r.WingAreaEstimated || !within(r.AreaM2, 0.03*0.81, 1e-12) || !hasNote(r, "wing_area_estimated:") {
		t.Errorf("estimated %v, area %g m², notes %q", r.WingAreaEstimated, r.AreaM2, r.Notes)
	}
}

func TestFlight_SelfReference(t *testing.T) {
	// The issue: without a species the bird is its own reference at 1.225 kg/m³,
	// so a bird scored healthy has margin ratio 1.
	in := pinnedBird()
	in.FatScore, in.FatScale, in.MuscleScore = ptr(2), FatScaleKaiser, ptr(3)
	r := mustFlight(t, in)
	if math.Abs(r.MarginRatio-1) > 1e-12 || r.FatAssumed || r.MuscleAssumed {
		t.Errorf("margin ratio %g, fat assumed %v, muscle assumed %v", r.MarginRatio, r.FatAssumed, r.MuscleAssumed)
	}
	if a := mustFlight(t, pinnedBird()); !a.FatAssumed || !a.MuscleAssumed || a.FatFraction != AssumedFatFraction {
		t.Errorf("no scores: fat assumed %v (φ %g), muscle assumed %v", a.FatAssumed, a.FatFraction, a.MuscleAssumed)
	}
}

func TestFlight_ParamSets(t *testing.T) {
	// SCIENCE.md §3: pennycuick2013 lowers k to 0.9, so less induced power.
	p13, err := ParamSet(ParamsPennycuick2013)
	if err != nil || p13.K != 0.9 {
		t.Fatalf("ParamSet(2013) = %+v, %v", p13, err)
	}
	in := pinnedBird()
	in.Params = p13
	r13, r08 := mustFlight(t, in), mustFlight(t, pinnedBird())
	if r13.Params.Name != ParamsPennycuick2013 || !(r13.MinPowerMechW < r08.MinPowerMechW) {
		t.Errorf("2013: %s, P_mech(V_mp) %g vs %g", r13.Params.Name, r13.MinPowerMechW, r08.MinPowerMechW)
	}
	if _, err := ParamSet("pennycuick1975"); err == nil {
		t.Error("unknown set: no error")
	}
	if p, _ := ParamSet(""); p.Name != ParamSetNames[0] {
		t.Errorf(`ParamSet("") = %q, want the default`, p.Name)
	}
}

func TestFlight_Deterministic(t *testing.T) {
	in := pinnedBird()
	in.Site.ElevationM = 1234
	a, _ := json.Marshal(mustFlight(t, in))
	b, _ := json.Marshal(mustFlight(t, in))
	if string(a) != string(b) {
		t.Error("two evaluations of one input differ")
	}
}

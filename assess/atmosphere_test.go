package assess

import (
	"errors"
	"math"
	"testing"
)

func TestAirDensity_StandardAtmosphere(t *testing.T) {
	// U.S. Standard Atmosphere 1976, tables at geometric altitude; SCIENCE.md §1
	// takes the elevation as geopotential, hence the 2·10⁻⁴ kg/m³ tolerance.
	tests := []struct {
		name       string
		elevationM float64
		want, tol  float64
	}{
		{"SeaLevel", 0, 1.2250, 2e-4},
		{"1000m", 1000, 1.1117, 2e-4},
		{"2000m", 2000, 1.0066, 2e-4},
		{"3000m", 3000, 0.90925, 2e-4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := AirDensity(tc.elevationM, nil)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tc.want) > tc.tol {
				t.Errorf("AirDensity(%g, nil) = %.6f, want %.5f ± %g", tc.elevationM, got, tc.want, tc.tol)
			}
		})
	}
}

func TestAirDensity_MeasuredTemperature(t *testing.T) {
	// Derived: the same pressure at a different temperature, ρ ∝ 1/T.
	isa, _ := AirDensity(1000, nil)
	tIsaC := 288.15 - 0.0065*1000 - 273.15
	same, _ := AirDensity(1000, ptr(tIsaC))
	if !within(same, isa, 1e-12) {
		t.Errorf("at the ISA temperature %g °C got %g, want %g", tIsaC, same, isa)
	}
	hot, _ := AirDensity(1000, ptr(35.0))
	want := isa * (tIsaC + 273.15) / (35 + 273.15)
	if !within(hot, want, 1e-12) || hot >= isa {
		t.Errorf("at 35 °C got %g, want %g (below the ISA %g)", hot, want, isa)
	}
}

func TestAirDensity_Errors(t *testing.T) {
	tests := []struct {
		name       string
		elevationM float64
		tempC      *float64
		field      string
	}{
		{"ErrElevationLow", -501, nil, "elevation_m"},
		{"ErrElevationHigh", 5001, nil, "elevation_m"},
		{"ErrElevationNaN", math.NaN(), nil, "elevation_m"},
		{"ErrTempLow", 0, ptr(-40.1), "temp_c"},
		{"ErrTempHigh", 0, ptr(50.1), "temp_c"},
		{"ErrTempInf", 0, ptr(math.Inf(1)), "temp_c"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := AirDensity(tc.elevationM, tc.tempC)
			var ve *ValidationError
			if !errors.As(err, &ve) || ve.Field != tc.field {
				t.Errorf("AirDensity(%g, %v) error = %v, want a ValidationError on %s", tc.elevationM, tc.tempC, err, tc.field)
			}
		})
	}
	for _, h := range []float64{-500, 5000} {
		if _, err := (Site{ElevationM: h, TempC: ptr(-40.0)}).Density(); err != nil {
			t.Errorf("Site{%g m, −40 °C}.Density: %v, want the range's ends accepted", h, err)
		}
	}
}

func TestEquivalentAirspeed(t *testing.T) {
	// Derived: U_e = V·√(ρ/1.225).
	if got := EquivalentAirspeed(10, 1.225/4); !within(got, 5, 1e-15) {
		t.Errorf("EquivalentAirspeed(10, ρ₀/4) = %g, want 5", got)
	}
}

package assess

import (
	"fmt"
	"math"
)

// International Standard Atmosphere constants (ICAO = U.S. Standard Atmosphere
// 1976, troposphere), SCIENCE.md §1.
const (
	SeaLevelDensityKgM3 = 1.225     // ρ₀, kg/m³
	seaLevelPressurePa  = 101325    // p₀, Pa
	seaLevelTempK       = 288.15    // T₀, K
	lapseRateKM         = 0.0065    // K/m
	pressureExponent    = 5.255876  // g₀·M/(R*·L)
	gasConstantAir      = 287.05287 // J/(kg·K)
	celsiusToKelvin     = 273.15
)

// Valid ranges of a release site (SCIENCE.md §1).
const (
	MinElevationM = -500.0
	MaxElevationM = 5000.0
	MinTempC      = -40.0
	MaxTempC      = 50.0
)

// Site is where the bird is to fly: its elevation and, when measured, the air
// temperature.
type Site struct {
	// ElevationM is the release site's elevation, m, taken as geopotential
	// altitude; valid −500…5000.
	ElevationM float64
	// TempC is the measured air temperature, °C, valid −40…50; nil = the ISA
	// temperature at ElevationM.
	TempC *float64
}

// Density returns the air density at the site, kg/m³; see AirDensity.
func (s Site) Density() (float64, error) { return AirDensity(s.ElevationM, s.TempC) }

// Validate returns a *ValidationError (field elevation_m or temp_c) for a site
// outside the model's range, or nil.
func (s Site) Validate() error {
	_, err := AirDensity(s.ElevationM, s.TempC)
	return err
}

// AirDensity returns the air density, kg/m³, at elevationM (m, geopotential,
// valid −500…5000) by the International Standard Atmosphere:
//
//	T_isa = 288.15 − 0.0065·H (K)
//	p     = 101325·(T_isa/288.15)^5.255876 (Pa)
//	ρ     = p/(287.05287·T)
//
// where T = T_isa, or the measured air temperature tempC + 273.15 when tempC
// is not nil (valid −40…50 °C): the same pressure, a different temperature.
// Out-of-range or non-finite arguments give a *ValidationError with field
// elevation_m or temp_c.
//
// References:
//   - U.S. Standard Atmosphere, 1976. NOAA/NASA/USAF, Washington D.C.
//   - ICAO Doc 7488/3, Manual of the ICAO Standard Atmosphere, 1993.
func AirDensity(elevationM float64, tempC *float64) (float64, error) {
	if !(elevationM >= MinElevationM && elevationM <= MaxElevationM) {
		return 0, &ValidationError{Field: "elevation_m", Value: formatNum(elevationM),
			Message: fmt.Sprintf("expected an elevation from %g to %g m above sea level", MinElevationM, MaxElevationM)}
	}
	tISA := seaLevelTempK - lapseRateKM*elevationM
	p := seaLevelPressurePa * math.Pow(tISA/seaLevelTempK, pressureExponent)
	t := tISA
	if tempC != nil {
		if !(*tempC >= MinTempC && *tempC <= MaxTempC) {
			return 0, &ValidationError{Field: "temp_c", Value: formatNum(*tempC),
				Message: fmt.Sprintf("expected an air temperature from %g to %g °C", MinTempC, MaxTempC)}
		}
		t = *tempC + celsiusToKelvin
	}
	return p / (gasConstantAir * t), nil
}

// EquivalentAirspeed returns U_e = V·√(ρ/1.225), m/s: the true airspeed vMS at
// density rhoKgM3 expressed as the speed giving the same dynamic pressure at
// sea level. Radar studies quote cruising speeds this way (SCIENCE.md §4).
func EquivalentAirspeed(vMS, rhoKgM3 float64) float64 {
	return vMS * math.Sqrt(rhoKgM3/SeaLevelDensityKgM3)
}

package assess

import (
	"math"
	"strconv"
)

// GravityMS2 is the acceleration of gravity the model uses, m/s² (SCIENCE.md).
const GravityMS2 = 9.81

// MaxLiftCoefficient is C_L,max, the lift coefficient in MinSpeed: a project
// default, from memory about the highest lift coefficient measured on gliding
// birds' wings (SCIENCE.md §2).
const MaxLiftCoefficient = 1.6

// Valid range of the aspect ratio b²/S (SCIENCE.md's validation range).
const (
	MinAspectRatio = 2.0
	MaxAspectRatio = 25.0
)

// AspectRatio returns AR = b²/S (dimensionless) for span spanM (m, tip to tip,
// wings fully spread) and area areaM2 (m², both wings plus the body strip
// between them).
func AspectRatio(spanM, areaM2 float64) float64 { return spanM * spanM / areaM2 }

// WingLoading returns Q = m·g/S, N/m², for mass massKg (kg) and wing area
// areaM2 (m²).
func WingLoading(massKg, areaM2 float64) float64 { return massKg * GravityMS2 / areaM2 }

// DiscArea returns the actuator disc area S_d = π·b²/4, m², of span spanM (m).
func DiscArea(spanM float64) float64 { return math.Pi * spanM * spanM / 4 }

// DiscLoading returns m·g/S_d, N/m², with S_d = π·b²/4 the disc swept by a
// wing of span spanM (m); massKg in kg.
func DiscLoading(massKg, spanM float64) float64 { return massKg * GravityMS2 / DiscArea(spanM) }

// BodyFrontalArea returns S_b = 0.00813·m^0.666, m², for the all-up mass
// massKg (kg).
//
// References:
//   - Pennycuick, C.J., Obrecht, H.H. & Fuller, M.R. 1988. Empirical estimates
//     of body drag of large waterfowl and raptors. J. Exp. Biol. 135:253–264
//     (the m^⅔ scaling read; the coefficient from memory).
func BodyFrontalArea(massKg float64) float64 { return 0.00813 * math.Pow(massKg, 0.666) }

// MinSpeed returns the minimum flight speed from wing loading,
// V_min = √(2·m·g/(ρ·S·C_L,max)), m/s, with C_L,max = MaxLiftCoefficient;
// massKg in kg, areaM2 in m², rhoKgM3 in kg/m³. It is an index, not the stall
// speed of a flapping bird: it is how lost wing area shows in the model
// (SCIENCE.md §2, a project default).
func MinSpeed(massKg, areaM2, rhoKgM3 float64) float64 {
	return math.Sqrt(2 * massKg * GravityMS2 / (rhoKgM3 * areaM2 * MaxLiftCoefficient))
}

// EstimatedWingArea returns S = S_ref·(b/b_ref)², m², the wing area of a bird of
// span spanM (m) geometrically similar to the reference (SCIENCE.md §2,
// derived). The result must be flagged as estimated wherever it is shown.
func EstimatedWingArea(spanM float64, ref Reference) float64 {
	r := spanM / ref.SpanM
	return ref.AreaM2 * r * r
}

// formatNum formats a number for a ValidationError's Value.
func formatNum(x float64) string { return strconv.FormatFloat(x, 'g', 10, 64) }

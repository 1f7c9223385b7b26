package assess

import (
	"errors"
	"fmt"
	"math"
)

// DefaultExpectedMargin returns the expected power margin of a healthy adult
// of mass massKg (kg) when the species table has none:
//
//	M_ref = 1.8·m^(−1/6), clamped to [1.1, 4.0]
//
// the sustained available power over P_mech at V_mp at 1.225 kg/m³. A project
// default fitted to Hedenström & Alerstam 1992 (total over minimum power
// 1.1–1.3 in the largest species, 2–4 in the smallest), SCIENCE.md §5.
//
// References:
//   - Hedenström, A. & Alerstam, T. 1992. Climbing performance of migrating
//     birds as a basis for estimating limits for fuel-carrying capacity and
//     muscle work. J. Exp. Biol. 164:19–38.
func DefaultExpectedMargin(massKg float64) float64 {
	return math.Min(4.0, math.Max(1.1, 1.8*math.Pow(massKg, -1.0/6)))
}

// defaultMuscleFactors is q by pectoral muscle score 0…3 (SCIENCE.md §5, a
// project default the centre may change).
var defaultMuscleFactors = [4]float64{0.45, 0.65, 0.85, 1.00}

// DefaultMuscleFactors returns a copy of the default flight-muscle factors,
// indexed by pectoral muscle score 0…3.
func DefaultMuscleFactors() [4]float64 { return defaultMuscleFactors }

// MaxMuscleScore is the top of the pectoral muscle score scale (0–3, Bairlein
// 1995).
const MaxMuscleScore = 3

// MuscleFactor returns the flight-muscle factor q, the patient's sustained
// available power over a healthy bird's (dimensionless), for a pectoral muscle
// score on the 0–3 scale: 3 → 1.00, 2 → 0.85, 1 → 0.65, 0 → 0.45 (a project
// default), or factors[score] when factors is not nil (a centre's own
// values, each in (0, 2]). A score outside 0–3 or a bad factor gives a
// *ValidationError (field muscle_score or muscle_factors).
func MuscleFactor(score int, factors *[4]float64) (float64, error) {
	table := defaultMuscleFactors
	if factors != nil {
		table = *factors
	}
	for i, q := range table {
		if !(q > 0 && q <= 2) {
			return 0, &ValidationError{Field: "muscle_factors", Value: formatNum(q),
				Message: fmt.Sprintf("muscle factor for score %d must be above 0 and at most 2", i)}
		}
	}
	if score < 0 || score > MaxMuscleScore {
		return 0, &ValidationError{Field: "muscle_score", Value: fmt.Sprint(score),
			Message: "expected a pectoral muscle score from 0 to 3"}
	}
	return table[score], nil
}

// leanReferenceFraction is m_lean,ref/m_ref: a healthy reference bird is taken
// to carry 5 % fat (SCIENCE.md §5).
const leanReferenceFraction = 0.95

// AvailablePower returns the patient's sustained available power, W:
//
//	P_av = P_av,ref · q · min(1, m_lean/m_lean,ref)
//
// with m_lean = massKg·(1 − fatFraction), m_lean,ref = refMassKg·0.95, q the
// muscle factor and refAvailableW = M_ref·P_mech,ref(V_mp) at 1.225 kg/m³
// (SCIENCE.md §5, a project model).
func AvailablePower(refAvailableW, muscleFactor, massKg, fatFraction, refMassKg float64) float64 {
	lean := massKg * (1 - fatFraction)
	return refAvailableW * muscleFactor * math.Min(1, lean/(refMassKg*leanReferenceFraction))
}

// ClimbRate returns the rate of climb at V_mp, m/s, of a bird of weight
// m·g = massKg·g with available power availableW and P_mech(V_mp) = minPowerW:
// V_z = (P_av − P_mech(V_mp))/(m·g). Negative when the bird cannot hold level
// flight.
//
// References:
//   - Hedenström, A. & Alerstam, T. 1992. J. Exp. Biol. 164:19–38 (climb
//     power m·g·V_z as the power margin).
func ClimbRate(availableW, minPowerW, massKg float64) float64 {
	return (availableW - minPowerW) / (massKg * GravityMS2)
}

// marginalSiteMargin is the healthy margin at the site at or below which the
// excess-power fraction is undefined (SCIENCE.md §5).
const marginalSiteMargin = 1.05

// ExcessPowerFraction returns E = (M − 1)/(M_ref,site − 1), the share of a
// healthy bird's spare power at the site that the patient has, and false
// when the healthy margin at the site refSiteMargin is 1.05 or less: the
// site leaves even a healthy bird almost no reserve and E is undefined.
func ExcessPowerFraction(margin, refSiteMargin float64) (float64, bool) {
	if !(refSiteMargin > marginalSiteMargin) {
		return 0, false
	}
	return (margin - 1) / (refSiteMargin - 1), true
}

// SpeedWindow is the range of airspeeds a bird can sustain: where
// P_mech(V) ≤ P_av, starting no lower than V_min (SCIENCE.md §5).
type SpeedWindow struct {
	LowMS, HighMS float64
	// SlowUnresolved is set when the curve stays within P_av down to zero
	// speed (P_hover is a lower bound), so the low end is only V_min: the
	// model cannot resolve slow flight.
	SlowUnresolved bool
}

// Reasons Bird.SpeedWindow finds no window.
var (
	// ErrNoLevelFlight: available power is below P_mech(V_mp), margin < 1.
	ErrNoLevelFlight = errors.New("assess: available power below the minimum power: no sustained level flight by this model")
	// ErrMinSpeedAboveWindow: V_min lies above the fastest sustainable speed.
	ErrMinSpeedAboveWindow = errors.New("assess: minimum speed from wing loading above the fastest sustainable speed")
)

// SpeedWindow returns the airspeeds, m/s, at which the bird can sustain level
// flight on availableW (W): from max(V_min, the slow root of P_mech(V) = P_av)
// to the fast root. It returns an error saying why when there is none: the
// margin is below 1, or V_min lies above the fast root.
func (b Bird) SpeedWindow(availableW float64) (SpeedWindow, error) {
	if !(availableW >= b.PowerMech(b.vmp)) {
		return SpeedWindow{}, ErrNoLevelFlight
	}
	gap := func(v float64) float64 { return b.PowerMech(v) - availableW }
	hi := 2 * b.vmp
	for i := 0; i < 64 && gap(hi) <= 0; i++ {
		hi *= 2
	}
	w := SpeedWindow{HighMS: root(gap, b.vmp, hi, speedTolMS)}
	// Hover power is at least P_mech(0), so P_hover ≤ P_av lands here too.
	if gap(0) <= 0 || b.HoverPower() <= availableW {
		w.SlowUnresolved = true
	} else {
		w.LowMS = root(gap, 0, b.vmp, speedTolMS)
	}
	vmin := b.MinSpeed()
	if w.SlowUnresolved || vmin > w.LowMS {
		w.LowMS = vmin
	}
	if w.LowMS > w.HighMS {
		return SpeedWindow{}, ErrMinSpeedAboveWindow
	}
	return w, nil
}

package assess

import (
	"fmt"
	"math"
	"slices"
)

// FatScale names the scale a fat score was read on. Store it with every score.
type FatScale string

// Fat scales.
const (
	// FatScaleKaiser is Kaiser's 0–8 scale (Kaiser 1993, J. Field Ornithol. 64:246).
	FatScaleKaiser FatScale = "0-8"
	// FatScaleHelmsDrury is Helms & Drury's 0–5 scale (Helms & Drury 1960,
	// Bird-Banding 31:1).
	FatScaleHelmsDrury FatScale = "0-5"
)

// FatScales lists the fat scales.
var FatScales = []FatScale{FatScaleKaiser, FatScaleHelmsDrury}

// Valid reports whether s is one of FatScales.
func (s FatScale) Valid() bool { return slices.Contains(FatScales, s) }

// MaxScore returns the highest score of the scale, or −1 for an unknown scale.
func (s FatScale) MaxScore() int {
	switch s {
	case FatScaleKaiser:
		return 8
	case FatScaleHelmsDrury:
		return 5
	}
	return -1
}

// FatFractions holds a centre's own fat-fraction tables (fat mass over body
// mass for each score). A nil table means SCIENCE.md §7's default. Each value
// must lie in [0, 0.6].
type FatFractions struct {
	Kaiser     *[9]float64 `json:"0-8,omitempty"` // scores 0…8
	HelmsDrury *[6]float64 `json:"0-5,omitempty"` // scores 0…5
}

// Default fat fractions by score, a project default (SCIENCE.md §7): about
// 2 % per class to class 4 on the 0–8 scale (from memory: ≈ 2.1 % per class in
// sparrows, Wenker et al. 2022), steeper above as fat covers the flight
// muscles. Fat scores explain less than half the variation in true fat
// (Krementz & Pendleton 1990, Condor 92:500).
var (
	defaultFatKaiser     = [9]float64{0.01, 0.03, 0.05, 0.07, 0.09, 0.14, 0.20, 0.28, 0.36}
	defaultFatHelmsDrury = [6]float64{0.01, 0.03, 0.06, 0.10, 0.18, 0.30}
)

// DefaultFatFractions returns a copy of the default tables.
func DefaultFatFractions() FatFractions {
	k, h := defaultFatKaiser, defaultFatHelmsDrury
	return FatFractions{Kaiser: &k, HelmsDrury: &h}
}

// AssumedFatFraction is φ when no fat score is known (SCIENCE.md §5).
const AssumedFatFraction = 0.05

// maxFatFraction bounds a centre's table: lean mass stays positive and the
// range's logarithm finite.
const maxFatFraction = 0.6

// FatFraction returns the fat fraction φ (fat mass over body mass,
// dimensionless) for score on scale, from tables (nil or a nil table: the
// defaults of SCIENCE.md §7, a project default). A score outside the scale,
// an unknown scale or a table value outside [0, 0.6] gives a
// *ValidationError (field fat_score, fat_scale or fat_fractions).
func FatFraction(score int, scale FatScale, tables *FatFractions) (float64, error) {
	table, err := fatTable(scale, tables)
	if err != nil {
		return 0, err
	}
	if score < 0 || score >= len(table) {
		return 0, &ValidationError{Field: "fat_score", Value: fmt.Sprint(score),
			Message: fmt.Sprintf("expected a fat score from 0 to %d on the %s scale", len(table)-1, scale)}
	}
	return table[score], nil
}

// fatTable returns the table of scale, checked.
func fatTable(scale FatScale, tables *FatFractions) ([]float64, error) {
	var table []float64
	switch scale {
	case FatScaleKaiser:
		table = defaultFatKaiser[:]
		if tables != nil && tables.Kaiser != nil {
			table = tables.Kaiser[:]
		}
	case FatScaleHelmsDrury:
		table = defaultFatHelmsDrury[:]
		if tables != nil && tables.HelmsDrury != nil {
			table = tables.HelmsDrury[:]
		}
	default:
		return nil, &ValidationError{Field: "fat_scale", Value: string(scale),
			Message: `expected the fat score's scale, "0-8" (Kaiser) or "0-5" (Helms & Drury)`}
	}
	for i, v := range table {
		if !(v >= 0 && v <= maxFatFraction) {
			return nil, &ValidationError{Field: "fat_fractions", Value: formatNum(v),
				Message: fmt.Sprintf("fat fraction for score %d on the %s scale must be from 0 to %g", i, scale, maxFatFraction)}
		}
	}
	return table, nil
}

// FatEnergyJKg is the energy density of fat used by the range equation, J/kg
// (from memory, SCIENCE.md §7).
const FatEnergyJKg = 3.9e7

// StillAirRangeM returns the still-air range on fat fraction phi (valid
// [0, 1)), m, by the Breguet form
//
//	Y = (e·η·N/g)·ln(1/(1−φ))
//
// with e = FatEnergyJKg, eta the flight-muscle efficiency and liftDrag the
// effective lift:drag ratio N. A rough guide, for migrants only.
//
// References:
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press (from memory).
func StillAirRangeM(liftDrag, eta, phi float64) float64 {
	return FatEnergyJKg * eta * liftDrag / GravityMS2 * -math.Log1p(-phi)
}

package assess

// BurstFactor is P_burst/P_av, sprint power over maximum continuous power in
// the pigeon, 20.4 W / 10.5 W (SCIENCE.md §6).
//
// References:
//   - Pennycuick, C.J. 1968. J. Exp. Biol. 49:527–555 (from memory: partly
//     calculated values in that paper).
const BurstFactor = 1.94

// TakeoffIndex returns T = P_burst/P_hover = 1.94·P_av/P_hover, dimensionless:
// the burst power the bird has over the (lower-bound) power a standing
// takeoff needs; availableW and hoverW in W (SCIENCE.md §6).
func TakeoffIndex(availableW, hoverW float64) float64 {
	return BurstFactor * availableW / hoverW
}

// TakeoffBand sorts a takeoff index into three bands (SCIENCE.md §6, a project
// default). The species' normal launch mode always decides which trials
// count; the band never excuses a failed trial.
type TakeoffBand string

// Takeoff bands.
const (
	// TakeoffPowered: T ≥ 1.2.
	TakeoffPowered TakeoffBand = "powered"
	// TakeoffAssisted: 0.9 ≤ T < 1.2.
	TakeoffAssisted TakeoffBand = "assisted"
	// TakeoffShort: T < 0.9.
	TakeoffShort TakeoffBand = "short"
)

// Band limits of the takeoff index.
const (
	TakeoffPoweredMin  = 1.2
	TakeoffAssistedMin = 0.9
)

// TakeoffBands lists the bands from most to least power.
var TakeoffBands = []TakeoffBand{TakeoffPowered, TakeoffAssisted, TakeoffShort}

// TakeoffBandOf returns the band of takeoff index t.
func TakeoffBandOf(t float64) TakeoffBand {
	switch {
	case t >= TakeoffPoweredMin:
		return TakeoffPowered
	case t >= TakeoffAssistedMin:
		return TakeoffAssisted
	}
	return TakeoffShort
}

// Label returns the band in words for people.
func (b TakeoffBand) Label() string {
	switch b {
	case TakeoffPowered:
		return "enough burst power to rise from a standstill"
	case TakeoffAssisted:
		return "rising from a standstill needs a push from the legs or a headwind"
	case TakeoffShort:
		return "too little burst power to rise from a standstill"
	}
	return string(b)
}

// MardenLiftNKg is the maximum lift per kilogram of flight muscle, N/kg,
// about 57 ± 14 (SCIENCE.md §6): a vertical takeoff needs flight muscle of
// at least g/57 ≈ 17 % of body mass.
//
// References:
//   - Marden, J.H. & Allen, L.R. 2002, cited in Schilder, R.J. & Marden, J.H.
//     2004. J. Exp. Biol. 207:767–776.
const MardenLiftNKg = 57.0

// MardenLiftRatio returns 57·m_muscle/(m·g), the greatest lift the flight
// muscle muscleKg (kg) can make over the weight of a bird of massKg (kg):
// 1 or more means enough muscle for a vertical takeoff by Marden's scaling
// (Marden & Allen 2002, in Schilder & Marden 2004, J. Exp. Biol. 207:767).
func MardenLiftRatio(muscleKg, massKg float64) float64 {
	return MardenLiftNKg * muscleKg / (massKg * GravityMS2)
}

package assess

import (
	"math"
)

// Body is the shape of one bird, as the power-curve model needs it.
type Body struct {
	// MassKg is the all-up mass, kg (valid 0.5 g to 100 kg).
	MassKg float64
	// SpanM is the wingspan tip to tip, wings fully spread, m (valid 10 mm to 5 m).
	SpanM float64
	// AreaM2 is the wing area, both wings plus the body strip between them, m²;
	// b²/S must lie in 2–25 and m·g/S in 1–1000 N/m².
	AreaM2 float64
	// IntactAspectRatio is the aspect ratio of the intact wing of the species,
	// used for profile power (SCIENCE.md §3); 0 = the bird's own b²/S.
	IntactAspectRatio float64
	// Passerine selects the passerine basal metabolic rate.
	Passerine bool
}

// Bird is the power-curve model of one body in air of one density with one
// parameter set (SCIENCE.md §3–4). Make it with NewBird; the zero Bird is not
// usable. A Bird is immutable and safe for concurrent use.
type Bird struct {
	body   Body
	rho    float64
	params Params

	weight   float64 // W = m·g, N
	vh       float64 // induced velocity in hover, m/s
	vh4      float64 // vh⁴
	bodyArea float64 // S_b, m²
	hsA      float64 // a = 2k(mg)²/(πρb²), W·m/s
	hsC      float64 // c = ½ρS_bC_Db, W/(m/s)³
	vStar    float64 // V*, m/s
	pam      float64 // P_am, W
	pro      float64 // P_pro, W
	basal    float64 // P_met, W
	vmp      float64 // V_mp, m/s
	vmr      float64 // V_mr, m/s
	vmrMech  float64 // V_mr,mech, m/s
}

// NewBird returns the model of body in air of density rhoKgM3 (kg/m³, valid
// 0.5–1.7) with parameter set p. It finds the characteristic speeds once, so
// the methods are cheap. Out-of-range input gives a *ValidationError.
func NewBird(body Body, rhoKgM3 float64, p Params) (Bird, error) {
	if err := validateBody(body); err != nil {
		return Bird{}, err
	}
	if !(rhoKgM3 >= 0.5 && rhoKgM3 <= 1.7) {
		return Bird{}, &ValidationError{Field: "air_density_kg_m3", Value: formatNum(rhoKgM3),
			Message: "expected an air density from 0.5 to 1.7 kg/m³"}
	}
	if err := p.Validate(); err != nil {
		return Bird{}, err
	}
	return newBird(body, rhoKgM3, p), nil
}

// newBird builds the model of already validated input.
func newBird(body Body, rho float64, p Params) Bird {
	if body.IntactAspectRatio == 0 {
		body.IntactAspectRatio = AspectRatio(body.SpanM, body.AreaM2)
	}
	b := Bird{body: body, rho: rho, params: p}
	b.weight = body.MassKg * GravityMS2
	b.vh = math.Sqrt(b.weight / (2 * rho * DiscArea(body.SpanM)))
	b.vh4 = b.vh * b.vh * b.vh * b.vh
	b.bodyArea = BodyFrontalArea(body.MassKg)
	b.hsA = 2 * p.K * b.weight * b.weight / (math.Pi * rho * body.SpanM * body.SpanM)
	b.hsC = 0.5 * rho * b.bodyArea * p.CDb
	b.vStar = math.Pow(b.hsA/(3*b.hsC), 0.25)
	b.pam = b.hsA/b.vStar + b.hsC*b.vStar*b.vStar*b.vStar
	b.pro = p.CPro / body.IntactAspectRatio * b.pam
	b.basal = BasalMetabolicRate(body.MassKg, body.Passerine)
	b.findSpeeds()
	return b
}

// BasalMetabolicRate returns the basal metabolic rate P_met, W, of a bird of
// mass massKg (kg): 6.25·m^0.724 for passerines, 3.79·m^0.723 for other birds.
//
// References:
//   - Lasiewski, R.C. & Dawson, W.R. 1967. A re-examination of the relation
//     between standard metabolic rate and body weight in birds. Condor 69:13–23.
func BasalMetabolicRate(massKg float64, passerine bool) float64 {
	if passerine {
		return 6.25 * math.Pow(massKg, 0.724)
	}
	return 3.79 * math.Pow(massKg, 0.723)
}

// Body returns the body the model was made for, with IntactAspectRatio filled in.
func (b Bird) Body() Body { return b.body }

// Density returns the air density of the model, kg/m³.
func (b Bird) Density() float64 { return b.rho }

// Params returns the parameter set of the model.
func (b Bird) Params() Params { return b.params }

// AspectRatio returns the bird's own b²/S.
func (b Bird) AspectRatio() float64 { return AspectRatio(b.body.SpanM, b.body.AreaM2) }

// WingLoading returns m·g/S, N/m².
func (b Bird) WingLoading() float64 { return WingLoading(b.body.MassKg, b.body.AreaM2) }

// DiscLoading returns m·g/(π·b²/4), N/m².
func (b Bird) DiscLoading() float64 { return DiscLoading(b.body.MassKg, b.body.SpanM) }

// MinSpeed returns V_min at the model's density, m/s; see MinSpeed.
func (b Bird) MinSpeed() float64 { return MinSpeed(b.body.MassKg, b.body.AreaM2, b.rho) }

// BodyFrontalArea returns S_b, m²; see BodyFrontalArea.
func (b Bird) BodyFrontalArea() float64 { return b.bodyArea }

// InducedVelocity returns the actuator disc's induced velocity at airspeed vMS
// (m/s, ≥ 0), m/s:
//
//	v_h = √(W/(2ρS_d)), v_i(V) = √(−V²/2 + √(V⁴/4 + v_h⁴))
//
// evaluated as √(v_h⁴/(V²/2 + √(V⁴/4 + v_h⁴))), the same value without the
// cancellation at high speed (SCIENCE.md §3, derived from momentum theory).
func (b Bird) InducedVelocity(vMS float64) float64 {
	v2 := vMS * vMS
	return math.Sqrt(b.vh4 / (v2/2 + math.Sqrt(v2*v2/4+b.vh4)))
}

// PowerInduced returns the induced power P_ind(V) = k·W·v_i(V), W, at airspeed
// vMS (m/s, ≥ 0), the exact actuator-disc (momentum) form valid from hover to
// high speed; at high speed it tends to 2k(mg)²/(πρb²V).
//
// References:
//   - Pennycuick, C.J. 1968. Power requirements for horizontal flight in the
//     pigeon Columba livia. J. Exp. Biol. 49:527–555.
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press.
func (b Bird) PowerInduced(vMS float64) float64 {
	return b.params.K * b.weight * b.InducedVelocity(vMS)
}

// PowerParasite returns the parasite power P_par(V) = ½·ρ·V³·S_b·C_Db, W, at
// airspeed vMS (m/s, ≥ 0). Live birds measured C_Db ≈ 0.08 in a wind tunnel
// (Pennycuick et al. 1996); the sets' 0.1 is the value adopted since (from
// memory).
//
// References:
//   - Pennycuick, C.J., Obrecht, H.H. & Fuller, M.R. 1988. J. Exp. Biol. 135:253–264.
//   - Pennycuick, C.J., Klaassen, M., Kvist, A. & Lindström, Å. 1996. J. Exp. Biol. 199:2757.
func (b Bird) PowerParasite(vMS float64) float64 {
	return b.hsC * vMS * vMS * vMS
}

// AbsoluteMinPower returns P_am = a/V* + c·V*³, W, the minimum of the
// high-speed form a/V + c·V³ with a = 2k(mg)²/(πρb²), c = ½ρS_bC_Db,
// V* = (a/(3c))^¼ (SCIENCE.md §3, derived). It equals
// 1.0516510·k^¾·(mg)^1.5·(S_bC_Db)^¼/(ρ^½·b^1.5).
func (b Bird) AbsoluteMinPower() float64 { return b.pam }

// AbsoluteMinPowerSpeed returns V* = (a/(3c))^¼, m/s, the speed of
// AbsoluteMinPower; it equals 0.8071369·k^¼·(mg)^½/(ρ^½·b^½·(S_bC_Db)^¼).
func (b Bird) AbsoluteMinPowerSpeed() float64 { return b.vStar }

// ProfilePower returns P_pro = (C_pro/AR_intact)·P_am, W, constant over the
// speed range, with AR_intact the intact wing's aspect ratio (the species
// reference's, else the bird's own): losing wing area must not lower it.
//
// References:
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press (C_pro from memory).
func (b Bird) ProfilePower() float64 { return b.pro }

// PowerMech returns the mechanical power P_mech(V) = P_ind(V) + P_par(V) +
// P_pro, W, at airspeed vMS (m/s, ≥ 0) in level flight.
func (b Bird) PowerMech(vMS float64) float64 {
	return b.PowerInduced(vMS) + b.PowerParasite(vMS) + b.pro
}

// BasalPower returns P_met, W; see BasalMetabolicRate.
func (b Bird) BasalPower() float64 { return b.basal }

// PowerChem returns the chemical (fuel) power P_chem(V) = R·(P_mech(V)/η +
// P_met), W, at airspeed vMS (m/s, ≥ 0).
//
// References:
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press (R from memory).
//   - Lasiewski, R.C. & Dawson, W.R. 1967. Condor 69:13–23 (P_met).
func (b Bird) PowerChem(vMS float64) float64 { return b.chem(b.PowerMech(vMS)) }

// chem returns the chemical power for mechanical power mechW.
func (b Bird) chem(mechW float64) float64 {
	return b.params.R * (mechW/b.params.Eta + b.basal)
}

// HoverPower returns the power to take off standing, a lower bound:
// P_hover = max(k, 1)·W·v_h + P_pro, W, with v_h = √(W/(2ρS_d)). It differs from
// PowerMech(0) only when k < 1. Every rule about hovering uses it.
//
// References:
//   - Rayner, J.M.V. 1979. A new approach to animal flight mechanics.
//     J. Exp. Biol. 80:17–54.
func (b Bird) HoverPower() float64 {
	return math.Max(b.params.K, 1)*b.weight*b.vh + b.pro
}

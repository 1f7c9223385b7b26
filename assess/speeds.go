package assess

import "math"

// speedTolMS is the tolerance of the numeric searches, m/s: well inside
// SCIENCE.md's 10⁻⁴ m/s.
const speedTolMS = 1e-9

// findSpeeds fills V_mp, V_mr and V_mr,mech. Each minimum is the root of a
// derivative: P_mech'(V) = 0 for V_mp, and V·P'(V) − P(V) = 0 for the minimum
// of P(V)/V, which lies above V_mp (there d(P/V)/dV = −P/V² < 0).
func (b *Bird) findSpeeds() {
	b.vmp = rootAbove(b.slopeMech, 1e-3*b.vStar, b.vStar)
	eta, r := b.params.Eta, b.params.R
	b.vmr = rootAbove(func(v float64) float64 {
		return v*r*b.slopeMech(v)/eta - b.PowerChem(v)
	}, b.vmp, 2*b.vmp)
	b.vmrMech = rootAbove(func(v float64) float64 {
		return v*b.slopeMech(v) - b.PowerMech(v)
	}, b.vmp, 2*b.vmp)
}

// slopeMech returns dP_mech/dV at airspeed v, W/(m/s). The induced term
// follows by differentiating v_i⁴ + V²·v_i² = v_h⁴ (the momentum equation the
// actuator-disc v_i solves): dv_i/dV = −V·v_i/(2·v_i² + V²).
func (b Bird) slopeMech(v float64) float64 {
	vi := b.InducedVelocity(v)
	return -b.params.K*b.weight*v*vi/(2*vi*vi+v*v) + 3*b.hsC*v*v
}

// rootAbove returns the root above lo of f, which is negative at lo and
// changes sign once above it; guess is a first upper bound, doubled until f is
// positive there.
func rootAbove(f func(float64) float64, lo, guess float64) float64 {
	hi := guess
	for i := 0; i < 64 && f(hi) <= 0; i++ {
		lo, hi = hi, 2*hi
	}
	return root(f, lo, hi, speedTolMS)
}

// root returns the x in [lo, hi] where the continuous f changes sign, to
// within tol, by the Illinois variant of false position: superlinear on
// smooth functions, and bracketed, so it cannot escape [lo, hi]. f(lo) and
// f(hi) must differ in sign. The iteration count is capped.
func root(f func(float64) float64, lo, hi, tol float64) float64 {
	flo, fhi := f(lo), f(hi)
	side := 0
	x := (lo + hi) / 2
	for i := 0; i < 100 && hi-lo > tol; i++ {
		x = (lo*fhi - hi*flo) / (fhi - flo)
		if !(x > lo && x < hi) { // no progress by interpolation: bisect
			x = (lo + hi) / 2
		}
		fx := f(x)
		switch {
		case fx == 0:
			return x
		case (fx < 0) == (flo < 0):
			lo, flo = x, fx
			if side == -1 {
				fhi /= 2
			}
			side = -1
		default:
			hi, fhi = x, fx
			if side == 1 {
				flo /= 2
			}
			side = 1
		}
	}
	return x
}

// MinPowerSpeed returns V_mp, m/s: the airspeed that minimises PowerMech,
// found numerically to 10⁻⁹ m/s (SCIENCE.md §4). It lies within 0.2 % of
// AbsoluteMinPowerSpeed for aspect ratios of 3 and more.
func (b Bird) MinPowerSpeed() float64 { return b.vmp }

// MaxRangeSpeed returns V_mr, m/s: the airspeed that minimises PowerChem(V)/V,
// the fuel burnt per distance (the tangent from the origin to the chemical
// power curve), found numerically (SCIENCE.md §4). It is not a fixed multiple
// of V_mp.
func (b Bird) MaxRangeSpeed() float64 { return b.vmr }

// MaxRangeSpeedMech returns V_mr,mech, m/s, the airspeed that minimises
// PowerMech(V)/V, the mechanical twin of MaxRangeSpeed.
func (b Bird) MaxRangeSpeedMech() float64 { return b.vmrMech }

// EffectiveLiftDrag returns the effective lift:drag ratio at the maximum-range
// speed, N = m·g·V_mr/(η·P_chem(V_mr)), dimensionless: the
// mechanical-equivalent convention of Pennycuick's range equation (from
// memory, SCIENCE.md §4); about 9 for a 100 g bird.
//
// References:
//   - Pennycuick, C.J. 2008. Modelling the Flying Bird. Academic Press (from memory).
func (b Bird) EffectiveLiftDrag() float64 {
	return b.weight * b.vmr / (b.params.Eta * b.PowerChem(b.vmr))
}

// WingbeatFrequency returns f, Hz; see WingbeatFrequency.
func (b Bird) WingbeatFrequency() float64 {
	return WingbeatFrequency(b.body.MassKg, b.body.SpanM, b.body.AreaM2, b.rho)
}

// WingbeatFrequency returns the wingbeat frequency in cruising flight,
// f = m^(3/8)·g^(1/2)·b^(−23/24)·S^(−1/3)·ρ^(−3/8), Hz, with no fitted
// coefficient; massKg in kg, spanM in m, areaM2 in m², rhoKgM3 in kg/m³.
// Observed frequencies were 0.81–1.05·f in 14 of 16 species (Pennycuick 2001).
//
// References:
//   - Pennycuick, C.J. 1996. Wingbeat frequency of birds in steady cruising
//     flight: new data and improved predictions. J. Exp. Biol. 199:1613–1618.
//   - Pennycuick, C.J. 2001. Speeds and wingbeat frequencies of migrating
//     birds compared with calculated benchmarks. J. Exp. Biol. 204:3283–3294.
func WingbeatFrequency(massKg, spanM, areaM2, rhoKgM3 float64) float64 {
	return math.Pow(massKg, 3.0/8) * math.Sqrt(GravityMS2) * math.Pow(spanM, -23.0/24) *
		math.Cbrt(1/areaM2) * math.Pow(rhoKgM3, -3.0/8)
}

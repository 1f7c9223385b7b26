package assess

import (
	"errors"
	"fmt"
	"math"
)

// CurvePoint is one point of a power curve.
type CurvePoint struct {
	SpeedMS    float64 `json:"speed_m_s"`
	PowerMechW float64 `json:"power_mech_w"`
	PowerChemW float64 `json:"power_chem_w"`
}

// curveStepMS is the largest speed step of a result's curves, m/s.
const curveStepMS = 0.25

// FlightResult is the flight model's account of one patient at one site. Its
// JSON form is the `aloft curve --json` object: keys are added by later
// work, never renamed. A quantity undefined in a case is null, with an entry
// in Notes saying why; no field is ever NaN or infinite.
type FlightResult struct {
	AirDensityKgM3      float64     `json:"air_density_kg_m3"`        // at the site
	AspectRatio         float64     `json:"aspect_ratio"`             // b²/S, the patient's
	WingLoadingNM2      float64     `json:"wing_loading_n_m2"`        // m·g/S
	DiscLoadingNM2      float64     `json:"disc_loading_n_m2"`        // m·g/(πb²/4)
	WingAreaEstimated   bool        `json:"wing_area_estimated"`      // area from span and the reference
	MinSpeedMS          float64     `json:"min_speed_m_s"`            // V_min at the site
	MinPowerSpeedMS     float64     `json:"min_power_speed_m_s"`      // V_mp at the site
	MaxRangeSpeedMS     float64     `json:"max_range_speed_m_s"`      // V_mr (chemical) at the site
	MaxRangeSpeedMechMS float64     `json:"max_range_speed_mech_m_s"` // argmin P_mech/V
	AbsoluteMinPowerW   float64     `json:"absolute_min_power_w"`     // P_am
	ProfilePowerW       float64     `json:"profile_power_w"`          // P_pro
	MinPowerMechW       float64     `json:"min_power_mech_w"`         // P_mech(V_mp)
	MinPowerChemW       float64     `json:"min_power_chem_w"`         // P_chem(V_mp)
	HoverPowerW         float64     `json:"hover_power_w"`            // P_hover
	WingbeatHz          float64     `json:"wingbeat_hz"`              // f
	EffectiveLiftDrag   float64     `json:"effective_lift_drag"`      // N
	ExpectedMargin      float64     `json:"expected_margin"`          // M_ref at 1.225 kg/m³
	ExpectedMarginSite  float64     `json:"expected_margin_site"`     // M_ref,site
	AvailablePowerW     float64     `json:"available_power_w"`        // P_av
	PowerMargin         float64     `json:"power_margin"`             // M
	MarginRatio         float64     `json:"margin_ratio"`             // M/M_ref,site
	ExcessPowerFraction *float64    `json:"excess_power_fraction"`    // E; null at a marginal site
	ClimbRateMS         float64     `json:"climb_rate_m_s"`           // V_z at V_mp
	SpeedWindowMS       *[2]float64 `json:"speed_window_m_s"`         // [low, high]; null without one
	TakeoffIndex        float64     `json:"takeoff_index"`            // T
	TakeoffBand         TakeoffBand `json:"takeoff_band"`
	FatFraction         float64     `json:"fat_fraction"` // φ, scored or assumed
	FatAssumed          bool        `json:"fat_assumed"`
	MuscleAssumed       bool        `json:"muscle_assumed"`
	StillAirRangeKm     *float64    `json:"still_air_range_km"` // migrants with a fat score
	Params              Params      `json:"params"`
	ReferenceMinSpeedMS float64     `json:"reference_min_speed_m_s"` // the reference's V_min at the site
	// MardenLiftRatio is 57 N/kg × flight muscle over weight (MardenLiftRatio),
	// the muscle taken as the reference's fraction of its mass, scaled as the
	// available power is (muscle factor, lean mass); null when the reference
	// has no flight-muscle fraction.
	MardenLiftRatio *float64     `json:"marden_lift_ratio"`
	Notes           []string     `json:"notes"`
	Curve           []CurvePoint `json:"curve"`           // the patient, 0 to 1.5·V_mr
	ReferenceCurve  []CurvePoint `json:"reference_curve"` // the healthy reference at the site

	// AreaM2 is the wing area used, measured or estimated, m².
	AreaM2 float64 `json:"-"`
	// ReferenceAvailablePowerW is P_av,ref = M_ref·P_mech,ref(V_mp) at 1.225 kg/m³, W.
	ReferenceAvailablePowerW float64 `json:"-"`
	// Window is the speed window when SpeedWindowMS is not null.
	Window SpeedWindow `json:"-"`
	// Bird is the patient's model at the site; ReferenceBird the healthy
	// reference's at the site. Charts draw their curves from these.
	Bird, ReferenceBird Bird `json:"-"`
}

// Flight evaluates the flight model for in (SCIENCE.md §1–7): air density,
// shape, the power curve, characteristic speeds, the power margin against the
// healthy reference, takeoff, fat and range, and both curves. Invalid input
// gives ValidationErrors; the result is deterministic.
func Flight(in FlightInput) (FlightResult, error) {
	if err := in.Validate(); err != nil {
		return FlightResult{}, err
	}
	rho, _ := in.Site.Density()
	p := in.params()
	body, estimated := in.body()
	ref := in.reference(body)
	refBody := Body{MassKg: ref.MassKg, SpanM: ref.SpanM, AreaM2: ref.AreaM2, Passerine: in.Passerine}
	bird := newBird(body, rho, p)
	refSea := newBird(refBody, SeaLevelDensityKgM3, p)
	refSite := refSea
	if rho != SeaLevelDensityKgM3 {
		refSite = newBird(refBody, rho, p)
	}
	r := FlightResult{
		AirDensityKgM3: rho, AspectRatio: bird.AspectRatio(), WingLoadingNM2: bird.WingLoading(),
		DiscLoadingNM2: bird.DiscLoading(), WingAreaEstimated: estimated, MinSpeedMS: bird.MinSpeed(),
		MinPowerSpeedMS: bird.vmp, MaxRangeSpeedMS: bird.vmr, MaxRangeSpeedMechMS: bird.vmrMech,
		AbsoluteMinPowerW: bird.pam, ProfilePowerW: bird.pro, MinPowerMechW: bird.PowerMech(bird.vmp),
		MinPowerChemW: bird.PowerChem(bird.vmp), HoverPowerW: bird.HoverPower(),
		WingbeatHz: bird.WingbeatFrequency(), EffectiveLiftDrag: bird.EffectiveLiftDrag(),
		Params: p, ReferenceMinSpeedMS: refSite.MinSpeed(), Notes: []string{},
		AreaM2: body.AreaM2, Bird: bird, ReferenceBird: refSite,
	}
	if estimated {
		r.note("wing_area_estimated: wing area estimated from the span and the species reference by geometric similarity, not measured")
	}
	if err := r.margins(in, ref, refSea, refSite); err != nil {
		return FlightResult{}, err
	}
	r.fatRange(in)
	r.Curve, r.ReferenceCurve = curves(bird, refSite)
	if err := r.checkFinite(); err != nil {
		return FlightResult{}, err
	}
	return r, nil
}

// margins fills the power margin, the window, takeoff and Marden's check.
func (r *FlightResult) margins(in FlightInput, ref Reference, refSea, refSite Bird) error {
	phi, q, err := r.condition(in)
	if err != nil {
		return err
	}
	r.ExpectedMargin = ref.ExpectedMargin
	if r.ExpectedMargin == 0 {
		r.ExpectedMargin = DefaultExpectedMargin(ref.MassKg)
	}
	r.ReferenceAvailablePowerW = r.ExpectedMargin * refSea.PowerMech(refSea.vmp)
	r.AvailablePowerW = AvailablePower(r.ReferenceAvailablePowerW, q, in.MassKg, phi, ref.MassKg)
	r.ExpectedMarginSite = r.ReferenceAvailablePowerW / refSite.PowerMech(refSite.vmp)
	r.PowerMargin = r.AvailablePowerW / r.MinPowerMechW
	r.MarginRatio = r.PowerMargin / r.ExpectedMarginSite
	if e, ok := ExcessPowerFraction(r.PowerMargin, r.ExpectedMarginSite); ok {
		r.ExcessPowerFraction = &e
	} else {
		r.note(fmt.Sprintf("excess_power_fraction: the site is marginal for the species by this model: "+
			"a healthy bird's margin here is %.2f (at most %.2f), leaving almost no reserve", r.ExpectedMarginSite, marginalSiteMargin))
	}
	r.ClimbRateMS = ClimbRate(r.AvailablePowerW, r.MinPowerMechW, in.MassKg)
	r.window()
	r.TakeoffIndex = TakeoffIndex(r.AvailablePowerW, r.HoverPowerW)
	r.TakeoffBand = TakeoffBandOf(r.TakeoffIndex)
	if f := ref.FlightMuscleFraction; f > 0 {
		// The flight muscle scales as the available power does: by the muscle
		// factor and by lean mass against the reference's.
		muscle := f * ref.MassKg * r.AvailablePowerW / r.ReferenceAvailablePowerW
		m := MardenLiftRatio(muscle, in.MassKg)
		r.MardenLiftRatio = &m
	} else {
		r.note("marden_lift_ratio: the species' flight-muscle fraction is not known")
	}
	return nil
}

// condition returns the fat fraction and the muscle factor, scored or assumed.
func (r *FlightResult) condition(in FlightInput) (phi, q float64, err error) {
	phi, q = AssumedFatFraction, 1
	if in.FatScore != nil {
		if phi, err = FatFraction(*in.FatScore, in.FatScale, in.FatFractions); err != nil {
			return 0, 0, err
		}
	} else {
		r.FatAssumed = true
		r.note(fmt.Sprintf("fat_assumed: no fat score; fat assumed to be %.0f %% of body mass", AssumedFatFraction*100))
	}
	if in.MuscleScore != nil {
		if q, err = MuscleFactor(*in.MuscleScore, in.MuscleFactors); err != nil {
			return 0, 0, err
		}
	} else {
		r.MuscleAssumed = true
		r.note("muscle_assumed: no pectoral muscle score; muscle condition assumed healthy")
	}
	r.FatFraction = phi
	return phi, q, nil
}

// window fills the speed window or the note saying why there is none.
func (r *FlightResult) window() {
	w, err := r.Bird.SpeedWindow(r.AvailablePowerW)
	switch {
	case errors.Is(err, ErrNoLevelFlight):
		r.note("speed_window_m_s: the power margin is below 1: by this model the bird cannot sustain level flight at any speed")
	case errors.Is(err, ErrMinSpeedAboveWindow):
		r.note("speed_window_m_s: the minimum speed from wing loading is above the fastest speed the bird can sustain")
	case err == nil:
		r.Window = w
		r.SpeedWindowMS = &[2]float64{w.LowMS, w.HighMS}
		if w.SlowUnresolved {
			r.note("speed_window_m_s: the power curve stays within the available power down to hovering " +
				"(hover power is a lower bound), so the model cannot resolve slow flight; the low end is the minimum speed from wing loading")
		}
	}
}

// fatRange fills the still-air range, or the note saying why there is none.
func (r *FlightResult) fatRange(in FlightInput) {
	switch {
	case !in.Migrant:
		r.note("still_air_range_km: shown for migrants only")
	case r.FatAssumed:
		r.note("still_air_range_km: needs a fat score")
	default:
		km := StillAirRangeM(r.EffectiveLiftDrag, r.Params.Eta, r.FatFraction) / 1000
		r.StillAirRangeKm = &km
	}
}

func (r *FlightResult) note(s string) { r.Notes = append(r.Notes, s) }

// curves returns the patient's and the reference's curves at the same speeds,
// from 0 to 1.5 × the patient's V_mr in equal steps of at most 0.25 m/s.
func curves(bird, ref Bird) (own, healthy []CurvePoint) {
	end := 1.5 * bird.vmr
	n := int(math.Ceil(end / curveStepMS))
	own = make([]CurvePoint, n+1)
	healthy = make([]CurvePoint, n+1)
	for i := range own {
		v := end * float64(i) / float64(n)
		pb, pr := bird.PowerMech(v), ref.PowerMech(v)
		own[i] = CurvePoint{SpeedMS: v, PowerMechW: pb, PowerChemW: bird.chem(pb)}
		healthy[i] = CurvePoint{SpeedMS: v, PowerMechW: pr, PowerChemW: ref.chem(pr)}
	}
	return own, healthy
}

// errNonFinite guards the promise that no result is NaN or infinite; input
// validation keeps the model inside its domain, so it signals a bug.
var errNonFinite = errors.New("assess: flight model produced a non-finite number")

// checkFinite returns errNonFinite when any number of r is NaN or infinite.
func (r *FlightResult) checkFinite() error {
	xs := []float64{r.AirDensityKgM3, r.AspectRatio, r.WingLoadingNM2, r.DiscLoadingNM2, r.MinSpeedMS,
		r.MinPowerSpeedMS, r.MaxRangeSpeedMS, r.MaxRangeSpeedMechMS, r.AbsoluteMinPowerW, r.ProfilePowerW,
		r.MinPowerMechW, r.MinPowerChemW, r.HoverPowerW, r.WingbeatHz, r.EffectiveLiftDrag, r.ExpectedMargin,
		r.ExpectedMarginSite, r.AvailablePowerW, r.PowerMargin, r.MarginRatio, r.ClimbRateMS, r.TakeoffIndex,
		r.FatFraction, r.ReferenceMinSpeedMS, r.AreaM2, r.ReferenceAvailablePowerW, r.Window.LowMS, r.Window.HighMS}
	for _, p := range []*float64{r.ExcessPowerFraction, r.StillAirRangeKm, r.MardenLiftRatio} {
		if p != nil {
			xs = append(xs, *p)
		}
	}
	ok := finite(xs...)
	for i := range r.Curve {
		c, h := r.Curve[i], r.ReferenceCurve[i]
		ok = ok && finite(c.SpeedMS, c.PowerMechW, c.PowerChemW, h.PowerMechW, h.PowerChemW)
	}
	if !ok {
		return errNonFinite
	}
	return nil
}

// finite reports whether every x is neither NaN nor infinite.
func finite(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

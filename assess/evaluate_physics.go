package assess

import (
	"errors"
	"fmt"
	"strings"
	"time"
)

// Physics is the flight model's account of the patient at the release site
// beside its species' healthy reference (SCIENCE.md): both power curves,
// the margins and excess-power fraction, the minimum speed against the
// reference's, the takeoff index and band, and the still-air range for
// migrants. The FlightResult's fields appear at this level in JSON.
type Physics struct {
	Inputs PhysicsInputs `json:"inputs"`
	// MinSpeedRatio is the patient's V_min over the reference's at the site.
	MinSpeedRatio float64 `json:"min_speed_ratio"`
	// TakeoffBandLabel is TakeoffBand in words.
	TakeoffBandLabel string `json:"takeoff_band_label"`
	FlightResult
}

// PhysicsInputs are the records the model read, in the units staff use.
type PhysicsInputs struct {
	MassG   float64   `json:"mass_g"`
	MassAt  time.Time `json:"mass_at"`
	MassFed FedState  `json:"mass_fed"`
	SpanMM  float64   `json:"span_mm"`
	// SpanAssumed is true when no span was measured: the species'
	// reference span stands in, and the minimum-speed criterion is not
	// assessed.
	SpanAssumed      bool       `json:"span_assumed"`
	WingAt           *time.Time `json:"wing_at"`
	AreaCM2          float64    `json:"area_cm2"`
	AreaEstimated    bool       `json:"area_estimated"`
	FatScore         *int       `json:"fat_score"`
	FatScale         FatScale   `json:"fat_scale,omitempty"`
	MuscleScore      *int       `json:"muscle_score"`
	ReferenceMassG   float64    `json:"reference_mass_g"`
	ReferenceSpanMM  float64    `json:"reference_span_mm"`
	ReferenceAreaCM2 float64    `json:"reference_area_cm2"`
}

// physics runs the flight model once for the patient, or notes why not.
func (e *eval) physics() {
	in, pin, err := e.flightInput()
	if err != nil {
		e.note("physics: the flight model was not run: " + err.Error())
		return
	}
	r, err := Flight(in)
	if err != nil {
		e.note("physics: the flight model cannot use these records: " + modelError(err))
		return
	}
	pin.AreaCM2 = r.AreaM2 * 1e4
	pin.AreaEstimated = r.WingAreaEstimated
	e.phys = &Physics{Inputs: pin, MinSpeedRatio: r.MinSpeedMS / r.ReferenceMinSpeedMS,
		TakeoffBandLabel: r.TakeoffBand.Label(), FlightResult: r}
	switch {
	case pin.SpanAssumed:
		e.caution("span-assumed", "No wingspan has been measured: the model used the species' reference span, so the margin describes an intact wing.", "")
	case r.WingAreaEstimated:
		e.caution("area-estimated", "The wing area was estimated from the span and the species reference, not traced: area lost with damaged feathers does not show in the minimum speed.", "")
	}
	if r.ExcessPowerFraction == nil {
		e.caution("marginal-site", fmt.Sprintf("At this release site even a healthy %s has almost no spare power by the model (healthy margin %.2f): consider a lower or cooler site.",
			e.sp.CommonName, r.ExpectedMarginSite), "")
	}
}

// flightInput builds the model's input from the latest records: the mass
// picked by pickMass, the latest span (and the area of the same measurement,
// else estimated from the reference), the latest fat and muscle scores, the
// species' reference for the patient's sex, and the thresholds' muscle and
// fat tables.
func (e *eval) flightInput() (FlightInput, PhysicsInputs, error) {
	if e.mass == nil {
		return FlightInput{}, PhysicsInputs{}, errNoMass
	}
	ref := e.sp.Reference(e.in.Sex)
	in := FlightInput{MassKg: e.mass.MassG / 1000, Passerine: e.sp.Passerine, Migrant: e.sp.Migrant,
		Site: e.site, Reference: &ref, MuscleFactors: e.th.muscleFactors(), FatFractions: e.th.fatFractions()}
	pin := PhysicsInputs{MassG: e.mass.MassG, MassAt: e.mass.At, MassFed: e.mass.Fed,
		ReferenceMassG: ref.MassKg * 1000, ReferenceSpanMM: ref.SpanM * 1000, ReferenceAreaCM2: ref.AreaM2 * 1e4}
	if e.wing != nil {
		in.SpanM = *e.wing.SpanMM / 1000
		if e.wing.AreaCM2 != nil {
			in.AreaM2 = *e.wing.AreaCM2 / 1e4
		}
		pin.SpanMM, pin.WingAt = *e.wing.SpanMM, evalPtr(e.wing.At)
	} else {
		in.SpanM, pin.SpanMM, pin.SpanAssumed = ref.SpanM, ref.SpanM*1000, true
	}
	if e.fat != nil {
		in.FatScore, in.FatScale = e.fat.FatScore, e.fat.FatScale
		pin.FatScore, pin.FatScale = e.fat.FatScore, e.fat.FatScale
	}
	if e.muscle != nil {
		in.MuscleScore, pin.MuscleScore = e.muscle.MuscleScore, e.muscle.MuscleScore
	}
	return in, pin, nil
}

// modelError turns the model's validation errors into one sentence.
func modelError(err error) string {
	var ves ValidationErrors
	if !errors.As(err, &ves) {
		return err.Error()
	}
	parts := make([]string, len(ves))
	for i, v := range ves {
		parts[i] = fmt.Sprintf("%s %s: %s", v.Field, v.Value, v.Message)
	}
	return strings.Join(parts, "; ")
}

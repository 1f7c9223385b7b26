package assess

import (
	"errors"
	"fmt"
	"math"
)

// FlightInput is everything the flight model needs about one patient, in SI
// units. The edges (web forms, records rows, the command line) convert.
type FlightInput struct {
	// MassKg is the patient's mass now, kg (0.5 g to 100 kg).
	MassKg float64
	// SpanM is the wingspan tip to tip, wings fully spread, m (10 mm to 5 m).
	SpanM float64
	// AreaM2 is the wing area, both wings and the body strip, m²; 0 = estimate
	// it from the span and Reference (flagged in the result), an error when
	// Reference is nil.
	AreaM2 float64
	// Passerine selects the passerine basal metabolic rate.
	Passerine bool
	// Migrant enables the still-air range.
	Migrant bool
	// FatScore on FatScale; nil = unknown (fat fraction 0.05 assumed).
	FatScore *int
	// FatScale is the scale of FatScore, required with it.
	FatScale FatScale
	// MuscleScore is the pectoral muscle score 0–3; nil = unknown (q = 1 assumed).
	MuscleScore *int
	// Site is where the bird is to fly.
	Site Site
	// Params is the parameter set; the zero value means pennycuick2008.
	Params Params
	// Reference is the healthy bird of the species for the patient's sex; nil
	// = the patient is its own reference.
	Reference *Reference
	// MuscleFactors overrides the muscle factors by score 0…3; nil = defaults.
	MuscleFactors *[4]float64
	// FatFractions overrides the fat-fraction tables; nil = defaults.
	FatFractions *FatFractions
}

// Validate checks every field and returns nil or ValidationErrors, one entry
// per bad field, named as the command line's flags and the JSON keys are
// (mass_g, span_mm, area_cm2, aspect_ratio, wing_loading_n_m2, elevation_m,
// temp_c, fat_score, fat_scale, muscle_score, params, reference_mass_g, …),
// with values in those units.
func (in FlightInput) Validate() error {
	var errs ValidationErrors
	if in.Params != (Params{}) {
		errs.add(in.Params.Validate())
	}
	refErr := validateReference(in.Reference)
	errs.add(refErr)
	switch {
	case in.AreaM2 == 0 && in.Reference == nil:
		errs.add(checkMass(in.MassKg))
		errs.add(checkSpan(in.SpanM))
		errs.add(&ValidationError{Field: "area_cm2", Value: "0",
			Message: "wing area is required when no species reference is given"})
	case refErr != nil: // the reference can give neither area nor intact aspect ratio
		errs.add(checkMass(in.MassKg))
		errs.add(checkSpan(in.SpanM))
		if in.AreaM2 != 0 {
			errs.add(checkArea(in.AreaM2))
		}
	default:
		body, _ := in.body()
		errs.add(validateBody(body))
	}
	errs.add(in.Site.Validate())
	if in.FatScore != nil {
		_, err := FatFraction(*in.FatScore, in.FatScale, in.FatFractions)
		errs.add(err)
	} else if in.FatFractions != nil {
		_, err := fatTable(FatScaleKaiser, in.FatFractions)
		errs.add(err)
		_, err = fatTable(FatScaleHelmsDrury, in.FatFractions)
		errs.add(err)
	}
	score := MaxMuscleScore
	if in.MuscleScore != nil {
		score = *in.MuscleScore
	}
	_, err := MuscleFactor(score, in.MuscleFactors)
	errs.add(err)
	if len(errs) == 0 {
		return nil
	}
	return errs
}

// add appends err's field errors; nil adds nothing.
func (es *ValidationErrors) add(err error) {
	var one *ValidationError
	var many ValidationErrors
	switch {
	case err == nil:
	case errors.As(err, &many):
		*es = append(*es, many...)
	case errors.As(err, &one):
		*es = append(*es, one)
	default:
		*es = append(*es, &ValidationError{Field: "input", Message: err.Error()})
	}
}

// validateReference checks a species reference; nil is valid.
func validateReference(ref *Reference) error {
	if ref == nil {
		return nil
	}
	var errs ValidationErrors
	errs.add(validateBody(Body{MassKg: ref.MassKg, SpanM: ref.SpanM, AreaM2: ref.AreaM2}))
	for _, e := range errs {
		e.Field = "reference_" + e.Field
	}
	if !(ref.ExpectedMargin == 0 || ref.ExpectedMargin >= 1 && ref.ExpectedMargin <= 10) {
		errs = append(errs, &ValidationError{Field: "reference_expected_margin", Value: formatNum(ref.ExpectedMargin),
			Message: "expected a healthy power margin from 1 to 10, or 0 for the default"})
	}
	if !(ref.FlightMuscleFraction >= 0 && ref.FlightMuscleFraction < 1) {
		errs = append(errs, &ValidationError{Field: "reference_flight_muscle_fraction", Value: formatNum(ref.FlightMuscleFraction),
			Message: "expected the flight-muscle share of body mass from 0 to below 1 (0 = unknown)"})
	}
	if len(errs) == 0 {
		return nil
	}
	return errs
}

// body returns the patient's body for the model, with the area estimated from
// the reference when not measured (estimated = true) and the intact aspect
// ratio taken from the reference.
func (in FlightInput) body() (body Body, estimated bool) {
	body = Body{MassKg: in.MassKg, SpanM: in.SpanM, AreaM2: in.AreaM2, Passerine: in.Passerine}
	if in.Reference != nil {
		if body.AreaM2 == 0 {
			body.AreaM2 = EstimatedWingArea(in.SpanM, *in.Reference)
			estimated = true
		}
		body.IntactAspectRatio = AspectRatio(in.Reference.SpanM, in.Reference.AreaM2)
	}
	return body, estimated
}

// reference returns the healthy reference: in.Reference, or the patient itself.
func (in FlightInput) reference(body Body) Reference {
	if in.Reference != nil {
		return *in.Reference
	}
	return Reference{MassKg: body.MassKg, SpanM: body.SpanM, AreaM2: body.AreaM2}
}

// params returns the parameter set, the default for the zero value.
func (in FlightInput) params() Params {
	if in.Params == (Params{}) {
		return defaultParams()
	}
	return in.Params
}

// Numeric domain of the model: far wider than any flying bird, narrow enough
// that no result overflows.
const (
	minMassKg      = 0.0005
	maxMassKg      = 100
	minSpanM       = 0.01
	maxSpanM       = 5
	minWingLoading = 1.0
	maxWingLoading = 1000.0
)

// validateBody checks a body against the ranges documented on Body: each
// measurement first, then the shape they make together.
func validateBody(bd Body) error {
	var errs ValidationErrors
	errs.add(checkMass(bd.MassKg))
	errs.add(checkSpan(bd.SpanM))
	errs.add(checkArea(bd.AreaM2))
	if !(bd.IntactAspectRatio == 0 || bd.IntactAspectRatio >= MinAspectRatio && bd.IntactAspectRatio <= MaxAspectRatio) {
		errs = append(errs, &ValidationError{Field: "intact_aspect_ratio", Value: formatNum(bd.IntactAspectRatio),
			Message: fmt.Sprintf("expected the intact wing's aspect ratio from %g to %g", MinAspectRatio, MaxAspectRatio)})
	}
	if len(errs) > 0 {
		return errs
	}
	if ar := AspectRatio(bd.SpanM, bd.AreaM2); !(ar >= MinAspectRatio && ar <= MaxAspectRatio) {
		return &ValidationError{Field: "aspect_ratio", Value: formatNum(ar),
			Message: fmt.Sprintf("span²/area must be from %g to %g for a bird's wing: check the span (mm) and the area (cm²)", MinAspectRatio, MaxAspectRatio)}
	}
	if q := WingLoading(bd.MassKg, bd.AreaM2); !(q >= minWingLoading && q <= maxWingLoading) {
		return &ValidationError{Field: "wing_loading_n_m2", Value: formatNum(q),
			Message: fmt.Sprintf("mass·g/area must be from %g to %g N/m² for a flying bird: check the mass (g) and the area (cm²)", minWingLoading, maxWingLoading)}
	}
	return nil
}

func checkMass(massKg float64) error {
	if massKg >= minMassKg && massKg <= maxMassKg {
		return nil
	}
	return &ValidationError{Field: "mass_g", Value: formatNum(massKg * 1000),
		Message: fmt.Sprintf("expected a positive mass in grams, from %g g to %g kg", minMassKg*1000, float64(maxMassKg))}
}

func checkSpan(spanM float64) error {
	if spanM >= minSpanM && spanM <= maxSpanM {
		return nil
	}
	return &ValidationError{Field: "span_mm", Value: formatNum(spanM * 1000),
		Message: fmt.Sprintf("expected a positive wingspan in millimetres, tip to tip, from %g mm to %g m", minSpanM*1000, float64(maxSpanM))}
}

func checkArea(areaM2 float64) error {
	if areaM2 > 0 && !math.IsInf(areaM2, 1) {
		return nil
	}
	return &ValidationError{Field: "area_cm2", Value: formatNum(areaM2 * 1e4),
		Message: "expected a positive wing area in cm², both wings and the body strip between them"}
}

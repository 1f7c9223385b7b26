package assess

import (
	"fmt"
	"slices"
)

// Sex of a patient. Mass ranges of dimorphic species depend on it.
type Sex string

// Sexes.
const (
	SexUnknown Sex = "unknown"
	SexFemale  Sex = "female"
	SexMale    Sex = "male"
)

// Sexes lists the valid sexes.
var Sexes = []Sex{SexUnknown, SexFemale, SexMale}

// Valid reports whether s is one of Sexes.
func (s Sex) Valid() bool { return slices.Contains(Sexes, s) }

// LaunchMode is how a bird leaves the ground or water.
type LaunchMode string

// Launch modes (DESIGN.md's one vocabulary).
const (
	LaunchStanding     LaunchMode = "standing"
	LaunchWaterSpring  LaunchMode = "water-spring"
	LaunchRunUpWater   LaunchMode = "run-up-water"
	LaunchRunUpLand    LaunchMode = "run-up-land"
	LaunchWindOrHeight LaunchMode = "wind-or-height"
	LaunchHand         LaunchMode = "hand"
	LaunchHover        LaunchMode = "hover"
	// TrialDrop is a trial mode only: a launch from a stated height.
	TrialDrop LaunchMode = "drop"
)

// LaunchModes lists the launch modes; TrialModes adds the drop test.
var (
	LaunchModes = []LaunchMode{LaunchStanding, LaunchWaterSpring, LaunchRunUpWater,
		LaunchRunUpLand, LaunchWindOrHeight, LaunchHand, LaunchHover}
	TrialModes = append(slices.Clone(LaunchModes), TrialDrop)
)

// Valid reports whether m is a launch mode (not a drop).
func (m LaunchMode) Valid() bool { return slices.Contains(LaunchModes, m) }

// Disposition is what became of a patient; DispositionInCare while none applies.
type Disposition string

// Dispositions (DESIGN.md). Renested is a kind of release.
const (
	DispInCare        Disposition = "in-care"
	DispReleased      Disposition = "released"
	DispRenested      Disposition = "renested"
	DispTransferred   Disposition = "transferred"
	DispDied          Disposition = "died"
	DispEuthanised    Disposition = "euthanised"
	DispDeadOnArrival Disposition = "dead-on-arrival"
	DispEscaped       Disposition = "escaped"
)

// Dispositions lists every patient status, in-care first.
var Dispositions = []Disposition{DispInCare, DispReleased, DispRenested, DispTransferred,
	DispDied, DispEuthanised, DispDeadOnArrival, DispEscaped}

// Valid reports whether d is one of Dispositions.
func (d Disposition) Valid() bool { return slices.Contains(Dispositions, d) }

// Status of one criterion of an assessment.
type Status string

// Criterion statuses.
const (
	StatusMet         Status = "met"
	StatusBorderline  Status = "borderline"
	StatusUnmet       Status = "unmet"
	StatusNotAssessed Status = "not-assessed"
)

// OutcomeLevel is the advisory outcome of an assessment.
type OutcomeLevel string

// Outcome levels. The labels shown to people are the project's own wording.
const (
	OutcomeReady        OutcomeLevel = "ready"
	OutcomeContinue     OutcomeLevel = "continue"
	OutcomeRefer        OutcomeLevel = "refer"
	OutcomeInsufficient OutcomeLevel = "insufficient"
)

// Provenance says where a threshold or a value comes from.
type Provenance string

// Provenances (DESIGN.md).
const (
	ProvPublished      Provenance = "published"
	ProvDerived        Provenance = "derived"
	ProvCommonPractice Provenance = "common-practice"
	ProvProjectDefault Provenance = "project-default"
	ProvCentreSetting  Provenance = "centre-setting"
	ProvFromMemory     Provenance = "from-memory"
)

// ValidationError is the one typed error for bad input anywhere in Aloft: it
// names the field, the value given and what was expected. The web layer shows
// Message beside Field; the command line prints Error().
type ValidationError struct {
	Field   string // form or JSON field name, e.g. "mass_g"
	Value   string // the value as given
	Message string // one sentence: what was expected, and the likely mistake
}

func (e *ValidationError) Error() string {
	return fmt.Sprintf("%s: %s (got %q)", e.Field, e.Message, e.Value)
}

// ValidationErrors collects several field errors from one form.
type ValidationErrors []*ValidationError

func (es ValidationErrors) Error() string {
	if len(es) == 0 {
		return "no errors"
	}
	if len(es) == 1 {
		return es[0].Error()
	}
	return fmt.Sprintf("%s (and %d more)", es[0].Error(), len(es)-1)
}

// Field returns the message for field, or "".
func (es ValidationErrors) Field(field string) string {
	for _, e := range es {
		if e.Field == field {
			return e.Message
		}
	}
	return ""
}

// Reference is the healthy bird a patient is compared with: a species'
// reference for the patient's sex (see Species.Reference), or, without a
// species, the bird itself.
type Reference struct {
	MassKg float64 // healthy adult mass for the sex, kg
	SpanM  float64 // wingspan tip to tip, m
	AreaM2 float64 // both wings plus the body strip, m²
	// ExpectedMargin is the species' sustained available power over P_mech at
	// V_mp at 1.225 kg/m³; 0 means use the default allometry (SCIENCE.md §5).
	ExpectedMargin float64
	// FlightMuscleFraction is flight-muscle mass over body mass; 0 = unknown.
	FlightMuscleFraction float64
}

package assess

import (
	"slices"
	"time"
)

// Assessment is the readiness assessment of one patient at one release site
// at one time: advice for the licensed rehabilitator and the veterinarian,
// who decide. Its JSON form (top level outcome, criteria, physics, params,
// species, site, …) is what `aloft assess --json` prints and the API
// serves; keys are added by later work, never renamed. The same inputs give
// byte-identical JSON.
type Assessment struct {
	Outcome  Outcome     `json:"outcome"`
	Criteria []Criterion `json:"criteria"`
	// Physics is the flight model's account of the patient at the site;
	// nil when the records cannot support it (see Notes).
	Physics     *Physics         `json:"physics"`
	Params      AssessmentParams `json:"params"`
	Species     SpeciesUsed      `json:"species"`
	Site        SiteUsed         `json:"site"`
	EvaluatedAt time.Time        `json:"evaluated_at"`
	Exercise    ExerciseSummary  `json:"exercise"`
	// Cautions are the warnings that apply to this case; the general ones
	// of CAUTIONS.md are shown beside every assessment as well.
	Cautions []Caution `json:"cautions"`
	Notes    []string  `json:"notes"`
}

// Criterion returns the criterion with the given id, and false when the
// assessment does not list it (it does not apply to the species' group).
func (a Assessment) Criterion(id CriterionID) (Criterion, bool) {
	i := slices.IndexFunc(a.Criteria, func(c Criterion) bool { return c.ID == id })
	if i < 0 {
		return Criterion{}, false
	}
	return a.Criteria[i], true
}

// Outcome is the advisory outcome of an assessment.
type Outcome struct {
	Level OutcomeLevel `json:"level"`
	Label string       `json:"label"` // Level in the project's words
	// Reasons are the criteria that decided Level.
	Reasons []OutcomeReason `json:"reasons"`
	// Referrals lists every finding that points to the veterinarian,
	// whatever the level: with too little evidence the level is
	// insufficient, but a drooping wing must still be seen.
	Referrals []OutcomeReason `json:"referrals"`
	// NotAssessed lists every criterion not assessed, core or not.
	NotAssessed []CriterionID `json:"not_assessed"`
}

// OutcomeReason is one criterion's part in an outcome.
type OutcomeReason struct {
	Criterion CriterionID `json:"criterion"`
	Title     string      `json:"title"`
	Status    Status      `json:"status"`
	Stale     bool        `json:"stale"`
	Text      string      `json:"text"`
}

// OutcomeLabel returns an outcome level in the project's own words.
func OutcomeLabel(l OutcomeLevel) string {
	switch l {
	case OutcomeReady:
		return "Ready for the release decision"
	case OutcomeContinue:
		return "Keep conditioning, then assess again"
	case OutcomeRefer:
		return "Ask the veterinarian to examine the bird"
	case OutcomeInsufficient:
		return "Too little evidence to advise yet"
	}
	return string(l)
}

// AssessmentParams are the constants the assessment used: the flight
// model's parameter set and every threshold with a value for the species'
// group, with that value and its provenance.
type AssessmentParams struct {
	Flight     Params             `json:"flight"`
	Thresholds []AppliedThreshold `json:"thresholds"`
}

// AppliedThreshold is one threshold's value as used for this patient.
type AppliedThreshold struct {
	ID         ThresholdID `json:"id"`
	Label      string      `json:"label"`
	Value      float64     `json:"value"`
	Unit       string      `json:"unit"`
	Provenance Basis       `json:"provenance"`
}

// SpeciesUsed is the species reference the patient was compared with: the
// whole row, the patient's sex, and the reference mass and mass range for
// that sex.
type SpeciesUsed struct {
	Species
	Sex            Sex        `json:"sex"`
	ReferenceMassG float64    `json:"reference_mass_g"`
	MassRangeForG  RangeG     `json:"mass_range_for_sex_g"`
	GroupLabel     string     `json:"group_label"`
	NormalLaunch   LaunchMode `json:"normal_launch"`
}

// SiteUsed is the release site as assessed.
type SiteUsed struct {
	ElevationM     float64  `json:"elevation_m"`
	TempC          *float64 `json:"temp_c"` // nil: the standard atmosphere's temperature
	AirDensityKgM3 float64  `json:"air_density_kg_m3"`
}

// ExerciseSummary says which kinds of flight exercise the bird had: the
// report must say so (cage flight conditions raptors less well).
type ExerciseSummary struct {
	Sessions   int        `json:"sessions"`
	Cage       int        `json:"cage"`
	Creance    int        `json:"creance"`
	FreeFlight int        `json:"free_flight"`
	First      *time.Time `json:"first"`
	Last       *time.Time `json:"last"`
	CageOnly   bool       `json:"cage_only"`
	Text       string     `json:"text"`
}

// Caution is a warning that applies to this case.
type Caution struct {
	ID     string `json:"id"`
	Text   string `json:"text"`
	Source string `json:"source,omitempty"`
}

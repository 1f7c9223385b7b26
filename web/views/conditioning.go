package views

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
)

// CondOption is one choice of a select in the conditioning forms.
type CondOption struct{ Value, Label string }

// CondForm is one conditioning record form (new or correction), holding
// exactly what the person typed, keyed by field name.
type CondForm struct {
	Kind    records.Kind
	Title   string // "Weigh-in"
	Patient records.Patient
	Action  string // the URL the form posts to
	Values  map[string]string
	Errors  assess.ValidationErrors
	// Key and Version are set when correcting record Key, read at Version.
	Key     int64
	Version int
	// Conflict is shown above the form when the record changed meanwhile.
	Conflict string
	// Confirm lists the fields whose value is implausible for the species
	// and needs a confirmation with a reason ("mass_g", "span_mm").
	Confirm map[string]bool
	// SpeciesNote tells the species' reference for the form (mass range,
	// reference span), or "".
	SpeciesNote string

	// Options of the selects.
	SafeModes, OtherModes []CondOption
	GroupLabel            string
	DropCapM              float64
	Enclosures            []CondOption
	Feathers              []FeatherTractView // the wing form's feather map
	Attempts              int                // rows of attempt results on the trial form
}

// V returns the typed value of field name.
func (f CondForm) V(name string) string { return f.Values[name] }

// On reports whether checkbox name is ticked.
func (f CondForm) On(name string) bool { return f.Values[name] == "1" }

// Err returns the message for field name, or "".
func (f CondForm) Err(name string) string { return f.Errors.Field(name) }

// Correcting reports whether the form corrects an existing record.
func (f CondForm) Correcting() bool { return f.Key != 0 }

// FeatherTractView is one row of the feather map form: a wing's primaries
// or secondaries, or one half of the tail.
type FeatherTractView struct {
	Prefix, Label string
	Feathers      []FeatherCell
	Open          bool // shown unfolded: something is not intact, or wrong
}

// FeatherCell is one feather's select.
type FeatherCell struct{ Name, Label, Value string }

// CondRemoveForm asks for the reason a record is removed.
type CondRemoveForm struct {
	Patient records.Patient
	Item    TimelineItem
	Action  string
	Reason  string
	Errors  assess.ValidationErrors
}

// CondSummary is the conditioning block of the patient page.
type CondSummary struct {
	Patient records.Patient
	InCare  bool
	CanEdit bool
	Links   []CondLink
	Facts   []RefRow // label, value, source-or-note
}

// CondLink is one button of the conditioning block.
type CondLink struct{ Href, Label, TestID string }

// Timeline is the history of a patient's conditioning records.
type Timeline struct {
	Patient records.Patient
	Filter  records.Kind // "" for every kind
	Filters []TimelineFilter
	Items   []TimelineItem
	CanEdit bool
	// Hidden counts older records left out of a long unfiltered timeline;
	// AllHref shows them.
	Hidden  int
	AllHref string
}

// TimelineFilter is one filter link of the timeline.
type TimelineFilter struct {
	Href, Label string
	Current     bool
}

// TimelineItem is one record with its versions.
type TimelineItem struct {
	Key       int64
	Kind      records.Kind
	KindLabel string
	At        time.Time // observed
	By        string    // who made the first version
	Summary   string
	Details   []string
	Caution   string // shown in a warning box, e.g. for a drop test
	Flag      string // e.g. a mass outside the usual range
	// CorrectedBy and CorrectedAt name the latest correction, if any.
	CorrectedBy string
	CorrectedAt time.Time
	Versions    []TimelineVersion // every version, oldest first, when more than one
	Removed     bool
	RemovedNote string
	CorrectURL  string
	RemoveURL   string
}

// TimelineVersion is one version of a record.
type TimelineVersion struct {
	Version   int
	At        time.Time
	By        string
	CreatedAt time.Time
	Summary   string
	Current   bool
}

// EnclosuresView is the enclosures page.
type EnclosuresView struct {
	List    []records.Enclosure
	CanEdit bool
	Form    EnclosureForm
	Notice  string
	Classes []assess.EnclosureClass
}

// EnclosureForm is the add or edit form of an enclosure, as typed.
type EnclosureForm struct {
	ID                                int64
	Version                           int
	Name, Kind, Length, Width, Height string
	Unit                              string // "m" or "ft"
	Notes                             string
	Retired                           bool
	Errors                            assess.ValidationErrors
}

// Action is the URL the enclosure form posts to.
func (f EnclosureForm) Action() string {
	if f.ID == 0 {
		return "/enclosures"
	}
	return fmt.Sprintf("/enclosures/%d", f.ID)
}

// Labels of the record vocabularies, in this project's wording.
var (
	fedLabels = map[assess.FedState]string{assess.FedBefore: "before feeding", assess.FedAfter: "after feeding",
		assess.FedUnknown: "feeding not known"}
	modeLabels = map[assess.LaunchMode]string{assess.LaunchStanding: "standing jump", assess.LaunchWaterSpring: "spring off water",
		assess.LaunchRunUpWater: "run-up on water", assess.LaunchRunUpLand: "run-up on land",
		assess.LaunchWindOrHeight: "into wind or off a height", assess.LaunchHand: "hand launch", assess.LaunchHover: "hover",
		assess.TrialDrop: "drop from a height"}
	attemptLabels = map[assess.AttemptResult]string{assess.AttemptClimbed: "climbed away", assess.AttemptLevel: "flew level",
		assess.AttemptShort: "landed short", assess.AttemptFailed: "failed to lift"}
	featherLabels = map[assess.FeatherStatus]string{assess.FeatherIntact: "intact", assess.FeatherMissing: "missing",
		assess.FeatherBroken: "broken", assess.FeatherPin: "growing (pin)", assess.FeatherImped: "imped",
		assess.FeatherFrayed: "frayed", assess.FeatherStressBars: "stress bars"}
	heightLabels = map[assess.HeightReached]string{assess.HeightFloor: "floor", assess.HeightLowPerch: "low perch",
		assess.HeightHighPerch: "high perch", assess.HeightCeiling: "ceiling"}
	exerciseLabels = map[assess.Exercise]string{assess.ExerciseCage: "cage flight", assess.ExerciseCreance: "creance",
		assess.ExerciseFreeFlight: "free flight"}
	enclosureLabels = map[assess.EnclosureKind]string{assess.EnclosureIndoorCage: "indoor cage",
		assess.EnclosureOutdoorAviary: "outdoor aviary", assess.EnclosureFlightCage: "flight cage", assess.EnclosurePool: "pool"}
	waterproofLabels = map[assess.WaterproofResult]string{assess.WaterproofYes: "waterproof", assess.WaterproofPartial: "partly wet",
		assess.WaterproofNo: "not waterproof"}
	droopLabels = map[assess.Droop]string{assess.DroopNone: "none", assess.DroopLeft: "left wing", assess.DroopRight: "right wing"}
)

func labelOr[K ~string](m map[K]string, k K) string {
	if l, ok := m[k]; ok {
		return l
	}
	return string(k)
}

// FedLabel, ModeLabel, … name a vocabulary value for people.
func FedLabel(f assess.FedState) string                { return labelOr(fedLabels, f) }
func ModeLabel(m assess.LaunchMode) string             { return labelOr(modeLabels, m) }
func AttemptLabel(r assess.AttemptResult) string       { return labelOr(attemptLabels, r) }
func FeatherLabel(f assess.FeatherStatus) string       { return labelOr(featherLabels, f) }
func HeightLabel(h assess.HeightReached) string        { return labelOr(heightLabels, h) }
func ExerciseLabel(e assess.Exercise) string           { return labelOr(exerciseLabels, e) }
func EnclosureKindLabel(k assess.EnclosureKind) string { return labelOr(enclosureLabels, k) }
func WaterproofLabel(r assess.WaterproofResult) string { return labelOr(waterproofLabels, r) }
func DroopLabel(d assess.Droop) string                 { return labelOr(droopLabels, d) }

func condOpts[K ~string](list []K, label func(K) string) []CondOption {
	out := make([]CondOption, 0, len(list))
	for _, k := range list {
		out = append(out, CondOption{Value: string(k), Label: label(k)})
	}
	return out
}

func fedOptions() []CondOption      { return condOpts(assess.FedStates, FedLabel) }
func featherOptions() []CondOption  { return condOpts(assess.FeatherStatuses, FeatherLabel) }
func heightOptions() []CondOption   { return condOpts(assess.Heights, HeightLabel) }
func exerciseOptions() []CondOption { return condOpts(assess.Exercises, ExerciseLabel) }
func droopOptions() []CondOption    { return condOpts(assess.Droops, DroopLabel) }
func waterproofOptions() []CondOption {
	return condOpts(assess.WaterproofResults, WaterproofLabel)
}
func enclosureKindOptions() []CondOption {
	return condOpts(assess.EnclosureKinds, EnclosureKindLabel)
}
func attemptOptions() []CondOption {
	return append([]CondOption{{"", "not made"}}, condOpts(assess.AttemptResults, AttemptLabel)...)
}
func windOptions() []CondOption {
	return condOpts(assess.WindStrengths, func(w assess.WindStrength) string { return string(w) })
}
func windDirOptions() []CondOption {
	return []CondOption{{"", "none (calm)"}, {"head", "head wind"}, {"tail", "tail wind"}, {"cross", "cross wind"}}
}
func fatScaleOptions() []CondOption {
	return []CondOption{{string(assess.FatScaleKaiser), "0–8 (Kaiser)"}, {string(assess.FatScaleHelmsDrury), "0–5 (Helms & Drury)"}}
}
func muscleOptions() []CondOption {
	return []CondOption{{"", "not scored"}, {"0", "0: keel sharp, muscle hollow"}, {"1", "1"}, {"2", "2"},
		{"3", "3: muscle fully rounded"}}
}
func bodyConditionOptions() []CondOption {
	return []CondOption{{"", "not scored"}, {"1", "1: emaciated"}, {"2", "2: thin"}, {"3", "3: good"}, {"4", "4: heavy"}, {"5", "5: obese"}}
}
func areaMethodOptions() []CondOption {
	return []CondOption{{"", "no area"}, {string(assess.AreaTraced), "traced or photographed"},
		{string(assess.AreaEstimated), "estimated from the span"}}
}

// EnclosureSize formats an enclosure's size as "L × W × H m (L × W × H ft)".
func EnclosureSize(l, w, h float64) string {
	r := func(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }
	ft := func(x float64) string { return strconv.FormatFloat(x/0.3048, 'f', 0, 64) }
	return fmt.Sprintf("%s × %s × %s m (%s × %s × %s ft)", r(l), r(w), r(h), ft(l), ft(w), ft(h))
}

// condChoose puts an empty "choose" entry first, so nothing is preselected.
func condChoose(opts []CondOption) []CondOption {
	return append([]CondOption{{Value: "", Label: "choose"}}, opts...)
}

func condAttemptName(i int) string { return "attempt_" + strconv.Itoa(i+1) }

func condAttemptRows(f CondForm) []int {
	n := f.Attempts
	if n < 1 {
		n = 6
	}
	out := make([]int, n)
	for i := range out {
		out[i] = i
	}
	return out
}

func condNoun(f CondForm) string { return strings.ToLower(f.Title) }

func condTime(t time.Time) string { return fmtTime(t) }

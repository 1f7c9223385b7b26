package assess

import (
	"math"
	"slices"
	"time"
)

// CriterionID names one criterion of the readiness assessment. IDs are
// stable: reports, tests and the API refer to them.
type CriterionID string

// Criteria, in the order an assessment lists them.
const (
	CritMass          CriterionID = "mass"
	CritMassTrend     CriterionID = "mass-trend"
	CritFat           CriterionID = "fat"
	CritMuscle        CriterionID = "pectoral-muscle"
	CritOuterPrimary  CriterionID = "outer-primaries"
	CritTail          CriterionID = "tail"
	CritMinSpeed      CriterionID = "min-speed"
	CritPowerMargin   CriterionID = "power-margin"
	CritTakeoff       CriterionID = "takeoff"
	CritStamina       CriterionID = "stamina"
	CritRecovery      CriterionID = "recovery"
	CritBreathing     CriterionID = "breathing"
	CritWingDroop     CriterionID = "wing-droop"
	CritAsymmetry     CriterionID = "asymmetry"
	CritHeight        CriterionID = "height"
	CritLandings      CriterionID = "landings"
	CritWaterproofing CriterionID = "waterproofing"
	CritPrerelease    CriterionID = "prerelease-housing"
	CritEnclosure     CriterionID = "enclosure-size"
	// CritClearancePrefix + a ClearanceItem names each clinical-clearance
	// criterion, e.g. "clearance-vision".
	CritClearancePrefix CriterionID = "clearance-"
)

// ClearanceCriterion returns the criterion ID of a clearance item.
func ClearanceCriterion(item ClearanceItem) CriterionID {
	return CritClearancePrefix + CriterionID(item)
}

// Basis is where a criterion's threshold comes from: a provenance of
// DESIGN.md's vocabulary and the source in words.
type Basis struct {
	Kind   Provenance `json:"kind"`
	Source string     `json:"source"`
}

// Evidence is one fact a criterion read: what, its value with units, and
// when it was observed.
type Evidence struct {
	Name string     `json:"name"`
	Text string     `json:"text"`         // the value with its unit, e.g. "1480 g (before-feed)"
	At   *time.Time `json:"at,omitempty"` // when observed; nil for a reference or derived value
}

// Criterion is one line of an assessment: a question about the patient,
// the evidence read, the threshold applied and the answer.
type Criterion struct {
	ID    CriterionID `json:"id"`
	Title string      `json:"title"`
	// Core criteria must all be assessed for any outcome but insufficient.
	Core       bool          `json:"core"`
	Status     Status        `json:"status"`
	Evidence   []Evidence    `json:"evidence"`
	Threshold  string        `json:"threshold"`     // the rule applied, in words with units
	Thresholds []ThresholdID `json:"threshold_ids"` // the thresholds it used
	Provenance Basis         `json:"provenance"`
	Reason     string        `json:"reason"` // one sentence
	// Stale is true when the evidence it rests on (AsOf) is older than the
	// staleness threshold: it cannot support the top outcome.
	Stale bool       `json:"stale"`
	AsOf  *time.Time `json:"as_of"`
	// Findings are further observations that do not change Status (the
	// takeoff index, a drop above the cap, a group session).
	Findings []string `json:"findings"`
	// Refer is true when the finding points to injury or illness: the
	// outcome is then refer (unless the evidence is insufficient).
	Refer bool `json:"refer"`
}

// criterionInfo is what is fixed about a criterion: its title, whether it
// is core, and the statuses it can take (tests drive each through each).
type criterionInfo struct {
	id       CriterionID
	title    string
	core     bool
	statuses []Status
}

var (
	sMUN  = []Status{StatusMet, StatusUnmet, StatusNotAssessed}
	sMBN  = []Status{StatusMet, StatusBorderline, StatusNotAssessed}
	sMBUN = []Status{StatusMet, StatusBorderline, StatusUnmet, StatusNotAssessed}
)

// criterionTable lists every criterion but the clearance items, in order.
var criterionTable = []criterionInfo{
	{CritMass, "Body mass within the species' range", true, sMBUN},
	{CritMassTrend, "Mass holding steady", false, sMUN},
	{CritFat, "Fat reserves", false, sMBN},
	{CritMuscle, "Flight muscle over the keel", true, sMBUN},
	{CritOuterPrimary, "Outer primaries whole", false, sMUN},
	{CritTail, "Tail feathers", false, sMBN},
	{CritMinSpeed, "Minimum speed from wing loading", false, sMBUN},
	{CritPowerMargin, "Spare flight power at the release site", false, sMBUN},
	{CritTakeoff, "Takeoff in the species' usual way", true, sMBUN},
	{CritStamina, "Unbroken passes", true, sMBUN},
	{CritRecovery, "Breathing back to resting after exercise", false, sMUN},
	{CritBreathing, "No laboured breathing in flight", false, sMBUN},
	{CritWingDroop, "Wings carried level", false, sMBUN},
	{CritAsymmetry, "Even, symmetrical wingbeats", false, sMBUN},
	{CritHeight, "Rises from the ground to the top perch", false, sMBUN},
	{CritLandings, "Landings under control", false, sMBUN},
	{CritWaterproofing, "Waterproof plumage", false, sMBUN},
	{CritPrerelease, "Time in outdoor pre-release housing", false, sMUN},
	{CritEnclosure, "Enclosure of at least the minimum size", false, sMBUN},
}

// clearanceTitles are the titles of the clearance criteria.
var clearanceTitles = map[ClearanceItem]string{
	ClearInjuries:  "Cleared: injuries healed",
	ClearVision:    "Cleared: vision",
	ClearFeetLegs:  "Cleared: feet and legs sound",
	ClearPerching:  "Cleared: perches and preens",
	ClearFeeding:   "Cleared: feeds itself",
	ClearLivePrey:  "Cleared: catches live prey",
	ClearBehaviour: "Cleared: wary of people, not imprinted",
	ClearDisease:   "Cleared: disease and quarantine status",
}

// CriterionStatuses returns the statuses criterion id can take, and false
// for an unknown id. Every clearance item can be met, unmet or not assessed.
func CriterionStatuses(id CriterionID) ([]Status, bool) {
	if info, ok := lookupCriterion(id); ok {
		return slices.Clone(info.statuses), true
	}
	return nil, false
}

// CriterionTitle returns the title of criterion id, "" for an unknown id.
func CriterionTitle(id CriterionID) string {
	info, _ := lookupCriterion(id)
	return info.title
}

// lookupCriterion returns the fixed facts of criterion id.
func lookupCriterion(id CriterionID) (criterionInfo, bool) {
	for _, c := range criterionTable {
		if c.id == id {
			return c, true
		}
	}
	for _, item := range ClearanceItems {
		if ClearanceCriterion(item) == id {
			return criterionInfo{id, clearanceTitles[item], true, sMUN}, true
		}
	}
	return criterionInfo{}, false
}

// CriterionIDs lists every criterion ID in assessment order, the clearance
// items last (not every one applies to every species).
func CriterionIDs() []CriterionID {
	var out []CriterionID
	for _, c := range criterionTable {
		out = append(out, c.id)
	}
	for _, item := range ClearanceItems {
		out = append(out, ClearanceCriterion(item))
	}
	return out
}

// perchingGroups are the groups the height and landing criteria apply to:
// this project's reading of "all that perch" (PRACTICE.md) [project
// default]. Swifts cling, and shorebirds, gulls, rails and the water birds
// stand or swim rather than perch.
var perchingGroups = []Group{GroupRaptor, GroupOwl, GroupSongbird, GroupCorvid, GroupSwallow,
	GroupHummingbird, GroupNightjar, GroupDove, GroupWoodpecker, GroupOtherLandbird,
	GroupHeron, GroupCraneStork, GroupGamebird, GroupCormorantPelican}

// perches reports whether the group perches (see perchingGroups).
func (g Group) perches() bool { return slices.Contains(perchingGroups, g) }

// needsWholeFlight reports whether the group needs fully normal flight and
// intact outer primaries and tail: raptors, owls and aerial insectivores
// (PRACTICE.md; Wildlife International, release criteria).
func (g Group) needsWholeFlight() bool { return g.RaptorLike() || g.AerialInsectivore() }

// newCriterion starts criterion id with its fixed facts, not yet assessed.
func newCriterion(id CriterionID) Criterion {
	info, _ := lookupCriterion(id)
	return Criterion{ID: id, Title: info.title, Core: info.core, Status: StatusNotAssessed,
		Evidence: []Evidence{}, Thresholds: []ThresholdID{}, Findings: []string{}}
}

// evidence appends one fact, dated when at is not zero.
func (c *Criterion) evidence(name, text string, at time.Time) {
	e := Evidence{Name: name, Text: text}
	if !at.IsZero() {
		e.At = evalPtr(at)
	}
	c.Evidence = append(c.Evidence, e)
}

// finding appends a further observation.
func (c *Criterion) finding(s string) { c.Findings = append(c.Findings, s) }

// set gives the criterion its status and reason.
func (c *Criterion) set(s Status, reason string) { c.Status, c.Reason = s, reason }

// asOf records the oldest instant the criterion's evidence rests on.
func (c *Criterion) asOf(ts ...time.Time) {
	for _, t := range ts {
		if t.IsZero() {
			continue
		}
		if c.AsOf == nil || t.Before(*c.AsOf) {
			c.AsOf = evalPtr(t)
		}
	}
}

// zeroTime marks evidence without a date (a reference value, a derived one).
var zeroTime time.Time

// roundTo rounds x to digits decimal places, for display.
func roundTo(x float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(x*p) / p
}

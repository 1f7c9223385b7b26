package assess

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"time"
)

// ThresholdID names one threshold of the readiness assessment. IDs are
// stable: the centre's settings and the audit trail refer to them.
type ThresholdID string

// Setting is the value of a threshold (for one group, when it depends on the
// group), its default and where the value in force comes from.
type Setting struct {
	// Default is the shipped value; nil = none (the criterion is not
	// assessed until the centre sets a value).
	Default *float64 `json:"default"`
	// Value is the value in force; nil = not set.
	Value *float64 `json:"value"`
	// Provenance of Value: the default's, or ProvCentreSetting once the
	// centre has changed it.
	Provenance Provenance `json:"provenance"`
	// Source cites where the value comes from, in words for people.
	Source string `json:"source"`
	// SetBy and SetAt say who changed the value and when; empty for a default.
	SetBy string     `json:"set_by,omitempty"`
	SetAt *time.Time `json:"set_at,omitempty"`
}

// GroupSetting is a threshold's setting for one species group.
type GroupSetting struct {
	Group Group `json:"group"`
	Setting
}

// Threshold is one number the assessment compares evidence with, with its
// unit, valid range and provenance. A group-dependent threshold holds a
// setting per group in Groups (every group, in Groups order); any other holds
// its one setting in Setting.
type Threshold struct {
	ID    ThresholdID `json:"id"`
	Label string      `json:"label"` // what it is, for a settings page
	Unit  string      `json:"unit"`  // "g", "days", "fraction", "×", "" for a count or score
	// Min and Max bound a value the centre may set (inclusive).
	Min float64 `json:"min"`
	Max float64 `json:"max"`
	// Integer values only (counts, scores, days).
	Integer  bool `json:"integer"`
	PerGroup bool `json:"per_group"`
	Setting
	Groups []GroupSetting `json:"groups,omitempty"`
}

// Thresholds is every threshold of the assessment. The zero value means the
// defaults (Evaluate reads it as DefaultThresholds()). It is a value type:
// Set and Reset copy before they change anything, so a Thresholds passed to
// Evaluate is never changed behind its back.
type Thresholds struct {
	list []Threshold
}

// Threshold IDs. Each default, its unit and its provenance is in
// DefaultThresholds.
const (
	ThMassLowBand         ThresholdID = "mass-low-band"
	ThMassTrendFall       ThresholdID = "mass-trend-fall"
	ThMassTrendWeighIns   ThresholdID = "mass-trend-weigh-ins"
	ThMassTrendDays       ThresholdID = "mass-trend-days"
	ThFatKaiserLow        ThresholdID = "fat-0-8-low"
	ThFatKaiserHigh       ThresholdID = "fat-0-8-high"
	ThFatHelmsLow         ThresholdID = "fat-0-5-low"
	ThFatHelmsHigh        ThresholdID = "fat-0-5-high"
	ThMuscleMet           ThresholdID = "muscle-met"
	ThMuscleBorderline    ThresholdID = "muscle-borderline"
	ThOuterPrimaryFrom    ThresholdID = "outer-primary-from"
	ThOuterPrimariesMax   ThresholdID = "outer-primaries-damaged"
	ThRectricesMax        ThresholdID = "rectrices-damaged"
	ThMinSpeedMet         ThresholdID = "min-speed-ratio-met"
	ThMinSpeedBorderline  ThresholdID = "min-speed-ratio-borderline"
	ThExcessPowerMet      ThresholdID = "excess-power-met"
	ThExcessPowerBorder   ThresholdID = "excess-power-borderline"
	ThDropCapM            ThresholdID = "drop-height-cap"
	ThPasses              ThresholdID = "passes"
	ThPassesScaleCap      ThresholdID = "passes-scale-cap"
	ThCageLengthM         ThresholdID = "cage-length"
	ThRecoveryS           ThresholdID = "recovery"
	ThHeatC               ThresholdID = "heat-temperature"
	ThLandingsMet         ThresholdID = "landings-met"
	ThLandingsBorderline  ThresholdID = "landings-borderline"
	ThWaterproofDays      ThresholdID = "waterproof-days"
	ThPrereleaseDays      ThresholdID = "prerelease-days"
	ThEnclosureSlack      ThresholdID = "enclosure-slack"
	ThStaleDays           ThresholdID = "stale-days"
	ThMuscleFactorPrefix  ThresholdID = "muscle-factor-"    // + score 0…3
	ThFatFractionKaiser   ThresholdID = "fat-fraction-0-8-" // + score 0…8
	ThFatFractionHelmsPfx ThresholdID = "fat-fraction-0-5-" // + score 0…5
)

func evalPtr[T any](v T) *T { return &v }

// orDefault returns t, or the defaults for the zero value.
func (t Thresholds) orDefault() Thresholds {
	if len(t.list) == 0 {
		return DefaultThresholds()
	}
	return t
}

// All returns every threshold, deep-copied, in a fixed order (the order of
// DefaultThresholds): the list a settings page shows.
func (t Thresholds) All() []Threshold {
	t = t.orDefault()
	out := make([]Threshold, len(t.list))
	for i, th := range t.list {
		out[i] = th.clone()
	}
	return out
}

func (th Threshold) clone() Threshold {
	th.Setting = th.Setting.clone()
	th.Groups = slices.Clone(th.Groups)
	for i := range th.Groups {
		th.Groups[i].Setting = th.Groups[i].Setting.clone()
	}
	return th
}

func (s Setting) clone() Setting {
	if s.Default != nil {
		s.Default = evalPtr(*s.Default)
	}
	if s.Value != nil {
		s.Value = evalPtr(*s.Value)
	}
	if s.SetAt != nil {
		s.SetAt = evalPtr(*s.SetAt)
	}
	return s
}

// Get returns the threshold with the given id.
func (t Thresholds) Get(id ThresholdID) (Threshold, bool) {
	t = t.orDefault()
	if i := t.index(id); i >= 0 {
		return t.list[i].clone(), true
	}
	return Threshold{}, false
}

func (t Thresholds) index(id ThresholdID) int {
	return slices.IndexFunc(t.list, func(th Threshold) bool { return th.ID == id })
}

// Lookup returns the setting of threshold id for group g (g is ignored for a
// threshold that does not depend on the group), and false when there is no
// such threshold or its value is not set for the group.
func (t Thresholds) Lookup(id ThresholdID, g Group) (Setting, bool) {
	t = t.orDefault()
	i := t.index(id)
	if i < 0 {
		return Setting{}, false
	}
	th := t.list[i]
	s := th.Setting
	if th.PerGroup {
		j := slices.IndexFunc(th.Groups, func(gs GroupSetting) bool { return gs.Group == g })
		if j < 0 {
			return Setting{}, false
		}
		s = th.Groups[j].Setting
	}
	return s, s.Value != nil
}

// Value returns the value in force of threshold id for group g; see Lookup.
func (t Thresholds) Value(id ThresholdID, g Group) (float64, bool) {
	s, ok := t.Lookup(id, g)
	if !ok {
		return 0, false
	}
	return *s.Value, true
}

// must returns the value of a threshold that always has one (every
// threshold that does not depend on the group); 0 for an unknown id.
func (t Thresholds) must(id ThresholdID) float64 {
	v, _ := t.Value(id, "")
	return v
}

// Set changes threshold id (for group g when it depends on the group; g must
// be "" otherwise) to value, recording who changed it and when; its
// provenance becomes ProvCentreSetting. A value outside the threshold's
// range, a fraction for a whole-number threshold, or a value that would
// contradict a paired threshold (a borderline limit beyond its met limit)
// gives a *ValidationError and changes nothing.
func (t *Thresholds) Set(id ThresholdID, g Group, value float64, who string, when time.Time) error {
	return t.change(id, g, func(th Threshold, s *Setting) error {
		if !(value >= th.Min && value <= th.Max) || th.Integer && value != math.Trunc(value) {
			kind := "a number"
			if th.Integer {
				kind = "a whole number"
			}
			return &ValidationError{Field: string(id), Value: formatNum(value),
				Message: fmt.Sprintf("expected %s from %g to %g %s", kind, th.Min, th.Max, th.Unit)}
		}
		s.Value = evalPtr(value)
		s.Provenance = ProvCentreSetting
		s.Source = fmt.Sprintf("centre setting by %s on %s", who, when.UTC().Format(time.DateOnly))
		s.SetBy, s.SetAt = who, evalPtr(when)
		return nil
	})
}

// Reset restores threshold id (for group g) to its default.
func (t *Thresholds) Reset(id ThresholdID, g Group) error {
	def, ok := DefaultThresholds().Lookup(id, g)
	if !ok {
		if _, exists := DefaultThresholds().Get(id); !exists {
			return &ValidationError{Field: "threshold", Value: string(id), Message: "no such threshold"}
		}
	}
	return t.change(id, g, func(_ Threshold, s *Setting) error {
		*s = def
		return nil
	})
}

// change copies the list, applies fn to the setting of (id, g), checks the
// whole set, and keeps the copy only when it is valid.
func (t *Thresholds) change(id ThresholdID, g Group, fn func(Threshold, *Setting) error) error {
	next := Thresholds{list: t.All()}
	i := next.index(id)
	if i < 0 {
		return &ValidationError{Field: "threshold", Value: string(id), Message: "no such threshold"}
	}
	th := &next.list[i]
	s := &th.Setting
	switch {
	case th.PerGroup:
		j := slices.IndexFunc(th.Groups, func(gs GroupSetting) bool { return gs.Group == g })
		if j < 0 {
			return &ValidationError{Field: string(id), Value: string(g), Message: "this threshold is set per species group: name a known group"}
		}
		s = &th.Groups[j].Setting
	case g != "":
		return &ValidationError{Field: string(id), Value: string(g), Message: "this threshold does not depend on the species group"}
	}
	if err := fn(*th, s); err != nil {
		return err
	}
	if err := next.Validate(); err != nil {
		return err
	}
	*t = next
	return nil
}

// thresholdPairs are limits that must stay in order: the first at most the
// second.
var thresholdPairs = [][2]ThresholdID{
	{ThFatKaiserLow, ThFatKaiserHigh},
	{ThFatHelmsLow, ThFatHelmsHigh},
	{ThMuscleBorderline, ThMuscleMet},
	{ThMinSpeedMet, ThMinSpeedBorderline},
	{ThExcessPowerBorder, ThExcessPowerMet},
	{ThLandingsBorderline, ThLandingsMet},
}

// Validate checks every value against its range and the paired limits'
// order. It returns ValidationErrors naming the threshold ids, or nil.
func (t Thresholds) Validate() error {
	t = t.orDefault()
	var errs ValidationErrors
	for _, th := range t.list {
		settings := []Setting{th.Setting}
		if th.PerGroup {
			settings = settings[:0]
			for _, gs := range th.Groups {
				settings = append(settings, gs.Setting)
			}
		}
		for _, s := range settings {
			if s.Value == nil {
				if !th.PerGroup {
					errs = append(errs, &ValidationError{Field: string(th.ID), Message: "a value is required"})
				}
				continue
			}
			v := *s.Value
			if !(v >= th.Min && v <= th.Max) || th.Integer && v != math.Trunc(v) {
				errs = append(errs, &ValidationError{Field: string(th.ID), Value: formatNum(v),
					Message: fmt.Sprintf("expected a value from %g to %g %s", th.Min, th.Max, th.Unit)})
			}
		}
	}
	for _, p := range thresholdPairs {
		if a, b := t.must(p[0]), t.must(p[1]); a > b {
			errs = append(errs, &ValidationError{Field: string(p[0]), Value: formatNum(a),
				Message: fmt.Sprintf("must not be beyond %s (%g)", p[1], b)})
		}
	}
	for _, id := range []ThresholdID{ThMuscleFactorPrefix, ThFatFractionKaiser, ThFatFractionHelmsPfx} {
		if i := t.index(id + "0"); i < 0 {
			errs = append(errs, &ValidationError{Field: string(id) + "0", Message: "missing from the thresholds"})
		}
	}
	if len(errs) == 0 {
		return nil
	}
	return errs
}

// MarshalJSON writes the list of thresholds (All).
func (t Thresholds) MarshalJSON() ([]byte, error) { return json.Marshal(t.All()) }

// muscleFactors returns the flight-muscle factors by score 0…3.
func (t Thresholds) muscleFactors() *[4]float64 {
	var q [4]float64
	for i := range q {
		q[i] = t.must(ThMuscleFactorPrefix + ThresholdID(fmt.Sprint(i)))
	}
	return &q
}

// fatFractions returns the fat-fraction tables.
func (t Thresholds) fatFractions() *FatFractions {
	var k [9]float64
	var h [6]float64
	for i := range k {
		k[i] = t.must(ThFatFractionKaiser + ThresholdID(fmt.Sprint(i)))
	}
	for i := range h {
		h[i] = t.must(ThFatFractionHelmsPfx + ThresholdID(fmt.Sprint(i)))
	}
	return &FatFractions{Kaiser: &k, HelmsDrury: &h}
}

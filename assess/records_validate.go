package assess

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"
)

// This file checks the conditioning records of case.go as staff type them.
// Every check is pure: the species, the drop-height cap and the clock are
// arguments. Field names are the web forms' names, so a message lands beside
// the field that caused it.

// DefaultDropCapM is the highest drop test allowed, m, until the centre sets
// its own (PRACTICE.md "Safety": warn on any drop test and cap its height,
// default 1 m [common practice]).
const DefaultDropCapM = 1.0

// SpanConfirmFraction: a wingspan more than this fraction above or below the
// species' reference span is more likely a typing or unit mistake than a real
// bird, and is refused unless confirmed with a reason [project default].
const SpanConfirmFraction = 0.25

// Upper bounds of plausible entries [project default: well beyond any bird
// or enclosure the app serves, to catch unit and typing mistakes].
const (
	maxRecordMassG   = 25000 // heavier than any flying bird (about 20 kg [from memory])
	maxSpanMM        = 4000  // above the largest living wingspans (about 3.5 m [from memory])
	maxAreaCM2       = 30000
	maxRunUpM        = 1000 // loons may need 30 m to 400 m of water (PRACTICE.md)
	maxMinutesOnWtr  = 24 * 60
	maxSessionMin    = 240
	maxRecoveryS     = 3600
	maxWingbeatHz    = 100 // hummingbirds beat their wings up to about 80 Hz [from memory]
	maxPassesOrCount = 1000
	maxAttempts      = 20
	maxEnclosureM    = 500
	maxTextRunes     = 2000
)

// Lists and validity of the record vocabularies of case.go.
var (
	// EnclosureKinds lists the enclosure kinds, indoor first.
	EnclosureKinds = []EnclosureKind{EnclosureIndoorCage, EnclosureOutdoorAviary, EnclosureFlightCage, EnclosurePool}
	// WindStrengths lists the wind strengths, calm first.
	WindStrengths = []WindStrength{WindCalm, WindLight, WindModerate, WindStrong}
	// WindDirections lists the wind directions relative to the launch.
	WindDirections = []WindDirection{WindHead, WindTail, WindCross}
	// Exercises lists the exercise kinds.
	Exercises = []Exercise{ExerciseCage, ExerciseCreance, ExerciseFreeFlight}
	// Droops lists the wing-droop observations.
	Droops = []Droop{DroopNone, DroopLeft, DroopRight}
	// WaterproofResults lists the waterproofing results, best first.
	WaterproofResults = []WaterproofResult{WaterproofYes, WaterproofPartial, WaterproofNo}
	// AreaMethods lists the ways a wing area is obtained.
	AreaMethods = []AreaMethod{AreaTraced, AreaEstimated}
)

// Valid reports whether f is one of FedStates.
func (f FedState) Valid() bool { return slices.Contains(FedStates, f) }

// Valid reports whether k is one of EnclosureKinds.
func (k EnclosureKind) Valid() bool { return slices.Contains(EnclosureKinds, k) }

// Prerelease reports whether a stay in an enclosure of this kind counts as
// outdoor pre-release housing: an aviary, a flight cage or a pool enclosure
// (PRACTICE.md "Time in pre-release housing").
func (k EnclosureKind) Prerelease() bool { return k.Valid() && k != EnclosureIndoorCage }

// Valid reports whether w is one of WindStrengths.
func (w WindStrength) Valid() bool { return slices.Contains(WindStrengths, w) }

// Valid reports whether d is one of WindDirections or WindNone.
func (d WindDirection) Valid() bool { return d == WindNone || slices.Contains(WindDirections, d) }

// Valid reports whether e is one of Exercises.
func (e Exercise) Valid() bool { return slices.Contains(Exercises, e) }

// Valid reports whether h is one of Heights.
func (h HeightReached) Valid() bool { return slices.Contains(Heights, h) }

// Valid reports whether d is one of Droops.
func (d Droop) Valid() bool { return slices.Contains(Droops, d) }

// Valid reports whether r is one of WaterproofResults.
func (r WaterproofResult) Valid() bool { return slices.Contains(WaterproofResults, r) }

// Valid reports whether m is one of AreaMethods.
func (m AreaMethod) Valid() bool { return slices.Contains(AreaMethods, m) }

// Valid reports whether r is one of AttemptResults.
func (r AttemptResult) Valid() bool { return slices.Contains(AttemptResults, r) }

// recErr appends one field error.
func (es *ValidationErrors) recErr(field, value, format string, args ...any) {
	*es = append(*es, &ValidationError{Field: field, Value: value, Message: fmt.Sprintf(format, args...)})
}

func (es ValidationErrors) orNil() error {
	if len(es) == 0 {
		return nil
	}
	return es
}

func recNum(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

func recFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// recRange checks an optional number against [lo, hi].
func (es *ValidationErrors) recRange(field string, p *float64, lo, hi float64, what string) {
	if p != nil && !(recFinite(*p) && *p >= lo && *p <= hi) {
		es.recErr(field, recNum(*p), "%s", what)
	}
}

func (es *ValidationErrors) recText(field, s string) {
	if len([]rune(s)) > maxTextRunes {
		es.recErr(field, string([]rune(s)[:20])+"…", "keep this under %d characters", maxTextRunes)
	}
}

// Validate checks a weigh-in without the species: a mass in grams above 0
// and below any flying bird's, and a known fed state. CheckMass adds the
// species' range.
func (w WeighIn) Validate() error {
	var es ValidationErrors
	switch {
	case !recFinite(w.MassG) || w.MassG <= 0:
		es.recErr("mass_g", recNum(w.MassG), "enter the mass in grams, a number above 0")
	case w.MassG > maxRecordMassG:
		es.recErr("mass_g", recNum(w.MassG), "%s g is heavier than any flying bird: mass is entered in grams — an extra digit?", recNum(w.MassG))
	}
	if !w.Fed.Valid() {
		es.recErr("fed", string(w.Fed), "say whether the bird was weighed before or after feeding, or that it is not known")
	}
	es.recText("note", w.Note)
	return es.orNil()
}

// Validate checks a condition score: at least one score; the fat score
// within its scale (0–8 Kaiser, 0–5 Helms & Drury), the scale stated with
// it; pectoral muscle 0–3; body condition 1–5 (PRACTICE.md "Scores").
func (c ConditionScore) Validate() error {
	var es ValidationErrors
	if c.FatScore == nil && c.MuscleScore == nil && c.BodyCondition == nil {
		es.recErr("fat_score", "", "enter at least one score: fat, pectoral muscle or body condition")
	}
	if c.FatScore != nil {
		switch max := c.FatScale.MaxScore(); {
		case !c.FatScale.Valid():
			es.recErr("fat_scale", string(c.FatScale), "choose the fat score's scale: 0–8 (Kaiser) or 0–5 (Helms & Drury)")
		case *c.FatScore < 0 || *c.FatScore > max:
			es.recErr("fat_score", strconv.Itoa(*c.FatScore), "a fat score on the %s scale is a whole number from 0 to %d", c.FatScale, max)
		}
	}
	if c.MuscleScore != nil && (*c.MuscleScore < 0 || *c.MuscleScore > MaxMuscleScore) {
		es.recErr("muscle_score", strconv.Itoa(*c.MuscleScore), "the pectoral muscle score is a whole number from 0 (keel sharp) to 3 (muscle fully rounded)")
	}
	if c.BodyCondition != nil && (*c.BodyCondition < 1 || *c.BodyCondition > 5) {
		es.recErr("body_condition", strconv.Itoa(*c.BodyCondition), "the body-condition score is a whole number from 1 (emaciated) to 5 (obese)")
	}
	return es.orNil()
}

// FeatherCounts are how many flight feathers a wing and each half of the
// tail carry; zero means unknown (any count accepted).
type FeatherCounts struct {
	Primaries, Secondaries int // per wing
	RectricesPerSide       int // half the tail
}

// FeatherCountsOf returns the species' feather counts (typical of its
// family); nil gives zero counts.
func FeatherCountsOf(sp *Species) FeatherCounts {
	if sp == nil {
		return FeatherCounts{}
	}
	return FeatherCounts{Primaries: sp.Primaries, Secondaries: sp.Secondaries, RectricesPerSide: sp.Rectrices / 2}
}

// FeatherTract names one row of a feather map, with its form field prefix.
type FeatherTract struct {
	Prefix string // form field prefix: lp, rp, ls, rs, tl, tr; feather n is Prefix+n
	Label  string // "Left primaries"
	Short  string // the feathers' letter: P, S or R
}

// FeatherTracts lists the rows of a feather map in form order.
var FeatherTracts = []FeatherTract{
	{"lp", "Left primaries", "P"}, {"ls", "Left secondaries", "S"},
	{"rp", "Right primaries", "P"}, {"rs", "Right secondaries", "S"},
	{"tl", "Tail, left rectrices", "R"}, {"tr", "Tail, right rectrices", "R"},
}

// Tract returns the feathers of the tract with the given prefix (nil for an
// unknown prefix), as a pointer so a caller can fill it.
func (m *FeatherMap) Tract(prefix string) *[]FeatherStatus {
	switch prefix {
	case "lp":
		return &m.LeftPrimaries
	case "rp":
		return &m.RightPrimaries
	case "ls":
		return &m.LeftSecondaries
	case "rs":
		return &m.RightSecondaries
	case "tl":
		return &m.TailLeft
	case "tr":
		return &m.TailRight
	}
	return nil
}

// Count returns the expected number of feathers of tract prefix.
func (n FeatherCounts) Count(prefix string) int {
	switch prefix {
	case "lp", "rp":
		return n.Primaries
	case "ls", "rs":
		return n.Secondaries
	case "tl", "tr":
		return n.RectricesPerSide
	}
	return 0
}

// Validate checks each feather's status and, where n knows it, that each
// tract has the species' count.
func (m FeatherMap) Validate(n FeatherCounts) error {
	var es ValidationErrors
	for _, t := range FeatherTracts {
		fs := *m.Tract(t.Prefix)
		if want := n.Count(t.Prefix); want > 0 && len(fs) != want {
			es.recErr(t.Prefix, strconv.Itoa(len(fs)), "%s: expected %d feathers for this species, got %d", t.Label, want, len(fs))
		}
		for i, f := range fs {
			if !f.Valid() {
				es.recErr(fmt.Sprintf("%s%d", t.Prefix, i+1), string(f), "%s%d: choose intact, missing, broken, growing (pin), imped, frayed or stress bars", t.Short, i+1)
			}
		}
	}
	return es.orNil()
}

// Validate checks a wing measurement: at least one value; span 1–4000 mm;
// area above 0 with its method; a flattened chord shorter than half the
// span; the feather map against the species' counts (sp may be nil).
// CheckSpan compares the span with the species' reference.
func (w WingMeasurement) Validate(sp *Species) error {
	var es ValidationErrors
	if w.SpanMM == nil && w.AreaCM2 == nil && w.ChordMM == nil && w.Feathers == nil {
		es.recErr("span_mm", "", "enter at least a wingspan, a wing area, a wing chord or the feather map")
	}
	es.recRange("span_mm", w.SpanMM, 1, maxSpanMM, "the wingspan is in millimetres, tip to tip, from 1 to 4000")
	es.recRange("area_cm2", w.AreaCM2, 0.5, maxAreaCM2, "the wing area is in cm², both wings and the body strip, above 0")
	es.recRange("chord_mm", w.ChordMM, 1, maxSpanMM/2, "the flattened wing chord is in millimetres, wrist to wing tip")
	if w.AreaCM2 != nil && !w.AreaMethod.Valid() {
		es.recErr("area_method", string(w.AreaMethod), "say how the area was obtained: traced or estimated")
	}
	if w.SpanMM != nil && w.ChordMM != nil && es.Field("span_mm") == "" && es.Field("chord_mm") == "" && *w.ChordMM >= *w.SpanMM/2 {
		es.recErr("chord_mm", recNum(*w.ChordMM), "a wing chord of %s mm is longer than half the %s mm span: check both (span is tip to tip, chord wrist to tip)",
			recNum(*w.ChordMM), recNum(*w.SpanMM))
	}
	if w.Feathers != nil {
		es.add(w.Feathers.Validate(FeatherCountsOf(sp)))
	}
	es.recText("note", w.Note)
	return es.orNil()
}

// SpanCheck is the finding of CheckSpan.
type SpanCheck struct {
	ValidationError
	// NeedsConfirm is always true: a span this far off the reference is
	// refused unless the person confirms it with a reason.
	NeedsConfirm bool
}

// CheckSpan compares a wingspan in mm with the species' reference span. It
// returns nil within SpanConfirmFraction of it (or without a reference).
func CheckSpan(field string, mm float64, sp *Species) *SpanCheck {
	if sp == nil || sp.SpanMM <= 0 || !recFinite(mm) || mm <= 0 {
		return nil
	}
	off := mm/sp.SpanMM - 1
	if math.Abs(off) <= SpanConfirmFraction {
		return nil
	}
	dir, hint := "longer", "check the digits (an extra digit, or measured in a different unit?)"
	if off < 0 {
		dir, hint = "shorter", fmt.Sprintf("did you enter centimetres (%s mm)?", recNum(mm*10))
		if mm*10 > sp.SpanMM*(1+SpanConfirmFraction) {
			hint = "check the wings were fully spread and the digits"
		}
	}
	return &SpanCheck{NeedsConfirm: true, ValidationError: ValidationError{Field: field, Value: recNum(mm),
		Message: fmt.Sprintf("%s mm is %.0f %% %s than the span of a %s (%s mm): %s If the span is right, confirm it and say why.",
			recNum(mm), math.Abs(off)*100, dir, sp.CommonName, recNum(sp.SpanMM), hint)}}
}

// EstimateAreaCM2 is the wing area estimated from a span and the species'
// reference, S_ref·(b/b_ref)², cm² (the AreaEstimated method); 0 without a
// reference.
func EstimateAreaCM2(spanMM float64, sp *Species) float64 {
	if sp == nil || sp.SpanMM <= 0 || sp.AreaCM2 <= 0 || spanMM <= 0 {
		return 0
	}
	r := spanMM / sp.SpanMM
	return math.Round(sp.AreaCM2*r*r*10) / 10
}

// TrialRules are what a takeoff trial is checked against.
type TrialRules struct {
	// SafeModes are offered without a stated reason; nil skips the check.
	SafeModes []LaunchMode
	// DropCapM caps any drop height, m; 0 skips the check.
	DropCapM float64
	// GroupLabel names the group in messages, e.g. "Swifts".
	GroupLabel string
}

// TrialRulesFor returns the rules for a species: its group's safe trial
// modes (with the species' own launch mode) and the drop cap.
func TrialRulesFor(sp *Species, dropCapM float64) TrialRules {
	r := TrialRules{DropCapM: dropCapM}
	if sp == nil {
		return r
	}
	r.SafeModes, r.GroupLabel = sp.Group.SafeTrialModes(), sp.Group.Label()
	if sp.LaunchMode != "" && !slices.Contains(r.SafeModes, sp.LaunchMode) {
		r.SafeModes = append([]LaunchMode{sp.LaunchMode}, r.SafeModes...)
	}
	return r
}

// Safe reports whether mode needs no stated reason under r.
func (r TrialRules) Safe(mode LaunchMode) bool {
	return r.SafeModes == nil || slices.Contains(r.SafeModes, mode)
}

// OtherModes lists the trial modes that need a stated reason under r.
func (r TrialRules) OtherModes() []LaunchMode {
	var out []LaunchMode
	for _, m := range TrialModes {
		if !r.Safe(m) {
			out = append(out, m)
		}
	}
	return out
}

// Validate checks a takeoff trial: a known trial mode, with a reason when it
// is not safe for the group; a drop height for a drop test, above 0 and at
// most the cap; run-up 0–1000 m; the wind's strength and, unless calm, its
// direction; 1–20 attempts, each with a result.
func (t TakeoffTrial) Validate(r TrialRules) error {
	var es ValidationErrors
	switch {
	case !slices.Contains(TrialModes, t.Mode):
		es.recErr("mode", string(t.Mode), "choose how the bird was launched")
	case !r.Safe(t.Mode) && strings.TrimSpace(t.ModeReason) == "":
		who := r.GroupLabel
		if who == "" {
			who = "this species"
		}
		es.recErr("mode_reason", "", "a %s trial is not a safe mode for %s: say why it is needed", t.Mode, strings.ToLower(who))
	}
	es.recRange("run_up_m", t.RunUpM, 0, maxRunUpM, "the run-up is in metres, from 0 to 1000")
	switch {
	case t.DropHeightM == nil && t.Mode == TrialDrop:
		es.recErr("drop_height_m", "", "a drop test needs its height in metres")
	case t.DropHeightM != nil && !(recFinite(*t.DropHeightM) && *t.DropHeightM > 0):
		es.recErr("drop_height_m", recNum(*t.DropHeightM), "the drop height is in metres, above 0")
	case t.DropHeightM != nil && r.DropCapM > 0 && *t.DropHeightM > r.DropCapM:
		es.recErr("drop_height_m", recNum(*t.DropHeightM), "drops are capped at %s m at this centre, to spare the bird a fall: use a lower drop or another mode", recNum(r.DropCapM))
	}
	if !t.Wind.Valid() {
		es.recErr("wind", string(t.Wind), "choose the wind: calm, light, moderate or strong")
	}
	if !t.WindDir.Valid() || (t.Wind.Valid() && t.Wind != WindCalm && t.WindDir == WindNone) {
		es.recErr("wind_dir", string(t.WindDir), "say whether the wind was a head, tail or cross wind")
	}
	switch {
	case len(t.Attempts) == 0:
		es.recErr("attempts", "0", "record at least one attempt and its result")
	case len(t.Attempts) > maxAttempts:
		es.recErr("attempts", strconv.Itoa(len(t.Attempts)), "record at most %d attempts in one trial", maxAttempts)
	}
	for i, a := range t.Attempts {
		if !a.Valid() {
			es.recErr(fmt.Sprintf("attempt_%d", i+1), string(a), "choose the result: climbed away, flew level, landed short or failed to lift")
		}
	}
	es.recText("surface", t.Surface)
	es.recText("mode_reason", t.ModeReason)
	es.recText("notes", t.Notes)
	return es.orNil()
}

// Validate checks a flight session: known exercise, height and droop;
// counts not negative and consistent (longest unbroken run ≤ passes,
// controlled landings ≤ landings); times within a session's range; air
// temperature −40 to 50 °C; wingbeat frequency 0–100 Hz; a group of at
// least two birds.
func (f FlightSession) Validate() error {
	var es ValidationErrors
	if !f.Exercise.Valid() {
		es.recErr("exercise", string(f.Exercise), "choose the exercise: cage, creance or free flight")
	}
	count := func(field string, n int, what string) {
		if n < 0 || n > maxPassesOrCount {
			es.recErr(field, strconv.Itoa(n), "%s is a whole number from 0 to %d", what, maxPassesOrCount)
		}
	}
	count("passes", f.Passes, "passes flown")
	count("longest_run", f.LongestRun, "the longest unbroken run")
	count("landings", f.Landings, "landings")
	count("landings_controlled", f.LandingsControlled, "controlled landings")
	if es.Field("longest_run") == "" && es.Field("passes") == "" && f.LongestRun > f.Passes {
		es.recErr("longest_run", strconv.Itoa(f.LongestRun), "the longest unbroken run (%d) cannot exceed the passes flown (%d)", f.LongestRun, f.Passes)
	}
	if es.Field("landings_controlled") == "" && es.Field("landings") == "" && f.LandingsControlled > f.Landings {
		es.recErr("landings_controlled", strconv.Itoa(f.LandingsControlled), "controlled landings (%d) cannot exceed landings (%d)", f.LandingsControlled, f.Landings)
	}
	if !f.Highest.Valid() {
		es.recErr("highest", string(f.Highest), "choose the highest point reached: floor, low perch, high perch or ceiling")
	}
	if !f.Droop.Valid() {
		es.recErr("droop", string(f.Droop), "choose the wing droop: none, left or right")
	}
	if f.DurationS != nil && (*f.DurationS < 0 || *f.DurationS > maxSessionMin*60) {
		es.recErr("duration_min", recNum(float64(*f.DurationS)/60), "the session's duration is in minutes, from 0 to %d", maxSessionMin)
	}
	if f.RecoveryS != nil && (*f.RecoveryS < 0 || *f.RecoveryS > maxRecoveryS) {
		es.recErr("recovery_s", strconv.Itoa(*f.RecoveryS), "the breathing recovery time is in seconds, from 0 to %d", maxRecoveryS)
	}
	es.recRange("air_temp_c", f.AirTempC, -40, 50, "the air temperature is in °C, from -40 to 50")
	es.recRange("wingbeat_hz", f.WingbeatHz, 0.1, maxWingbeatHz, "the wingbeat frequency is in Hz (beats per second), above 0 and at most 100")
	es.recRange("length_m", f.EnclosureLengthM, 0.5, maxEnclosureM, "the flight length is in metres, above 0")
	if f.Group && f.GroupSize < 2 {
		es.recErr("group_size", strconv.Itoa(f.GroupSize), "a group session needs the number of birds flown together, at least 2")
	}
	es.recText("enclosure", f.EnclosureName)
	es.recText("notes", f.Notes)
	return es.orNil()
}

// Validate checks a waterproofing test: minutes on water 0–1440, a known
// result, and that a bird wet to the skin is not called waterproof.
func (w WaterproofTest) Validate() error {
	var es ValidationErrors
	if !recFinite(w.MinutesOnWater) || w.MinutesOnWater < 0 || w.MinutesOnWater > maxMinutesOnWtr {
		es.recErr("minutes_on_water", recNum(w.MinutesOnWater), "the time on water is in minutes, from 0 to %d", maxMinutesOnWtr)
	}
	switch {
	case !w.Result.Valid():
		es.recErr("result", string(w.Result), "choose the result: waterproof, partly wet or not waterproof")
	case w.WetToSkin && w.Result == WaterproofYes:
		es.recErr("result", string(w.Result), "a bird wet to the skin is not waterproof: choose partly wet or not waterproof")
	}
	return es.orNil()
}

// Validate checks a housing record: an enclosure's name, a known kind and
// its size in metres above 0.
func (h Housing) Validate() error {
	var es ValidationErrors
	if strings.TrimSpace(h.EnclosureName) == "" {
		es.recErr("enclosure", "", "choose the enclosure the bird moved into")
	}
	if !h.Kind.Valid() {
		es.recErr("enclosure", string(h.Kind), "the enclosure's kind is unknown: indoor cage, outdoor aviary, flight cage or pool")
	}
	for _, d := range []float64{h.LengthM, h.WidthM, h.HeightM} {
		if !(recFinite(d) && d > 0 && d <= maxEnclosureM) {
			es.recErr("enclosure", recNum(d), "the enclosure's size must be in metres, above 0: correct the enclosure first")
			break
		}
	}
	return es.orNil()
}

// PrereleaseDays returns the days spent in outdoor pre-release housing up to
// now: each stay lasts until the next one starts (the last until now), and
// the stays whose Prerelease is set are summed. Order of hs does not matter.
func PrereleaseDays(hs []Housing, now time.Time) float64 {
	sorted := slices.Clone(hs)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].From.Before(sorted[j].From) })
	var total time.Duration
	for i, h := range sorted {
		end := now
		if i+1 < len(sorted) {
			end = sorted[i+1].From
		}
		if end.After(now) {
			end = now
		}
		if h.Prerelease && end.After(h.From) {
			total += end.Sub(h.From)
		}
	}
	return total.Hours() / 24
}

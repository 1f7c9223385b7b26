package records

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
)

// SpeciesValueKind is the type of one value of the species reference.
type SpeciesValueKind string

// Kinds of species reference values.
const (
	ValueNumber  SpeciesValueKind = "number"  // float64
	ValueInteger SpeciesValueKind = "integer" // int
	ValueRange   SpeciesValueKind = "range"   // assess.RangeG, grams
	ValueText    SpeciesValueKind = "text"    // string
	ValueLaunch  SpeciesValueKind = "launch"  // assess.LaunchMode
	ValueGroup   SpeciesValueKind = "group"   // assess.Group
	ValueBool    SpeciesValueKind = "bool"    // bool
)

// SpeciesField is one value of the species reference the centre may set:
// for a shipped species an override of the shipped value, for a species
// the centre adds its value.
type SpeciesField struct {
	// Key is the value's name in the species reference and its Sources
	// ("mass_g.female", "span_mm"), and the form field's name.
	Key   string
	Label string
	Unit  string // "g", "mm", "cm²", "days", "×", "" for a count, a word or a yes/no
	Kind  SpeciesValueKind
	// Min and Max bound a number, a count or a range's ends (inclusive).
	Min, Max float64
	// AddedOnly values (names, group, passerine, migrant) are set only for
	// a species the centre adds: they decide which criteria apply and how
	// a patient is found, so a shipped species keeps its own.
	AddedOnly bool
	// Required for a species the centre adds.
	Required bool
	// Hint is shown beside the field.
	Hint string
}

// SpeciesFields lists the values the centre may set, in form order.
// Bounds are plausibility limits for flying birds [project default]: the
// heaviest flying birds weigh about 20 kg and the longest spans are about
// 3.5 m [from memory].
var SpeciesFields = []SpeciesField{
	{Key: "common_name", Label: "Common name", Kind: ValueText, Max: 80, AddedOnly: true, Required: true},
	{Key: "group", Label: "Species group", Kind: ValueGroup, AddedOnly: true, Required: true,
		Hint: "decides which criteria apply, the normal launch and the safe trials"},
	{Key: "passerine", Label: "Passerine (songbird)", Kind: ValueBool, AddedOnly: true, Required: true,
		Hint: "passerines have a higher basal metabolic rate in the flight model"},
	{Key: "migrant", Label: "Migrant", Kind: ValueBool, AddedOnly: true, Required: true,
		Hint: "a fat load may be normal in season"},
	{Key: "mass_g.pooled", Label: "Mean adult mass, sexes pooled", Unit: "g", Kind: ValueNumber, Min: 1, Max: 25000, Required: true},
	{Key: "mass_g.female", Label: "Mean adult mass, female", Unit: "g", Kind: ValueNumber, Min: 1, Max: 25000,
		Hint: "for dimorphic species: the reference bird of a female patient"},
	{Key: "mass_g.male", Label: "Mean adult mass, male", Unit: "g", Kind: ValueNumber, Min: 1, Max: 25000},
	{Key: "mass_range_g.female", Label: "Typical mass range, female", Unit: "g", Kind: ValueRange, Min: 1, Max: 25000},
	{Key: "mass_range_g.male", Label: "Typical mass range, male", Unit: "g", Kind: ValueRange, Min: 1, Max: 25000},
	{Key: "mass_range_g.unknown", Label: "Typical mass range, sex unknown", Unit: "g", Kind: ValueRange, Min: 1, Max: 25000},
	{Key: "span_mm", Label: "Wingspan, tip to tip", Unit: "mm", Kind: ValueNumber, Min: 50, Max: 4000, Required: true},
	{Key: "area_cm2", Label: "Wing area, both wings and the body strip", Unit: "cm²", Kind: ValueNumber, Min: 5, Max: 30000, Required: true},
	{Key: "wing_chord_mm", Label: "Wing chord, unflattened", Unit: "mm", Kind: ValueNumber, Min: 10, Max: 1000},
	{Key: "launch_mode", Label: "Normal launch", Kind: ValueLaunch, Required: true},
	{Key: "expected_margin", Label: "Expected power margin of a healthy adult", Unit: "×", Kind: ValueNumber, Min: 1, Max: 10,
		Hint: "blank: the flight model's default for the mass"},
	{Key: "release_min_mass_g", Label: "Release guide: lowest mass", Unit: "g", Kind: ValueNumber, Min: 1, Max: 25000},
	{Key: "release_guide", Label: "Release guide, in words", Kind: ValueText, Max: 500},
	{Key: "min_passes", Label: "Unbroken passes the length of the flight cage", Kind: ValueInteger, Min: 1, Max: 100,
		Hint: "a centre value for the whole group, on the thresholds page, takes precedence"},
	{Key: "min_prerelease_days", Label: "Least time in outdoor pre-release housing", Unit: "days", Kind: ValueInteger, Min: 0, Max: 365},
	{Key: "waterproof_days", Label: "Consecutive days waterproof", Unit: "days", Kind: ValueInteger, Min: 1, Max: 60},
	{Key: "primaries", Label: "Primaries per wing", Kind: ValueInteger, Min: 0, Max: 40},
	{Key: "secondaries", Label: "Secondaries per wing (with tertials)", Kind: ValueInteger, Min: 0, Max: 40},
	{Key: "rectrices", Label: "Tail feathers", Kind: ValueInteger, Min: 0, Max: 40},
}

// SpeciesFieldByKey returns the field with key.
func SpeciesFieldByKey(key string) (SpeciesField, bool) {
	i := slices.IndexFunc(SpeciesFields, func(f SpeciesField) bool { return f.Key == key })
	if i < 0 {
		return SpeciesField{}, false
	}
	return SpeciesFields[i], true
}

// Parse reads a value as typed in a form: one string, or two (minimum and
// maximum) for a range. "" is no value (nil, nil). Numbers may use a comma
// for the decimal point. A bad value is a validation error naming the
// field's key (a range's ".min" or ".max" end).
func (f SpeciesField) Parse(typed ...string) (any, error) {
	raw := func(i int) string {
		if i < len(typed) {
			return strings.TrimSpace(typed[i])
		}
		return ""
	}
	if f.Kind == ValueRange {
		lo, hi := raw(0), raw(1)
		if lo == "" && hi == "" {
			return nil, nil
		}
		a, err := f.number(f.Key+".min", lo)
		if err != nil {
			return nil, err
		}
		b, err := f.number(f.Key+".max", hi)
		if err != nil {
			return nil, err
		}
		return f.Check(assess.RangeG{Min: a, Max: b})
	}
	v := raw(0)
	if v == "" {
		return nil, nil
	}
	switch f.Kind {
	case ValueNumber:
		n, err := f.number(f.Key, v)
		if err != nil {
			return nil, err
		}
		return f.Check(n)
	case ValueInteger:
		n, err := strconv.Atoi(v)
		if err != nil {
			return nil, f.invalid(v, "enter a whole number")
		}
		return f.Check(n)
	case ValueBool:
		switch strings.ToLower(v) {
		case "yes", "true", "on", "1":
			return true, nil
		case "no", "false", "off", "0":
			return false, nil
		}
		return nil, f.invalid(v, "choose yes or no")
	case ValueLaunch:
		return f.Check(assess.LaunchMode(v))
	case ValueGroup:
		return f.Check(assess.Group(v))
	}
	return f.Check(v)
}

func (f SpeciesField) number(field, v string) (float64, error) {
	n, err := strconv.ParseFloat(strings.ReplaceAll(v, ",", "."), 64)
	if err != nil || math.IsNaN(n) || math.IsInf(n, 0) {
		return 0, &assess.ValidationError{Field: field, Value: v, Message: "enter a number, such as 12 or 12.5"}
	}
	return n, nil
}

func (f SpeciesField) invalid(v, msg string) error {
	return &assess.ValidationError{Field: f.Key, Value: v, Message: msg}
}

// Check returns v as the field's Go type when it is valid for the field:
// float64 (a JSON number decodes as one) for numbers, int for counts,
// assess.RangeG, string, assess.LaunchMode, assess.Group or bool.
func (f SpeciesField) Check(v any) (any, error) {
	inRange := func(n float64) bool { return n >= f.Min && n <= f.Max }
	bounds := fmt.Sprintf("from %g to %g %s", f.Min, f.Max, f.Unit)
	switch f.Kind {
	case ValueNumber:
		n, ok := v.(float64)
		if !ok || !inRange(n) {
			return nil, f.invalid(fmt.Sprint(v), "expected a number "+strings.TrimSpace(bounds))
		}
		return n, nil
	case ValueInteger:
		n, ok := v.(int)
		if fl, isF := v.(float64); isF && fl == math.Trunc(fl) {
			n, ok = int(fl), true
		}
		if !ok || !inRange(float64(n)) {
			return nil, f.invalid(fmt.Sprint(v), "expected a whole number "+strings.TrimSpace(bounds))
		}
		return n, nil
	case ValueRange:
		r, ok := v.(assess.RangeG)
		if !ok || !inRange(r.Min) || !inRange(r.Max) || r.Min > r.Max {
			return nil, f.invalid(fmt.Sprint(v), "expected the lightest and the heaviest typical mass, each "+bounds+", the lightest first")
		}
		return r, nil
	case ValueLaunch:
		m, ok := v.(assess.LaunchMode)
		if s, isS := v.(string); isS {
			m, ok = assess.LaunchMode(s), true
		}
		if !ok || !m.Valid() {
			return nil, f.invalid(fmt.Sprint(v), "choose a launch mode, e.g. standing, water-spring, run-up-water, hand")
		}
		return m, nil
	case ValueGroup:
		g, ok := v.(assess.Group)
		if s, isS := v.(string); isS {
			g, ok = assess.Group(s), true
		}
		if !ok || !g.Valid() {
			return nil, f.invalid(fmt.Sprint(v), "choose a species group")
		}
		return g, nil
	case ValueBool:
		b, ok := v.(bool)
		if !ok {
			return nil, f.invalid(fmt.Sprint(v), "expected yes or no")
		}
		return b, nil
	}
	s, ok := v.(string)
	s = strings.TrimSpace(s)
	if !ok || s == "" || len([]rune(s)) > int(f.Max) {
		return nil, f.invalid(s, fmt.Sprintf("enter up to %g characters", f.Max))
	}
	return s, nil
}

// decodeValue reads a stored value of the field.
func (f SpeciesField) decodeValue(raw string) (any, error) {
	var v any
	switch f.Kind {
	case ValueRange:
		var r [2]float64
		if err := json.Unmarshal([]byte(raw), &r); err != nil {
			return nil, err
		}
		v = assess.RangeG{Min: r[0], Max: r[1]}
	default:
		if err := json.Unmarshal([]byte(raw), &v); err != nil {
			return nil, err
		}
	}
	return f.Check(v)
}

// encodeValue writes a checked value for storage.
func encodeValue(v any) (string, error) {
	if r, ok := v.(assess.RangeG); ok {
		v = [2]float64{r.Min, r.Max}
	}
	b, err := json.Marshal(v)
	return string(b), err
}

// FormatSpeciesValue shows a value in words, with its unit: "" for none.
func FormatSpeciesValue(f SpeciesField, v any) string {
	unit := ""
	if f.Unit != "" {
		unit = " " + f.Unit
	}
	switch x := v.(type) {
	case nil:
		return ""
	case float64:
		return strconv.FormatFloat(x, 'f', -1, 64) + unit
	case *float64:
		if x == nil {
			return ""
		}
		return strconv.FormatFloat(*x, 'f', -1, 64) + unit
	case int:
		return strconv.Itoa(x) + unit
	case *int:
		if x == nil {
			return ""
		}
		return strconv.Itoa(*x) + unit
	case assess.RangeG:
		if x.Min == 0 && x.Max == 0 {
			return ""
		}
		return strconv.FormatFloat(x.Min, 'f', -1, 64) + "–" + strconv.FormatFloat(x.Max, 'f', -1, 64) + unit
	case bool:
		if x {
			return "yes"
		}
		return "no"
	}
	return fmt.Sprint(v)
}

// SpeciesValue returns a species' value of field key, typed as Check
// returns it; nil when the species has none (an optional value unset).
func SpeciesValue(sp *assess.Species, key string) any {
	opt := func(p *float64) any {
		if p == nil {
			return nil
		}
		return *p
	}
	optInt := func(p *int) any {
		if p == nil {
			return nil
		}
		return *p
	}
	switch key {
	case "common_name":
		return sp.CommonName
	case "group":
		return sp.Group
	case "passerine":
		return sp.Passerine
	case "migrant":
		return sp.Migrant
	case "mass_g.pooled":
		return sp.MassG.Pooled
	case "mass_g.female":
		return opt(sp.MassG.Female)
	case "mass_g.male":
		return opt(sp.MassG.Male)
	case "mass_range_g.female":
		return sp.MassRanges.Female
	case "mass_range_g.male":
		return sp.MassRanges.Male
	case "mass_range_g.unknown":
		return sp.MassRanges.Unknown
	case "span_mm":
		return sp.SpanMM
	case "area_cm2":
		return sp.AreaCM2
	case "wing_chord_mm":
		return sp.WingChordMM
	case "launch_mode":
		return sp.LaunchMode
	case "expected_margin":
		return opt(sp.ExpectedMargin)
	case "release_min_mass_g":
		return opt(sp.ReleaseMinMassG)
	case "release_guide":
		if sp.ReleaseGuide == "" {
			return nil
		}
		return sp.ReleaseGuide
	case "min_passes":
		return optInt(sp.MinPasses)
	case "min_prerelease_days":
		return optInt(sp.MinPrereleaseDays)
	case "waterproof_days":
		return optInt(sp.WaterproofDays)
	case "primaries":
		return sp.Primaries
	case "secondaries":
		return sp.Secondaries
	case "rectrices":
		return sp.Rectrices
	}
	return nil
}

// setSpeciesValue writes a checked value into sp (a copy the caller owns).
func setSpeciesValue(sp *assess.Species, key string, v any) {
	ptr := func() *float64 { x := v.(float64); return &x }
	ptrInt := func() *int { x := v.(int); return &x }
	switch key {
	case "common_name":
		sp.CommonName = v.(string)
	case "group":
		sp.Group = v.(assess.Group)
	case "passerine":
		sp.Passerine = v.(bool)
	case "migrant":
		sp.Migrant = v.(bool)
	case "mass_g.pooled":
		sp.MassG.Pooled = v.(float64)
	case "mass_g.female":
		sp.MassG.Female = ptr()
	case "mass_g.male":
		sp.MassG.Male = ptr()
	case "mass_range_g.female":
		sp.MassRanges.Female = v.(assess.RangeG)
	case "mass_range_g.male":
		sp.MassRanges.Male = v.(assess.RangeG)
	case "mass_range_g.unknown":
		sp.MassRanges.Unknown = v.(assess.RangeG)
	case "span_mm":
		sp.SpanMM = v.(float64)
		sp.SpanAreaEstimated = false
	case "area_cm2":
		sp.AreaCM2 = v.(float64)
		sp.SpanAreaEstimated = false
	case "wing_chord_mm":
		sp.WingChordMM = v.(float64)
	case "launch_mode":
		sp.LaunchMode = v.(assess.LaunchMode)
	case "expected_margin":
		sp.ExpectedMargin = ptr()
	case "release_min_mass_g":
		sp.ReleaseMinMassG = ptr()
	case "release_guide":
		sp.ReleaseGuide = v.(string)
	case "min_passes":
		sp.MinPasses = ptrInt()
	case "min_prerelease_days":
		sp.MinPrereleaseDays = ptrInt()
	case "waterproof_days":
		sp.WaterproofDays = ptrInt()
	case "primaries":
		sp.Primaries = v.(int)
	case "secondaries":
		sp.Secondaries = v.(int)
	case "rectrices":
		sp.Rectrices = v.(int)
	}
}

// SpeciesOverride is one value the centre has set for a species.
type SpeciesOverride struct {
	ID      int64     `json:"id"`
	Species string    `json:"species"` // scientific name
	Field   string    `json:"field"`   // a SpeciesField key
	Value   any       `json:"value"`   // typed as SpeciesField.Check returns it
	Note    string    `json:"note,omitempty"`
	SetByID int64     `json:"set_by_id"`
	SetBy   string    `json:"set_by"` // display name
	SetAt   time.Time `json:"set_at"`
}

// Source is the SourceRef of an overridden value: provenance
// centre-setting, the author and the date, the note, and the value it
// replaced (shipped, "" for a species the centre added).
func (o SpeciesOverride) Source(shipped string) assess.SourceRef {
	note := o.Note
	if shipped != "" {
		if note != "" {
			note += "; "
		}
		note += "replaces the shipped value " + shipped
	}
	return assess.SourceRef{Provenance: assess.ProvCentreSetting,
		Citation: fmt.Sprintf("centre setting by %s on %s", o.SetBy, o.SetAt.UTC().Format(time.DateOnly)), Note: note}
}

// applyOverrides returns a copy of base (the shipped species, or a blank
// row for a species the centre added) with each override written in and its
// Sources entry marked centre-setting with the author. A species the centre
// added gets the mass ranges it lacks from its means (mean ± 25 %, as the
// shipped table does without a published range).
func applyOverrides(base *assess.Species, added bool, ovs []SpeciesOverride) *assess.Species {
	sp := *base
	sp.Sources = make(map[string]assess.SourceRef, len(base.Sources)+len(ovs))
	for k, v := range base.Sources {
		sp.Sources[k] = v
	}
	for _, o := range ovs {
		f, _ := SpeciesFieldByKey(o.Field)
		shipped := ""
		if !added {
			shipped = FormatSpeciesValue(f, SpeciesValue(base, o.Field))
			if shipped == "" {
				shipped = "(none)"
			}
		}
		setSpeciesValue(&sp, o.Field, o.Value)
		sp.Sources[o.Field] = o.Source(shipped)
	}
	if added {
		fillAddedDefaults(&sp)
	}
	return &sp
}

// srcRangeDefault is the provenance of a mass range made from the mean.
var srcRangeDefault = assess.SourceRef{Provenance: assess.ProvProjectDefault,
	Citation: "mean ± 25 % for each sex, and for unknown sex the span of both: a default of this project, not a measured range"}

// fillAddedDefaults gives a species the centre added the mass ranges it was
// not given, its migration code, and sources for the defaults it runs on.
func fillAddedDefaults(sp *assess.Species) {
	band := func(m float64) assess.RangeG { return assess.RangeG{Min: round1(m * 0.75), Max: round1(m * 1.25)} }
	mean := func(p *float64) float64 {
		if p != nil {
			return *p
		}
		return sp.MassG.Pooled
	}
	if sp.MassRanges.Female == (assess.RangeG{}) {
		sp.MassRanges.Female = band(mean(sp.MassG.Female))
		sp.Sources["mass_range_g.female"] = srcRangeDefault
	}
	if sp.MassRanges.Male == (assess.RangeG{}) {
		sp.MassRanges.Male = band(mean(sp.MassG.Male))
		sp.Sources["mass_range_g.male"] = srcRangeDefault
	}
	if sp.MassRanges.Unknown == (assess.RangeG{}) {
		f, m := sp.MassRanges.Female, sp.MassRanges.Male
		sp.MassRanges.Unknown = assess.RangeG{Min: min(f.Min, m.Min), Max: max(f.Max, m.Max)}
		sp.Sources["mass_range_g.unknown"] = srcRangeDefault
	}
	sp.Migration = 1
	if sp.Migrant {
		sp.Migration = 3
	}
	sp.Sources["migration"] = sp.Sources["migrant"]
	if sp.ExpectedMargin == nil {
		sp.Sources["expected_margin"] = assess.SourceRef{Provenance: assess.ProvProjectDefault,
			Citation: "blank: the default allometry M_ref = 1.8·m^(−1/6), clamped to [1.1, 4.0] (SCIENCE.md §5)"}
	}
}

func round1(x float64) float64 { return math.Round(x*10) / 10 }

package assess

import (
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"
)

// Validation of a case file. The records are checked by their own Validate
// methods (records_validate.go, the web forms' rules) without the
// form-only rules that may change after a record is stored (the species'
// feather counts, the safe trial modes, the drop-height cap), and each error
// is renamed to its JSON path.

// caseAgeClasses are the age classes a patient may have (as at intake).
var caseAgeClasses = []string{"hatchling", "nestling", "fledgling", "juvenile", "immature", "adult", "unknown"}

// caseDate matches a calendar date, YYYY-MM-DD.
var caseDate = regexp.MustCompile(`^\d{4}-\d{2}-\d{2}$`)

// knownProvenances lists DESIGN.md's provenance vocabulary.
var knownProvenances = []Provenance{ProvPublished, ProvDerived, ProvCommonPractice, ProvProjectDefault,
	ProvCentreSetting, ProvFromMemory}

// Validate checks every part of the case file and returns ValidationErrors
// naming JSON paths, or nil.
func (cf CaseFile) Validate() error {
	var errs ValidationErrors
	if cf.FormatVersion != CaseFileVersion {
		errs.recErr("format_version", strconv.Itoa(cf.FormatVersion), "unknown case-file format version: this Aloft reads version %d", CaseFileVersion)
	}
	errs.add(checkPatient("patient", cf.Patient))
	errs.add(checkSpeciesRow("species", &cf.Species))
	if cf.Patient.SpeciesScientific != "" && cf.Patient.SpeciesScientific != cf.Species.ScientificName {
		errs.recErr("patient.species_scientific", cf.Patient.SpeciesScientific, "must name the embedded species, %q", cf.Species.ScientificName)
	}
	errs.add(checkInputs("inputs", cf.Inputs))
	p, in := cf.Patient, cf.Inputs
	if in.Sex != p.Sex {
		errs.recErr("inputs.sex", string(in.Sex), "must agree with patient.sex (%q)", p.Sex)
	}
	if in.AgeClass != p.AgeClass {
		errs.recErr("inputs.age_class", in.AgeClass, "must agree with patient.age_class (%q)", p.AgeClass)
	}
	if !in.AdmittedAt.Equal(p.AdmittedAt) {
		errs.recErr("inputs.admitted_at", in.AdmittedAt.Format(time.RFC3339), "must agree with patient.admitted_at")
	}
	if cf.Site != nil {
		errs.add(prefixed("site.", cf.Site.Site().Validate(), nil))
		errs.recText("site.name", cf.Site.Name)
	}
	return errs.orNil()
}

// checkPatient checks the patient part.
func checkPatient(path string, p CasePatient) error {
	var es ValidationErrors
	f := func(name string) string { return path + "." + name }
	if c := strings.TrimSpace(p.CaseNumber); c == "" || len(c) > 64 {
		es.recErr(f("case_number"), p.CaseNumber, "a case number of 1 to 64 characters is required")
	}
	if strings.TrimSpace(p.SpeciesScientific) == "" {
		es.recErr(f("species_scientific"), "", "the species' scientific name is required")
	}
	if !p.Sex.Valid() {
		es.recErr(f("sex"), string(p.Sex), "expected female, male or unknown")
	}
	if p.AgeClass != "" && !slices.Contains(caseAgeClasses, p.AgeClass) {
		es.recErr(f("age_class"), p.AgeClass, "expected one of %s", strings.Join(caseAgeClasses, ", "))
	}
	if p.AdmittedAt.IsZero() {
		es.recErr(f("admitted_at"), "", "the date and time of admission is required")
	}
	for name, d := range map[string]string{"found_date": p.FoundDate, "status_date": p.StatusDate} {
		if _, err := time.Parse(time.DateOnly, d); d != "" && (err != nil || !caseDate.MatchString(d)) {
			es.recErr(f(name), d, "expected a date as YYYY-MM-DD")
		}
	}
	es.recRange(f("found_lat"), p.FoundLat, -90, 90, "latitude is in decimal degrees, from -90 to 90")
	es.recRange(f("found_lon"), p.FoundLon, -180, 180, "longitude is in decimal degrees, from -180 to 180")
	if !(recFinite(p.IntakeMassG) && p.IntakeMassG >= 0 && p.IntakeMassG <= maxRecordMassG) {
		es.recErr(f("intake_mass_g"), recNum(p.IntakeMassG), "the intake mass is in grams, 0 (not recorded) to %d", maxRecordMassG)
	}
	if p.Status != "" && !p.Status.Valid() {
		es.recErr(f("status"), string(p.Status), "expected a disposition: in-care, released, renested, transferred, died, euthanised, dead-on-arrival or escaped")
	}
	for name, s := range map[string]string{"found_place": p.FoundPlace, "finder_name": p.FinderName, "finder_contact": p.FinderContact,
		"reason": p.Reason, "intake_condition": p.IntakeCondition, "species_common": p.SpeciesCommon} {
		es.recText(f(name), s)
	}
	slices.SortFunc(es, func(a, b *ValidationError) int { return strings.Compare(a.Field, b.Field) })
	return es.orNil()
}

// checkSpeciesRow checks a species reference row: names, group and
// vocabularies, masses and ranges, span and area, counts and the optional
// values, and each source's provenance.
func checkSpeciesRow(path string, sp *Species) error {
	var es ValidationErrors
	f := func(name string) string { return path + "." + name }
	if strings.TrimSpace(sp.ScientificName) == "" {
		es.recErr(f("scientific_name"), "", "the species' scientific name is required")
	}
	if !sp.Group.Valid() {
		es.recErr(f("group"), string(sp.Group), "expected a species group, e.g. raptor, songbird, dabbling-duck")
	}
	if sp.LaunchMode != "" && !sp.LaunchMode.Valid() {
		es.recErr(f("launch_mode"), string(sp.LaunchMode), "expected a launch mode, e.g. standing, run-up-water, hand")
	}
	if sp.FlightStyle != "" && !slices.Contains(FlyingStyles, sp.FlightStyle) {
		es.recErr(f("flight_style"), string(sp.FlightStyle), "expected a flying style, e.g. flapping, soaring")
	}
	if sp.Migration < 0 || sp.Migration > 3 {
		es.recErr(f("migration"), strconv.Itoa(sp.Migration), "expected 1 (sedentary), 2 (partial migrant), 3 (migrant) or 0 (unknown)")
	}
	es = append(es, checkSpeciesNumbers(path, sp)...)
	for key, src := range sp.Sources {
		if src.Provenance != "" && !slices.Contains(knownProvenances, src.Provenance) {
			es.recErr(f("sources."+key+".provenance"), string(src.Provenance), "expected published, derived, common-practice, project-default, centre-setting or from-memory")
		}
	}
	slices.SortFunc(es, func(a, b *ValidationError) int { return strings.Compare(a.Field, b.Field) })
	return es.orNil()
}

// checkSpeciesNumbers checks a species row's masses, ranges, measurements,
// feather counts and optional values.
func checkSpeciesNumbers(path string, sp *Species) ValidationErrors {
	var es ValidationErrors
	f := func(name string) string { return path + "." + name }
	positive := func(name string, p *float64, hi float64) {
		if p != nil && !(recFinite(*p) && *p > 0 && *p <= hi) {
			es.recErr(f(name), recNum(*p), "expected a number above 0 and at most %g", hi)
		}
	}
	positive("mass_g.pooled", &sp.MassG.Pooled, maxRecordMassG)
	positive("mass_g.female", sp.MassG.Female, maxRecordMassG)
	positive("mass_g.male", sp.MassG.Male, maxRecordMassG)
	for name, r := range map[string]RangeG{"female": sp.MassRanges.Female, "male": sp.MassRanges.Male, "unknown": sp.MassRanges.Unknown} {
		if !(recFinite(r.Min) && recFinite(r.Max) && r.Min >= 0 && r.Max >= r.Min && r.Max <= maxRecordMassG) {
			es.recErr(f("mass_range_g."+name), fmt.Sprintf("%s–%s", recNum(r.Min), recNum(r.Max)), "expected a range in grams, min ≤ max, or 0–0 when unknown")
		}
	}
	for name, v := range map[string]float64{"wing_chord_mm": sp.WingChordMM, "span_mm": sp.SpanMM, "area_cm2": sp.AreaCM2} {
		if !(recFinite(v) && v >= 0 && v <= maxAreaCM2) {
			es.recErr(f(name), recNum(v), "expected a number from 0 (unknown) to %d", maxAreaCM2)
		}
	}
	for name, n := range map[string]int{"primaries": sp.Primaries, "secondaries": sp.Secondaries, "rectrices": sp.Rectrices} {
		if n < 0 || n > 40 {
			es.recErr(f(name), strconv.Itoa(n), "expected a feather count from 0 (unknown) to 40")
		}
	}
	if _, ok := Enclosure(sp.EnclosureClass); sp.EnclosureClass != "" && !ok {
		es.recErr(f("enclosure_class"), sp.EnclosureClass, "unknown enclosure class")
	}
	for name, c := range map[string]struct {
		p      *int
		lo, hi int
	}{"min_passes": {sp.MinPasses, 1, 100}, "min_prerelease_days": {sp.MinPrereleaseDays, 0, 365}, "waterproof_days": {sp.WaterproofDays, 1, 60}} {
		if c.p != nil && (*c.p < c.lo || *c.p > c.hi) {
			es.recErr(f(name), strconv.Itoa(*c.p), "expected a whole number from %d to %d", c.lo, c.hi)
		}
	}
	positive("release_min_mass_g", sp.ReleaseMinMassG, maxRecordMassG)
	if m := sp.ExpectedMargin; m != nil && !(*m >= 1 && *m <= 10) {
		es.recErr(f("expected_margin"), recNum(*m), "expected a healthy power margin from 1 to 10")
	}
	if m := sp.FlightMuscleFraction; m != nil && !(*m >= 0 && *m < 1) {
		es.recErr(f("flight_muscle_fraction"), recNum(*m), "expected the flight-muscle share of body mass, from 0 to below 1")
	}
	return es
}

// checkInputs checks every record of in, naming errors by JSON path under
// path (e.g. "inputs.sessions[1].passes").
func checkInputs(path string, in CaseInputs) error {
	var es ValidationErrors
	if in.Sex != "" && !in.Sex.Valid() {
		es.recErr(path+".sex", string(in.Sex), "expected female, male or unknown")
	}
	if in.AgeClass != "" && !slices.Contains(caseAgeClasses, in.AgeClass) {
		es.recErr(path+".age_class", in.AgeClass, "expected one of %s", strings.Join(caseAgeClasses, ", "))
	}
	checkEach(&es, path+".weigh_ins", in.WeighIns, func(w WeighIn) (time.Time, error) { return w.At, w.Validate() }, nil)
	checkEach(&es, path+".conditions", in.Conditions, func(c ConditionScore) (time.Time, error) { return c.At, c.Validate() }, nil)
	checkEach(&es, path+".wings", in.Wings, func(w WingMeasurement) (time.Time, error) { return w.At, w.Validate(nil) }, renameFeathers)
	checkEach(&es, path+".trials", in.Trials, func(t TakeoffTrial) (time.Time, error) { return t.At, t.Validate(TrialRules{}) }, renameAttempts)
	checkEach(&es, path+".sessions", in.Sessions, func(s FlightSession) (time.Time, error) { return s.At, checkSession(s) },
		map[string]string{"length_m": "enclosure_length_m", "enclosure": "enclosure_name"})
	checkEach(&es, path+".waterproofing", in.Waterproofing, func(w WaterproofTest) (time.Time, error) { return w.At, w.Validate() }, nil)
	checkEach(&es, path+".housing", in.Housing, func(h Housing) (time.Time, error) { return h.From, checkHousing(h) }, nil)
	checkEach(&es, path+".clearances", in.Clearances, func(c Clearance) (time.Time, error) { return c.At, c.ValidateChange() }, nil)
	return es.orNil()
}

// checkEach validates every record of xs and adds its errors under
// path[i].field, renaming form fields to JSON keys by rename (a map or a
// func(string) string); a record without its time is an error too.
func checkEach[T any](es *ValidationErrors, path string, xs []T, check func(T) (time.Time, error), rename any) {
	for i, x := range xs {
		at, err := check(x)
		p := fmt.Sprintf("%s[%d].", path, i)
		if at.IsZero() {
			field := "at"
			if strings.HasSuffix(path, ".housing") {
				field = "from"
			}
			es.recErr(p+field, "", "the date and time is required")
		}
		es.add(prefixed(p, err, rename))
	}
}

// prefixed returns err's field errors with their fields renamed and
// prefixed.
func prefixed(prefix string, err error, rename any) error {
	if err == nil {
		return nil
	}
	var out ValidationErrors
	out.add(err)
	for i, e := range out {
		c := *e
		switch r := rename.(type) {
		case map[string]string:
			if to, ok := r[c.Field]; ok {
				c.Field = to
			}
		case func(string) string:
			c.Field = r(c.Field)
		}
		c.Field = prefix + c.Field
		out[i] = &c
	}
	return out
}

// renameFeathers maps the form's feather fields ("lp", "lp3") and the
// others to JSON keys.
func renameFeathers(field string) string {
	keys := map[string]string{"lp": "left_primaries", "rp": "right_primaries", "ls": "left_secondaries",
		"rs": "right_secondaries", "tl": "tail_left", "tr": "tail_right"}
	for prefix, key := range keys {
		if rest, ok := strings.CutPrefix(field, prefix); ok {
			if rest == "" {
				return "feathers." + key
			}
			if n, err := strconv.Atoi(rest); err == nil {
				return fmt.Sprintf("feathers.%s[%d]", key, n-1)
			}
		}
	}
	return field
}

// renameAttempts maps "attempt_3" to "attempts[2]".
func renameAttempts(field string) string {
	if rest, ok := strings.CutPrefix(field, "attempt_"); ok {
		if n, err := strconv.Atoi(rest); err == nil {
			return fmt.Sprintf("attempts[%d]", n-1)
		}
	}
	return field
}

// checkSession is FlightSession.Validate with the duration named in the
// case file's unit (seconds).
func checkSession(s FlightSession) error {
	var es ValidationErrors
	es.add(s.Validate())
	es = slices.DeleteFunc(es, func(e *ValidationError) bool { return e.Field == "duration_min" })
	if s.DurationS != nil && (*s.DurationS < 0 || *s.DurationS > maxSessionMin*60) {
		es.recErr("duration_s", strconv.Itoa(*s.DurationS), "the session's duration is in seconds, from 0 to %d", maxSessionMin*60)
	}
	if s.GroupSize < 0 {
		es.recErr("group_size", strconv.Itoa(s.GroupSize), "expected a number of birds, 0 or more")
	}
	return es.orNil()
}

// checkHousing checks a stay: the enclosure's name, a known kind and its
// size in metres, each above 0.
func checkHousing(h Housing) error {
	var es ValidationErrors
	if strings.TrimSpace(h.EnclosureName) == "" {
		es.recErr("enclosure_name", "", "the enclosure's name is required")
	}
	es.recText("enclosure_name", h.EnclosureName)
	if !h.Kind.Valid() {
		es.recErr("kind", string(h.Kind), "expected indoor-cage, outdoor-aviary, flight-cage or pool")
	}
	for name, d := range map[string]float64{"length_m": h.LengthM, "width_m": h.WidthM, "height_m": h.HeightM} {
		if !(recFinite(d) && d > 0 && d <= maxEnclosureM) {
			es.recErr(name, recNum(d), "the enclosure's size is in metres, above 0 and at most %d", maxEnclosureM)
		}
	}
	slices.SortFunc(es, func(a, b *ValidationError) int { return strings.Compare(a.Field, b.Field) })
	return es.orNil()
}

// isValidation reports whether err is a validation failure (one or many).
func isValidation(err error) bool {
	var one *ValidationError
	var many ValidationErrors
	return errors.As(err, &one) || errors.As(err, &many)
}

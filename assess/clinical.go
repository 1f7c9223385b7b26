package assess

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"
)

// The clinical record: exams, diagnoses, treatments, medications, lab
// results and disease tests, as the vet and staff record them. Like the
// conditioning records these are pure data; package records stores them with
// who, when, versions and audit. Each Validate names the form field of every
// bad value, takes the clock as an argument, and returns ValidationErrors or
// nil. Clearance items (case.go) are marked by the vet or the licensed
// rehabilitator only; that check needs the user and lives in package records.

// DateLayout is the layout of calendar dates in clinical records (YYYY-MM-DD).
const DateLayout = "2006-01-02"

// Text limits of clinical records, in characters.
const (
	clinicalShortText = 200  // names of drugs, tests, conditions, people
	clinicalLongText  = 4000 // findings and notes
)

// BodySystem is one body system of an examination's free-text findings.
type BodySystem string

// Body systems. Eyes, feet and legs, keel, feathers and hydration have
// structured fields of their own on Exam.
const (
	SysGeneral         BodySystem = "general"         // demeanour, posture, mentation
	SysHead            BodySystem = "head"            // beak, nares, ears, mouth
	SysRespiratory     BodySystem = "respiratory"     // breathing, air sacs
	SysCardiovascular  BodySystem = "cardiovascular"  // heart, circulation
	SysDigestive       BodySystem = "digestive"       // crop, vent, droppings
	SysMusculoskeletal BodySystem = "musculoskeletal" // wings, pectoral girdle, range of motion
	SysNeurological    BodySystem = "neurological"    // reflexes, coordination, tremor
	SysSkin            BodySystem = "skin"            // wounds, parasites, skin
)

// BodySystems lists the body systems in examination order.
var BodySystems = []BodySystem{SysGeneral, SysHead, SysRespiratory, SysCardiovascular,
	SysDigestive, SysMusculoskeletal, SysNeurological, SysSkin}

// Valid reports whether b is one of BodySystems.
func (b BodySystem) Valid() bool { return slices.Contains(BodySystems, b) }

// Finding is the structured result of examining one part.
type Finding string

// Findings.
const (
	FindingNotExamined Finding = "not-examined"
	FindingNormal      Finding = "normal"
	FindingAbnormal    Finding = "abnormal"
)

// Findings lists the findings, not examined first.
var Findings = []Finding{FindingNotExamined, FindingNormal, FindingAbnormal}

// Valid reports whether f is one of Findings.
func (f Finding) Valid() bool { return slices.Contains(Findings, f) }

// Hydration is the examiner's estimate of dehydration, in words.
type Hydration string

// Hydration estimates.
const (
	HydrationNotAssessed Hydration = "not-assessed"
	HydrationNormal      Hydration = "normal"
	HydrationMild        Hydration = "mild"
	HydrationModerate    Hydration = "moderate"
	HydrationSevere      Hydration = "severe"
)

// Hydrations lists the estimates, not assessed first.
var Hydrations = []Hydration{HydrationNotAssessed, HydrationNormal, HydrationMild,
	HydrationModerate, HydrationSevere}

// Valid reports whether h is one of Hydrations.
func (h Hydration) Valid() bool { return slices.Contains(Hydrations, h) }

// Exam is one clinical examination: free-text findings by body system plus
// structured fields for the eyes, feet and legs, keel, feathers and
// hydration.
type Exam struct {
	At       time.Time             `json:"at"`
	Findings map[BodySystem]string `json:"findings"` // free text per body system; empty systems left out
	EyeLeft  Finding               `json:"eye_left"`
	EyeRight Finding               `json:"eye_right"`
	EyesNote string                `json:"eyes_note"` // required when an eye is abnormal
	FeetLegs Finding               `json:"feet_legs"`
	// FeetLegsNote is required when FeetLegs is abnormal (pressure sores,
	// swelling, lameness).
	FeetLegsNote string `json:"feet_legs_note"`
	// KeelScore is the pectoral muscle score beside the keel, 0 (keel sharp,
	// muscle hollow) to 3 (muscle fully rounded), Bairlein 1995, the scale of
	// ConditionScore.MuscleScore; nil = not scored.
	KeelScore    *int      `json:"keel_score"`
	Feathers     Finding   `json:"feathers"`
	FeathersNote string    `json:"feathers_note"` // required when Feathers is abnormal
	Hydration    Hydration `json:"hydration"`
	Notes        string    `json:"notes"`
}

// Validate checks an exam recorded at now.
func (x Exam) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", x.At, now)
	for sys, text := range x.Findings {
		if !sys.Valid() {
			v.add("findings", string(sys), "unknown body system")
		}
		v.long("findings_"+string(sys), text)
	}
	for _, p := range []struct {
		field, note, noteField string
		f                      Finding
	}{
		{"eye_left", x.EyesNote, "eyes_note", x.EyeLeft},
		{"eye_right", x.EyesNote, "eyes_note", x.EyeRight},
		{"feet_legs", x.FeetLegsNote, "feet_legs_note", x.FeetLegs},
		{"feathers", x.FeathersNote, "feathers_note", x.Feathers},
	} {
		switch {
		case !p.f.Valid():
			v.add(p.field, string(p.f), "choose not examined, normal or abnormal")
		case p.f == FindingAbnormal && strings.TrimSpace(p.note) == "" && v.errs.Field(p.noteField) == "":
			v.add(p.noteField, "", "describe what is abnormal")
		}
	}
	if x.KeelScore != nil && (*x.KeelScore < 0 || *x.KeelScore > 3) {
		v.add("keel_score", strconv.Itoa(*x.KeelScore), "the keel (pectoral muscle) score runs from 0 to 3")
	}
	if !x.Hydration.Valid() {
		v.add("hydration", string(x.Hydration), "choose not assessed, normal, mild, moderate or severe")
	}
	v.long("eyes_note", x.EyesNote)
	v.long("feet_legs_note", x.FeetLegsNote)
	v.long("feathers_note", x.FeathersNote)
	v.long("notes", x.Notes)
	if len(v.errs) == 0 && x.empty() {
		v.add("notes", "", "the exam records nothing: give at least one finding")
	}
	return v.err()
}

func (x Exam) empty() bool {
	for _, t := range x.Findings {
		if strings.TrimSpace(t) != "" {
			return false
		}
	}
	for _, f := range []Finding{x.EyeLeft, x.EyeRight, x.FeetLegs, x.Feathers} {
		if f != FindingNotExamined && f != "" {
			return false
		}
	}
	return x.KeelScore == nil && (x.Hydration == HydrationNotAssessed || x.Hydration == "") && strings.TrimSpace(x.Notes) == ""
}

// DiagnosisStatus says whether a diagnosis still applies.
type DiagnosisStatus string

// Diagnosis statuses.
const (
	DiagnosisActive   DiagnosisStatus = "active"
	DiagnosisResolved DiagnosisStatus = "resolved"
)

// DiagnosisStatuses lists the statuses.
var DiagnosisStatuses = []DiagnosisStatus{DiagnosisActive, DiagnosisResolved}

// Valid reports whether s is one of DiagnosisStatuses.
func (s DiagnosisStatus) Valid() bool { return slices.Contains(DiagnosisStatuses, s) }

// Diagnosis is one condition the patient has or had.
type Diagnosis struct {
	At        time.Time       `json:"at"`        // when diagnosed
	Condition string          `json:"condition"` // e.g. "soft-tissue bruising, right wing"
	Status    DiagnosisStatus `json:"status"`
	// ResolvedOn is the date the condition resolved (YYYY-MM-DD), optional
	// and only with Status resolved.
	ResolvedOn string `json:"resolved_on"`
	Notes      string `json:"notes"`
}

// Validate checks a diagnosis recorded at now.
func (d Diagnosis) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", d.At, now)
	v.required("condition", d.Condition, "name the condition")
	if !d.Status.Valid() {
		v.add("status", string(d.Status), "choose active or resolved")
	}
	if d.ResolvedOn != "" {
		if d.Status != DiagnosisResolved {
			v.add("resolved_on", d.ResolvedOn, "a resolution date goes only with the status resolved")
		} else if r, ok := v.date("resolved_on", d.ResolvedOn, now); ok && !d.At.IsZero() && r.Before(calendarDay(d.At.In(now.Location()))) {
			v.add("resolved_on", d.ResolvedOn, "the condition cannot resolve before it was diagnosed")
		}
	}
	v.long("notes", d.Notes)
	return v.err()
}

// Treatment is a procedure other than a medication: a wound dressing, a
// wing wrap, a splint, imping, fluids given once.
type Treatment struct {
	At        time.Time `json:"at"`
	Procedure string    `json:"procedure"` // e.g. "wound cleaned and dressed"
	Notes     string    `json:"notes"`
}

// Validate checks a treatment recorded at now.
func (t Treatment) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", t.At, now)
	v.required("procedure", t.Procedure, "name the procedure")
	v.long("notes", t.Notes)
	return v.err()
}

// DoseUnit is the unit a dose is prescribed in.
type DoseUnit string

// Dose units.
const (
	DoseMgPerKg   DoseUnit = "mg/kg"
	DoseMg        DoseUnit = "mg"
	DoseUgPerKg   DoseUnit = "µg/kg"
	DoseMLPerKg   DoseUnit = "mL/kg"
	DoseML        DoseUnit = "mL"
	DoseIUPerKg   DoseUnit = "IU/kg"
	DoseIU        DoseUnit = "IU"
	DoseDrops     DoseUnit = "drops"
	DoseApplicate DoseUnit = "application" // a topical application
)

// DoseUnits lists the dose units.
var DoseUnits = []DoseUnit{DoseMgPerKg, DoseMg, DoseUgPerKg, DoseMLPerKg, DoseML,
	DoseIUPerKg, DoseIU, DoseDrops, DoseApplicate}

// Valid reports whether u is one of DoseUnits.
func (u DoseUnit) Valid() bool { return slices.Contains(DoseUnits, u) }

// Route is how a medication is given; the abbreviations are the usual
// medical ones [common practice].
type Route string

// Routes.
const (
	RouteOral       Route = "PO"         // by mouth (per os)
	RouteSC         Route = "SC"         // subcutaneous
	RouteIM         Route = "IM"         // intramuscular
	RouteIV         Route = "IV"         // intravenous
	RouteIO         Route = "IO"         // intraosseous
	RouteTopical    Route = "topical"    // on the skin or a wound
	RouteOphthalmic Route = "ophthalmic" // into the eye
	RouteNebulised  Route = "nebulised"  // inhaled as a mist
)

// Routes lists the routes.
var Routes = []Route{RouteOral, RouteSC, RouteIM, RouteIV, RouteIO, RouteTopical,
	RouteOphthalmic, RouteNebulised}

// Valid reports whether r is one of Routes.
func (r Route) Valid() bool { return slices.Contains(Routes, r) }

// Medication is one prescribed course of a drug. Doses fall on the wall
// clock: the first at FirstDose on Start, then every EveryHours hours, through
// End inclusive (see DosesOn).
type Medication struct {
	At       time.Time `json:"at"`   // when prescribed
	Drug     string    `json:"drug"` // name and strength, e.g. "meloxicam 1.5 mg/mL oral suspension"
	Dose     float64   `json:"dose"` // > 0, in DoseUnit
	DoseUnit DoseUnit  `json:"dose_unit"`
	Route    Route     `json:"route"`
	// EveryHours is the dosing interval in hours: a divisor of 24 (1, 2, 3,
	// 4, 6, 8, 12, 24) for doses each day, a multiple of 24 up to 168 for a
	// dose every few days, or 0 for a single dose.
	EveryHours int    `json:"every_hours"`
	FirstDose  string `json:"first_dose"` // wall-clock time of the first dose, HH:MM
	Start      string `json:"start"`      // first day, YYYY-MM-DD
	End        string `json:"end"`        // last day, YYYY-MM-DD, on or after Start
	Prescriber string `json:"prescriber"` // the prescribing vet's name
	Notes      string `json:"notes"`
}

// MaxCourseDays is the longest course accepted, in days: a longer one is
// most likely a mistyped year.
const MaxCourseDays = 366

// Validate checks a medication recorded at now.
func (m Medication) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", m.At, now)
	v.required("drug", m.Drug, "name the drug")
	if math.IsNaN(m.Dose) || math.IsInf(m.Dose, 0) || m.Dose <= 0 {
		v.add("dose", strconv.FormatFloat(m.Dose, 'f', -1, 64), "the dose must be a number above 0")
	}
	if !m.DoseUnit.Valid() {
		v.add("dose_unit", string(m.DoseUnit), "choose the dose's unit: "+joinVocab(DoseUnits))
	}
	if !m.Route.Valid() {
		v.add("route", string(m.Route), "choose the route: "+joinVocab(Routes))
	}
	if !ValidInterval(m.EveryHours) {
		v.add("every_hours", strconv.Itoa(m.EveryHours), "choose how often: every 1, 2, 3, 4, 6, 8, 12 or 24 hours, every 2 to 7 days, or a single dose")
	}
	if _, err := time.Parse("15:04", m.FirstDose); err != nil {
		v.add("first_dose", m.FirstDose, "give the time of the first dose as HH:MM, e.g. 08:00")
	}
	m.validateCourse(&v, now)
	v.required("prescriber", m.Prescriber, "name the prescribing vet")
	v.long("notes", m.Notes)
	return v.err()
}

func (m Medication) validateCourse(v *clinicalCheck, now time.Time) {
	start, okS := v.dateIn("start", m.Start, now.AddDate(-30, 0, 0), now.AddDate(1, 0, 0))
	end, okE := v.dateIn("end", m.End, now.AddDate(-30, 0, 0), now.AddDate(2, 0, 0))
	if !okS || !okE {
		return
	}
	switch {
	case end.Before(start):
		v.add("end", m.End, "the end date is before the start date")
	case m.EveryHours == 0 && !end.Equal(start):
		v.add("end", m.End, "a single dose starts and ends on the same day")
	case end.Sub(start) > MaxCourseDays*24*time.Hour:
		v.add("end", m.End, fmt.Sprintf("the course is longer than %d days: check the year", MaxCourseDays))
	}
}

// ValidInterval reports whether h hours is an accepted dosing interval: 0
// (a single dose), a divisor of 24, or a multiple of 24 up to 168 (weekly).
func ValidInterval(h int) bool {
	switch {
	case h == 0:
		return true
	case h > 0 && h <= 24:
		return 24%h == 0
	default:
		return h%24 == 0 && h <= 168
	}
}

// ActiveOn reports whether day (a calendar date in day's location) falls
// within the course, Start to End inclusive.
func (m Medication) ActiveOn(day time.Time) bool {
	start, end, ok := m.course(day.Location())
	d := calendarDay(day)
	return ok && !d.Before(start) && !d.After(end)
}

func (m Medication) course(loc *time.Location) (start, end time.Time, ok bool) {
	s, err1 := time.ParseInLocation(DateLayout, m.Start, loc)
	e, err2 := time.ParseInLocation(DateLayout, m.End, loc)
	return s, e, err1 == nil && err2 == nil
}

// DosesOn returns the wall-clock times of the doses due on day, a calendar
// date in day's location, earliest first; nil when none is due. Doses fall
// at FirstDose on Start and every EveryHours hours after it by the clock
// (so "every 24 hours" stays at the same time of day across a change to or
// from summer time); a single dose (EveryHours 0) falls on Start only;
// intervals of days fall on every (EveryHours/24)-th day from Start.
func (m Medication) DosesOn(day time.Time) []time.Time {
	if !m.ActiveOn(day) || !ValidInterval(m.EveryHours) {
		return nil
	}
	first, err := time.Parse("15:04", m.FirstDose)
	if err != nil {
		return nil
	}
	start, _, _ := m.course(day.Location())
	d := calendarDay(day)
	firstMin := first.Hour()*60 + first.Minute()
	at := func(min int) time.Time {
		return time.Date(d.Year(), d.Month(), d.Day(), min/60, min%60, 0, 0, d.Location())
	}
	isStart := d.Equal(start)
	switch {
	case m.EveryHours == 0:
		if isStart {
			return []time.Time{at(firstMin)}
		}
		return nil
	case m.EveryHours > 24:
		if calendarDaysBetween(start, d)%(m.EveryHours/24) == 0 {
			return []time.Time{at(firstMin)}
		}
		return nil
	}
	step := m.EveryHours * 60
	var out []time.Time
	for min := firstMin % step; min < 24*60; min += step {
		if isStart && min < firstMin {
			continue
		}
		out = append(out, at(min))
	}
	return out
}

// calendarDaysBetween counts calendar days from a to b (dates at midnight in one
// location), immune to changes of the clock.
func calendarDaysBetween(a, b time.Time) int {
	ua := time.Date(a.Year(), a.Month(), a.Day(), 0, 0, 0, 0, time.UTC)
	ub := time.Date(b.Year(), b.Month(), b.Day(), 0, 0, 0, 0, time.UTC)
	return int(ub.Sub(ua).Hours() / 24)
}

// calendarDay returns the midnight starting t's calendar day, in t's location.
func calendarDay(t time.Time) time.Time {
	return time.Date(t.Year(), t.Month(), t.Day(), 0, 0, 0, 0, t.Location())
}

// LabResult is one laboratory or in-house test result.
type LabResult struct {
	At    time.Time `json:"at"`    // when the sample was taken
	Test  string    `json:"test"`  // e.g. "packed cell volume"
	Value string    `json:"value"` // as reported: a number, or a word for a qualitative result
	Unit  string    `json:"unit"`  // e.g. "%", "g/dL"; "" when none
	// RefLow and RefHigh are the reference range the laboratory gave, in
	// Unit; nil where none was given.
	RefLow  *float64 `json:"ref_low"`
	RefHigh *float64 `json:"ref_high"`
	Lab     string   `json:"lab"` // the laboratory, or "in-house"
	Notes   string   `json:"notes"`
}

// Validate checks a lab result recorded at now.
func (l LabResult) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", l.At, now)
	v.required("test", l.Test, "name the test")
	v.required("value", l.Value, "give the result: a number, or a word such as positive")
	v.short("unit", l.Unit)
	v.short("lab", l.Lab)
	for field, p := range map[string]*float64{"ref_low": l.RefLow, "ref_high": l.RefHigh} {
		if p != nil && (math.IsNaN(*p) || math.IsInf(*p, 0)) {
			v.add(field, fmt.Sprint(*p), "enter a number")
		}
	}
	if l.RefLow != nil && l.RefHigh != nil && *l.RefLow > *l.RefHigh {
		v.add("ref_high", strconv.FormatFloat(*l.RefHigh, 'f', -1, 64), "the top of the reference range is below its bottom")
	}
	v.long("notes", l.Notes)
	return v.err()
}

// Numeric returns the value as a number when it is one ("1,5" reads as 1.5).
func (l LabResult) Numeric() (float64, bool) {
	f, err := strconv.ParseFloat(strings.ReplaceAll(strings.TrimSpace(l.Value), ",", "."), 64)
	return f, err == nil && !math.IsNaN(f) && !math.IsInf(f, 0)
}

// RangeFlag says where a numeric value lies against the reference range
// given: "low", "high", or "" (within it, no range, or not a number).
func (l LabResult) RangeFlag() string {
	x, ok := l.Numeric()
	switch {
	case !ok:
		return ""
	case l.RefLow != nil && x < *l.RefLow:
		return "low"
	case l.RefHigh != nil && x > *l.RefHigh:
		return "high"
	}
	return ""
}

// TestResult is the result of a disease test.
type TestResult string

// Test results.
const (
	ResultPending      TestResult = "pending"
	ResultNegative     TestResult = "negative"
	ResultPositive     TestResult = "positive"
	ResultInconclusive TestResult = "inconclusive"
)

// TestResults lists the results, pending first.
var TestResults = []TestResult{ResultPending, ResultNegative, ResultPositive, ResultInconclusive}

// Valid reports whether r is one of TestResults.
func (r TestResult) Valid() bool { return slices.Contains(TestResults, r) }

// DiseaseTest is one test for an infectious disease, as local rules require
// (for example avian influenza on waterbirds and raptors). A negative test
// does not by itself clear a bird (CAUTIONS.md).
type DiseaseTest struct {
	At     time.Time  `json:"at"`     // when the sample was taken
	Test   string     `json:"test"`   // e.g. "avian influenza A, PCR"
	Sample string     `json:"sample"` // e.g. "oropharyngeal and cloacal swabs"
	Result TestResult `json:"result"`
	// ResultOn is the date the result came back (YYYY-MM-DD); "" while
	// pending.
	ResultOn string `json:"result_on"`
	Lab      string `json:"lab"`
	// ReportedTo names the authority the result was reported to, where local
	// rules require a report.
	ReportedTo string `json:"reported_to"`
	Notes      string `json:"notes"`
}

// Validate checks a disease test recorded at now.
func (d DiseaseTest) Validate(now time.Time) error {
	var v clinicalCheck
	v.instant("at", d.At, now)
	v.required("test", d.Test, "name the test")
	v.short("sample", d.Sample)
	v.short("lab", d.Lab)
	v.short("reported_to", d.ReportedTo)
	if !d.Result.Valid() {
		v.add("result", string(d.Result), "choose pending, negative, positive or inconclusive")
	}
	if d.ResultOn != "" {
		if d.Result == ResultPending {
			v.add("result_on", d.ResultOn, "a pending test has no result date yet")
		} else if r, ok := v.date("result_on", d.ResultOn, now); ok && !d.At.IsZero() && r.Before(calendarDay(d.At.In(now.Location()))) {
			v.add("result_on", d.ResultOn, "the result cannot come back before the sample was taken")
		}
	}
	v.long("notes", d.Notes)
	return v.err()
}

// Valid reports whether i is one of ClearanceItems.
func (i ClearanceItem) Valid() bool { return slices.Contains(ClearanceItems, i) }

// ClearanceStates lists the states of a clearance item, not examined first.
var ClearanceStates = []ClearanceState{ClearanceNotExamined, ClearanceCleared, ClearanceNotCleared}

// Valid reports whether s is one of ClearanceStates.
func (s ClearanceState) Valid() bool { return slices.Contains(ClearanceStates, s) }

// ClearanceItemsFor lists the clearance items that apply to a species group,
// in display order: every item, except live-prey capture, which applies to
// raptors and owls only (PRACTICE.md, after Hand-Rearing Birds 2020). For an
// unknown group ("", a patient whose species is not in the table) every item
// is listed, so none is silently skipped.
func ClearanceItemsFor(g Group) []ClearanceItem {
	out := make([]ClearanceItem, 0, len(ClearanceItems))
	for _, it := range ClearanceItems {
		if it == ClearLivePrey && g != "" && !g.RaptorLike() {
			continue
		}
		out = append(out, it)
	}
	return out
}

// ValidateChange checks a clearance as set by a person: a known item and
// state, and a note saying what is not yet right when not cleared. The
// role check is the store's.
func (c Clearance) ValidateChange() error {
	var v clinicalCheck
	if !c.Item.Valid() {
		v.add("item", string(c.Item), "choose one of the clearance items")
	}
	if !c.State.Valid() {
		v.add("state", string(c.State), "choose cleared, not cleared or not yet examined")
	}
	if c.State == ClearanceNotCleared && strings.TrimSpace(c.Note) == "" {
		v.add("note", "", "say what is not yet right, so the next examiner knows what to re-check")
	}
	v.long("note", c.Note)
	return v.err()
}

// clinicalCheck collects field errors.
type clinicalCheck struct{ errs ValidationErrors }

func (v *clinicalCheck) add(field, value, msg string) {
	v.errs = append(v.errs, &ValidationError{Field: field, Value: value, Message: msg})
}

func (v *clinicalCheck) err() error {
	if len(v.errs) == 0 {
		return nil
	}
	return v.errs
}

// instant checks a record's time: set, not in the future (a few minutes'
// clock skew allowed), not more than 30 years ago.
func (v *clinicalCheck) instant(field string, t, now time.Time) {
	switch {
	case t.IsZero():
		v.add(field, "", "give the date and time")
	case t.After(now.Add(5 * time.Minute)):
		v.add(field, t.Format("2006-01-02 15:04"), "this is in the future: check the date and time")
	case t.Before(now.AddDate(-30, 0, 0)):
		v.add(field, t.Format("2006-01-02 15:04"), "this is more than 30 years ago: check the year")
	}
}

// date parses a calendar date that must not be in the future.
func (v *clinicalCheck) date(field, s string, now time.Time) (time.Time, bool) {
	return v.dateIn(field, s, now.AddDate(-30, 0, 0), now)
}

// dateIn parses a calendar date (in now's location) between lo and hi.
func (v *clinicalCheck) dateIn(field, s string, lo, hi time.Time) (time.Time, bool) {
	d, err := time.ParseInLocation(DateLayout, strings.TrimSpace(s), hi.Location())
	switch {
	case err != nil:
		v.add(field, s, "enter the date as YYYY-MM-DD")
		return time.Time{}, false
	case d.After(calendarDay(hi)):
		v.add(field, s, "this date is too far in the future: check the year")
		return time.Time{}, false
	case d.Before(calendarDay(lo)):
		v.add(field, s, "this date is too far in the past: check the year")
		return time.Time{}, false
	}
	return d, true
}

func (v *clinicalCheck) required(field, s, msg string) {
	if strings.TrimSpace(s) == "" {
		v.add(field, s, msg)
		return
	}
	v.short(field, s)
}

func (v *clinicalCheck) short(field, s string) {
	if utf8.RuneCountInString(s) > clinicalShortText {
		v.add(field, clipText(s), fmt.Sprintf("keep this under %d characters", clinicalShortText))
	}
}

func (v *clinicalCheck) long(field, s string) {
	if utf8.RuneCountInString(s) > clinicalLongText {
		v.add(field, clipText(s), fmt.Sprintf("keep this under %d characters", clinicalLongText))
	}
}

func clipText(s string) string {
	r := []rune(s)
	if len(r) > 20 {
		return string(r[:20]) + "…"
	}
	return s
}

func joinVocab[T ~string](xs []T) string {
	ss := make([]string, len(xs))
	for i, x := range xs {
		ss[i] = string(x)
	}
	return strings.Join(ss, ", ")
}

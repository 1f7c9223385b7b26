package views

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/a-h/templ"

	"aloft/assess"
	"aloft/records"
)

// ClinicalForm is the form of one clinical record (new or a correction),
// holding exactly what the person typed, by form field name.
type ClinicalForm struct {
	Patient records.Patient
	Kind    records.Kind
	Key     int64 // 0 for a new record
	Version int   // the version being corrected
	Values  map[string]string
	Errors  assess.ValidationErrors
	// Problem is a message about the whole form (a conflicting edit).
	Problem  string
	Versions []records.Entry // every version of the record, when correcting
	Cautions []CautionSection
}

// V returns the typed value of field name.
func (f ClinicalForm) V(name string) string { return f.Values[name] }

// Action is the URL the form posts to.
func (f ClinicalForm) Action() string {
	base := "/patients/" + f.Patient.CaseNumber + "/clinical/" + string(f.Kind)
	if f.Key == 0 {
		return base
	}
	return fmt.Sprintf("%s/%d", base, f.Key)
}

// RemoveAction is the URL of the removal form of a correction.
func (f ClinicalForm) RemoveAction() string { return f.Action() + "/remove" }

// ClinicalOption is one choice of a select or a group of radio buttons.
type ClinicalOption struct{ Value, Label string }

// ClinicalSection is the clinical record block of the patient page.
type ClinicalSection struct {
	Case         string
	Exams        []records.ClinicalEntry[assess.Exam]
	Diagnoses    []records.ClinicalEntry[assess.Diagnosis]
	Treatments   []records.ClinicalEntry[assess.Treatment]
	Medications  []records.ClinicalEntry[assess.Medication]
	Labs         []records.ClinicalEntry[assess.LabResult]
	DiseaseTests []records.ClinicalEntry[assess.DiseaseTest]
	Today        time.Time // the day medications are shown active or ended against
	Cautions     []CautionSection
}

// ClearancePanel is the clinical clearance block of the patient page, and
// the page of its form.
type ClearancePanel struct {
	Case    string
	Items   []assess.Clearance // the items that apply to the species, current state
	History []assess.Clearance // every change, newest first
	CanSet  bool               // the user is a vet or a rehabilitator
	CSRF    string
	// Form state when the form is shown again with errors.
	Item, State, Note string
	Errors            assess.ValidationErrors
	Cautions          []CautionSection
}

// MedsDue is the "medications due today" block of the patient list.
type MedsDue struct {
	Day  time.Time
	Rows []records.MedicationDue
}

// ClinicalKindTitle is the name of a clinical record kind in a heading.
func ClinicalKindTitle(k records.Kind) string {
	switch k {
	case records.KindExam:
		return "Examination"
	case records.KindDiagnosis:
		return "Diagnosis"
	case records.KindTreatment:
		return "Treatment"
	case records.KindMedication:
		return "Medication"
	case records.KindLab:
		return "Lab result"
	case records.KindDiseaseTest:
		return "Disease test"
	}
	return string(k)
}

// ClearanceItemLabel is the project's wording of a clearance item.
func ClearanceItemLabel(i assess.ClearanceItem) string {
	switch i {
	case assess.ClearInjuries:
		return "Injuries healed"
	case assess.ClearVision:
		return "Vision"
	case assess.ClearFeetLegs:
		return "Feet and legs"
	case assess.ClearPerching:
		return "Perching and preening"
	case assess.ClearFeeding:
		return "Feeds itself"
	case assess.ClearLivePrey:
		return "Catches live prey"
	case assess.ClearBehaviour:
		return "Wary of people"
	case assess.ClearDisease:
		return "Disease and quarantine"
	}
	return string(i)
}

// clearanceHint says what an item covers.
func clearanceHint(i assess.ClearanceItem) string {
	switch i {
	case assess.ClearVision:
		return "both eyes, especially after any head trauma"
	case assess.ClearFeetLegs:
		return "both legs and feet sound, no pressure sores from cage time"
	case assess.ClearLivePrey:
		return "raptors and owls"
	case assess.ClearBehaviour:
		return "wary of people, not imprinted"
	case assess.ClearDisease:
		return "testing and quarantine as local rules require"
	}
	return ""
}

// ClearanceStateLabel is the project's wording of a clearance state.
func ClearanceStateLabel(s assess.ClearanceState) string {
	switch s {
	case assess.ClearanceCleared:
		return "Cleared"
	case assess.ClearanceNotCleared:
		return "Not cleared"
	}
	return "Not yet examined"
}

func clearanceBadge(s assess.ClearanceState) string {
	switch s {
	case assess.ClearanceCleared:
		return "badge badge-met"
	case assess.ClearanceNotCleared:
		return "badge badge-unmet"
	}
	return "badge badge-not-assessed"
}

func clearanceItemOptions(items []assess.Clearance) []ClinicalOption {
	out := make([]ClinicalOption, 0, len(items))
	for _, c := range items {
		out = append(out, ClinicalOption{string(c.Item), ClearanceItemLabel(c.Item)})
	}
	return out
}

func clearanceStateOptions() []ClinicalOption {
	return []ClinicalOption{{string(assess.ClearanceCleared), "Cleared"}, {string(assess.ClearanceNotCleared), "Not cleared"},
		{string(assess.ClearanceNotExamined), "Not yet examined (undo)"}}
}

func clearanceWho(c assess.Clearance) string {
	if c.By == "" {
		return ""
	}
	return c.By + " (" + c.Role + "), " + fmtTime(c.At)
}

// FrequencyLabel says how often a medication is given, with the usual
// abbreviation.
func FrequencyLabel(everyHours int) string {
	switch everyHours {
	case 0:
		return "single dose"
	case 24:
		return "every 24 h (once a day)"
	case 12:
		return "every 12 h (twice a day)"
	case 8:
		return "every 8 h (three times a day)"
	case 6:
		return "every 6 h (four times a day)"
	}
	if everyHours > 24 {
		if everyHours == 168 {
			return "once a week"
		}
		return fmt.Sprintf("every %d days", everyHours/24)
	}
	return fmt.Sprintf("every %d h", everyHours)
}

func frequencyOptions() []ClinicalOption {
	var out []ClinicalOption
	for _, h := range []int{24, 12, 8, 6, 4, 2, 1, 48, 72, 168, 0} {
		out = append(out, ClinicalOption{strconv.Itoa(h), FrequencyLabel(h)})
	}
	return out
}

// DoseLabel is a dose with its unit and route, e.g. "0.5 mg/kg PO".
func DoseLabel(m assess.Medication) string {
	unit := string(m.DoseUnit)
	if m.Dose == 1 && m.DoseUnit == assess.DoseDrops {
		unit = "drop"
	}
	return strconv.FormatFloat(m.Dose, 'f', -1, 64) + " " + unit + " " + string(m.Route)
}

// medicationPhase says whether a course is planned, running or ended on day.
func medicationPhase(m assess.Medication, day time.Time) (label, class string) {
	d := day.Format(assess.DateLayout)
	switch {
	case d < m.Start:
		return "planned", "badge badge-not-assessed"
	case d > m.End:
		return "ended", "badge badge-not-assessed"
	}
	return "active", "badge badge-borderline"
}

func doseTimes(ts []time.Time) string {
	ss := make([]string, len(ts))
	for i, t := range ts {
		ss[i] = t.Format("15:04")
	}
	return strings.Join(ss, ", ")
}

func unitOptions() []ClinicalOption {
	out := []ClinicalOption{{"", "choose…"}}
	for _, u := range assess.DoseUnits {
		out = append(out, ClinicalOption{string(u), string(u)})
	}
	return out
}

func routeOptions() []ClinicalOption {
	labels := map[assess.Route]string{assess.RouteOral: "PO (by mouth)", assess.RouteSC: "SC (subcutaneous)",
		assess.RouteIM: "IM (intramuscular)", assess.RouteIV: "IV (intravenous)", assess.RouteIO: "IO (intraosseous)"}
	out := []ClinicalOption{{"", "choose…"}}
	for _, r := range assess.Routes {
		l := labels[r]
		if l == "" {
			l = string(r)
		}
		out = append(out, ClinicalOption{string(r), l})
	}
	return out
}

func findingOptions() []ClinicalOption {
	return []ClinicalOption{{string(assess.FindingNotExamined), "not examined"}, {string(assess.FindingNormal), "normal"},
		{string(assess.FindingAbnormal), "abnormal"}}
}

func hydrationOptions() []ClinicalOption {
	out := make([]ClinicalOption, 0, len(assess.Hydrations))
	for _, h := range assess.Hydrations {
		out = append(out, ClinicalOption{string(h), strings.ReplaceAll(string(h), "-", " ")})
	}
	return out
}

func keelOptions() []ClinicalOption {
	return []ClinicalOption{{"", "not scored"}, {"0", "0 – keel sharp, muscle hollow"}, {"1", "1"}, {"2", "2"},
		{"3", "3 – muscle fully rounded"}}
}

func diagnosisStatusOptions() []ClinicalOption {
	return []ClinicalOption{{string(assess.DiagnosisActive), "active"}, {string(assess.DiagnosisResolved), "resolved"}}
}

func resultOptions() []ClinicalOption {
	out := make([]ClinicalOption, 0, len(assess.TestResults))
	for _, r := range assess.TestResults {
		out = append(out, ClinicalOption{string(r), string(r)})
	}
	return out
}

func resultBadge(r assess.TestResult) string {
	switch r {
	case assess.ResultNegative:
		return "badge badge-met"
	case assess.ResultPositive:
		return "badge badge-unmet"
	case assess.ResultInconclusive:
		return "badge badge-borderline"
	}
	return "badge badge-not-assessed"
}

func diagnosisBadge(s assess.DiagnosisStatus) string {
	if s == assess.DiagnosisActive {
		return "badge badge-borderline"
	}
	return "badge badge-met"
}

// BodySystemLabel is a body system's name on the exam form.
func BodySystemLabel(b assess.BodySystem) string {
	switch b {
	case assess.SysGeneral:
		return "General (demeanour, posture)"
	case assess.SysHead:
		return "Head (beak, nares, ears, mouth)"
	case assess.SysRespiratory:
		return "Respiratory"
	case assess.SysCardiovascular:
		return "Heart and circulation"
	case assess.SysDigestive:
		return "Digestive (crop, vent, droppings)"
	case assess.SysMusculoskeletal:
		return "Wings and skeleton"
	case assess.SysNeurological:
		return "Neurological"
	case assess.SysSkin:
		return "Skin and wounds"
	}
	return string(b)
}

func examSummary(x assess.Exam) []string {
	var out []string
	f := func(label string, v assess.Finding, note string) {
		if v == assess.FindingNotExamined || v == "" {
			return
		}
		s := label + ": " + string(v)
		if note != "" && v == assess.FindingAbnormal {
			s += " (" + note + ")"
		}
		out = append(out, s)
	}
	if x.EyeLeft != assess.FindingNotExamined || x.EyeRight != assess.FindingNotExamined {
		s := "Eyes: left " + string(x.EyeLeft) + ", right " + string(x.EyeRight)
		if x.EyesNote != "" {
			s += " (" + x.EyesNote + ")"
		}
		out = append(out, s)
	}
	f("Feet and legs", x.FeetLegs, x.FeetLegsNote)
	if x.KeelScore != nil {
		out = append(out, fmt.Sprintf("Keel: %d of 3", *x.KeelScore))
	}
	f("Feathers", x.Feathers, x.FeathersNote)
	if x.Hydration != assess.HydrationNotAssessed && x.Hydration != "" {
		s := "Hydration: " + string(x.Hydration)
		if x.Hydration != assess.HydrationNormal {
			s += " dehydration"
		}
		out = append(out, s)
	}
	for _, b := range assess.BodySystems {
		if t := x.Findings[b]; t != "" {
			out = append(out, BodySystemLabel(b)+": "+t)
		}
	}
	return out
}

func labValue(l assess.LabResult) string {
	s := l.Value
	if l.Unit != "" {
		s += " " + l.Unit
	}
	return s
}

func labRange(l assess.LabResult) string {
	num := func(p *float64) string { return strconv.FormatFloat(*p, 'f', -1, 64) }
	var r string
	switch {
	case l.RefLow != nil && l.RefHigh != nil:
		r = num(l.RefLow) + "–" + num(l.RefHigh)
	case l.RefLow != nil:
		r = "≥ " + num(l.RefLow)
	case l.RefHigh != nil:
		r = "≤ " + num(l.RefHigh)
	default:
		return ""
	}
	if l.Unit != "" {
		r += " " + l.Unit
	}
	return "reference " + r
}

func entryURL(caseNo string, e records.Entry) string {
	return fmt.Sprintf("/patients/%s/clinical/%s/%d", caseNo, e.Kind, e.Key)
}

func newURL(caseNo string, k records.Kind) string {
	return "/patients/" + caseNo + "/clinical/" + string(k) + "/new"
}

func byLine(e records.Entry) string {
	s := fmtTime(e.At) + " · " + e.ByName
	if e.Version > 1 {
		s += fmt.Sprintf(" · corrected (version %d)", e.Version)
	}
	return s
}

func versionLine(e records.Entry) string {
	s := fmt.Sprintf("Version %d, written %s by %s", e.Version, fmtTime(e.CreatedAt), e.ByName)
	if e.RemovedAt != nil {
		s += fmt.Sprintf("; removed %s by %s: %s", fmtTime(*e.RemovedAt), e.RemovedBy, e.RemovedReason)
	}
	return s
}

func clinItoa(n int) string { return strconv.Itoa(n) }

func kindNoun(k records.Kind) string { return strings.ToLower(ClinicalKindTitle(k)) }

func inputMode(mode string) templ.Attributes {
	if mode == "" {
		return templ.Attributes{}
	}
	return templ.Attributes{"inputmode": mode}
}

package demo

import (
	"fmt"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
)

// exam plans the intake examination or, with final, the one before
// release. Drugs, doses, tests and the laboratory below are the demo
// scenario's own (testdata/demo/history-clinical.json).
func (h *scaleHist) exam(at time.Time, final bool) error {
	keel := h.muscle()
	x := assess.Exam{At: at, EyeLeft: assess.FindingNormal, EyeRight: assess.FindingNormal, FeetLegs: assess.FindingNormal,
		KeelScore: &keel, Feathers: assess.FindingNormal, Hydration: assess.HydrationNormal,
		Findings: map[assess.BodySystem]string{assess.SysGeneral: h.plan.intake.IntakeCondition}}
	switch {
	case final:
		x.Findings[assess.SysGeneral] = "Bright and alert; feeding well."
		x.Notes = "Fit for the release review."
	case h.reason == "window strike" && h.rng.IntN(4) == 0:
		x.EyeLeft, x.EyesNote = assess.FindingAbnormal, "Hyphema, left eye"
	case h.massNow < h.targetG*0.8:
		x.Hydration = assess.HydrationModerate
	case h.rng.IntN(2) == 0:
		x.Hydration = assess.HydrationMild
	}
	if len(h.broken) > 0 && !final {
		x.Feathers, x.FeathersNote = assess.FindingAbnormal, h.brokenText()
	}
	return h.add(records.KindExam, at, h.vet(), x, x.Validate(h.env.now))
}

func (h *scaleHist) brokenText() string {
	p := h.sp.Primaries
	return fmt.Sprintf("Broken primaries P%d–P%d, left wing", p-1, p)
}

// diagnoses names what is wrong, from the reason for admission.
func (h *scaleHist) diagnoses() []string {
	var out []string
	switch h.reason {
	case "window strike":
		out = append(out, "Head trauma (window strike)")
	case "cat caught", "dog attack":
		out = append(out, "Puncture wounds (animal bite)")
	case "hit by car", "power line collision", "caught in netting":
		out = append(out, "Soft-tissue bruising, wing and shoulder")
	case "fishing line entanglement":
		out = append(out, "Constriction wound (fishing line)")
	case "oiled":
		out = append(out, "Plumage contamination (oil)")
	case "lead poisoning suspected":
		out = append(out, "Suspected lead toxicosis")
	case "orphaned", "fell from nest", "fell from roof":
		out = append(out, "Healthy young bird, unable to fend for itself")
	default:
		out = append(out, "Emaciation")
	}
	if len(h.broken) > 0 {
		out = append(out, h.brokenText())
	}
	return out
}

// clinicalStart plans the diagnoses, treatment and medication of the day
// of admission.
func (h *scaleHist) clinicalStart(at time.Time) error {
	resolved := h.admitted.AddDate(0, 0, max(h.days*7/10, 1)).Format(assess.DateLayout)
	for _, cond := range h.diagnoses() {
		d := assess.Diagnosis{At: at, Condition: cond, Status: assess.DiagnosisActive}
		if (h.outcome == assess.DispReleased || h.outcome == assess.DispTransferred) && resolved <= h.env.now.Format(assess.DateLayout) {
			d.Status, d.ResolvedOn = assess.DiagnosisResolved, resolved
		}
		if err := h.add(records.KindDiagnosis, at, h.vet(), d, d.Validate(h.env.now)); err != nil {
			return err
		}
	}
	at = at.Add(10 * time.Minute)
	if proc := h.treatment(); proc != "" {
		t := assess.Treatment{At: at, Procedure: proc}
		if err := h.add(records.KindTreatment, at, h.vet(), t, t.Validate(h.env.now)); err != nil {
			return err
		}
	}
	for _, m := range h.medications(at.Add(10 * time.Minute)) {
		if err := h.add(records.KindMedication, m.At, h.vet(), m, m.Validate(h.env.now)); err != nil {
			return err
		}
	}
	return nil
}

func (h *scaleHist) treatment() string {
	switch h.reason {
	case "hit by car", "power line collision":
		return "Wing wrapped to the body"
	case "cat caught", "dog attack":
		return "Puncture wounds cleaned"
	case "fishing line entanglement":
		return "Fishing line removed; wound cleaned and dressed"
	case "oiled":
		return "Washed in warm water and detergent; rinsed and dried"
	}
	return ""
}

// medications are the courses prescribed on the day of admission.
func (h *scaleHist) medications(at time.Time) []assess.Medication {
	course := func(drug string, dose float64, unit assess.DoseUnit, route assess.Route, every int, first string, days int) assess.Medication {
		return assess.Medication{At: at, Drug: drug, Dose: dose, DoseUnit: unit, Route: route, EveryHours: every,
			FirstDose: first, Start: at.Format(assess.DateLayout), End: at.AddDate(0, 0, days-1).Format(assess.DateLayout),
			Prescriber: h.env.users["vet"].DisplayName}
	}
	var out []assess.Medication
	switch h.reason {
	case "hit by car", "power line collision", "window strike", "caught in netting", "fishing line entanglement":
		out = append(out, course("meloxicam 1.5 mg/mL oral suspension", 0.5, assess.DoseMgPerKg, assess.RouteOral, 24, "08:00", 5))
	case "cat caught", "dog attack":
		out = append(out, course("amoxicillin-clavulanic acid oral suspension", 125, assess.DoseMgPerKg, assess.RouteOral, 12, "08:00", 7))
	}
	if h.massNow < h.targetG*0.8 || h.reason == "oiled" {
		out = append(out, course("lactated Ringer's solution, warmed", 20, assess.DoseMLPerKg, assess.RouteSC, 0, "13:00", 1))
	}
	return out
}

// clinicalDay1 plans the first day's lab work and, for waterbirds and
// raptors, the avian influenza test with the quarantine it keeps.
func (h *scaleHist) clinicalDay1() error {
	if h.rng.IntN(2) == 0 {
		at := h.dayAt(1, 14, 0)
		pcv := assess.LabResult{At: at, Test: "packed cell volume", Value: fmt.Sprint(25 + h.rng.IntN(25)), Unit: "%", Lab: "in-house"}
		ts := assess.LabResult{At: at, Test: "total solids", Value: fmt.Sprintf("%.1f", h.between(2.5, 5)), Unit: "g/dL", Lab: "in-house"}
		for _, l := range []assess.LabResult{pcv, ts} {
			if err := h.add(records.KindLab, at, h.vet(), l, l.Validate(h.env.now)); err != nil {
				return err
			}
		}
	}
	if !h.sp.Group.Aquatic() && !h.sp.Group.RaptorLike() {
		return nil
	}
	at := h.dayAt(1, 15, 0)
	back := h.dayAt(3, 16, 0)
	d := assess.DiseaseTest{At: at, Test: "avian influenza A, PCR", Sample: "oropharyngeal and cloacal swabs",
		Lab: "Hartsfell Veterinary Laboratory", Result: assess.ResultPending}
	if h.fits(back) {
		d.Result, d.ResultOn = assess.ResultNegative, back.Format(assess.DateLayout)
	}
	if err := h.add(records.KindDiseaseTest, at, h.vet(), d, d.Validate(h.env.now)); err != nil {
		return err
	}
	h.clear(at.Add(5*time.Minute), assess.ClearDisease, assess.ClearanceNotCleared, "Awaiting the avian influenza result; kept in quarantine.")
	h.clear(back, assess.ClearDisease, assess.ClearanceCleared, "Avian influenza PCR negative.")
	return nil
}

// clear plans one clearance change by the vet (checked when written).
func (h *scaleHist) clear(at time.Time, item assess.ClearanceItem, state assess.ClearanceState, note string) {
	if h.fits(at) {
		h.plan.recs = append(h.plan.recs, scaleRec{kind: records.KindClearance, at: at, clear: &scaleClear{item, state, note}})
	}
}

// clearAll clears every item that applies to the species' group before
// release.
func (h *scaleHist) clearAll(at time.Time) error {
	for i, it := range assess.ClearanceItemsFor(h.sp.Group) {
		h.clear(at.Add(time.Duration(i)*time.Minute), it, assess.ClearanceCleared, "")
	}
	return nil
}

// dispose plans the disposition at the end of the stay; none for a bird
// still in care.
func (h *scaleHist) dispose() {
	if h.outcome == assess.DispInCare {
		return
	}
	in := records.DispositionInput{Kind: h.outcome, Date: h.cut.Format(records.DateLayout)}
	by := h.env.users["staff"].ID
	switch h.outcome {
	case assess.DispReleased:
		in.Place, by = h.pick(scaleSites), h.env.users["rehab"].ID
		in.NoReportReason = "Historical case: the release decision is on the paper file."
	case assess.DispRenested:
		in.Place, by = "Back at the nest, "+h.plan.intake.FoundPlace, h.env.users["rehab"].ID
		in.NoReportReason = "Healthy young bird returned to its nest: no flight assessment needed."
	case assess.DispTransferred:
		in.Place, in.Receiver = "Handed over at the centre", h.pick(scaleTakers)
	case assess.DispDied:
		in.Reason, by = "Died overnight; cause not determined.", h.vet()
	case assess.DispEuthanised:
		in.Reason, by = "Poor prognosis: "+strings.ToLower(h.diagnoses()[0])+".", h.vet()
	case assess.DispEscaped:
		in.Place, in.Reason = h.prof.outdoor, "Slipped out past the double door at feeding time."
	}
	h.plan.disp, h.plan.dispBy = &in, by
}

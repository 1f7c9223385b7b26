package web

import (
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
)

// The forms of the clinical record: each kind's fields are read from the
// posted values by name into the assess record type (parseClinical), and a
// stored record is turned back into form values for a correction
// (clinicalValues). Field names are the ones assess's Validate reports.

// clinicalLoc is the time zone of the centre's clock: dates typed into the
// forms, "today" of the medication list.
func (s *Server) clinicalLoc() *time.Location { return time.Local }

// Layouts of the browser's date-time and time fields.
const (
	clinDateTime = "2006-01-02T15:04"
	clinClock    = "15:04"
)

// parseClinical converts the posted values of a kind's form into its record,
// with every field error at once (conversion first, then the record's own
// checks).
func (s *Server) parseClinical(kind records.Kind, v map[string]string) (records.ClinicalRecord, assess.ValidationErrors) {
	var errs assess.ValidationErrors
	at := s.parseAt(v["at"], &errs)
	var rec records.ClinicalRecord
	switch kind {
	case records.KindExam:
		rec = parseExam(v, at, &errs)
	case records.KindDiagnosis:
		rec = assess.Diagnosis{At: at, Condition: strings.TrimSpace(v["condition"]), Status: assess.DiagnosisStatus(v["status"]),
			ResolvedOn: strings.TrimSpace(v["resolved_on"]), Notes: strings.TrimSpace(v["notes"])}
	case records.KindTreatment:
		rec = assess.Treatment{At: at, Procedure: strings.TrimSpace(v["procedure"]), Notes: strings.TrimSpace(v["notes"])}
	case records.KindMedication:
		rec = parseMedication(v, at, &errs)
	case records.KindLab:
		rec = parseLab(v, at, &errs)
	case records.KindDiseaseTest:
		rec = assess.DiseaseTest{At: at, Test: strings.TrimSpace(v["test"]), Sample: strings.TrimSpace(v["sample"]),
			Result: assess.TestResult(v["result"]), ResultOn: strings.TrimSpace(v["result_on"]), Lab: strings.TrimSpace(v["lab"]),
			ReportedTo: strings.TrimSpace(v["reported_to"]), Notes: strings.TrimSpace(v["notes"])}
	}
	if err := rec.Validate(s.now().In(s.clinicalLoc())); err != nil {
		for _, e := range asValidation(err) {
			if errs.Field(e.Field) == "" {
				errs = append(errs, e)
			}
		}
	}
	return rec, errs
}

// parseAt reads a browser date-time field in the centre's time zone.
func (s *Server) parseAt(raw string, errs *assess.ValidationErrors) time.Time {
	raw = strings.TrimSpace(raw)
	for _, layout := range []string{clinDateTime, "2006-01-02T15:04:05", "2006-01-02 15:04"} {
		if t, err := time.ParseInLocation(layout, raw, s.clinicalLoc()); err == nil {
			return t
		}
	}
	*errs = append(*errs, &assess.ValidationError{Field: "at", Value: raw, Message: "enter the date and time, e.g. 2026-06-15 09:30"})
	return time.Time{}
}

func clinFinding(raw string) assess.Finding {
	if raw == "" {
		return assess.FindingNotExamined
	}
	return assess.Finding(raw)
}

func parseExam(v map[string]string, at time.Time, errs *assess.ValidationErrors) assess.Exam {
	x := assess.Exam{At: at, Findings: map[assess.BodySystem]string{},
		EyeLeft: clinFinding(v["eye_left"]), EyeRight: clinFinding(v["eye_right"]), EyesNote: strings.TrimSpace(v["eyes_note"]),
		FeetLegs: clinFinding(v["feet_legs"]), FeetLegsNote: strings.TrimSpace(v["feet_legs_note"]),
		Feathers: clinFinding(v["feathers"]), FeathersNote: strings.TrimSpace(v["feathers_note"]),
		Hydration: assess.Hydration(v["hydration"]), Notes: strings.TrimSpace(v["notes"])}
	if x.Hydration == "" {
		x.Hydration = assess.HydrationNotAssessed
	}
	for _, b := range assess.BodySystems {
		if t := strings.TrimSpace(v["findings_"+string(b)]); t != "" {
			x.Findings[b] = t
		}
	}
	var verr *assess.ValidationError
	if x.KeelScore, verr = parseOptInt("keel_score", v["keel_score"]); verr != nil {
		*errs = append(*errs, verr)
	}
	return x
}

func parseMedication(v map[string]string, at time.Time, errs *assess.ValidationErrors) assess.Medication {
	m := assess.Medication{At: at, Drug: strings.TrimSpace(v["drug"]), DoseUnit: assess.DoseUnit(v["dose_unit"]),
		Route: assess.Route(v["route"]), FirstDose: strings.TrimSpace(v["first_dose"]), Start: strings.TrimSpace(v["start"]),
		End: strings.TrimSpace(v["end"]), Prescriber: strings.TrimSpace(v["prescriber"]), Notes: strings.TrimSpace(v["notes"])}
	var verr *assess.ValidationError
	if m.Dose, verr = parseFloatField("dose", v["dose"], false); verr != nil {
		*errs = append(*errs, verr)
	}
	if m.EveryHours, verr = parseIntField("every_hours", v["every_hours"], false); verr != nil {
		*errs = append(*errs, verr)
	}
	if m.EveryHours == 0 && m.End == "" {
		m.End = m.Start // a single dose: the last day is the first
	}
	// Browsers may send a time field with seconds.
	if t, err := time.Parse("15:04:05", m.FirstDose); err == nil {
		m.FirstDose = t.Format(clinClock)
	}
	return m
}

func parseLab(v map[string]string, at time.Time, errs *assess.ValidationErrors) assess.LabResult {
	l := assess.LabResult{At: at, Test: strings.TrimSpace(v["test"]), Value: strings.TrimSpace(v["value"]),
		Unit: strings.TrimSpace(v["unit"]), Lab: strings.TrimSpace(v["lab"]), Notes: strings.TrimSpace(v["notes"])}
	var verr *assess.ValidationError
	if l.RefLow, verr = parseOptFloat("ref_low", v["ref_low"]); verr != nil {
		*errs = append(*errs, verr)
	}
	if l.RefHigh, verr = parseOptFloat("ref_high", v["ref_high"]); verr != nil {
		*errs = append(*errs, verr)
	}
	return l
}

// clinicalDefaults fills a new form: now, today, and the usual first
// choices.
func (s *Server) clinicalDefaults(kind records.Kind, u records.User) map[string]string {
	now := s.now().In(s.clinicalLoc())
	v := map[string]string{"at": now.Format(clinDateTime)}
	switch kind {
	case records.KindExam:
		for _, f := range []string{"eye_left", "eye_right", "feet_legs", "feathers"} {
			v[f] = string(assess.FindingNotExamined)
		}
		v["hydration"] = string(assess.HydrationNotAssessed)
	case records.KindDiagnosis:
		v["status"] = string(assess.DiagnosisActive)
	case records.KindMedication:
		today := now.Format(assess.DateLayout)
		v["start"], v["end"], v["every_hours"], v["first_dose"] = today, today, "24", "08:00"
		if u.Has(records.RoleVet) {
			v["prescriber"] = u.DisplayName
		}
	case records.KindDiseaseTest:
		v["result"] = string(assess.ResultPending)
	}
	return v
}

// clinicalValues turns a stored record back into its form's values.
func (s *Server) clinicalValues(e records.Entry) (map[string]string, error) {
	var v map[string]string
	var err error
	switch e.Kind {
	case records.KindExam:
		var x assess.Exam
		err = e.Decode(&x)
		v = examValues(x)
	case records.KindDiagnosis:
		var d assess.Diagnosis
		err = e.Decode(&d)
		v = map[string]string{"condition": d.Condition, "status": string(d.Status), "resolved_on": d.ResolvedOn, "notes": d.Notes}
	case records.KindTreatment:
		var t assess.Treatment
		err = e.Decode(&t)
		v = map[string]string{"procedure": t.Procedure, "notes": t.Notes}
	case records.KindMedication:
		var m assess.Medication
		err = e.Decode(&m)
		v = map[string]string{"drug": m.Drug, "dose": strconv.FormatFloat(m.Dose, 'f', -1, 64), "dose_unit": string(m.DoseUnit),
			"route": string(m.Route), "every_hours": strconv.Itoa(m.EveryHours), "first_dose": m.FirstDose, "start": m.Start,
			"end": m.End, "prescriber": m.Prescriber, "notes": m.Notes}
	case records.KindLab:
		var l assess.LabResult
		err = e.Decode(&l)
		v = map[string]string{"test": l.Test, "value": l.Value, "unit": l.Unit, "ref_low": clinOptFloat(l.RefLow),
			"ref_high": clinOptFloat(l.RefHigh), "lab": l.Lab, "notes": l.Notes}
	case records.KindDiseaseTest:
		var d assess.DiseaseTest
		err = e.Decode(&d)
		v = map[string]string{"test": d.Test, "sample": d.Sample, "result": string(d.Result), "result_on": d.ResultOn,
			"lab": d.Lab, "reported_to": d.ReportedTo, "notes": d.Notes}
	default:
		v = map[string]string{}
	}
	v["at"] = e.At.In(s.clinicalLoc()).Format(clinDateTime)
	return v, err
}

func examValues(x assess.Exam) map[string]string {
	v := map[string]string{"eye_left": string(x.EyeLeft), "eye_right": string(x.EyeRight), "eyes_note": x.EyesNote,
		"feet_legs": string(x.FeetLegs), "feet_legs_note": x.FeetLegsNote, "feathers": string(x.Feathers),
		"feathers_note": x.FeathersNote, "hydration": string(x.Hydration), "notes": x.Notes}
	if x.KeelScore != nil {
		v["keel_score"] = strconv.Itoa(*x.KeelScore)
	}
	for b, t := range x.Findings {
		v["findings_"+string(b)] = t
	}
	return v
}

func clinOptFloat(p *float64) string {
	if p == nil {
		return ""
	}
	return strconv.FormatFloat(*p, 'f', -1, 64)
}

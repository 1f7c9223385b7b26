package demo

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"time"

	"aloft/assess"
	"aloft/records"
)

// clinicalSeeders stores the clinical records of the demo
// (testdata/demo/history-clinical.json). Exams, treatments and lab results
// are the assess types as JSON; diagnoses, medications and disease tests give
// their dates as days after admission; clearance events set several items at
// once. Every record passes the same validation as one typed into a form.
func clinicalSeeders() map[string]eventSeeder {
	return map[string]eventSeeder{
		string(records.KindExam):        seedExam,
		string(records.KindDiagnosis):   seedDiagnosis,
		string(records.KindTreatment):   seedTreatment,
		string(records.KindMedication):  seedMedication,
		string(records.KindLab):         seedLab,
		string(records.KindDiseaseTest): seedDiseaseTest,
		string(records.KindClearance):   seedClearance,
	}
}

// decodeStrict unmarshals an event's data, refusing unknown fields (a typo
// must not silently drop demo data).
func decodeStrict(data json.RawMessage, v any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	return dec.Decode(v)
}

// clinicalAt is the instant of a clinical event: never before the patient's
// admission, never after now.
func clinicalAt(sd *Seeded, p records.Patient, ev Event) time.Time {
	at := sd.At(p.AdmittedAt, ev)
	if earliest := p.AdmittedAt.Add(20 * time.Minute); at.Before(earliest) {
		at = earliest
	}
	if latest := sd.Now.Add(-time.Minute); at.After(latest) {
		at = latest
	}
	return at.In(time.Local)
}

// dayDate is the calendar date (YYYY-MM-DD) days after p's admission.
func dayDate(p records.Patient, days int) string {
	return p.AdmittedAt.In(time.Local).AddDate(0, 0, days).Format(assess.DateLayout)
}

func seedExam(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var x assess.Exam
	if err := decodeStrict(ev.Data, &x); err != nil {
		return err
	}
	x.At = clinicalAt(sd, p, ev)
	for _, f := range []*assess.Finding{&x.EyeLeft, &x.EyeRight, &x.FeetLegs, &x.Feathers} {
		if *f == "" {
			*f = assess.FindingNotExamined
		}
	}
	if x.Hydration == "" {
		x.Hydration = assess.HydrationNotAssessed
	}
	_, err := sd.Store.AddExam(ctx, sd.UserID(ev.By), p.ID, x)
	return err
}

func seedDiagnosis(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var d struct {
		Condition   string `json:"condition"`
		ResolvedDay *int   `json:"resolved_day"` // days after admission; nil while active
		Notes       string `json:"notes"`
	}
	if err := decodeStrict(ev.Data, &d); err != nil {
		return err
	}
	rec := assess.Diagnosis{At: clinicalAt(sd, p, ev), Condition: d.Condition, Status: assess.DiagnosisActive, Notes: d.Notes}
	if d.ResolvedDay != nil {
		rec.Status, rec.ResolvedOn = assess.DiagnosisResolved, dayDate(p, *d.ResolvedDay)
	}
	_, err := sd.Store.AddDiagnosis(ctx, sd.UserID(ev.By), p.ID, rec)
	return err
}

func seedTreatment(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var t assess.Treatment
	if err := decodeStrict(ev.Data, &t); err != nil {
		return err
	}
	t.At = clinicalAt(sd, p, ev)
	_, err := sd.Store.AddTreatment(ctx, sd.UserID(ev.By), p.ID, t)
	return err
}

func seedMedication(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var m struct {
		Drug       string          `json:"drug"`
		Dose       float64         `json:"dose"`
		DoseUnit   assess.DoseUnit `json:"dose_unit"`
		Route      assess.Route    `json:"route"`
		EveryHours int             `json:"every_hours"`
		FirstDose  string          `json:"first_dose"`
		Days       int             `json:"days"`       // length of the course, from the event's day
		Prescriber string          `json:"prescriber"` // a demo username
		Notes      string          `json:"notes"`
	}
	if err := decodeStrict(ev.Data, &m); err != nil {
		return err
	}
	u, ok := sd.Users[m.Prescriber]
	if !ok {
		return fmt.Errorf("prescriber %q is not a demo user", m.Prescriber)
	}
	at := clinicalAt(sd, p, ev)
	start := at.Format(assess.DateLayout)
	end := at.AddDate(0, 0, max(m.Days, 1)-1).Format(assess.DateLayout)
	rec := assess.Medication{At: at, Drug: m.Drug, Dose: m.Dose, DoseUnit: m.DoseUnit, Route: m.Route,
		EveryHours: m.EveryHours, FirstDose: m.FirstDose, Start: start, End: end, Prescriber: u.DisplayName, Notes: m.Notes}
	_, err := sd.Store.AddMedication(ctx, sd.UserID(ev.By), p.ID, rec)
	return err
}

func seedLab(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var l assess.LabResult
	if err := decodeStrict(ev.Data, &l); err != nil {
		return err
	}
	l.At = clinicalAt(sd, p, ev)
	_, err := sd.Store.AddLabResult(ctx, sd.UserID(ev.By), p.ID, l)
	return err
}

func seedDiseaseTest(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var d struct {
		Test       string            `json:"test"`
		Sample     string            `json:"sample"`
		Result     assess.TestResult `json:"result"`
		ResultDay  *int              `json:"result_day"` // days after admission; nil while pending
		Lab        string            `json:"lab"`
		ReportedTo string            `json:"reported_to"`
		Notes      string            `json:"notes"`
	}
	if err := decodeStrict(ev.Data, &d); err != nil {
		return err
	}
	rec := assess.DiseaseTest{At: clinicalAt(sd, p, ev), Test: d.Test, Sample: d.Sample, Result: d.Result,
		Lab: d.Lab, ReportedTo: d.ReportedTo, Notes: d.Notes}
	if d.ResultDay != nil {
		rec.ResultOn = dayDate(p, *d.ResultDay)
	}
	_, err := sd.Store.AddDiseaseTest(ctx, sd.UserID(ev.By), p.ID, rec)
	return err
}

// seedClearance sets items (or, with "all", every item that applies to the
// patient's species group) to one state, as ev.By, who must be a vet or a
// rehabilitator.
func seedClearance(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var c struct {
		Items []string              `json:"items"`
		State assess.ClearanceState `json:"state"`
		Note  string                `json:"note"`
	}
	if err := decodeStrict(ev.Data, &c); err != nil {
		return err
	}
	var items []assess.ClearanceItem
	for _, it := range c.Items {
		if it != "all" {
			items = append(items, assess.ClearanceItem(it))
			continue
		}
		sp, err := sd.Species.Find(p.SpeciesScientific)
		if err != nil {
			return err
		}
		items = append(items, assess.ClearanceItemsFor(sp.Group)...)
	}
	at := clinicalAt(sd, p, ev)
	for _, it := range items {
		if _, err := sd.Store.SetClearanceAt(ctx, sd.Users[ev.By], p.ID, at, it, c.State, c.Note); err != nil {
			return fmt.Errorf("clearance %s: %w", it, err)
		}
	}
	return nil
}

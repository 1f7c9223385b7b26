package records

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"sort"
	"strings"
	"time"

	"aloft/assess"
)

// Kinds of the clinical record.
const (
	KindExam        Kind = "exam"
	KindDiagnosis   Kind = "diagnosis"
	KindTreatment   Kind = "treatment"
	KindMedication  Kind = "medication"
	KindLab         Kind = "lab"
	KindDiseaseTest Kind = "disease-test"
	// KindClearance entries are written only by SetClearance: one entry per
	// change, the latest per item being the current state. They are never
	// corrected or removed; a new change supersedes the last.
	KindClearance Kind = "clearance"
)

// ClinicalKinds lists the clinical record kinds that people add, correct
// and remove (every clinical kind but clearance), in page order.
var ClinicalKinds = []Kind{KindExam, KindDiagnosis, KindTreatment, KindMedication, KindLab, KindDiseaseTest}

// ClinicalRecord is one of the clinical record types of package assess:
// Exam, Diagnosis, Treatment, Medication, LabResult or DiseaseTest.
type ClinicalRecord interface {
	Validate(now time.Time) error
}

// ClinicalEntry is one current clinical record with its entry: the record's
// key and version, who wrote it and when.
type ClinicalEntry[T any] struct {
	Entry  Entry
	Record T
}

// ClinicalKindOf returns the kind under which rec is stored and the instant
// it was made, or ok false for a type that is not a clinical record.
func ClinicalKindOf(rec ClinicalRecord) (kind Kind, at time.Time, ok bool) {
	switch r := rec.(type) {
	case assess.Exam:
		return KindExam, r.At, true
	case assess.Diagnosis:
		return KindDiagnosis, r.At, true
	case assess.Treatment:
		return KindTreatment, r.At, true
	case assess.Medication:
		return KindMedication, r.At, true
	case assess.LabResult:
		return KindLab, r.At, true
	case assess.DiseaseTest:
		return KindDiseaseTest, r.At, true
	}
	return "", time.Time{}, false
}

// AddClinical validates rec and stores it for patient patientID, with its
// audit row. Bad input is returned as assess.ValidationErrors; a missing
// patient as ErrNotFound.
func (s *Store) AddClinical(ctx context.Context, actorID, patientID int64, rec ClinicalRecord) (Entry, error) {
	kind, at, ok := ClinicalKindOf(rec)
	if !ok {
		return Entry{}, fmt.Errorf("records: add clinical: %T is not a clinical record", rec)
	}
	if err := rec.Validate(s.now()); err != nil {
		return Entry{}, err
	}
	return s.AddEntry(ctx, actorID, NewEntry{PatientID: patientID, Kind: kind, At: at, Data: rec})
}

// AddExam stores an examination; see AddClinical.
func (s *Store) AddExam(ctx context.Context, actorID, patientID int64, x assess.Exam) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, x)
}

// AddDiagnosis stores a diagnosis; see AddClinical.
func (s *Store) AddDiagnosis(ctx context.Context, actorID, patientID int64, d assess.Diagnosis) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, d)
}

// AddTreatment stores a treatment (a procedure other than a medication).
func (s *Store) AddTreatment(ctx context.Context, actorID, patientID int64, t assess.Treatment) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, t)
}

// AddMedication stores a course of medication; see AddClinical.
func (s *Store) AddMedication(ctx context.Context, actorID, patientID int64, m assess.Medication) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, m)
}

// AddLabResult stores a lab result; see AddClinical.
func (s *Store) AddLabResult(ctx context.Context, actorID, patientID int64, l assess.LabResult) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, l)
}

// AddDiseaseTest stores a disease test; see AddClinical.
func (s *Store) AddDiseaseTest(ctx context.Context, actorID, patientID int64, d assess.DiseaseTest) (Entry, error) {
	return s.AddClinical(ctx, actorID, patientID, d)
}

// CorrectClinical replaces the current version of clinical record key with
// rec, keeping the old version. version must be the current version (else
// ErrConflict); rec must be of the record's kind (else ErrNotFound: there is
// no such record of that kind). Clearance entries cannot be corrected.
func (s *Store) CorrectClinical(ctx context.Context, actorID, key int64, version int, rec ClinicalRecord) (Entry, error) {
	kind, at, ok := ClinicalKindOf(rec)
	if !ok {
		return Entry{}, fmt.Errorf("records: correct clinical: %T is not a clinical record", rec)
	}
	cur, err := s.Entry(ctx, key)
	if err != nil {
		return Entry{}, err
	}
	if cur.Kind != kind {
		return Entry{}, ErrNotFound
	}
	if err := rec.Validate(s.now()); err != nil {
		return Entry{}, err
	}
	return s.CorrectEntry(ctx, actorID, key, version, at, rec)
}

// RemoveClinical soft-deletes clinical record key with a reason (see
// RemoveEntry). Only the kinds of ClinicalKinds can be removed; any other
// key is ErrNotFound.
func (s *Store) RemoveClinical(ctx context.Context, actorID, key int64, reason string) error {
	cur, err := s.Entry(ctx, key)
	if err != nil {
		return err
	}
	if !slices.Contains(ClinicalKinds, cur.Kind) {
		return ErrNotFound
	}
	return s.RemoveEntry(ctx, actorID, key, reason)
}

// clinicalOf lists a patient's current records of one kind, newest first,
// decoded.
func clinicalOf[T any](ctx context.Context, s *Store, patientID int64, kind Kind) ([]ClinicalEntry[T], error) {
	es, err := s.Entries(ctx, patientID, EntryFilter{Kinds: []Kind{kind}, Newest: true})
	if err != nil {
		return nil, err
	}
	out := make([]ClinicalEntry[T], 0, len(es))
	for _, e := range es {
		var v T
		if err := e.Decode(&v); err != nil {
			return nil, err
		}
		out = append(out, ClinicalEntry[T]{Entry: e, Record: v})
	}
	return out, nil
}

// Exams lists a patient's current examinations, newest first.
func (s *Store) Exams(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.Exam], error) {
	return clinicalOf[assess.Exam](ctx, s, patientID, KindExam)
}

// Diagnoses lists a patient's current diagnoses, newest first.
func (s *Store) Diagnoses(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.Diagnosis], error) {
	return clinicalOf[assess.Diagnosis](ctx, s, patientID, KindDiagnosis)
}

// Treatments lists a patient's current treatments, newest first.
func (s *Store) Treatments(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.Treatment], error) {
	return clinicalOf[assess.Treatment](ctx, s, patientID, KindTreatment)
}

// Medications lists a patient's current medications, newest first.
func (s *Store) Medications(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.Medication], error) {
	return clinicalOf[assess.Medication](ctx, s, patientID, KindMedication)
}

// LabResults lists a patient's current lab results, newest first.
func (s *Store) LabResults(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.LabResult], error) {
	return clinicalOf[assess.LabResult](ctx, s, patientID, KindLab)
}

// DiseaseTests lists a patient's current disease tests, newest first.
func (s *Store) DiseaseTests(ctx context.Context, patientID int64) ([]ClinicalEntry[assess.DiseaseTest], error) {
	return clinicalOf[assess.DiseaseTest](ctx, s, patientID, KindDiseaseTest)
}

// MedicationDue is one course of medication with doses due on a day.
type MedicationDue struct {
	Patient    Patient
	Key        int64 // the medication record's key
	Medication assess.Medication
	Doses      []time.Time // wall-clock times of the doses that day, in the day's location
}

// MedicationsDue lists, for the patients in care, the medications with a
// dose due on day (the calendar date of day in its location), ordered by the
// first dose's time, then case number.
func (s *Store) MedicationsDue(ctx context.Context, day time.Time) ([]MedicationDue, error) {
	date := day.Format(assess.DateLayout)
	rows, err := s.db.QueryContext(ctx, `SELECT `+entryCols+entryFrom+` JOIN patients p ON p.id = e.patient_id
		WHERE e.kind = ? AND e.superseded = 0 AND e.removed_at IS NULL AND p.status = 'in-care'
		AND json_extract(e.data_json, '$.start') <= ? AND json_extract(e.data_json, '$.end') >= ?
		ORDER BY e.id`, string(KindMedication), date, date)
	if err != nil {
		return nil, fmt.Errorf("records: medications due: %w", err)
	}
	var es []Entry
	for rows.Next() {
		e, err := scanEntry(rows)
		if err != nil {
			rows.Close()
			return nil, fmt.Errorf("records: medications due: %w", err)
		}
		es = append(es, e)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("records: medications due: %w", err)
	}
	return s.dueFrom(ctx, es, day)
}

func (s *Store) dueFrom(ctx context.Context, es []Entry, day time.Time) ([]MedicationDue, error) {
	patients := map[int64]Patient{}
	var out []MedicationDue
	for _, e := range es {
		var m assess.Medication
		if err := e.Decode(&m); err != nil {
			return nil, err
		}
		doses := m.DosesOn(day)
		if len(doses) == 0 {
			continue
		}
		p, ok := patients[e.PatientID]
		if !ok {
			var err error
			if p, err = s.Patient(ctx, e.PatientID); err != nil {
				return nil, err
			}
			patients[e.PatientID] = p
		}
		out = append(out, MedicationDue{Patient: p, Key: e.Key, Medication: m, Doses: doses})
	}
	sort.SliceStable(out, func(i, j int) bool {
		a, b := out[i], out[j]
		if !a.Doses[0].Equal(b.Doses[0]) {
			return a.Doses[0].Before(b.Doses[0])
		}
		return a.Patient.CaseNumber < b.Patient.CaseNumber
	})
	return out, nil
}

// ClearanceRoles are the roles that may set clinical clearance.
var ClearanceRoles = []Role{RoleVet, RoleRehabilitator}

// SetClearance records the state of one clearance item of a patient, now.
// Only a user who holds RoleVet or RoleRehabilitator may: the roles are read
// afresh from the database, so a stale or forged User value does not help,
// and anyone else (or a disabled account) gets ErrForbidden. A not-cleared
// state needs a note (assess.ValidationErrors otherwise).
func (s *Store) SetClearance(ctx context.Context, actor User, patientID int64, item assess.ClearanceItem, state assess.ClearanceState, note string) (assess.Clearance, error) {
	return s.SetClearanceAt(ctx, actor, patientID, s.now(), item, state, note)
}

// SetClearanceAt is SetClearance for a change made at an earlier instant at
// (the demo's history, a change written down on paper first). at must not
// be in the future.
func (s *Store) SetClearanceAt(ctx context.Context, actor User, patientID int64, at time.Time, item assess.ClearanceItem, state assess.ClearanceState, note string) (assess.Clearance, error) {
	u, err := s.User(ctx, actor.ID)
	if err != nil && !errors.Is(err, ErrNotFound) {
		return assess.Clearance{}, err
	}
	c, err := clearanceBy(u, at, s.now(), item, state, note)
	if err != nil {
		return assess.Clearance{}, err
	}
	if _, err := s.AddEntry(ctx, u.ID, NewEntry{PatientID: patientID, Kind: KindClearance, At: c.At, Data: c}); err != nil {
		return assess.Clearance{}, err
	}
	return c, nil
}

// clearanceBy builds the clearance change u makes at at, with the checks
// every writer of clearance entries shares: u (as stored, not as a caller
// claims) must be an enabled vet or rehabilitator (else ErrForbidden), the
// change must be valid (assess.Clearance.ValidateChange), and at must not be
// after now. A user holding both roles signs as the vet.
func clearanceBy(u User, at, now time.Time, item assess.ClearanceItem, state assess.ClearanceState, note string) (assess.Clearance, error) {
	if u.ID == 0 || u.Disabled || !u.HasAny(ClearanceRoles...) {
		return assess.Clearance{}, ErrForbidden
	}
	role := RoleRehabilitator
	if u.Has(RoleVet) {
		role = RoleVet
	}
	c := assess.Clearance{Item: item, State: state, By: u.DisplayName, Role: string(role),
		At: at.UTC().Truncate(time.Second), Note: strings.TrimSpace(note)}
	if err := c.ValidateChange(); err != nil {
		return assess.Clearance{}, err
	}
	if at.After(now.Add(5 * time.Minute)) {
		return assess.Clearance{}, assess.ValidationErrors{{Field: "at", Value: at.Format(time.RFC3339), Message: "a clearance cannot be set in the future"}}
	}
	return c, nil
}

// Clearances returns the current state of every clearance item of a patient,
// in assess.ClearanceItems order: the latest change of each item, or
// not-examined (with no one and no time) when nobody has set it. Filter with
// assess.ClearanceItemsFor for the patient's species group.
func (s *Store) Clearances(ctx context.Context, patientID int64) ([]assess.Clearance, error) {
	hist, err := s.ClearanceHistory(ctx, patientID)
	if err != nil {
		return nil, err
	}
	latest := map[assess.ClearanceItem]assess.Clearance{}
	for _, c := range hist { // newest first: keep the first seen
		if _, ok := latest[c.Item]; !ok {
			latest[c.Item] = c
		}
	}
	out := make([]assess.Clearance, 0, len(assess.ClearanceItems))
	for _, it := range assess.ClearanceItems {
		c, ok := latest[it]
		if !ok {
			c = assess.Clearance{Item: it, State: assess.ClearanceNotExamined}
		}
		out = append(out, c)
	}
	return out, nil
}

// ClearanceHistory lists every clearance change of a patient, newest first.
func (s *Store) ClearanceHistory(ctx context.Context, patientID int64) ([]assess.Clearance, error) {
	es, err := s.Entries(ctx, patientID, EntryFilter{Kinds: []Kind{KindClearance}, Newest: true})
	if err != nil {
		return nil, err
	}
	return DecodeAll[assess.Clearance](es)
}

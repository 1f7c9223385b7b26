package records

import (
	"context"
	"fmt"
	"sync"

	"aloft/assess"
)

// speciesTable is the shipped species reference, parsed once per process.
var speciesTable = sync.OnceValues(assess.LoadSpecies)

// SpeciesFor returns the species reference a patient is assessed against:
// the shipped row with the centre's overrides (their Sources entries marked
// centre-setting, with the author), or a species the centre added. Any
// name the table knows finds it; an unknown one wraps
// assess.ErrUnknownSpecies.
func (s *Store) SpeciesFor(ctx context.Context, scientific string) (*assess.Species, error) {
	t, err := s.SpeciesTable(ctx)
	if err != nil {
		return nil, err
	}
	sp, err := t.Find(scientific)
	if err != nil {
		return nil, fmt.Errorf("records: species of patient: %w", err)
	}
	return sp, nil
}

// CaseInputs gathers everything the engine reads about patient p: its
// current conditioning records and its clinical clearance, oldest first.
func (s *Store) CaseInputs(ctx context.Context, p Patient) (assess.CaseInputs, error) {
	in := assess.CaseInputs{Sex: p.Sex, AgeClass: p.AgeClass, AdmittedAt: p.AdmittedAt}
	if err := s.FillConditioning(ctx, p.ID, &in); err != nil {
		return in, err
	}
	cl, err := s.Clearances(ctx, p.ID)
	if err != nil {
		return in, err
	}
	for _, c := range cl {
		if c.State != assess.ClearanceNotExamined || !c.At.IsZero() {
			in.Clearances = append(in.Clearances, c)
		}
	}
	return in, nil
}

// CaseFile returns one patient's complete record in the case-file format
// (assess.CaseFile): the patient, the species reference used, and every
// current record. Finders' personal data is left out unless withFinder.
func (s *Store) CaseFile(ctx context.Context, caseNumber string) (assess.CaseFile, error) {
	return s.caseFile(ctx, caseNumber, false)
}

// CaseFileWithFinder is CaseFile including the finder's name and contact.
func (s *Store) CaseFileWithFinder(ctx context.Context, caseNumber string) (assess.CaseFile, error) {
	return s.caseFile(ctx, caseNumber, true)
}

func (s *Store) caseFile(ctx context.Context, caseNumber string, withFinder bool) (assess.CaseFile, error) {
	p, err := s.PatientByCase(ctx, caseNumber)
	if err != nil {
		return assess.CaseFile{}, err
	}
	sp, err := s.SpeciesFor(ctx, p.SpeciesScientific)
	if err != nil {
		return assess.CaseFile{}, err
	}
	in, err := s.CaseInputs(ctx, p)
	if err != nil {
		return assess.CaseFile{}, err
	}
	cp := assess.CasePatient{CaseNumber: p.CaseNumber, SpeciesScientific: p.SpeciesScientific, SpeciesCommon: p.SpeciesCommon,
		AgeClass: p.AgeClass, Sex: p.Sex, AdmittedAt: p.AdmittedAt, FoundDate: p.FoundDate, FoundPlace: p.FoundPlace,
		FoundLat: p.FoundLat, FoundLon: p.FoundLon, Reason: p.Reason, IntakeCondition: p.IntakeCondition,
		IntakeMassG: p.IntakeMassG, Status: p.Status, StatusDate: p.StatusDate}
	if withFinder {
		cp.FinderName, cp.FinderContact = p.FinderName, p.FinderContact
	}
	return assess.CaseFile{FormatVersion: assess.CaseFileVersion, Patient: cp, Species: *sp, Inputs: in}, nil
}

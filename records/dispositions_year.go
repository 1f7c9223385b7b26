package records

import (
	"context"
	"database/sql"
	"fmt"
	"strconv"

	"aloft/assess"
)

// A year's caseload, for permit reporting: every patient admitted in the
// year (its case year, the UTC year of admission), plus every patient
// admitted in an earlier year that was still in care on 1 January (had no
// disposition dated before it) — "held over". A disposition dated after 31
// December leaves the patient pending (in care) for that year.

// YearCase is one patient of a year's caseload.
type YearCase struct {
	Patient Patient
	// Disposition is the current disposition, whatever its date; nil while
	// the patient is in care. See StatusAtYearEnd.
	Disposition *Disposition
	HeldOver    bool // admitted in an earlier year, still in care on 1 January
}

// StatusAtYearEnd is the patient's disposition on 31 December of year:
// in-care (the federal report's "pending") when it had none by then.
func (c YearCase) StatusAtYearEnd(year int) assess.Disposition {
	if c.Disposition == nil || c.Disposition.Date > yearEnd(year) {
		return assess.DispInCare
	}
	return c.Disposition.Kind
}

func yearStart(year int) string { return strconv.Itoa(year) + "-01-01" }
func yearEnd(year int) string   { return strconv.Itoa(year) + "-12-31" }

// caseloadWhere selects the year's caseload from patients p joined with
// their current disposition d; its arguments are caseloadArgs(year).
const caseloadWhere = ` WHERE p.case_year = ? OR (p.case_year < ? AND (d.id IS NULL OR d.disposed_on >= ?))`

func caseloadArgs(year int) []any { return []any{year, year, yearStart(year)} }

const caseloadFrom = ` FROM patients p LEFT JOIN dispositions d ON d.patient_id = p.id AND d.superseded = 0 `

// Caseload lists the year's caseload by case number: held-over patients
// (earlier case years) first.
func (s *Store) Caseload(ctx context.Context, year int) ([]YearCase, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT `+patientCols+`, case_year, did FROM (SELECT p.*, d.id AS did`+
		caseloadFrom+caseloadWhere+`) ORDER BY case_year, case_seq`, caseloadArgs(year)...)
	if err != nil {
		return nil, fmt.Errorf("records: caseload %d: %w", year, err)
	}
	var out []YearCase
	var withDisp []int
	for rows.Next() {
		var caseYear int
		var did sql.NullInt64
		p, err := scanPatient(scanExtra{rows, []any{&caseYear, &did}})
		if err != nil {
			rows.Close()
			return nil, fmt.Errorf("records: caseload %d: %w", year, err)
		}
		if did.Valid {
			withDisp = append(withDisp, len(out))
		}
		out = append(out, YearCase{Patient: p, HeldOver: caseYear < year})
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("records: caseload %d: %w", year, err)
	}
	for _, i := range withDisp {
		d, err := s.Disposition(ctx, out[i].Patient.ID)
		if err != nil {
			return nil, err
		}
		out[i].Disposition = &d
	}
	return out, nil
}

// scanExtra scans a patient row followed by extra columns.
type scanExtra struct {
	r     rowScanner
	extra []any
}

func (s scanExtra) Scan(dest ...any) error { return s.r.Scan(append(dest, s.extra...)...) }

// DispositionCount is one group of a year's caseload: the patients of one
// species with one disposition at the year's end.
type DispositionCount struct {
	SpeciesScientific string
	SpeciesCommon     string
	Status            assess.Disposition // at 31 December; in-care = pending
	Received          int                // admitted in the year
	HeldOver          int                // admitted earlier, in care on 1 January
}

// DispositionCounts counts the year's caseload by species and disposition
// at the year's end, in SQL, independently of Caseload: the two reconcile
// (see reports.Reconcile). Ordered by species, then status.
func (s *Store) DispositionCounts(ctx context.Context, year int) ([]DispositionCount, error) {
	q := `SELECT p.species_scientific, MAX(p.species_common),
		CASE WHEN d.id IS NULL OR d.disposed_on > ? THEN 'in-care' ELSE d.kind END AS st,
		SUM(p.case_year = ?), SUM(p.case_year < ?)` + caseloadFrom + caseloadWhere +
		` GROUP BY p.species_scientific, st ORDER BY p.species_scientific, st`
	args := append([]any{yearEnd(year), year, year}, caseloadArgs(year)...)
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("records: disposition counts %d: %w", year, err)
	}
	defer rows.Close()
	var out []DispositionCount
	for rows.Next() {
		var c DispositionCount
		var st string
		if err := rows.Scan(&c.SpeciesScientific, &c.SpeciesCommon, &st, &c.Received, &c.HeldOver); err != nil {
			return nil, fmt.Errorf("records: disposition counts %d: %w", year, err)
		}
		c.Status = assess.Disposition(st)
		out = append(out, c)
	}
	return out, rows.Err()
}

// CaseYears lists the case years that have patients, newest first.
func (s *Store) CaseYears(ctx context.Context) ([]int, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT DISTINCT case_year FROM patients ORDER BY case_year DESC`)
	if err != nil {
		return nil, fmt.Errorf("records: case years: %w", err)
	}
	defer rows.Close()
	var out []int
	for rows.Next() {
		var y int
		if err := rows.Scan(&y); err != nil {
			return nil, fmt.Errorf("records: case years: %w", err)
		}
		out = append(out, y)
	}
	return out, rows.Err()
}

// ActionExport is the audit action of an export of case records.
const ActionExport = "export"

// ExportRecord describes one export for the audit trail.
type ExportRecord struct {
	Kind           string `json:"kind"`                  // cases, summary, patient-csv, patient-casefile
	Year           int    `json:"year,omitempty"`        // cases, summary
	CaseNumber     string `json:"case_number,omitempty"` // patient exports
	IncludeFinders bool   `json:"include_finders"`       // finders' personal data included
}

// LogExport appends an audit row saying who exported what, and whether it
// carried finders' personal data. patientID is 0 for a year's export.
func (s *Store) LogExport(ctx context.Context, actorID, patientID int64, e ExportRecord) error {
	return wrapValidation("log export", s.inTx(ctx, func(tx *sql.Tx) error {
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "export", entityID: patientID, patientID: patientID,
			action: ActionExport, after: e})
	}))
}

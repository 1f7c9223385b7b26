package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"aloft/assess"
)

// AgeClasses are the age classes a patient may be given at intake.
var AgeClasses = []string{"hatchling", "nestling", "fledgling", "juvenile", "immature", "adult", "unknown"}

// Patient is one bird in the centre's care, from intake to disposition.
type Patient struct {
	ID                int64              `json:"id"`
	CaseNumber        string             `json:"case_number"`
	SpeciesScientific string             `json:"species_scientific"`
	SpeciesCommon     string             `json:"species_common"`
	AgeClass          string             `json:"age_class"`
	Sex               assess.Sex         `json:"sex"`
	FoundDate         string             `json:"found_date"` // YYYY-MM-DD
	FoundPlace        string             `json:"found_place"`
	FoundLat          *float64           `json:"found_lat"` // decimal degrees, WGS 84
	FoundLon          *float64           `json:"found_lon"`
	FinderName        string             `json:"finder_name"`    // personal data: off reports by default
	FinderContact     string             `json:"finder_contact"` // personal data: off reports by default
	Reason            string             `json:"reason"`
	IntakeCondition   string             `json:"intake_condition"`
	IntakeMassG       float64            `json:"intake_mass_g"`
	MassNote          string             `json:"mass_note"` // the reason given when an unusual intake mass was confirmed
	AdmittedAt        time.Time          `json:"admitted_at"`
	Status            assess.Disposition `json:"status"`
	StatusDate        string             `json:"status_date"` // YYYY-MM-DD of the disposition; "" while in care
	CreatedBy         int64              `json:"created_by"`
	UpdatedAt         time.Time          `json:"updated_at"`
	Version           int                `json:"version"`
}

// InCare reports whether the patient has no disposition yet.
func (p Patient) InCare() bool { return p.Status == assess.DispInCare || p.Status == "" }

// PatientInput is what intake records (and what a correction of the intake
// details may change).
type PatientInput struct {
	SpeciesScientific string
	SpeciesCommon     string
	AgeClass          string
	Sex               assess.Sex
	FoundDate         string
	FoundPlace        string
	FoundLat          *float64
	FoundLon          *float64
	FinderName        string
	FinderContact     string
	Reason            string
	IntakeCondition   string
	IntakeMassG       float64
	MassNote          string
	// AdmittedAt is the time of admission; zero means now.
	AdmittedAt time.Time
}

// Absolute mass bounds for any flying bird, in grams: the smallest
// hummingbirds weigh about 2 g and the heaviest flying birds about 20 kg
// [from memory]. The species' own range is checked by assess.CheckMass.
const (
	minBirdMassG = 1.5
	maxBirdMassG = 22000
)

// CheckMassG is the species-free plausibility check of a mass in grams; it
// names the field and the likely unit mistake.
func CheckMassG(field string, g float64) *assess.ValidationError {
	v := strconv.FormatFloat(g, 'f', -1, 64)
	switch {
	case math.IsNaN(g) || math.IsInf(g, 0) || g <= 0:
		return &assess.ValidationError{Field: field, Value: v, Message: "enter the mass in grams, a number above 0"}
	case g < minBirdMassG:
		return &assess.ValidationError{Field: field, Value: v, Message: fmt.Sprintf(
			"%s g is lighter than any bird: did you mean kilograms (%s g)?", v, strconv.FormatFloat(g*1000, 'f', -1, 64))}
	case g > maxBirdMassG:
		return &assess.ValidationError{Field: field, Value: v, Message: fmt.Sprintf(
			"%s g is heavier than any flying bird: mass is entered in grams — did you type milligrams, or an extra digit?", v)}
	}
	return nil
}

// Validate checks an intake against rules that need no species table. now
// bounds the dates.
func (in PatientInput) Validate(now time.Time) error {
	var errs assess.ValidationErrors
	add := func(field, value, msg string) {
		errs = append(errs, &assess.ValidationError{Field: field, Value: value, Message: msg})
	}
	if strings.TrimSpace(in.SpeciesScientific) == "" {
		add("species", in.SpeciesScientific, "choose the species (common or scientific name)")
	}
	if !slices.Contains(AgeClasses, in.AgeClass) {
		add("age_class", in.AgeClass, "choose an age class: "+strings.Join(AgeClasses, ", "))
	}
	if !in.Sex.Valid() {
		add("sex", string(in.Sex), "choose female, male or unknown")
	}
	d, err := time.Parse(DateLayout, in.FoundDate)
	switch {
	case err != nil:
		add("found_date", in.FoundDate, "enter the date found as YYYY-MM-DD")
	case d.After(now.Add(24 * time.Hour)):
		add("found_date", in.FoundDate, "the date found cannot be in the future")
	case d.Before(now.AddDate(-30, 0, 0)):
		add("found_date", in.FoundDate, "the date found is more than 30 years ago: check the year")
	}
	if strings.TrimSpace(in.Reason) == "" {
		add("reason", in.Reason, "say why the bird was admitted")
	}
	for field, s := range map[string]string{"found_place": in.FoundPlace, "finder_name": in.FinderName,
		"finder_contact": in.FinderContact, "reason": in.Reason, "intake_condition": in.IntakeCondition, "mass_note": in.MassNote} {
		if utf8.RuneCountInString(s) > 2000 {
			add(field, s[:20]+"…", "keep this under 2000 characters")
		}
	}
	if in.FoundLat != nil && (math.IsNaN(*in.FoundLat) || *in.FoundLat < -90 || *in.FoundLat > 90) {
		add("found_lat", fmt.Sprint(*in.FoundLat), "latitude is in decimal degrees from -90 to 90")
	}
	if in.FoundLon != nil && (math.IsNaN(*in.FoundLon) || *in.FoundLon < -180 || *in.FoundLon > 180) {
		add("found_lon", fmt.Sprint(*in.FoundLon), "longitude is in decimal degrees from -180 to 180")
	}
	if (in.FoundLat == nil) != (in.FoundLon == nil) {
		add("found_lat", "", "give both latitude and longitude, or neither")
	}
	if e := CheckMassG("intake_mass_g", in.IntakeMassG); e != nil {
		errs = append(errs, e)
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

// CaseNumber formats a case number: the year of admission and a sequence
// number within it, e.g. "2026-0042".
func CaseNumber(year, seq int) string { return fmt.Sprintf("%d-%04d", year, seq) }

// AdmitPatient registers a new patient and returns it with its case number.
func (s *Store) AdmitPatient(ctx context.Context, actorID int64, in PatientInput) (Patient, error) {
	now := s.now()
	if err := in.Validate(now); err != nil {
		return Patient{}, err
	}
	if in.AdmittedAt.IsZero() {
		in.AdmittedAt = now
	}
	var p Patient
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		var err error
		p, err = s.admitTx(ctx, tx, actorID, in, now)
		return err
	})
	return p, wrapValidation("admit patient", err)
}

func (s *Store) admitTx(ctx context.Context, tx *sql.Tx, actorID int64, in PatientInput, now time.Time) (Patient, error) {
	year := in.AdmittedAt.UTC().Year()
	var seq int
	if err := tx.QueryRowContext(ctx, `SELECT COALESCE(MAX(case_seq), 0) + 1 FROM patients WHERE case_year = ?`, year).Scan(&seq); err != nil {
		return Patient{}, err
	}
	var createdBy any
	if actorID != 0 {
		createdBy = actorID
	}
	res, err := tx.ExecContext(ctx, `INSERT INTO patients (case_number, case_year, case_seq, species_scientific, species_common,
		age_class, sex, found_date, found_place, found_lat, found_lon, finder_name, finder_contact, reason, intake_condition,
		intake_mass_g, mass_note, admitted_at, status, created_by, updated_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 'in-care', ?, ?)`,
		CaseNumber(year, seq), year, seq, strings.TrimSpace(in.SpeciesScientific), strings.TrimSpace(in.SpeciesCommon),
		in.AgeClass, string(in.Sex), in.FoundDate, in.FoundPlace, nullFloat(in.FoundLat), nullFloat(in.FoundLon),
		in.FinderName, in.FinderContact, in.Reason, in.IntakeCondition, in.IntakeMassG, in.MassNote,
		fmtTime(in.AdmittedAt), createdBy, fmtTime(now))
	if err != nil {
		return Patient{}, err
	}
	id, _ := res.LastInsertId()
	p, err := getPatient(ctx, tx, "id = ?", id)
	if err != nil {
		return Patient{}, err
	}
	return p, s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "patient", entityID: id, patientID: id, action: ActionCreate, after: p})
}

// UpdatePatient corrects the intake details of patient id. version must be
// the version that was read (else ErrConflict: someone else changed it).
func (s *Store) UpdatePatient(ctx context.Context, actorID, id int64, version int, in PatientInput) (Patient, error) {
	if err := in.Validate(s.now()); err != nil {
		return Patient{}, err
	}
	var p Patient
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		before, err := getPatient(ctx, tx, "id = ?", id)
		if err != nil {
			return err
		}
		if before.Version != version {
			return ErrConflict
		}
		if in.AdmittedAt.IsZero() {
			in.AdmittedAt = before.AdmittedAt
		}
		_, err = tx.ExecContext(ctx, `UPDATE patients SET species_scientific = ?, species_common = ?, age_class = ?, sex = ?,
			found_date = ?, found_place = ?, found_lat = ?, found_lon = ?, finder_name = ?, finder_contact = ?, reason = ?,
			intake_condition = ?, intake_mass_g = ?, mass_note = ?, admitted_at = ?, updated_at = ?, version = version + 1 WHERE id = ?`,
			strings.TrimSpace(in.SpeciesScientific), strings.TrimSpace(in.SpeciesCommon), in.AgeClass, string(in.Sex),
			in.FoundDate, in.FoundPlace, nullFloat(in.FoundLat), nullFloat(in.FoundLon), in.FinderName, in.FinderContact,
			in.Reason, in.IntakeCondition, in.IntakeMassG, in.MassNote, fmtTime(in.AdmittedAt), fmtTime(s.now()), id)
		if err != nil {
			return err
		}
		p, err = getPatient(ctx, tx, "id = ?", id)
		if err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "patient", entityID: id, patientID: id, action: ActionUpdate, before: before, after: p})
	})
	return p, wrapValidation("update patient", err)
}

const patientCols = `id, case_number, species_scientific, species_common, age_class, sex, found_date, found_place,
	found_lat, found_lon, finder_name, finder_contact, reason, intake_condition, intake_mass_g, mass_note, admitted_at,
	status, COALESCE(status_date, ''), COALESCE(created_by, 0), updated_at, version`

type rowScanner interface{ Scan(dest ...any) error }

func scanPatient(r rowScanner) (Patient, error) {
	var p Patient
	var lat, lon sql.NullFloat64
	var sex, status, admitted, updated string
	err := r.Scan(&p.ID, &p.CaseNumber, &p.SpeciesScientific, &p.SpeciesCommon, &p.AgeClass, &sex, &p.FoundDate,
		&p.FoundPlace, &lat, &lon, &p.FinderName, &p.FinderContact, &p.Reason, &p.IntakeCondition, &p.IntakeMassG,
		&p.MassNote, &admitted, &status, &p.StatusDate, &p.CreatedBy, &updated, &p.Version)
	if err != nil {
		return Patient{}, err
	}
	p.Sex, p.Status = assess.Sex(sex), assess.Disposition(status)
	p.FoundLat, p.FoundLon = floatPtr(lat), floatPtr(lon)
	p.AdmittedAt, p.UpdatedAt = parseTime(admitted), parseTime(updated)
	return p, nil
}

type queryer interface {
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
}

func getPatient(ctx context.Context, q queryer, where string, arg any) (Patient, error) {
	p, err := scanPatient(q.QueryRowContext(ctx, `SELECT `+patientCols+` FROM patients WHERE `+where, arg))
	if errors.Is(err, sql.ErrNoRows) {
		return Patient{}, ErrNotFound
	}
	return p, err
}

// Patient returns the patient with id.
func (s *Store) Patient(ctx context.Context, id int64) (Patient, error) {
	p, err := getPatient(ctx, s.db, "id = ?", id)
	return p, wrapValidation("patient", err)
}

// PatientByCase returns the patient with a case number.
func (s *Store) PatientByCase(ctx context.Context, caseNumber string) (Patient, error) {
	p, err := getPatient(ctx, s.db, "case_number = ?", strings.TrimSpace(caseNumber))
	return p, wrapValidation("patient "+caseNumber, err)
}

// PatientFilter selects patients for a list.
type PatientFilter struct {
	Query  string // case number, species (either name) or reason, substring, case-insensitive
	Status string // "" any, "in-care", or a disposition
	Year   int    // admission year, 0 any
	Limit  int    // 0: 200
	Offset int
}

// Patients lists patients: in care first, then newest admissions first.
func (s *Store) Patients(ctx context.Context, f PatientFilter) ([]Patient, error) {
	q := `SELECT ` + patientCols + ` FROM patients WHERE 1=1`
	var args []any
	if t := strings.TrimSpace(f.Query); t != "" {
		like := "%" + strings.NewReplacer(`\`, `\\`, `%`, `\%`, `_`, `\_`).Replace(strings.ToLower(t)) + "%"
		q += ` AND (lower(case_number) LIKE ? ESCAPE '\' OR lower(species_scientific) LIKE ? ESCAPE '\'
			OR lower(species_common) LIKE ? ESCAPE '\' OR lower(reason) LIKE ? ESCAPE '\')`
		args = append(args, like, like, like, like)
	}
	if f.Status != "" {
		q += ` AND status = ?`
		args = append(args, f.Status)
	}
	if f.Year != 0 {
		q += ` AND case_year = ?`
		args = append(args, f.Year)
	}
	if f.Limit <= 0 {
		f.Limit = 200
	}
	q += ` ORDER BY (status = 'in-care') DESC, admitted_at DESC, id DESC LIMIT ? OFFSET ?`
	args = append(args, f.Limit, f.Offset)
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("records: patients: %w", err)
	}
	defer rows.Close()
	var out []Patient
	for rows.Next() {
		p, err := scanPatient(rows)
		if err != nil {
			return nil, fmt.Errorf("records: patients: %w", err)
		}
		out = append(out, p)
	}
	return out, rows.Err()
}

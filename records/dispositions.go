package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"aloft/assess"
)

// DispositionInput is what a person records when a patient leaves care, or
// corrects afterwards. Which fields are required depends on Kind (see
// Validate); fields that do not apply to the kind are dropped by Normalise.
type DispositionInput struct {
	Kind assess.Disposition `json:"kind"` // any disposition but in-care
	Date string             `json:"date"` // YYYY-MM-DD: not before admission, not in the future
	// Place is where the bird was released, renested or handed over, or
	// where it died or escaped. Required for released, renested, transferred.
	Place string   `json:"place"`
	Lat   *float64 `json:"lat"` // decimal degrees, WGS 84, -90 to 90; optional, with Lon
	Lon   *float64 `json:"lon"` // decimal degrees, WGS 84, -180 to 180; optional, with Lat
	// Receiver names who received a transferred bird (a centre, a vet
	// practice, a licensed person). Transferred only, required.
	Receiver string `json:"receiver"`
	// Reason is the cause of death (died) or the reason for euthanasia
	// (euthanised), both required; a free note for the other kinds.
	Reason string `json:"reason"`
	// ReportVersionID is the signed pre-release report version a release
	// rests on. The report feature fills it and checks it names a signed
	// version; until then it is nil.
	ReportVersionID *int64 `json:"report_version_id"`
	// NoReportReason says why a release (or renesting) needed no signed
	// report, e.g. "nestling returned to its nest the day it was found".
	// Required for released and renested when ReportVersionID is nil.
	NoReportReason string `json:"no_report_reason"`
	// PerformedBy names the person who carried it out; "" means the person
	// recording it.
	PerformedBy string `json:"performed_by"`
	// Note is a correction's reason: required by CorrectDisposition, ignored
	// by Dispose.
	Note string `json:"note"`
}

// Disposition is one version of a patient's disposition.
type Disposition struct {
	DispositionInput
	ID             int64     `json:"id"`  // this version's row id
	Key            int64     `json:"key"` // the same for every version
	PatientID      int64     `json:"patient_id"`
	Version        int       `json:"version"`
	RecordedBy     int64     `json:"recorded_by"` // user id; 0 for the system
	RecordedByName string    `json:"recorded_by_name"`
	CreatedAt      time.Time `json:"created_at"`
	Superseded     bool      `json:"superseded"`
}

// IsRelease reports whether k returns the bird to the wild: released, or
// renested (a kind of release).
func IsRelease(k assess.Disposition) bool {
	return k == assess.DispReleased || k == assess.DispRenested
}

// ReleaseRoles may record or correct a release: releasing a bird is the
// licensed rehabilitator's decision.
var ReleaseRoles = []Role{RoleRehabilitator, RoleAdmin}

// maxDispText bounds every free-text field of a disposition, in characters.
const maxDispText = 2000

// Normalise trims the text fields and clears those that do not apply to the
// kind: the receiver outside a transfer, the report fields outside a release.
func (in DispositionInput) Normalise() DispositionInput {
	for _, p := range []*string{&in.Date, &in.Place, &in.Receiver, &in.Reason, &in.NoReportReason, &in.PerformedBy, &in.Note} {
		*p = strings.TrimSpace(*p)
	}
	if in.Kind != assess.DispTransferred {
		in.Receiver = ""
	}
	if !IsRelease(in.Kind) {
		in.ReportVersionID, in.NoReportReason = nil, ""
	} else if in.ReportVersionID != nil {
		in.NoReportReason = ""
	}
	return in
}

// Validate checks a normalised disposition of patient p against the clock
// now. Errors name the form field: kind, date, place, lat, lon, receiver,
// reason, no_report_reason.
func (in DispositionInput) Validate(p Patient, now time.Time) error {
	var errs assess.ValidationErrors
	add := func(field, value, msg string) {
		errs = append(errs, &assess.ValidationError{Field: field, Value: value, Message: msg})
	}
	if in.Kind == assess.DispInCare || !in.Kind.Valid() {
		add("kind", string(in.Kind), "choose what became of the bird: released, renested, transferred, died, euthanised, dead on arrival or escaped")
	}
	if msg := checkDispDate(in.Date, p, now); msg != "" {
		add("date", in.Date, msg)
	}
	if in.Place == "" && (IsRelease(in.Kind) || in.Kind == assess.DispTransferred) {
		add("place", "", "say where: the release site, the nest, or where the bird was handed over")
	}
	if in.Kind == assess.DispTransferred && in.Receiver == "" {
		add("receiver", "", "name who received the bird (centre, practice or licensed person)")
	}
	switch {
	case in.Kind == assess.DispDied && in.Reason == "":
		add("reason", "", "give the cause of death, or \"unknown\" if it is not known")
	case in.Kind == assess.DispEuthanised && in.Reason == "":
		add("reason", "", "give the reason for euthanasia")
	}
	if IsRelease(in.Kind) && in.ReportVersionID == nil && in.NoReportReason == "" {
		add("no_report_reason", "", "no signed pre-release report is attached: say why none was needed")
	}
	errs = append(errs, checkLatLon(in.Lat, in.Lon)...)
	for field, s := range map[string]string{"place": in.Place, "receiver": in.Receiver, "reason": in.Reason,
		"no_report_reason": in.NoReportReason, "performed_by": in.PerformedBy, "note": in.Note} {
		if utf8.RuneCountInString(s) > maxDispText {
			add(field, string([]rune(s)[:20])+"…", fmt.Sprintf("keep this under %d characters", maxDispText))
		}
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

// checkDispDate returns what is wrong with a disposition date, or "". The
// admission day and today are taken both in UTC and in local time, so a
// disposition dated the local day of an evening admission is accepted.
func checkDispDate(date string, p Patient, now time.Time) string {
	d, err := time.Parse(DateLayout, date)
	if err != nil {
		return "enter the date as YYYY-MM-DD"
	}
	first := min(p.AdmittedAt.UTC().Format(DateLayout), p.AdmittedAt.Local().Format(DateLayout))
	last := max(now.UTC().Format(DateLayout), now.Local().Format(DateLayout))
	switch {
	case d.Format(DateLayout) < first:
		return "the date is before the bird was admitted (" + first + ")"
	case d.Format(DateLayout) > last:
		return "the date cannot be in the future"
	}
	return ""
}

// checkLatLon checks an optional coordinate pair.
func checkLatLon(lat, lon *float64) assess.ValidationErrors {
	var errs assess.ValidationErrors
	if lat != nil && (math.IsNaN(*lat) || *lat < -90 || *lat > 90) {
		errs = append(errs, &assess.ValidationError{Field: "lat", Value: strconv.FormatFloat(*lat, 'f', -1, 64),
			Message: "latitude is in decimal degrees from -90 to 90"})
	}
	if lon != nil && (math.IsNaN(*lon) || *lon < -180 || *lon > 180) {
		errs = append(errs, &assess.ValidationError{Field: "lon", Value: strconv.FormatFloat(*lon, 'f', -1, 64),
			Message: "longitude is in decimal degrees from -180 to 180 (west is negative)"})
	}
	if (lat == nil) != (lon == nil) {
		errs = append(errs, &assess.ValidationError{Field: "lat", Message: "give both latitude and longitude, or neither"})
	}
	return errs
}

// Dispose records what became of patient patientID: the patient leaves the
// in-care list (patients.status and status_date follow the disposition), in
// one transaction with its audit row. Releases (released, renested) need
// the rehabilitator or admin role (ErrForbidden otherwise); actorID 0 is the
// system. A patient that already has a disposition gives ErrConflict: use
// CorrectDisposition. Bad input is returned as assess.ValidationErrors.
func (s *Store) Dispose(ctx context.Context, actorID, patientID int64, in DispositionInput) (Disposition, error) {
	in = in.Normalise()
	in.Note = ""
	var d Disposition
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		p, err := getPatient(ctx, tx, "id = ?", patientID)
		if err != nil {
			return err
		}
		if err := in.Validate(p, s.now()); err != nil {
			return err
		}
		if !p.InCare() {
			return ErrConflict
		}
		if err := checkReleaseRole(ctx, tx, actorID, in.Kind); err != nil {
			return err
		}
		d, err = s.insertDispositionTx(ctx, tx, actorID, p.ID, 0, 1, in)
		if err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "disposition", entityID: d.Key, patientID: p.ID,
			action: ActionCreate, before: map[string]any{"status": p.Status}, after: d})
	})
	return d, wrapValidation("dispose", err)
}

// CorrectDisposition replaces the current disposition of patient patientID
// with a new version; the old version is kept, marked superseded. version
// must be the current version (else ErrConflict); in.Note must say what was
// wrong. A correction into or out of a release needs the release roles. The
// kind cannot go back to in-care: a disposition is corrected, never undone.
func (s *Store) CorrectDisposition(ctx context.Context, actorID, patientID int64, version int, in DispositionInput) (Disposition, error) {
	in = in.Normalise()
	var d Disposition
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		p, err := getPatient(ctx, tx, "id = ?", patientID)
		if err != nil {
			return err
		}
		verr := in.Validate(p, s.now())
		if in.Note == "" {
			ve, _ := verr.(assess.ValidationErrors)
			verr = append(ve, &assess.ValidationError{Field: "note", Message: "say what was wrong with the recorded disposition"})
		}
		if verr != nil {
			return verr
		}
		cur, err := dispositionWhere(ctx, tx, "d.patient_id = ? AND d.superseded = 0", patientID)
		if err != nil {
			return err
		}
		if cur.Version != version {
			return ErrConflict
		}
		if err := checkReleaseRole(ctx, tx, actorID, in.Kind); err != nil {
			return err
		}
		if err := checkReleaseRole(ctx, tx, actorID, cur.Kind); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE dispositions SET superseded = 1 WHERE id = ?`, cur.ID); err != nil {
			return err
		}
		d, err = s.insertDispositionTx(ctx, tx, actorID, p.ID, cur.Key, cur.Version+1, in)
		if err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "disposition", entityID: d.Key, patientID: p.ID,
			action: ActionCorrect, before: cur, after: d})
	})
	return d, wrapValidation("correct disposition", err)
}

// checkReleaseRole returns ErrForbidden when kind is a release and the
// actor holds neither release role. The system (actorID 0) may.
func checkReleaseRole(ctx context.Context, tx *sql.Tx, actorID int64, kind assess.Disposition) error {
	if actorID == 0 || !IsRelease(kind) {
		return nil
	}
	var n int
	err := tx.QueryRowContext(ctx, `SELECT count(*) FROM user_roles WHERE user_id = ? AND role IN (?, ?)`,
		actorID, string(RoleRehabilitator), string(RoleAdmin)).Scan(&n)
	if err != nil {
		return err
	}
	if n == 0 {
		return ErrForbidden
	}
	return nil
}

// insertDispositionTx writes one version (key 0: a new disposition whose key
// is its own id) and mirrors it on the patient row.
func (s *Store) insertDispositionTx(ctx context.Context, tx *sql.Tx, actorID, patientID, key int64, version int, in DispositionInput) (Disposition, error) {
	if in.PerformedBy == "" && actorID != 0 {
		if err := tx.QueryRowContext(ctx, `SELECT display_name FROM users WHERE id = ?`, actorID).Scan(&in.PerformedBy); err != nil {
			return Disposition{}, err
		}
	}
	var rep any
	if in.ReportVersionID != nil {
		rep = *in.ReportVersionID
	}
	now := fmtTime(s.now())
	res, err := tx.ExecContext(ctx, `INSERT INTO dispositions (disposition_key, patient_id, version, kind, disposed_on, place,
		lat, lon, receiver, reason, report_version_id, no_report_reason, performed_by, note, created_by, created_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		key, patientID, version, string(in.Kind), in.Date, in.Place, nullFloat(in.Lat), nullFloat(in.Lon), in.Receiver,
		in.Reason, rep, in.NoReportReason, in.PerformedBy, in.Note, nullID(actorID), now)
	if err != nil {
		return Disposition{}, err
	}
	id, _ := res.LastInsertId()
	if key == 0 {
		if _, err := tx.ExecContext(ctx, `UPDATE dispositions SET disposition_key = ? WHERE id = ?`, id, id); err != nil {
			return Disposition{}, err
		}
	}
	if _, err := tx.ExecContext(ctx, `UPDATE patients SET status = ?, status_date = ?, updated_at = ? WHERE id = ?`,
		string(in.Kind), in.Date, now, patientID); err != nil {
		return Disposition{}, err
	}
	return dispositionWhere(ctx, tx, "d.id = ?", id)
}

const dispositionCols = `d.id, d.disposition_key, d.patient_id, d.version, d.kind, d.disposed_on, d.place, d.lat, d.lon,
	d.receiver, d.reason, d.report_version_id, d.no_report_reason, d.performed_by, d.note, COALESCE(d.created_by, 0),
	COALESCE(u.display_name, 'system'), d.created_at, d.superseded`

const dispositionFrom = ` FROM dispositions d LEFT JOIN users u ON u.id = d.created_by `

func scanDisposition(r rowScanner) (Disposition, error) {
	var d Disposition
	var kind, created string
	var lat, lon sql.NullFloat64
	var rep sql.NullInt64
	err := r.Scan(&d.ID, &d.Key, &d.PatientID, &d.Version, &kind, &d.Date, &d.Place, &lat, &lon, &d.Receiver,
		&d.Reason, &rep, &d.NoReportReason, &d.PerformedBy, &d.Note, &d.RecordedBy, &d.RecordedByName, &created, &d.Superseded)
	if err != nil {
		return Disposition{}, err
	}
	d.Kind, d.CreatedAt = assess.Disposition(kind), parseTime(created)
	d.Lat, d.Lon = floatPtr(lat), floatPtr(lon)
	if rep.Valid {
		v := rep.Int64
		d.ReportVersionID = &v
	}
	return d, nil
}

func dispositionWhere(ctx context.Context, q queryer, where string, args ...any) (Disposition, error) {
	d, err := scanDisposition(q.QueryRowContext(ctx, `SELECT `+dispositionCols+dispositionFrom+` WHERE `+where, args...))
	if errors.Is(err, sql.ErrNoRows) {
		return Disposition{}, ErrNotFound
	}
	return d, err
}

// Disposition returns the current disposition of patient patientID, or
// ErrNotFound while the patient is in care.
func (s *Store) Disposition(ctx context.Context, patientID int64) (Disposition, error) {
	d, err := dispositionWhere(ctx, s.db, "d.patient_id = ? AND d.superseded = 0", patientID)
	return d, wrapValidation("disposition", err)
}

// DispositionVersions lists every version of patient patientID's
// disposition, oldest first (none while in care).
func (s *Store) DispositionVersions(ctx context.Context, patientID int64) ([]Disposition, error) {
	return s.queryDispositions(ctx, `SELECT `+dispositionCols+dispositionFrom+` WHERE d.patient_id = ? ORDER BY d.version`, patientID)
}

func (s *Store) queryDispositions(ctx context.Context, q string, args ...any) ([]Disposition, error) {
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("records: dispositions: %w", err)
	}
	defer rows.Close()
	var out []Disposition
	for rows.Next() {
		d, err := scanDisposition(rows)
		if err != nil {
			return nil, fmt.Errorf("records: dispositions: %w", err)
		}
		out = append(out, d)
	}
	return out, rows.Err()
}

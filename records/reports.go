package records

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"aloft/assess"
)

// Page sizes a report may be printed on.
const (
	PageA4     = "A4"
	PageLetter = "Letter"
)

// PageSizes lists the page sizes, the default first.
var PageSizes = []string{PageA4, PageLetter}

// SignOffRoles are the roles that sign off a pre-release report: the
// veterinarian and the licensed rehabilitator. Staff cannot sign.
var SignOffRoles = []Role{RoleVet, RoleRehabilitator}

// MaxSignOffComment is the longest sign-off comment, in characters.
const MaxSignOffComment = 2000

// ErrReportCorrupt is returned when a stored report's bytes no longer match
// the SHA-256 stored with them: nobody may sign such a version.
var ErrReportCorrupt = errors.New("records: stored report does not match its SHA-256")

// ReportSite is the release site a report version was assessed at.
type ReportSite struct {
	Label      string   `json:"label"`       // in words, e.g. "Wrenfield Bird Hospital (centre)"
	ElevationM float64  `json:"elevation_m"` // m above sea level
	TempC      *float64 `json:"temp_c"`      // measured air temperature, °C; nil = standard atmosphere
}

// Site returns the site as the engine takes it.
func (r ReportSite) Site() assess.Site { return assess.Site{ElevationM: r.ElevationM, TempC: r.TempC} }

// ReportVersion is one frozen pre-release report of a patient: its bytes
// (read with ReportPDF) and their SHA-256 never change once stored.
type ReportVersion struct {
	ID            int64      `json:"id"`
	PatientID     int64      `json:"patient_id"`
	Version       int        `json:"version"` // 1, 2, … per patient
	CreatedAt     time.Time  `json:"created_at"`
	CreatedBy     int64      `json:"created_by"`
	CreatedByName string     `json:"created_by_name"`
	SHA256        string     `json:"sha256"` // lower-case hex
	SizeBytes     int        `json:"size_bytes"`
	Site          ReportSite `json:"site"`
	PageSize      string     `json:"page_size"` // PageA4 or PageLetter
	SignOffs      []SignOff  `json:"signoffs"`  // oldest first
}

// Signed reports whether someone holding role has signed the version.
func (v ReportVersion) Signed(role Role) bool {
	return slices.ContainsFunc(v.SignOffs, func(s SignOff) bool { return s.Role == role })
}

// SignOff is one person's sign-off of a report version, on its hash.
type SignOff struct {
	ID              int64     `json:"id"`
	ReportVersionID int64     `json:"report_version_id"`
	UserID          int64     `json:"user_id"`
	UserName        string    `json:"user_name"` // display name
	Role            Role      `json:"role"`      // RoleVet or RoleRehabilitator
	At              time.Time `json:"at"`
	Comment         string    `json:"comment"`
	SHA256          string    `json:"sha256"` // the hash signed
}

// NewReport describes a report version about to be frozen.
type NewReport struct {
	PatientID int64
	Site      ReportSite
	PageSize  string // PageA4 or PageLetter; "" = PageA4
}

// ReportStamp is what a report learns about its own version before it is
// rendered: its number and the instant it is frozen.
type ReportStamp struct {
	Version   int
	CreatedAt time.Time
}

// FreezeReport stores a new report version of patient n.PatientID: it
// numbers the version, calls render with that number and the time, and
// stores the bytes render returns with their SHA-256 and an audit row, all
// in one transaction (render runs while the transaction holds the write
// lock, so two people generating at once get consecutive numbers, and no
// record changes between the reads render makes; render may read the store
// but must not write to it). An error from render stores nothing.
func (s *Store) FreezeReport(ctx context.Context, actorID int64, n NewReport, render func(ReportStamp) ([]byte, error)) (ReportVersion, error) {
	if n.PageSize == "" {
		n.PageSize = PageA4
	}
	if !slices.Contains(PageSizes, n.PageSize) {
		return ReportVersion{}, assess.ValidationErrors{{Field: "page_size", Value: n.PageSize, Message: "choose A4 or Letter"}}
	}
	site, err := json.Marshal(n.Site)
	if err != nil {
		return ReportVersion{}, fmt.Errorf("records: freeze report: %w", err)
	}
	var id int64
	err = s.inTx(ctx, func(tx *sql.Tx) error {
		if _, err := getPatient(ctx, tx, "id = ?", n.PatientID); err != nil {
			return err
		}
		var last int
		if err := tx.QueryRowContext(ctx, `SELECT COALESCE(MAX(version), 0) FROM report_versions WHERE patient_id = ?`,
			n.PatientID).Scan(&last); err != nil {
			return err
		}
		stamp := ReportStamp{Version: last + 1, CreatedAt: s.now().UTC().Truncate(time.Second)}
		pdf, err := render(stamp)
		if err != nil {
			return err
		}
		if len(pdf) == 0 {
			return errors.New("the report is empty")
		}
		sum := sha256.Sum256(pdf)
		res, err := tx.ExecContext(ctx, `INSERT INTO report_versions (patient_id, version, created_at, created_by, sha256, pdf, site_json, page_size)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?)`, n.PatientID, stamp.Version, fmtTime(stamp.CreatedAt), nullID(actorID),
			hex.EncodeToString(sum[:]), pdf, string(site), n.PageSize)
		if err != nil {
			return err
		}
		id, _ = res.LastInsertId()
		v, err := reportVersionWhere(ctx, tx, "r.id = ?", id)
		if err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "report_version", entityID: id,
			patientID: n.PatientID, action: ActionCreate, after: v})
	})
	if err != nil {
		return ReportVersion{}, wrapValidation("freeze report", err)
	}
	return s.ReportVersionByID(ctx, id)
}

const reportCols = `r.id, r.patient_id, r.version, r.created_at, COALESCE(r.created_by, 0), COALESCE(u.display_name, ''),
	r.sha256, length(r.pdf), r.site_json, r.page_size`

// reportVersionWhere reads one version (without its sign-offs).
func reportVersionWhere(ctx context.Context, q queryer, where string, args ...any) (ReportVersion, error) {
	rows, err := q.QueryContext(ctx, `SELECT `+reportCols+` FROM report_versions r LEFT JOIN users u ON u.id = r.created_by
		WHERE `+where, args...)
	if err != nil {
		return ReportVersion{}, err
	}
	vs, err := scanReportVersions(rows)
	if err != nil {
		return ReportVersion{}, err
	}
	if len(vs) == 0 {
		return ReportVersion{}, ErrNotFound
	}
	return vs[0], nil
}

func scanReportVersions(rows *sql.Rows) ([]ReportVersion, error) {
	defer rows.Close()
	var out []ReportVersion
	for rows.Next() {
		var v ReportVersion
		var created, site string
		if err := rows.Scan(&v.ID, &v.PatientID, &v.Version, &created, &v.CreatedBy, &v.CreatedByName,
			&v.SHA256, &v.SizeBytes, &site, &v.PageSize); err != nil {
			return nil, err
		}
		v.CreatedAt = parseTime(created)
		if err := json.Unmarshal([]byte(site), &v.Site); err != nil {
			return nil, fmt.Errorf("report version %d: site: %w", v.ID, err)
		}
		v.SignOffs = []SignOff{}
		out = append(out, v)
	}
	return out, rows.Err()
}

// ReportVersionByID returns one report version with its sign-offs, or
// ErrNotFound.
func (s *Store) ReportVersionByID(ctx context.Context, id int64) (ReportVersion, error) {
	return s.reportVersion(ctx, "r.id = ?", id)
}

// ReportVersion returns version number version of a patient's reports with
// its sign-offs, or ErrNotFound.
func (s *Store) ReportVersion(ctx context.Context, patientID int64, version int) (ReportVersion, error) {
	return s.reportVersion(ctx, "r.patient_id = ? AND r.version = ?", patientID, version)
}

func (s *Store) reportVersion(ctx context.Context, where string, args ...any) (ReportVersion, error) {
	v, err := reportVersionWhere(ctx, s.db, where, args...)
	if err != nil {
		return ReportVersion{}, wrapValidation("report version", err)
	}
	if v.SignOffs, err = s.signOffs(ctx, "s.report_version_id = ?", v.ID); err != nil {
		return ReportVersion{}, err
	}
	return v, nil
}

// ReportVersions lists a patient's report versions, oldest first, each with
// its sign-offs.
func (s *Store) ReportVersions(ctx context.Context, patientID int64) ([]ReportVersion, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT `+reportCols+` FROM report_versions r LEFT JOIN users u ON u.id = r.created_by
		WHERE r.patient_id = ? ORDER BY r.version`, patientID)
	if err != nil {
		return nil, fmt.Errorf("records: report versions: %w", err)
	}
	vs, err := scanReportVersions(rows)
	if err != nil {
		return nil, fmt.Errorf("records: report versions: %w", err)
	}
	sos, err := s.signOffs(ctx, "r.patient_id = ?", patientID)
	if err != nil {
		return nil, err
	}
	for _, so := range sos {
		if i := slices.IndexFunc(vs, func(v ReportVersion) bool { return v.ID == so.ReportVersionID }); i >= 0 {
			vs[i].SignOffs = append(vs[i].SignOffs, so)
		}
	}
	return vs, nil
}

// signOffs lists sign-offs, oldest first.
func (s *Store) signOffs(ctx context.Context, where string, args ...any) ([]SignOff, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT s.id, s.report_version_id, s.user_id, COALESCE(u.display_name, ''), s.role, s.at,
		s.comment, s.sha256 FROM signoffs s JOIN report_versions r ON r.id = s.report_version_id
		LEFT JOIN users u ON u.id = s.user_id WHERE `+where+` ORDER BY s.id`, args...)
	if err != nil {
		return nil, fmt.Errorf("records: sign-offs: %w", err)
	}
	defer rows.Close()
	out := []SignOff{}
	for rows.Next() {
		var so SignOff
		var role, at string
		if err := rows.Scan(&so.ID, &so.ReportVersionID, &so.UserID, &so.UserName, &role, &at, &so.Comment, &so.SHA256); err != nil {
			return nil, fmt.Errorf("records: sign-offs: %w", err)
		}
		so.Role, so.At = Role(role), parseTime(at)
		out = append(out, so)
	}
	return out, rows.Err()
}

// ReportPDF returns the stored bytes of report version id, exactly as
// frozen, or ErrNotFound.
func (s *Store) ReportPDF(ctx context.Context, id int64) ([]byte, error) {
	var b []byte
	err := s.db.QueryRowContext(ctx, `SELECT pdf FROM report_versions WHERE id = ?`, id).Scan(&b)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, ErrNotFound
	}
	if err != nil {
		return nil, fmt.Errorf("records: report %d: %w", id, err)
	}
	return b, nil
}

// SignReport records actor's sign-off, in role, of report version
// versionID, on the version's SHA-256. The actor is read afresh from the
// database: a disabled account, or one that does not hold role, or a role
// other than RoleVet or RoleRehabilitator, gets ErrForbidden (staff cannot
// sign). password is checked again with Authenticate (ErrBadLogin when
// wrong). A second sign-off by the same person in the same role gives
// ErrConflict; a comment over MaxSignOffComment characters gives
// assess.ValidationErrors; a version whose stored bytes no longer match its
// hash gives ErrReportCorrupt.
func (s *Store) SignReport(ctx context.Context, actor User, versionID int64, role Role, password, comment string) (SignOff, error) {
	u, err := s.User(ctx, actor.ID)
	if err != nil && !errors.Is(err, ErrNotFound) {
		return SignOff{}, err
	}
	if err != nil || u.Disabled || !slices.Contains(SignOffRoles, role) || !u.Has(role) {
		return SignOff{}, ErrForbidden
	}
	if _, err := s.Authenticate(ctx, u.Username, password); err != nil {
		return SignOff{}, err
	}
	comment = strings.TrimSpace(comment)
	if utf8.RuneCountInString(comment) > MaxSignOffComment {
		return SignOff{}, assess.ValidationErrors{{Field: "comment", Value: string([]rune(comment)[:40]) + "…",
			Message: fmt.Sprintf("keep the comment under %d characters", MaxSignOffComment)}}
	}
	var id int64
	err = s.inTx(ctx, func(tx *sql.Tx) error {
		var sum string
		var pdf []byte
		var patientID int64
		err := tx.QueryRowContext(ctx, `SELECT sha256, pdf, patient_id FROM report_versions WHERE id = ?`, versionID).Scan(&sum, &pdf, &patientID)
		if errors.Is(err, sql.ErrNoRows) {
			return ErrNotFound
		}
		if err != nil {
			return err
		}
		if got := sha256.Sum256(pdf); hex.EncodeToString(got[:]) != sum {
			return ErrReportCorrupt
		}
		var n int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM signoffs WHERE report_version_id = ? AND user_id = ? AND role = ?`,
			versionID, u.ID, string(role)).Scan(&n); err != nil {
			return err
		}
		if n > 0 {
			return ErrConflict
		}
		so := SignOff{ReportVersionID: versionID, UserID: u.ID, UserName: u.DisplayName, Role: role,
			At: s.now().UTC().Truncate(time.Second), Comment: comment, SHA256: sum}
		res, err := tx.ExecContext(ctx, `INSERT INTO signoffs (report_version_id, user_id, role, at, comment, sha256)
			VALUES (?, ?, ?, ?, ?, ?)`, versionID, u.ID, string(role), fmtTime(so.At), so.Comment, so.SHA256)
		if err != nil {
			return err
		}
		id, _ = res.LastInsertId()
		so.ID = id
		return s.writeAudit(ctx, tx, auditRow{userID: u.ID, entity: "signoff", entityID: id, patientID: patientID,
			action: ActionCreate, after: so})
	})
	if err != nil {
		if errors.Is(err, ErrReportCorrupt) {
			return SignOff{}, err
		}
		return SignOff{}, wrapValidation("sign report", err)
	}
	sos, err := s.signOffs(ctx, "s.id = ?", id)
	if err != nil || len(sos) == 0 {
		return SignOff{}, fmt.Errorf("records: sign report: read back: %w", err)
	}
	return sos[0], nil
}

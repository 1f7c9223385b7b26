package records

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"time"
)

// Audit actions.
const (
	ActionCreate  = "create"
	ActionUpdate  = "update"
	ActionCorrect = "correct"
	ActionRemove  = "remove"
	ActionRedact  = "redact"
	ActionLogin   = "login"
)

// AuditEntry is one row of the append-only audit trail.
type AuditEntry struct {
	ID        int64
	At        time.Time
	UserID    int64 // 0 for the system (migrations, demo seeding, first set-up)
	Username  string
	Entity    string // table-like noun: "patient", "weigh_in", "user", …
	EntityID  int64
	PatientID int64 // 0 when the change is not about one patient
	Action    string
	Before    string // JSON of the row before, "" on create
	After     string // JSON of the row after, "" on remove without a new state
}

// auditRow describes one change for writeAudit.
type auditRow struct {
	userID    int64
	entity    string
	entityID  int64
	patientID int64
	action    string
	before    any
	after     any
}

// writeAudit appends one audit row inside tx: the change and its audit row
// commit or roll back together.
func (s *Store) writeAudit(ctx context.Context, tx *sql.Tx, a auditRow) error {
	enc := func(v any) (any, error) {
		if v == nil {
			return nil, nil
		}
		b, err := json.Marshal(v)
		if err != nil {
			return nil, err
		}
		return string(b), nil
	}
	before, err := enc(a.before)
	if err != nil {
		return fmt.Errorf("records: audit: %w", err)
	}
	after, err := enc(a.after)
	if err != nil {
		return fmt.Errorf("records: audit: %w", err)
	}
	var uid, pid any
	if a.userID != 0 {
		uid = a.userID
	}
	if a.patientID != 0 {
		pid = a.patientID
	}
	_, err = tx.ExecContext(ctx, `INSERT INTO audit_log (at, user_id, entity, entity_id, patient_id, action, before_json, after_json)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?)`, fmtTime(s.now()), uid, a.entity, a.entityID, pid, a.action, before, after)
	if err != nil {
		return fmt.Errorf("records: audit %s %d: %w", a.entity, a.entityID, err)
	}
	return nil
}

// AuditFilter selects audit rows; zero fields match everything.
type AuditFilter struct {
	PatientID int64
	Entity    string
	EntityID  int64
	Limit     int // 0: 500
}

// Audit lists audit rows, newest first.
func (s *Store) Audit(ctx context.Context, f AuditFilter) ([]AuditEntry, error) {
	q := `SELECT a.id, a.at, COALESCE(a.user_id, 0), COALESCE(u.username, 'system'), a.entity, a.entity_id,
		COALESCE(a.patient_id, 0), a.action, COALESCE(a.before_json, ''), COALESCE(a.after_json, '')
		FROM audit_log a LEFT JOIN users u ON u.id = a.user_id WHERE 1=1`
	var args []any
	if f.PatientID != 0 {
		q += ` AND a.patient_id = ?`
		args = append(args, f.PatientID)
	}
	if f.Entity != "" {
		q += ` AND a.entity = ?`
		args = append(args, f.Entity)
	}
	if f.EntityID != 0 {
		q += ` AND a.entity_id = ?`
		args = append(args, f.EntityID)
	}
	if f.Limit <= 0 {
		f.Limit = 500
	}
	q += ` ORDER BY a.id DESC LIMIT ?`
	args = append(args, f.Limit)
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("records: audit: %w", err)
	}
	defer rows.Close()
	var out []AuditEntry
	for rows.Next() {
		var e AuditEntry
		var at string
		if err := rows.Scan(&e.ID, &at, &e.UserID, &e.Username, &e.Entity, &e.EntityID, &e.PatientID, &e.Action, &e.Before, &e.After); err != nil {
			return nil, fmt.Errorf("records: audit: %w", err)
		}
		e.At = parseTime(at)
		out = append(out, e)
	}
	return out, rows.Err()
}

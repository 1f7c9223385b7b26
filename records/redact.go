package records

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
)

// redactedMark replaces scrubbed personal data.
const redactedMark = "[redacted]"

// finderFields are the patient fields holding a finder's personal data.
var finderFields = []string{"finder_name", "finder_contact"}

// RedactFinder erases a finder's personal data (where the law gives a right
// to erasure): the finder fields of patient id are scrubbed in the record and
// in every audit row about it, and one audit row records that a redaction
// happened, by whom and when, without the data. Only admins may redact.
func (s *Store) RedactFinder(ctx context.Context, actor User, patientID int64) error {
	if !actor.Has(RoleAdmin) {
		return ErrForbidden
	}
	return wrapValidation("redact finder", s.inTx(ctx, func(tx *sql.Tx) error {
		if _, err := getPatient(ctx, tx, "id = ?", patientID); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE patients SET finder_name = CASE WHEN finder_name = '' THEN '' ELSE ? END,
			finder_contact = CASE WHEN finder_contact = '' THEN '' ELSE ? END, version = version + 1, updated_at = ? WHERE id = ?`,
			redactedMark, redactedMark, fmtTime(s.now()), patientID); err != nil {
			return err
		}
		if err := s.scrubAudit(ctx, tx, patientID); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actor.ID, entity: "patient", entityID: patientID, patientID: patientID,
			action: ActionRedact, after: map[string]any{"redacted_fields": finderFields}})
	}))
}

// scrubAudit rewrites the finder fields in the before/after JSON of the
// patient's audit rows. The append-only trigger lets updates through only
// while the redaction guard is raised, inside this transaction.
func (s *Store) scrubAudit(ctx context.Context, tx *sql.Tx, patientID int64) error {
	rows, err := tx.QueryContext(ctx, `SELECT id, COALESCE(before_json, ''), COALESCE(after_json, '') FROM audit_log
		WHERE entity = 'patient' AND entity_id = ?`, patientID)
	if err != nil {
		return err
	}
	type change struct {
		id            int64
		before, after string
	}
	var changes []change
	for rows.Next() {
		var c change
		if err := rows.Scan(&c.id, &c.before, &c.after); err != nil {
			rows.Close()
			return err
		}
		b, bch := scrubJSON(c.before)
		a, ach := scrubJSON(c.after)
		if bch || ach {
			changes = append(changes, change{c.id, b, a})
		}
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return err
	}
	if len(changes) == 0 {
		return nil
	}
	if _, err := tx.ExecContext(ctx, `UPDATE redaction_guard SET active = 1`); err != nil {
		return err
	}
	for _, c := range changes {
		if _, err := tx.ExecContext(ctx, `UPDATE audit_log SET before_json = NULLIF(?, ''), after_json = NULLIF(?, '') WHERE id = ?`,
			c.before, c.after, c.id); err != nil {
			return fmt.Errorf("scrub audit %d: %w", c.id, err)
		}
	}
	_, err = tx.ExecContext(ctx, `UPDATE redaction_guard SET active = 0`)
	return err
}

// scrubJSON replaces non-empty finder fields in a JSON object.
func scrubJSON(s string) (string, bool) {
	if s == "" {
		return s, false
	}
	var m map[string]any
	if json.Unmarshal([]byte(s), &m) != nil {
		return s, false
	}
	changed := false
	for _, f := range finderFields {
		if v, ok := m[f].(string); ok && v != "" && v != redactedMark {
			m[f] = redactedMark
			changed = true
		}
	}
	if !changed {
		return s, false
	}
	b, _ := json.Marshal(m)
	return string(b), true
}

package records

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"

	"aloft/assess"
)

// Kind names a kind of patient record. Each feature defines its kinds.
type Kind string

// Entry is one version of one patient record. Data is the JSON of the
// record's type (an assess input type for conditioning records).
type Entry struct {
	ID            int64           `json:"id"`  // this version's row id
	Key           int64           `json:"key"` // the record's id, the same for every version
	PatientID     int64           `json:"patient_id"`
	Kind          Kind            `json:"kind"`
	Version       int             `json:"version"`
	At            time.Time       `json:"at"`
	Data          json.RawMessage `json:"data"`
	By            int64           `json:"by"`
	ByName        string          `json:"by_name"`
	CreatedAt     time.Time       `json:"created_at"`
	Superseded    bool            `json:"superseded"`
	RemovedAt     *time.Time      `json:"removed_at,omitempty"`
	RemovedBy     string          `json:"removed_by,omitempty"`
	RemovedReason string          `json:"removed_reason,omitempty"`
}

// Current reports whether the entry is the live version: not superseded by
// a correction and not removed.
func (e Entry) Current() bool { return !e.Superseded && e.RemovedAt == nil }

// Decode unmarshals the entry's data into v.
func (e Entry) Decode(v any) error {
	if err := json.Unmarshal(e.Data, v); err != nil {
		return fmt.Errorf("records: entry %d (%s): %w", e.ID, e.Kind, err)
	}
	return nil
}

// NewEntry is the input of AddEntry.
type NewEntry struct {
	PatientID int64
	Kind      Kind
	At        time.Time
	Data      any // marshalled to JSON
	// IdempotencyKey, when set, makes a repeated submission return the entry
	// already stored instead of a second one (cage-side drafts).
	IdempotencyKey string
}

// ErrDuplicate is returned (with the existing entry) when an idempotency key
// was already used.
var ErrDuplicate = errors.New("records: already saved")

// AddEntry stores a new record with its audit row. Callers validate Data
// first. With an idempotency key already used it returns the stored entry
// and ErrDuplicate.
func (s *Store) AddEntry(ctx context.Context, actorID int64, n NewEntry) (Entry, error) {
	var e Entry
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		var err error
		e, err = s.addEntryTx(ctx, tx, actorID, n)
		return err
	})
	return e, wrapEntry("add "+string(n.Kind), err)
}

func wrapEntry(op string, err error) error {
	if errors.Is(err, ErrDuplicate) {
		return err
	}
	return wrapValidation(op, err)
}

func (s *Store) addEntryTx(ctx context.Context, tx *sql.Tx, actorID int64, n NewEntry) (Entry, error) {
	if n.IdempotencyKey != "" {
		existing, err := entryWhere(ctx, tx, "e.idempotency_key = ?", n.IdempotencyKey)
		if err == nil {
			return existing, ErrDuplicate
		}
		if !errors.Is(err, ErrNotFound) {
			return Entry{}, err
		}
	}
	if _, err := getPatient(ctx, tx, "id = ?", n.PatientID); err != nil {
		return Entry{}, err
	}
	data, err := json.Marshal(n.Data)
	if err != nil {
		return Entry{}, err
	}
	var idem any
	if n.IdempotencyKey != "" {
		idem = n.IdempotencyKey
	}
	res, err := tx.ExecContext(ctx, `INSERT INTO entries (entry_key, patient_id, kind, version, at, data_json, created_by, created_at, idempotency_key)
		VALUES (0, ?, ?, 1, ?, ?, ?, ?, ?)`, n.PatientID, string(n.Kind), fmtTime(n.At), string(data), nullID(actorID), fmtTime(s.now()), idem)
	if err != nil {
		return Entry{}, err
	}
	id, _ := res.LastInsertId()
	if _, err := tx.ExecContext(ctx, `UPDATE entries SET entry_key = ? WHERE id = ?`, id, id); err != nil {
		return Entry{}, err
	}
	e, err := entryWhere(ctx, tx, "e.id = ?", id)
	if err != nil {
		return Entry{}, err
	}
	return e, s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: string(n.Kind), entityID: id, patientID: n.PatientID,
		action: ActionCreate, after: auditView(e)})
}

func nullID(id int64) any {
	if id == 0 {
		return nil
	}
	return id
}

// auditView is what the audit row keeps of an entry.
func auditView(e Entry) map[string]any {
	return map[string]any{"key": e.Key, "version": e.Version, "at": e.At, "data": e.Data}
}

// CorrectEntry replaces the current version of record key with a new
// version. version must be the current version (else ErrConflict). The old
// version is kept, marked superseded.
func (s *Store) CorrectEntry(ctx context.Context, actorID, key int64, version int, at time.Time, data any) (Entry, error) {
	var e Entry
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		cur, err := entryWhere(ctx, tx, "e.entry_key = ? AND e.superseded = 0", key)
		if err != nil {
			return err
		}
		if cur.Version != version || cur.RemovedAt != nil {
			return ErrConflict
		}
		b, err := json.Marshal(data)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE entries SET superseded = 1 WHERE id = ?`, cur.ID); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, `INSERT INTO entries (entry_key, patient_id, kind, version, at, data_json, created_by, created_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?)`, key, cur.PatientID, string(cur.Kind), cur.Version+1, fmtTime(at), string(b), nullID(actorID), fmtTime(s.now()))
		if err != nil {
			return err
		}
		id, _ := res.LastInsertId()
		e, err = entryWhere(ctx, tx, "e.id = ?", id)
		if err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: string(cur.Kind), entityID: key, patientID: cur.PatientID,
			action: ActionCorrect, before: auditView(cur), after: auditView(e)})
	})
	return e, wrapEntry("correct entry", err)
}

// RemoveEntry soft-deletes record key with a reason; it stays in the history.
func (s *Store) RemoveEntry(ctx context.Context, actorID, key int64, reason string) error {
	if strings.TrimSpace(reason) == "" {
		return assess.ValidationErrors{{Field: "reason", Message: "say why this record is removed"}}
	}
	return wrapEntry("remove entry", s.inTx(ctx, func(tx *sql.Tx) error {
		cur, err := entryWhere(ctx, tx, "e.entry_key = ? AND e.superseded = 0", key)
		if err != nil {
			return err
		}
		if cur.RemovedAt != nil {
			return ErrConflict
		}
		if _, err := tx.ExecContext(ctx, `UPDATE entries SET removed_at = ?, removed_by = ?, removed_reason = ? WHERE id = ?`,
			fmtTime(s.now()), nullID(actorID), reason, cur.ID); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: string(cur.Kind), entityID: key, patientID: cur.PatientID,
			action: ActionRemove, before: auditView(cur), after: map[string]string{"removed_reason": reason}})
	}))
}

const entryCols = `e.id, e.entry_key, e.patient_id, e.kind, e.version, e.at, e.data_json, COALESCE(e.created_by, 0),
	COALESCE(u.display_name, 'system'), e.created_at, e.superseded, e.removed_at, COALESCE(r.display_name, ''), COALESCE(e.removed_reason, '')`

const entryFrom = ` FROM entries e LEFT JOIN users u ON u.id = e.created_by LEFT JOIN users r ON r.id = e.removed_by `

func scanEntry(r rowScanner) (Entry, error) {
	var e Entry
	var kind, at, created, data string
	var removed sql.NullString
	if err := r.Scan(&e.ID, &e.Key, &e.PatientID, &kind, &e.Version, &at, &data, &e.By, &e.ByName, &created,
		&e.Superseded, &removed, &e.RemovedBy, &e.RemovedReason); err != nil {
		return Entry{}, err
	}
	e.Kind, e.At, e.CreatedAt, e.Data = Kind(kind), parseTime(at), parseTime(created), json.RawMessage(data)
	if removed.Valid {
		t := parseTime(removed.String)
		e.RemovedAt = &t
	}
	return e, nil
}

func entryWhere(ctx context.Context, q queryer, where string, args ...any) (Entry, error) {
	e, err := scanEntry(q.QueryRowContext(ctx, `SELECT `+entryCols+entryFrom+` WHERE `+where, args...))
	if errors.Is(err, sql.ErrNoRows) {
		return Entry{}, ErrNotFound
	}
	return e, err
}

// Entry returns the current version of record key (removed or not).
func (s *Store) Entry(ctx context.Context, key int64) (Entry, error) {
	e, err := entryWhere(ctx, s.db, "e.entry_key = ? AND e.superseded = 0", key)
	return e, wrapValidation("entry", err)
}

// EntryFilter selects a patient's entries.
type EntryFilter struct {
	Kinds []Kind // nil: every kind
	// AllVersions includes superseded versions and removed records (the
	// history); otherwise only current records.
	AllVersions bool
	Newest      bool // newest first (by At, then id); default oldest first
	Limit       int  // 0: no limit
}

// Entries lists a patient's records.
func (s *Store) Entries(ctx context.Context, patientID int64, f EntryFilter) ([]Entry, error) {
	q := `SELECT ` + entryCols + entryFrom + ` WHERE e.patient_id = ?`
	args := []any{patientID}
	if len(f.Kinds) > 0 {
		q += ` AND e.kind IN (?` + strings.Repeat(",?", len(f.Kinds)-1) + `)`
		for _, k := range f.Kinds {
			args = append(args, string(k))
		}
	}
	if !f.AllVersions {
		q += ` AND e.superseded = 0 AND e.removed_at IS NULL`
	}
	if f.Newest {
		q += ` ORDER BY e.at DESC, e.id DESC`
	} else {
		q += ` ORDER BY e.at, e.id`
	}
	if f.Limit > 0 {
		q += fmt.Sprintf(` LIMIT %d`, f.Limit)
	}
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("records: entries: %w", err)
	}
	defer rows.Close()
	var out []Entry
	for rows.Next() {
		e, err := scanEntry(rows)
		if err != nil {
			return nil, fmt.Errorf("records: entries: %w", err)
		}
		out = append(out, e)
	}
	return out, rows.Err()
}

// EntryVersions lists every version of record key, oldest first.
func (s *Store) EntryVersions(ctx context.Context, key int64) ([]Entry, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT `+entryCols+entryFrom+` WHERE e.entry_key = ? ORDER BY e.version`, key)
	if err != nil {
		return nil, fmt.Errorf("records: entry versions: %w", err)
	}
	defer rows.Close()
	var out []Entry
	for rows.Next() {
		e, err := scanEntry(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, e)
	}
	return out, rows.Err()
}

// DecodeAll decodes the data of each entry into a T.
func DecodeAll[T any](es []Entry) ([]T, error) {
	out := make([]T, 0, len(es))
	for _, e := range es {
		var v T
		if err := e.Decode(&v); err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, nil
}

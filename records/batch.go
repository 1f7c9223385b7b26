package records

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"time"

	"aloft/assess"
)

// Batch is a run of writes in one immediate transaction: many admissions,
// records, clearances and dispositions, each with its audit row, committed
// together or not at all. It is for bulk loads (the demo's scale seeding,
// imports), where one transaction per write would spend most of its time
// committing. A Batch is not safe for concurrent use and is valid only
// inside the function given to Store.Batch.
//
// Each method checks what its Store counterpart checks, in the same words:
// a write that Store.AdmitPatient, AddEntry, SetClearanceAt or Dispose
// would refuse, the Batch refuses too, and the rows it writes are the same.
type Batch struct {
	s   *Store
	ctx context.Context
	tx  *sql.Tx

	insEntry, insAudit *sql.Stmt
	nextEntryID        int64
	users              map[int64]User   // every account, read before the transaction
	patients           map[int64]bool   // patient ids known to exist
	now                func() time.Time // the store's clock
}

// Batch runs fn in one immediate transaction and commits when fn returns
// nil; any error rolls every write of the batch back. Keep a batch to a
// few thousand writes: the transaction holds the database's write lock, so
// other writers wait (up to the busy timeout) while it runs.
func (s *Store) Batch(ctx context.Context, fn func(b *Batch) error) error {
	users, err := s.Users(ctx)
	if err != nil {
		return fmt.Errorf("records: batch: %w", err)
	}
	b := &Batch{s: s, ctx: ctx, users: map[int64]User{}, patients: map[int64]bool{}, now: s.now}
	for _, u := range users {
		b.users[u.ID] = u
	}
	err = s.inTx(ctx, func(tx *sql.Tx) error {
		b.tx = tx
		if err := b.prepare(); err != nil {
			return err
		}
		defer b.close()
		return fn(b)
	})
	return wrapEntry("batch", err)
}

// prepare readies the statements written once per record, and the next
// entry id: inside the immediate transaction nobody else can insert, so
// ids are handed out here and each entry's key is set in the same insert.
func (b *Batch) prepare() error {
	var err error
	b.insEntry, err = b.tx.PrepareContext(b.ctx, `INSERT INTO entries (id, entry_key, patient_id, kind, version, at,
		data_json, created_by, created_at, idempotency_key) VALUES (?, ?, ?, ?, 1, ?, ?, ?, ?, ?)`)
	if err != nil {
		return err
	}
	b.insAudit, err = b.tx.PrepareContext(b.ctx, `INSERT INTO audit_log (at, user_id, entity, entity_id, patient_id,
		action, before_json, after_json) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`)
	if err != nil {
		return err
	}
	return b.tx.QueryRowContext(b.ctx, `SELECT COALESCE(MAX(id), 0) + 1 FROM entries`).Scan(&b.nextEntryID)
}

func (b *Batch) close() {
	for _, st := range []*sql.Stmt{b.insEntry, b.insAudit} {
		if st != nil {
			st.Close()
		}
	}
}

// Admit registers a new patient, as Store.AdmitPatient does.
func (b *Batch) Admit(actorID int64, in PatientInput) (Patient, error) {
	now := b.now()
	if err := in.Validate(now); err != nil {
		return Patient{}, err
	}
	if in.AdmittedAt.IsZero() {
		in.AdmittedAt = now
	}
	p, err := b.s.admitTx(b.ctx, b.tx, actorID, in, now)
	if err != nil {
		return Patient{}, wrapValidation("batch admit", err)
	}
	b.patients[p.ID] = true
	return p, nil
}

// AddEntry stores a new record with its audit row, as Store.AddEntry does:
// callers validate Data first; an idempotency key already used returns the
// stored entry and ErrDuplicate; an unknown patient is ErrNotFound.
func (b *Batch) AddEntry(actorID int64, n NewEntry) (Entry, error) {
	if n.IdempotencyKey != "" {
		existing, err := entryWhere(b.ctx, b.tx, "e.idempotency_key = ?", n.IdempotencyKey)
		if err == nil {
			return existing, ErrDuplicate
		}
		if !errors.Is(err, ErrNotFound) {
			return Entry{}, err
		}
	}
	if err := b.knownPatient(n.PatientID); err != nil {
		return Entry{}, err
	}
	data, err := json.Marshal(n.Data)
	if err != nil {
		return Entry{}, fmt.Errorf("records: batch %s: %w", n.Kind, err)
	}
	e := b.entryOf(actorID, n, data)
	var idem any
	if n.IdempotencyKey != "" {
		idem = n.IdempotencyKey
	}
	if _, err := b.insEntry.ExecContext(b.ctx, e.ID, e.Key, e.PatientID, string(e.Kind), fmtTime(e.At), string(data),
		nullID(actorID), fmtTime(e.CreatedAt), idem); err != nil {
		return Entry{}, fmt.Errorf("records: batch %s: %w", n.Kind, err)
	}
	b.nextEntryID++
	after, err := entryAuditJSON(e)
	if err != nil {
		return Entry{}, err
	}
	err = b.auditRaw(auditRow{userID: actorID, entity: string(n.Kind), entityID: e.ID, patientID: n.PatientID,
		action: ActionCreate}, nil, after)
	return e, err
}

// entryAuditJSON is json.Marshal(auditView(e)) for a new entry, written
// out by hand: the map's keys in sorted order, the data as stored (already
// compact). It is the batch's hottest line, and the test compares it with
// the store's own audit row.
func entryAuditJSON(e Entry) (string, error) {
	at, err := e.At.MarshalJSON()
	if err != nil {
		return "", err
	}
	buf := make([]byte, 0, len(e.Data)+64)
	buf = append(buf, `{"at":`...)
	buf = append(buf, at...)
	buf = append(buf, `,"data":`...)
	buf = append(buf, e.Data...)
	buf = append(buf, `,"key":`...)
	buf = strconv.AppendInt(buf, e.Key, 10)
	buf = append(buf, `,"version":`...)
	buf = strconv.AppendInt(buf, int64(e.Version), 10)
	return string(append(buf, '}')), nil
}

// entryOf is the entry AddEntry writes, as entryWhere would read it back:
// times at the second, in UTC.
func (b *Batch) entryOf(actorID int64, n NewEntry, data []byte) Entry {
	id := b.nextEntryID
	e := Entry{ID: id, Key: id, PatientID: n.PatientID, Kind: n.Kind, Version: 1, At: parseTime(fmtTime(n.At)),
		Data: json.RawMessage(data), By: actorID, ByName: "system", CreatedAt: parseTime(fmtTime(b.now()))}
	if u, ok := b.users[actorID]; ok && actorID != 0 {
		e.ByName = u.DisplayName
	}
	return e
}

// knownPatient returns ErrNotFound unless patient id exists.
func (b *Batch) knownPatient(id int64) error {
	if b.patients[id] {
		return nil
	}
	if _, err := getPatient(b.ctx, b.tx, "id = ?", id); err != nil {
		return err
	}
	b.patients[id] = true
	return nil
}

// audit appends one audit row through the prepared statement, encoded as
// writeAudit encodes it.
func (b *Batch) audit(a auditRow) error {
	enc := func(v any) (any, error) {
		if v == nil {
			return nil, nil
		}
		raw, err := json.Marshal(v)
		return string(raw), err
	}
	before, err := enc(a.before)
	if err != nil {
		return fmt.Errorf("records: audit: %w", err)
	}
	after, err := enc(a.after)
	if err != nil {
		return fmt.Errorf("records: audit: %w", err)
	}
	return b.auditRaw(a, before, after)
}

// auditRaw appends one audit row whose before and after are already JSON
// (or nil).
func (b *Batch) auditRaw(a auditRow, before, after any) error {
	if _, err := b.insAudit.ExecContext(b.ctx, fmtTime(b.now()), nullID(a.userID), a.entity, a.entityID,
		nullID(a.patientID), a.action, before, after); err != nil {
		return fmt.Errorf("records: audit %s %d: %w", a.entity, a.entityID, err)
	}
	return nil
}

// SetClearanceAt records the state of one clearance item at an earlier
// instant, as Store.SetClearanceAt does: only an enabled vet or licensed
// rehabilitator may (ErrForbidden otherwise, judged by the account as it
// was when the batch began), a not-cleared state needs a note, and at must
// not be in the future.
func (b *Batch) SetClearanceAt(actor User, patientID int64, at time.Time, item assess.ClearanceItem, state assess.ClearanceState, note string) (assess.Clearance, error) {
	u, ok := b.users[actor.ID]
	if !ok {
		return assess.Clearance{}, ErrForbidden
	}
	c, err := clearanceBy(u, at, b.now(), item, state, note)
	if err != nil {
		return assess.Clearance{}, err
	}
	if _, err := b.AddEntry(u.ID, NewEntry{PatientID: patientID, Kind: KindClearance, At: c.At, Data: c}); err != nil {
		return assess.Clearance{}, err
	}
	return c, nil
}

// Dispose records what became of a patient, as Store.Dispose does: the
// same validation, ErrConflict when the patient already has a disposition,
// ErrForbidden for a release by someone without a release role.
func (b *Batch) Dispose(actorID, patientID int64, in DispositionInput) (Disposition, error) {
	in = in.Normalise()
	in.Note = ""
	p, err := getPatient(b.ctx, b.tx, "id = ?", patientID)
	if err != nil {
		return Disposition{}, err
	}
	if err := in.Validate(p, b.now()); err != nil {
		return Disposition{}, err
	}
	if !p.InCare() {
		return Disposition{}, ErrConflict
	}
	if err := checkReleaseRole(b.ctx, b.tx, actorID, in.Kind); err != nil {
		return Disposition{}, err
	}
	d, err := b.s.insertDispositionTx(b.ctx, b.tx, actorID, p.ID, 0, 1, in)
	if err != nil {
		return Disposition{}, wrapValidation("batch dispose", err)
	}
	err = b.audit(auditRow{userID: actorID, entity: "disposition", entityID: d.Key, patientID: p.ID,
		action: ActionCreate, before: map[string]any{"status": p.Status}, after: d})
	return d, err
}

package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"aloft/assess"
)

// Enclosure is one of the centre's cages, aviaries, flight cages or pools,
// with its inside size in metres.
type Enclosure struct {
	ID        int64                `json:"id"`
	Name      string               `json:"name"`
	Kind      assess.EnclosureKind `json:"kind"`
	LengthM   float64              `json:"length_m"` // m, the longest flight inside it
	WidthM    float64              `json:"width_m"`  // m
	HeightM   float64              `json:"height_m"` // m
	Notes     string               `json:"notes"`
	Retired   bool                 `json:"retired"` // no longer in use: kept for the history
	UpdatedAt time.Time            `json:"updated_at"`
	Version   int                  `json:"version"`
}

// Housing returns a housing record of a move into e at from.
func (e Enclosure) Housing(from time.Time) assess.Housing {
	return assess.Housing{From: from, EnclosureName: e.Name, Kind: e.Kind, LengthM: e.LengthM, WidthM: e.WidthM,
		HeightM: e.HeightM, Prerelease: e.Kind.Prerelease()}
}

// EnclosureInput is what the enclosures form sets. Sizes are in metres: the
// web form converts feet at the edge.
type EnclosureInput struct {
	Name                     string
	Kind                     assess.EnclosureKind
	LengthM, WidthM, HeightM float64
	Notes                    string
	Retired                  bool
}

// Plausible enclosure sizes, m [project default: the largest enclosure of
// Minimum Standards 2012 is 30.5 m long; a free-flight hall may be longer].
const (
	maxEnclosureLengthM = 300
	maxEnclosureHeightM = 50
)

// Validate checks an enclosure: a name, a known kind, and each size in
// metres above 0 and plausible.
func (in EnclosureInput) Validate() error {
	var errs assess.ValidationErrors
	add := func(field, value, msg string) {
		errs = append(errs, &assess.ValidationError{Field: field, Value: value, Message: msg})
	}
	name := strings.TrimSpace(in.Name)
	switch {
	case name == "":
		add("name", in.Name, "give the enclosure a name staff will recognise, e.g. Flight cage 1")
	case len([]rune(name)) > 80:
		add("name", name[:20]+"…", "keep the name under 80 characters")
	}
	if !in.Kind.Valid() {
		add("kind", string(in.Kind), "choose the kind: indoor cage, outdoor aviary, flight cage or pool")
	}
	for _, d := range []struct {
		field string
		v     float64
		max   float64
		what  string
	}{{"length_m", in.LengthM, maxEnclosureLengthM, "length"}, {"width_m", in.WidthM, maxEnclosureLengthM, "width"},
		{"height_m", in.HeightM, maxEnclosureHeightM, "height"}} {
		if math.IsNaN(d.v) || d.v <= 0 || d.v > d.max {
			add(d.field, fmt.Sprint(d.v), fmt.Sprintf("the inside %s is above 0 and at most %g m", d.what, d.max))
		}
	}
	if len([]rune(in.Notes)) > 2000 {
		add("notes", "", "keep the notes under 2000 characters")
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

// AddEnclosure adds an enclosure. A name already used gives a validation
// error on "name".
func (s *Store) AddEnclosure(ctx context.Context, actorID int64, in EnclosureInput) (Enclosure, error) {
	if err := in.Validate(); err != nil {
		return Enclosure{}, err
	}
	var e Enclosure
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		if err := enclosureNameFree(ctx, tx, in.Name, 0); err != nil {
			return err
		}
		now := fmtTime(s.now())
		res, err := tx.ExecContext(ctx, `INSERT INTO enclosures (name, kind, length_m, width_m, height_m, notes, retired, created_by, created_at, updated_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`, strings.TrimSpace(in.Name), string(in.Kind), in.LengthM, in.WidthM, in.HeightM,
			in.Notes, in.Retired, nullID(actorID), now, now)
		if err != nil {
			return err
		}
		id, _ := res.LastInsertId()
		if e, err = getEnclosure(ctx, tx, "id = ?", id); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "enclosure", entityID: id, action: ActionCreate, after: e})
	})
	return e, wrapValidation("add enclosure", err)
}

// UpdateEnclosure changes enclosure id. version must be the version read
// (else ErrConflict). Housing records already made keep the old details.
func (s *Store) UpdateEnclosure(ctx context.Context, actorID, id int64, version int, in EnclosureInput) (Enclosure, error) {
	if err := in.Validate(); err != nil {
		return Enclosure{}, err
	}
	var e Enclosure
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		before, err := getEnclosure(ctx, tx, "id = ?", id)
		if err != nil {
			return err
		}
		if before.Version != version {
			return ErrConflict
		}
		if err := enclosureNameFree(ctx, tx, in.Name, id); err != nil {
			return err
		}
		_, err = tx.ExecContext(ctx, `UPDATE enclosures SET name = ?, kind = ?, length_m = ?, width_m = ?, height_m = ?, notes = ?,
			retired = ?, updated_at = ?, version = version + 1 WHERE id = ?`, strings.TrimSpace(in.Name), string(in.Kind),
			in.LengthM, in.WidthM, in.HeightM, in.Notes, in.Retired, fmtTime(s.now()), id)
		if err != nil {
			return err
		}
		if e, err = getEnclosure(ctx, tx, "id = ?", id); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "enclosure", entityID: id, action: ActionUpdate, before: before, after: e})
	})
	return e, wrapValidation("update enclosure", err)
}

func enclosureNameFree(ctx context.Context, tx *sql.Tx, name string, except int64) error {
	var n int
	if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM enclosures WHERE name = ? AND id <> ?`, strings.TrimSpace(name), except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return assess.ValidationErrors{{Field: "name", Value: name, Message: "another enclosure has this name: choose another"}}
	}
	return nil
}

const enclosureCols = `id, name, kind, length_m, width_m, height_m, notes, retired, updated_at, version`

func scanEnclosure(r rowScanner) (Enclosure, error) {
	var e Enclosure
	var kind, updated string
	if err := r.Scan(&e.ID, &e.Name, &kind, &e.LengthM, &e.WidthM, &e.HeightM, &e.Notes, &e.Retired, &updated, &e.Version); err != nil {
		return Enclosure{}, err
	}
	e.Kind, e.UpdatedAt = assess.EnclosureKind(kind), parseTime(updated)
	return e, nil
}

func getEnclosure(ctx context.Context, q queryer, where string, arg any) (Enclosure, error) {
	e, err := scanEnclosure(q.QueryRowContext(ctx, `SELECT `+enclosureCols+` FROM enclosures WHERE `+where, arg))
	if errors.Is(err, sql.ErrNoRows) {
		return Enclosure{}, ErrNotFound
	}
	return e, err
}

// Enclosure returns the enclosure with id.
func (s *Store) Enclosure(ctx context.Context, id int64) (Enclosure, error) {
	e, err := getEnclosure(ctx, s.db, "id = ?", id)
	return e, wrapValidation("enclosure", err)
}

// EnclosureByName returns the enclosure with a name (ignoring case).
func (s *Store) EnclosureByName(ctx context.Context, name string) (Enclosure, error) {
	e, err := getEnclosure(ctx, s.db, "name = ?", strings.TrimSpace(name))
	return e, wrapValidation("enclosure "+name, err)
}

// Enclosures lists the enclosures by name; retired ones only when all is set.
func (s *Store) Enclosures(ctx context.Context, all bool) ([]Enclosure, error) {
	q := `SELECT ` + enclosureCols + ` FROM enclosures`
	if !all {
		q += ` WHERE retired = 0`
	}
	rows, err := s.db.QueryContext(ctx, q+` ORDER BY retired, name`)
	if err != nil {
		return nil, fmt.Errorf("records: enclosures: %w", err)
	}
	defer rows.Close()
	var out []Enclosure
	for rows.Next() {
		e, err := scanEnclosure(rows)
		if err != nil {
			return nil, fmt.Errorf("records: enclosures: %w", err)
		}
		out = append(out, e)
	}
	return out, rows.Err()
}

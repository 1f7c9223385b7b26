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

// ReleaseSite is a named place where the centre releases birds, with the
// elevation the flight model reads for its air density.
type ReleaseSite struct {
	ID         int64     `json:"id"`
	Name       string    `json:"name"`
	ElevationM float64   `json:"elevation_m"` // m above sea level, −500…5000
	Notes      string    `json:"notes"`
	Retired    bool      `json:"retired"` // no longer offered; kept for the history
	CreatedBy  int64     `json:"created_by"`
	CreatedAt  time.Time `json:"created_at"`
	UpdatedAt  time.Time `json:"updated_at"`
	Version    int       `json:"version"`
}

// Site returns the site for the flight model, at air temperature tempC (°C;
// nil: the standard atmosphere's for the elevation).
func (r ReleaseSite) Site(tempC *float64) assess.Site {
	return assess.Site{ElevationM: r.ElevationM, TempC: tempC}
}

// Label names the site in words: "Saltmarsh Point (release site, 4 m)".
func (r ReleaseSite) Label() string {
	return fmt.Sprintf("%s (release site, %s m)", r.Name, fmtNum(r.ElevationM))
}

func fmtNum(x float64) string { return strings.TrimSuffix(fmt.Sprintf("%g", x), ".0") }

// ReleaseSiteInput is what the release-site form sets.
type ReleaseSiteInput struct {
	Name       string
	ElevationM float64
	Notes      string
	Retired    bool
}

// Validate checks a release site: a name, and an elevation within the
// flight model's range.
func (in ReleaseSiteInput) Validate() error {
	var errs assess.ValidationErrors
	name := strings.TrimSpace(in.Name)
	switch {
	case name == "":
		errs = append(errs, &assess.ValidationError{Field: "name", Value: in.Name, Message: "give the site a name people will recognise"})
	case len([]rune(name)) > 80:
		errs = append(errs, &assess.ValidationError{Field: "name", Value: string([]rune(name)[:20]) + "…", Message: "keep the name under 80 characters"})
	}
	if math.IsNaN(in.ElevationM) || in.ElevationM < assess.MinElevationM || in.ElevationM > assess.MaxElevationM {
		errs = append(errs, &assess.ValidationError{Field: "elevation_m", Value: fmt.Sprint(in.ElevationM),
			Message: fmt.Sprintf("the elevation is in metres above sea level, from %g to %g", assess.MinElevationM, assess.MaxElevationM)})
	}
	if len([]rune(in.Notes)) > 2000 {
		errs = append(errs, &assess.ValidationError{Field: "notes", Message: "keep the notes under 2000 characters"})
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

// AddReleaseSite adds a release site. A name already used gives a
// validation error on "name".
func (s *Store) AddReleaseSite(ctx context.Context, actorID int64, in ReleaseSiteInput) (ReleaseSite, error) {
	if err := in.Validate(); err != nil {
		return ReleaseSite{}, err
	}
	var r ReleaseSite
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		if err := siteNameFree(ctx, tx, in.Name, 0); err != nil {
			return err
		}
		now := fmtTime(s.now())
		res, err := tx.ExecContext(ctx, `INSERT INTO release_sites (name, elevation_m, notes, retired, created_by, created_at, updated_at)
			VALUES (?, ?, ?, ?, ?, ?, ?)`, strings.TrimSpace(in.Name), in.ElevationM, strings.TrimSpace(in.Notes), in.Retired,
			nullID(actorID), now, now)
		if err != nil {
			return err
		}
		id, _ := res.LastInsertId()
		if r, err = getSite(ctx, tx, "id = ?", id); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "release_site", entityID: id, action: ActionCreate, after: r})
	})
	return r, wrapValidation("add release site", err)
}

// UpdateReleaseSite changes release site id; version must be the version
// read (else ErrConflict). Retiring a site is an update with Retired set.
func (s *Store) UpdateReleaseSite(ctx context.Context, actorID, id int64, version int, in ReleaseSiteInput) (ReleaseSite, error) {
	if err := in.Validate(); err != nil {
		return ReleaseSite{}, err
	}
	var r ReleaseSite
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		before, err := getSite(ctx, tx, "id = ?", id)
		if err != nil {
			return err
		}
		if before.Version != version {
			return ErrConflict
		}
		if err := siteNameFree(ctx, tx, in.Name, id); err != nil {
			return err
		}
		_, err = tx.ExecContext(ctx, `UPDATE release_sites SET name = ?, elevation_m = ?, notes = ?, retired = ?, updated_at = ?,
			version = version + 1 WHERE id = ?`, strings.TrimSpace(in.Name), in.ElevationM, strings.TrimSpace(in.Notes), in.Retired,
			fmtTime(s.now()), id)
		if err != nil {
			return err
		}
		if r, err = getSite(ctx, tx, "id = ?", id); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "release_site", entityID: id, action: ActionUpdate, before: before, after: r})
	})
	return r, wrapValidation("update release site", err)
}

func siteNameFree(ctx context.Context, tx *sql.Tx, name string, except int64) error {
	var n int
	if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM release_sites WHERE name = ? AND id <> ?`, strings.TrimSpace(name), except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return assess.ValidationErrors{{Field: "name", Value: name, Message: "another release site has this name: choose another"}}
	}
	return nil
}

const siteCols = `id, name, elevation_m, notes, retired, COALESCE(created_by, 0), created_at, updated_at, version`

func scanSite(r rowScanner) (ReleaseSite, error) {
	var x ReleaseSite
	var created, updated string
	if err := r.Scan(&x.ID, &x.Name, &x.ElevationM, &x.Notes, &x.Retired, &x.CreatedBy, &created, &updated, &x.Version); err != nil {
		return ReleaseSite{}, err
	}
	x.CreatedAt, x.UpdatedAt = parseTime(created), parseTime(updated)
	return x, nil
}

func getSite(ctx context.Context, q queryer, where string, arg any) (ReleaseSite, error) {
	r, err := scanSite(q.QueryRowContext(ctx, `SELECT `+siteCols+` FROM release_sites WHERE `+where, arg))
	if errors.Is(err, sql.ErrNoRows) {
		return ReleaseSite{}, ErrNotFound
	}
	return r, err
}

// ReleaseSite returns the release site with id.
func (s *Store) ReleaseSite(ctx context.Context, id int64) (ReleaseSite, error) {
	r, err := getSite(ctx, s.db, "id = ?", id)
	return r, wrapValidation("release site", err)
}

// ReleaseSiteByName returns the release site with a name (ignoring case and
// surrounding spaces), retired or not; ErrNotFound when there is none.
func (s *Store) ReleaseSiteByName(ctx context.Context, name string) (ReleaseSite, error) {
	r, err := getSite(ctx, s.db, "name = ?", strings.TrimSpace(name))
	return r, wrapValidation("release site "+name, err)
}

// ReleaseSites lists the release sites by name; retired ones (last) only
// when all is set.
func (s *Store) ReleaseSites(ctx context.Context, all bool) ([]ReleaseSite, error) {
	q := `SELECT ` + siteCols + ` FROM release_sites`
	if !all {
		q += ` WHERE retired = 0`
	}
	rows, err := s.db.QueryContext(ctx, q+` ORDER BY retired, name`)
	if err != nil {
		return nil, fmt.Errorf("records: release sites: %w", err)
	}
	defer rows.Close()
	var out []ReleaseSite
	for rows.Next() {
		r, err := scanSite(rows)
		if err != nil {
			return nil, fmt.Errorf("records: release sites: %w", err)
		}
		out = append(out, r)
	}
	return out, rows.Err()
}

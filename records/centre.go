package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"

	"aloft/assess"
)

// Centre is the one centre an installation serves.
type Centre struct {
	Name       string  `json:"name"`
	Address    string  `json:"address"`
	ElevationM float64 `json:"elevation_m"` // the default release site's elevation, m
	IsDemo     bool    `json:"is_demo"`     // a demo database: its logins are public
	PageSize   string  `json:"page_size"`   // reports' paper: PageA4 or PageLetter ("" = A4)
}

// Validate checks the centre's details.
func (c Centre) Validate() error {
	var errs assess.ValidationErrors
	if strings.TrimSpace(c.Name) == "" {
		errs = append(errs, &assess.ValidationError{Field: "centre_name", Value: c.Name, Message: "give the centre's name"})
	}
	if c.ElevationM < -500 || c.ElevationM > 5000 {
		errs = append(errs, &assess.ValidationError{Field: "elevation_m", Value: fmt.Sprint(c.ElevationM),
			Message: "elevation is in metres above sea level, from -500 to 5000"})
	}
	if c.PageSize != "" && c.PageSize != PageA4 && c.PageSize != PageLetter {
		errs = append(errs, &assess.ValidationError{Field: "page_size", Value: c.PageSize, Message: "choose A4 or Letter"})
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

// Centre returns the centre's details, or ErrNotFound before set-up.
func (s *Store) Centre(ctx context.Context) (Centre, error) {
	var c Centre
	err := s.db.QueryRowContext(ctx, `SELECT name, address, elevation_m, is_demo, page_size FROM centre WHERE id = 1`).
		Scan(&c.Name, &c.Address, &c.ElevationM, &c.IsDemo, &c.PageSize)
	if errors.Is(err, sql.ErrNoRows) {
		return Centre{}, ErrNotFound
	}
	if err != nil {
		return Centre{}, fmt.Errorf("records: centre: %w", err)
	}
	return c, nil
}

// SetCentre creates or updates the centre's details.
func (s *Store) SetCentre(ctx context.Context, actorID int64, c Centre) error {
	if err := c.Validate(); err != nil {
		return err
	}
	return wrapValidation("set centre", s.inTx(ctx, func(tx *sql.Tx) error {
		var before *Centre
		var b Centre
		err := tx.QueryRowContext(ctx, `SELECT name, address, elevation_m, is_demo, page_size FROM centre WHERE id = 1`).
			Scan(&b.Name, &b.Address, &b.ElevationM, &b.IsDemo, &b.PageSize)
		switch {
		case err == nil:
			before = &b
		case !errors.Is(err, sql.ErrNoRows):
			return err
		}
		if c.PageSize == "" {
			c.PageSize = PageA4
		}
		_, err = tx.ExecContext(ctx, `INSERT INTO centre (id, name, address, elevation_m, is_demo, page_size, updated_at) VALUES (1, ?, ?, ?, ?, ?, ?)
			ON CONFLICT (id) DO UPDATE SET name = excluded.name, address = excluded.address,
			elevation_m = excluded.elevation_m, is_demo = excluded.is_demo, page_size = excluded.page_size, updated_at = excluded.updated_at`,
			strings.TrimSpace(c.Name), c.Address, c.ElevationM, c.IsDemo, c.PageSize, fmtTime(s.now()))
		if err != nil {
			return err
		}
		a := auditRow{userID: actorID, entity: "centre", entityID: 1, action: ActionUpdate, after: c}
		if before == nil {
			a.action = ActionCreate
		} else {
			a.before = before
		}
		return s.writeAudit(ctx, tx, a)
	}))
}

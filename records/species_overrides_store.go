package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"

	"aloft/assess"
)

// SpeciesChange sets one value of a species (Value non-nil, typed as
// SpeciesField.Check returns it) or removes the centre's value (Value nil),
// so the shipped one applies again.
type SpeciesChange struct {
	Field string
	Value any
}

// SpeciesOverrides lists the centre's values for one species (scientific
// name, any case), in field order; none is an empty list.
func (s *Store) SpeciesOverrides(ctx context.Context, species string) ([]SpeciesOverride, error) {
	out, err := speciesOverrides(ctx, s.db, "o.species = ?", strings.TrimSpace(species))
	if err != nil {
		return nil, fmt.Errorf("records: species overrides: %w", err)
	}
	return out, nil
}

// AllSpeciesOverrides lists every value the centre has set, by species.
func (s *Store) AllSpeciesOverrides(ctx context.Context) ([]SpeciesOverride, error) {
	out, err := speciesOverrides(ctx, s.db, "1 = ?", 1)
	if err != nil {
		return nil, fmt.Errorf("records: species overrides: %w", err)
	}
	return out, nil
}

func speciesOverrides(ctx context.Context, q queryer, where string, args ...any) ([]SpeciesOverride, error) {
	rows, err := q.QueryContext(ctx, `SELECT o.id, o.species, o.field, o.value_json, o.note, COALESCE(o.set_by, 0),
		COALESCE(u.display_name, ''), o.set_at FROM species_overrides o LEFT JOIN users u ON u.id = o.set_by
		WHERE `+where+` ORDER BY o.species, o.id`, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []SpeciesOverride
	for rows.Next() {
		var o SpeciesOverride
		var raw, at string
		if err := rows.Scan(&o.ID, &o.Species, &o.Field, &raw, &o.Note, &o.SetByID, &o.SetBy, &at); err != nil {
			return nil, err
		}
		f, ok := SpeciesFieldByKey(o.Field)
		if !ok {
			continue // a value this version of Aloft does not know: kept, not applied
		}
		if o.Value, err = f.decodeValue(raw); err != nil {
			continue // out of this version's bounds: the shipped value applies
		}
		o.SetAt = parseTime(at)
		if o.SetBy == "" {
			o.SetBy = systemName
		}
		out = append(out, o)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	sortOverrides(out)
	return out, nil
}

// sortOverrides orders each species' values as SpeciesFields lists them.
func sortOverrides(os []SpeciesOverride) {
	rank := map[string]int{}
	for i, f := range SpeciesFields {
		rank[f.Key] = i
	}
	for i := 1; i < len(os); i++ {
		for j := i; j > 0 && os[j-1].Species == os[j].Species && rank[os[j-1].Field] > rank[os[j].Field]; j-- {
			os[j-1], os[j] = os[j], os[j-1]
		}
	}
}

// SetSpeciesValues changes values of a species in one transaction, each
// with the note (why), by actorID now: the species is a shipped one
// (override) or one the centre added. Values the species already has are
// left alone. The resulting species must pass the engine's checks and give
// a working flight model for its reference bird; otherwise the validation
// error names the field and nothing changes. Each value set or removed
// leaves an audit row.
func (s *Store) SetSpeciesValues(ctx context.Context, actorID int64, species string, changes []SpeciesChange, note string) error {
	if err := checkSettingNote(note); err != nil {
		return err
	}
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		tab, err := s.speciesTable(ctx, tx)
		if err != nil {
			return err
		}
		sp, err := tab.Find(species)
		if err != nil {
			return ErrNotFound
		}
		added := tab.Added(sp.ScientificName)
		current, err := speciesOverrides(ctx, tx, "o.species = ?", sp.ScientificName)
		if err != nil {
			return err
		}
		next, err := mergeChanges(current, changes, added, sp.ScientificName)
		if err != nil {
			return err
		}
		if err := checkSpecies(tab.rowBase(sp.ScientificName), added, next); err != nil {
			return err
		}
		return s.writeSpeciesChanges(ctx, tx, actorID, sp.ScientificName, current, changes, note)
	})
	return wrapValidation("set species values", err)
}

// mergeChanges returns the overrides current with changes applied (the
// author and time are filled in when written), checking each change.
func mergeChanges(current []SpeciesOverride, changes []SpeciesChange, added bool, species string) ([]SpeciesOverride, error) {
	next := map[string]SpeciesOverride{}
	for _, o := range current {
		next[o.Field] = o
	}
	var errs assess.ValidationErrors
	for _, c := range changes {
		f, ok := SpeciesFieldByKey(c.Field)
		switch {
		case !ok:
			errs = append(errs, &assess.ValidationError{Field: c.Field, Message: "not a value of the species reference the centre can set"})
			continue
		case f.AddedOnly && !added:
			errs = append(errs, &assess.ValidationError{Field: c.Field, Message: "a shipped species keeps its own " + strings.ToLower(f.Label)})
			continue
		case c.Value == nil && added && f.Required:
			errs = append(errs, &assess.ValidationError{Field: c.Field, Message: "required for a species the centre added"})
			continue
		case c.Value == nil:
			delete(next, c.Field)
			continue
		}
		v, err := f.Check(c.Value)
		if err != nil {
			errs = append(errs, err.(*assess.ValidationError))
			continue
		}
		next[c.Field] = SpeciesOverride{Species: species, Field: c.Field, Value: v}
	}
	if len(errs) > 0 {
		return nil, errs
	}
	out := make([]SpeciesOverride, 0, len(next))
	for _, o := range next {
		out = append(out, o)
	}
	sortOverrides(out)
	return out, nil
}

// checkSpecies builds the species from base and ovs and runs the engine's
// checks of a species row and of its reference bird's flight model.
func checkSpecies(base *assess.Species, added bool, ovs []SpeciesOverride) error {
	sp := applyOverrides(base, added, ovs)
	cf := assess.CaseFile{Species: *sp}
	var errs assess.ValidationErrors
	var all assess.ValidationErrors
	if errors.As(cf.Validate(), &all) {
		for _, e := range all {
			if strings.HasPrefix(e.Field, "species.") {
				e.Field = strings.TrimPrefix(e.Field, "species.")
				errs = append(errs, e)
			}
		}
	}
	if len(errs) > 0 {
		return errs
	}
	ref := sp.Reference(assess.SexUnknown)
	in := assess.FlightInput{MassKg: ref.MassKg, SpanM: ref.SpanM, AreaM2: ref.AreaM2, Passerine: sp.Passerine, Reference: &ref}
	if _, err := assess.Flight(in); err != nil {
		return assess.ValidationErrors{{Field: "span_mm", Value: fmt.Sprintf("%g mm, %g cm², %g g", sp.SpanMM, sp.AreaCM2, sp.MassG.Pooled),
			Message: "the flight model cannot use this mass, span and area together (" + err.Error() + "): check the units"}}
	}
	return nil
}

// writeSpeciesChanges stores changes over current, each with its audit row.
func (s *Store) writeSpeciesChanges(ctx context.Context, tx *sql.Tx, actorID int64, species string, current []SpeciesOverride, changes []SpeciesChange, note string) error {
	now := fmtTime(s.now())
	for _, c := range changes {
		var before *SpeciesOverride
		for i := range current {
			if current[i].Field == c.Field {
				before = &current[i]
			}
		}
		f, _ := SpeciesFieldByKey(c.Field)
		if c.Value == nil {
			if before == nil {
				continue
			}
			if _, err := tx.ExecContext(ctx, `DELETE FROM species_overrides WHERE id = ?`, before.ID); err != nil {
				return err
			}
			if err := s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "species_override", entityID: before.ID,
				action: ActionRemove, before: before}); err != nil {
				return err
			}
			continue
		}
		v, _ := f.Check(c.Value)
		if before != nil && FormatSpeciesValue(f, before.Value) == FormatSpeciesValue(f, v) && before.Note == strings.TrimSpace(note) {
			continue
		}
		raw, err := encodeValue(v)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO species_overrides (species, field, value_json, note, set_by, set_at)
			VALUES (?, ?, ?, ?, ?, ?) ON CONFLICT (species, field) DO UPDATE SET value_json = excluded.value_json,
			note = excluded.note, set_by = excluded.set_by, set_at = excluded.set_at`,
			species, c.Field, raw, strings.TrimSpace(note), nullID(actorID), now); err != nil {
			return err
		}
		after, err := speciesOverrides(ctx, tx, "o.species = ? AND o.field = ?", species, c.Field)
		if err != nil {
			return err
		}
		a := auditRow{userID: actorID, entity: "species_override", action: ActionCreate}
		if len(after) == 1 {
			a.entityID, a.after = after[0].ID, after[0]
		}
		if before != nil {
			a.action, a.before = ActionUpdate, before
		}
		if err := s.writeAudit(ctx, tx, a); err != nil {
			return err
		}
	}
	return nil
}

// NewSpecies is a species the centre adds to its reference table.
type NewSpecies struct {
	ScientificName string
	// Values by SpeciesField key, typed as SpeciesField.Check returns them;
	// every Required field must be given.
	Values map[string]any
}

// AddSpecies adds a species that is not shipped, with its values and a
// note, by actorID now. The names must not be used by any species already
// in the table; a missing or bad value is a validation error naming the
// field, and nothing is stored. Each value leaves an audit row.
func (s *Store) AddSpecies(ctx context.Context, actorID int64, n NewSpecies, note string) (*assess.Species, error) {
	name := strings.Join(strings.Fields(n.ScientificName), " ")
	if err := checkScientificName(name); err != nil {
		return nil, err
	}
	if err := checkSettingNote(note); err != nil {
		return nil, err
	}
	var changes []SpeciesChange
	var errs assess.ValidationErrors
	for _, f := range SpeciesFields {
		v, ok := n.Values[f.Key]
		if !ok || v == nil {
			if f.Required {
				errs = append(errs, &assess.ValidationError{Field: f.Key, Message: "required for a species the centre adds"})
			}
			continue
		}
		changes = append(changes, SpeciesChange{Field: f.Key, Value: v})
	}
	if len(errs) > 0 {
		return nil, errs
	}
	var sp *assess.Species
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		tab, err := s.speciesTable(ctx, tx)
		if err != nil {
			return err
		}
		common, _ := n.Values["common_name"].(string)
		for field, nm := range map[string]string{"scientific_name": name, "common_name": common} {
			if other, err := tab.Find(nm); err == nil {
				return assess.ValidationErrors{{Field: field, Value: nm,
					Message: fmt.Sprintf("already in the species table as %s (%s)", other.CommonName, other.ScientificName)}}
			}
		}
		next, err := mergeChanges(nil, changes, true, name)
		if err != nil {
			return err
		}
		if err := checkSpecies(addedBase(name), true, next); err != nil {
			return err
		}
		if err := s.writeSpeciesChanges(ctx, tx, actorID, name, nil, changes, note); err != nil {
			return err
		}
		if tab, err = s.speciesTable(ctx, tx); err != nil {
			return err
		}
		sp, err = tab.Find(name)
		return err
	})
	return sp, wrapValidation("add species", err)
}

// checkScientificName checks the name of a species the centre adds: a
// genus and a species epithet (and optionally a subspecies), letters only.
func checkScientificName(name string) error {
	words := strings.Fields(name)
	ok := len(words) >= 2 && len(words) <= 3 && len(name) <= 80
	for _, w := range words {
		for _, r := range w {
			if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r == '-') {
				ok = false
			}
		}
	}
	if !ok {
		return assess.ValidationErrors{{Field: "scientific_name", Value: name,
			Message: "give the genus and species, e.g. Anas platyrhynchos, in Latin letters"}}
	}
	return nil
}

// addedBase is the blank row a species the centre adds starts from.
func addedBase(scientific string) *assess.Species {
	return &assess.Species{ScientificName: scientific, FlightStyle: "", Sources: map[string]assess.SourceRef{}}
}

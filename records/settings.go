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

// ThresholdSetting is one threshold value the centre has set in place of
// Aloft's default: the value in force until it is changed again or reset.
type ThresholdSetting struct {
	ID          int64              `json:"id"`
	ThresholdID assess.ThresholdID `json:"threshold_id"`
	// Group is the species group, for a threshold set per group; "" otherwise.
	Group assess.Group `json:"group,omitempty"`
	Value float64      `json:"value"`
	// Note says why, in the words of whoever set it; may be "".
	Note    string    `json:"note,omitempty"`
	SetByID int64     `json:"set_by_id"`
	SetBy   string    `json:"set_by"` // the person's display name; "Aloft" for the system
	SetAt   time.Time `json:"set_at"`
}

// SkippedSetting is a stored threshold setting that could not be applied
// (a later version of Aloft narrowed the threshold's range, say), with why.
// The assessment runs on the default instead; the settings page shows it.
type SkippedSetting struct {
	Setting ThresholdSetting
	Err     error
}

// maxNoteLen is the longest note kept with a setting, in characters.
const maxNoteLen = 500

// ThresholdSettings lists the centre's threshold settings in the order they
// were first made.
func (s *Store) ThresholdSettings(ctx context.Context) ([]ThresholdSetting, error) {
	out, err := thresholdSettings(ctx, s.db)
	if err != nil {
		return nil, fmt.Errorf("records: threshold settings: %w", err)
	}
	return out, nil
}

func thresholdSettings(ctx context.Context, q queryer) ([]ThresholdSetting, error) {
	rows, err := q.QueryContext(ctx, `SELECT t.id, t.threshold_id, t.species_group, t.value, t.note, COALESCE(t.set_by, 0),
		COALESCE(u.display_name, ''), t.set_at
		FROM threshold_settings t LEFT JOIN users u ON u.id = t.set_by ORDER BY t.id`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []ThresholdSetting
	for rows.Next() {
		var st ThresholdSetting
		var id, group, at string
		if err := rows.Scan(&st.ID, &id, &group, &st.Value, &st.Note, &st.SetByID, &st.SetBy, &at); err != nil {
			return nil, err
		}
		st.ThresholdID, st.Group, st.SetAt = assess.ThresholdID(id), assess.Group(group), parseTime(at)
		if st.SetBy == "" {
			st.SetBy = systemName
		}
		out = append(out, st)
	}
	return out, rows.Err()
}

// systemName names the system (user id 0) as the author of a change.
const systemName = "Aloft"

// ApplyThresholdSettings returns the defaults with each setting applied
// (assess.Thresholds.Set, with who and when), and the settings that could
// not be. Settings are applied until no more can be, so two paired limits
// moved together apply whatever order they were stored in.
func ApplyThresholdSettings(list []ThresholdSetting) (assess.Thresholds, []SkippedSetting) {
	th := assess.DefaultThresholds()
	pending := list
	for len(pending) > 0 {
		var next []ThresholdSetting
		for _, st := range pending {
			if th.Set(st.ThresholdID, st.Group, st.Value, st.SetBy, st.SetAt) != nil {
				next = append(next, st)
			}
		}
		if len(next) == len(pending) {
			break
		}
		pending = next
	}
	var skipped []SkippedSetting
	for _, st := range pending {
		skipped = append(skipped, SkippedSetting{Setting: st, Err: th.Set(st.ThresholdID, st.Group, st.Value, st.SetBy, st.SetAt)})
	}
	return th, skipped
}

// SkippedThresholdSettings returns the stored settings the assessment
// cannot apply; normally none.
func (s *Store) SkippedThresholdSettings(ctx context.Context) ([]SkippedSetting, error) {
	list, err := s.ThresholdSettings(ctx)
	if err != nil {
		return nil, err
	}
	_, skipped := ApplyThresholdSettings(list)
	return skipped, nil
}

// SetThreshold sets threshold id (for group g when it is set per group; ""
// otherwise) to value, as a centre setting by actorID now, with an optional
// note. A value outside the threshold's range, or one that would cross its
// paired limit, is a validation error naming the threshold, and nothing
// changes. The change and its audit row commit together; the next
// assessment uses it.
func (s *Store) SetThreshold(ctx context.Context, actorID int64, id assess.ThresholdID, g assess.Group, value float64, note string) (ThresholdSetting, error) {
	if err := checkSettingNote(note); err != nil {
		return ThresholdSetting{}, err
	}
	if math.IsNaN(value) || math.IsInf(value, 0) {
		return ThresholdSetting{}, &assess.ValidationError{Field: string(id), Value: fmt.Sprint(value), Message: "enter a number"}
	}
	var out ThresholdSetting
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		list, err := thresholdSettings(ctx, tx)
		if err != nil {
			return err
		}
		th, _ := ApplyThresholdSettings(list)
		who, err := actorName(ctx, tx, actorID)
		if err != nil {
			return err
		}
		now := s.now()
		if err := th.Set(id, g, value, who, now); err != nil {
			return err
		}
		before, found := findSetting(list, id, g)
		if found && before.Value == value && before.Note == strings.TrimSpace(note) {
			out = before
			return nil
		}
		_, err = tx.ExecContext(ctx, `INSERT INTO threshold_settings (threshold_id, species_group, value, note, set_by, set_at)
			VALUES (?, ?, ?, ?, ?, ?) ON CONFLICT (threshold_id, species_group) DO UPDATE SET
			value = excluded.value, note = excluded.note, set_by = excluded.set_by, set_at = excluded.set_at`,
			string(id), string(g), value, strings.TrimSpace(note), nullID(actorID), fmtTime(now))
		if err != nil {
			return err
		}
		if out, err = settingByKey(ctx, tx, id, g); err != nil {
			return err
		}
		a := auditRow{userID: actorID, entity: "threshold_setting", entityID: out.ID, action: ActionCreate, after: out}
		if found {
			a.action, a.before = ActionUpdate, before
		}
		return s.writeAudit(ctx, tx, a)
	})
	return out, wrapValidation("set threshold "+string(id), err)
}

// ResetThreshold restores threshold id (for group g) to Aloft's default. A
// threshold already at its default is left alone. A reset that would cross
// a paired limit the centre has set is a validation error, and nothing
// changes.
func (s *Store) ResetThreshold(ctx context.Context, actorID int64, id assess.ThresholdID, g assess.Group) error {
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		list, err := thresholdSettings(ctx, tx)
		if err != nil {
			return err
		}
		th, _ := ApplyThresholdSettings(list)
		if err := th.Reset(id, g); err != nil {
			return err
		}
		before, found := findSetting(list, id, g)
		if !found {
			return nil
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM threshold_settings WHERE id = ?`, before.ID); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "threshold_setting", entityID: before.ID,
			action: ActionRemove, before: before})
	})
	return wrapValidation("reset threshold "+string(id), err)
}

func findSetting(list []ThresholdSetting, id assess.ThresholdID, g assess.Group) (ThresholdSetting, bool) {
	for _, st := range list {
		if st.ThresholdID == id && st.Group == g {
			return st, true
		}
	}
	return ThresholdSetting{}, false
}

func settingByKey(ctx context.Context, q queryer, id assess.ThresholdID, g assess.Group) (ThresholdSetting, error) {
	list, err := thresholdSettings(ctx, q)
	if err != nil {
		return ThresholdSetting{}, err
	}
	if st, ok := findSetting(list, id, g); ok {
		return st, nil
	}
	return ThresholdSetting{}, ErrNotFound
}

// actorName is the display name a change is attributed to: the user's, or
// systemName for id 0.
func actorName(ctx context.Context, q queryer, id int64) (string, error) {
	if id == 0 {
		return systemName, nil
	}
	var name string
	err := q.QueryRowContext(ctx, `SELECT display_name FROM users WHERE id = ?`, id).Scan(&name)
	if errors.Is(err, sql.ErrNoRows) {
		return "", fmt.Errorf("records: no user %d", id)
	}
	return name, err
}

// checkSettingNote checks the note kept with a setting.
func checkSettingNote(note string) error {
	if len([]rune(note)) > maxNoteLen {
		return &assess.ValidationError{Field: "note", Value: "", Message: fmt.Sprintf("keep the note under %d characters", maxNoteLen)}
	}
	return nil
}

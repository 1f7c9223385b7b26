package records

import (
	"context"
	"encoding/json"

	"aloft/assess"
)

// CurrentHousings returns the latest current housing record of every
// patient in care, by patient id, in one query.
func (s *Store) CurrentHousings(ctx context.Context) (map[int64]assess.Housing, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT e.patient_id, e.data_json FROM patients p
		JOIN entries e ON e.id = (SELECT x.id FROM entries x WHERE x.patient_id = p.id AND x.kind = ?
			AND x.superseded = 0 AND x.removed_at IS NULL ORDER BY x.at DESC, x.id DESC LIMIT 1)
		WHERE p.status = 'in-care'`, string(KindHousing))
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := map[int64]assess.Housing{}
	for rows.Next() {
		var id int64
		var data string
		if err := rows.Scan(&id, &data); err != nil {
			return nil, err
		}
		var h assess.Housing
		if err := json.Unmarshal([]byte(data), &h); err != nil {
			return nil, err
		}
		out[id] = h
	}
	return out, rows.Err()
}

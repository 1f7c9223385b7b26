package records

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"aloft/assess"
)

// CentreSpecies is the species reference as the centre uses it: the
// shipped table, with the centre's overrides written into copies of the
// species they change (each overridden value's Sources entry marked
// centre-setting, with its author), and the species the centre added. It
// is read-only once built and safe to share; the species it returns must
// not be modified.
type CentreSpecies struct {
	shipped   *assess.SpeciesTable
	changed   map[string]*assess.Species // by scientific name: overridden copies and added species
	added     []*assess.Species          // by common name
	byName    map[string]*assess.Species // normalised names of the added species
	overrides map[string][]SpeciesOverride
}

// SpeciesTable returns the centre's species reference: intake's list, the
// engine's species, the species pages.
func (s *Store) SpeciesTable(ctx context.Context) (*CentreSpecies, error) {
	t, err := s.speciesTable(ctx, s.db)
	if err != nil {
		return nil, fmt.Errorf("records: species table: %w", err)
	}
	return t, nil
}

func (s *Store) speciesTable(ctx context.Context, q queryer) (*CentreSpecies, error) {
	shipped, err := speciesTable()
	if err != nil {
		return nil, err
	}
	ovs, err := speciesOverrides(ctx, q, "1 = ?", 1)
	if err != nil {
		return nil, err
	}
	return buildCentreSpecies(shipped, ovs), nil
}

// buildCentreSpecies merges the overrides into the shipped table. Values
// of a species that is not shipped make an added species when they include
// every required value; otherwise they are left out.
func buildCentreSpecies(shipped *assess.SpeciesTable, ovs []SpeciesOverride) *CentreSpecies {
	t := &CentreSpecies{shipped: shipped, changed: map[string]*assess.Species{}, byName: map[string]*assess.Species{},
		overrides: map[string][]SpeciesOverride{}}
	for _, o := range ovs {
		t.overrides[o.Species] = append(t.overrides[o.Species], o)
	}
	for name, list := range t.overrides {
		if base, err := shipped.Find(name); err == nil && strings.EqualFold(base.ScientificName, name) {
			t.changed[base.ScientificName] = applyOverrides(base, false, list)
			continue
		}
		if !hasRequired(list) {
			continue
		}
		sp := applyOverrides(addedBase(name), true, list)
		if _, err := shipped.Find(sp.CommonName); err == nil {
			continue // a shipped species has taken the name since
		}
		t.changed[sp.ScientificName] = sp
		t.added = append(t.added, sp)
		for _, n := range sp.Names() {
			t.byName[normSpeciesName(n)] = sp
		}
	}
	slices.SortFunc(t.added, func(a, b *assess.Species) int { return strings.Compare(a.CommonName, b.CommonName) })
	return t
}

func hasRequired(list []SpeciesOverride) bool {
	for _, f := range SpeciesFields {
		if f.Required && !slices.ContainsFunc(list, func(o SpeciesOverride) bool { return o.Field == f.Key }) {
			return false
		}
	}
	return true
}

// normSpeciesName folds case, hyphens, underscores and runs of spaces, as
// the shipped table's own lookup does.
func normSpeciesName(s string) string {
	s = strings.ToLower(strings.TrimSpace(s))
	s = strings.NewReplacer("-", " ", "_", " ", "’", "'", "‘", "'").Replace(s)
	return strings.Join(strings.Fields(s), " ")
}

// Find returns the species with the given scientific, common or other
// name (ignoring case, hyphens and extra spaces), with the centre's values.
// Otherwise the error wraps assess.ErrUnknownSpecies.
func (t *CentreSpecies) Find(name string) (*assess.Species, error) {
	if sp, ok := t.byName[normSpeciesName(name)]; ok {
		return sp, nil
	}
	sp, err := t.shipped.Find(name)
	if err != nil {
		return nil, err
	}
	if c, ok := t.changed[sp.ScientificName]; ok {
		return c, nil
	}
	return sp, nil
}

// All returns every species: the shipped table's order, then the species
// the centre added, by common name.
func (t *CentreSpecies) All() []*assess.Species {
	all := t.shipped.All()
	for i, sp := range all {
		if c, ok := t.changed[sp.ScientificName]; ok {
			all[i] = c
		}
	}
	return append(all, t.added...)
}

// Len is the number of species.
func (t *CentreSpecies) Len() int { return t.shipped.Len() + len(t.added) }

// Shipped returns the species as shipped, before the centre's values;
// false for a species the centre added or an unknown name.
func (t *CentreSpecies) Shipped(name string) (*assess.Species, bool) {
	if _, ok := t.byName[normSpeciesName(name)]; ok {
		return nil, false
	}
	sp, err := t.shipped.Find(name)
	return sp, err == nil
}

// Added reports whether the species (scientific name) is one the centre
// added.
func (t *CentreSpecies) Added(scientific string) bool {
	sp, ok := t.byName[normSpeciesName(scientific)]
	return ok && sp.ScientificName == scientific
}

// Overrides returns the centre's values of a species (scientific name), in
// field order.
func (t *CentreSpecies) Overrides(scientific string) []SpeciesOverride {
	return slices.Clone(t.overrides[scientific])
}

// Changed reports whether the centre has set any value of the species.
func (t *CentreSpecies) Changed(scientific string) bool { return len(t.overrides[scientific]) > 0 }

// rowBase is what the centre's values of a species are written over: the
// shipped row, or a blank one for a species the centre added.
func (t *CentreSpecies) rowBase(scientific string) *assess.Species {
	if sp, ok := t.Shipped(scientific); ok {
		return sp
	}
	return addedBase(scientific)
}

// Search returns up to limit species (all when limit ≤ 0) whose names
// match q as assess.SpeciesTable.Search ranks them: exact, then prefix,
// then word prefix, then substring; by common name within a rank.
func (t *CentreSpecies) Search(q string, limit int) []*assess.Species {
	q = normSpeciesName(q)
	if q == "" {
		return nil
	}
	buckets := make([][]*assess.Species, 4)
	for _, sp := range t.All() {
		best := 99
		for _, n := range sp.Names() {
			best = min(best, nameRank(normSpeciesName(n), q))
		}
		if best < len(buckets) {
			buckets[best] = append(buckets[best], sp)
		}
	}
	var out []*assess.Species
	for _, b := range buckets {
		slices.SortStableFunc(b, func(x, y *assess.Species) int { return strings.Compare(x.CommonName, y.CommonName) })
		out = append(out, b...)
	}
	if limit > 0 && len(out) > limit {
		out = out[:limit]
	}
	return out
}

// nameRank: 0 exact, 1 prefix, 2 word prefix, 3 substring, 99 none.
func nameRank(name, q string) int {
	switch {
	case name == q:
		return 0
	case strings.HasPrefix(name, q):
		return 1
	case strings.Contains(" "+name, " "+q) || strings.Contains(name, "'"+q):
		return 2
	case strings.Contains(name, q):
		return 3
	}
	return 99
}

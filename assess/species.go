package assess

import (
	_ "embed"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
)

// speciesJSON is the species reference, written by the generator
// (go run ./assess/internal/speciesgen) from published datasets; see
// testdata/species/README.md for the sources and their licences.
//
//go:embed species_data.json
var speciesJSON []byte

// ErrUnknownSpecies is returned (wrapped) by SpeciesTable.Find when no species
// has the given name.
var ErrUnknownSpecies = errors.New("assess: unknown species")

// FlyingStyle is how a species usually flies, in this project's words.
type FlyingStyle string

// Flying styles.
const (
	StyleFlapping       FlyingStyle = "flapping"        // continuous flapping
	StyleFlapGlide      FlyingStyle = "flap-glide"      // flapping broken by glides
	StyleBounding       FlyingStyle = "bounding"        // flapping bursts with folded-wing bounds
	StyleSoaring        FlyingStyle = "soaring"         // soaring on thermals and slope lift
	StyleDynamicSoaring FlyingStyle = "dynamic-soaring" // gliding over waves, using wind shear
	StyleAerial         FlyingStyle = "aerial"          // feeding on the wing for hours
	StyleHovering       FlyingStyle = "hovering"        // sustained hovering
	StyleBurst          FlyingStyle = "burst"           // explosive take-off, short flights
)

// FlyingStyles lists the flying styles.
var FlyingStyles = []FlyingStyle{StyleFlapping, StyleFlapGlide, StyleBounding,
	StyleSoaring, StyleDynamicSoaring, StyleAerial, StyleHovering, StyleBurst}

// SourceRef says where one value of a species comes from.
type SourceRef struct {
	Provenance Provenance `json:"provenance"`
	Citation   string     `json:"citation"`       // the work, in full
	Note       string     `json:"note,omitempty"` // what was taken from it, or how the value was derived
}

// MassesG are a species' mean adult masses in grams.
type MassesG struct {
	// Pooled is AVONET's species mean, sexes pooled (mostly Dunning 2008).
	Pooled float64 `json:"pooled"`
	// Female and Male are set for dimorphic species (raptors, owls, some
	// ducks, gamebirds); nil otherwise.
	Female *float64 `json:"female"`
	Male   *float64 `json:"male"`
}

// RangeG is a mass range in grams, inclusive.
type RangeG struct {
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// MassRanges are a species' typical adult mass ranges: by sex, and for a bird
// of unknown sex a range spanning both. Without a published range each is
// the mean ± 25 % [project default].
type MassRanges struct {
	Female  RangeG `json:"female"`
	Male    RangeG `json:"male"`
	Unknown RangeG `json:"unknown"`
}

// Species is one row of the species reference. Every value set has an entry
// in Sources under its JSON name ("mass_g.female" for a nested one).
type Species struct {
	ScientificName string   `json:"scientific_name"` // BirdLife taxonomy (HBW-BirdLife v5, as in AVONET)
	CommonName     string   `json:"common_name"`     // English, IOC World Bird List
	OtherNames     []string `json:"other_names,omitempty"`
	Family         string   `json:"family"` // AVONET Family1
	Order          string   `json:"order"`  // AVONET Order1
	Group          Group    `json:"group"`
	Passerine      bool     `json:"passerine"`
	// Migration is AVONET's code: 1 sedentary, 2 partial migrant, 3 migrant.
	Migration int `json:"migration"`
	// Migrant is Migration ≥ 2: a fat load may be normal in season.
	Migrant    bool       `json:"migrant"`
	MassG      MassesG    `json:"mass_g"`
	MassRanges MassRanges `json:"mass_range_g"`
	// WingChordMM is AVONET's Wing.Length: carpal joint to the longest primary
	// on the UNFLATTENED wing, mm. It is shorter than a flattened chord
	// measured at intake and must not be compared with it directly.
	WingChordMM float64 `json:"wing_chord_mm"`
	// SpanMM is the wingspan tip to tip, wings fully spread, mm.
	SpanMM float64 `json:"span_mm"`
	// AreaCM2 is the area of both wings plus the body strip between them, cm².
	AreaCM2 float64 `json:"area_cm2"`
	// SpanAreaEstimated is true when span and area come from the regression
	// on mass and wing chord rather than a measurement (see Sources).
	SpanAreaEstimated bool        `json:"span_area_estimated"`
	LaunchMode        LaunchMode  `json:"launch_mode"`
	FlightStyle       FlyingStyle `json:"flight_style"`
	// Flight-feather counts per wing (primaries, secondaries incl. tertials)
	// and of the tail: typical for the family.
	Primaries   int `json:"primaries"`
	Secondaries int `json:"secondaries"`
	Rectrices   int `json:"rectrices"`
	// EnclosureClass is an EnclosureClass ID; "" when PRACTICE.md lists none.
	EnclosureClass string `json:"enclosure_class"`
	// MinPasses is the default of unbroken passes the length of the flight
	// cage; nil = not assessed until the centre sets a value.
	MinPasses *int `json:"min_passes"`
	// MinPrereleaseDays is the least time in outdoor pre-release housing.
	MinPrereleaseDays *int `json:"min_prerelease_days"`
	// WaterproofDays is the consecutive days waterproof on pool access.
	WaterproofDays *int `json:"waterproof_days"`
	// ReleaseMinMassG is a published lowest release mass, g (release guide).
	ReleaseMinMassG *float64 `json:"release_min_mass_g"`
	ReleaseGuide    string   `json:"release_guide,omitempty"`
	// ExpectedMargin is the healthy adult's power margin at V_mp; nil = the
	// default allometry (SCIENCE.md §5).
	ExpectedMargin *float64 `json:"expected_margin"`
	// FlightMuscleFraction is flight-muscle mass over body mass; nil = unknown.
	FlightMuscleFraction *float64             `json:"flight_muscle_fraction"`
	Sources              map[string]SourceRef `json:"sources"`
}

// Reference returns the species' healthy reference bird for a patient of the
// given sex, in SI units: the female or male mean mass when the table has
// one, otherwise the pooled mean; the reference span and area; the expected
// margin and flight-muscle fraction, 0 when unknown (SCIENCE.md §5).
func (s *Species) Reference(sex Sex) Reference {
	return Reference{
		MassKg:               s.meanMassG(sex) / 1000,
		SpanM:                s.SpanMM / 1000,
		AreaM2:               s.AreaCM2 / 1e4,
		ExpectedMargin:       deref(s.ExpectedMargin),
		FlightMuscleFraction: deref(s.FlightMuscleFraction),
	}
}

// meanMassG returns the mean adult mass for the sex (g): female or male when
// the table has it, else pooled.
func (s *Species) meanMassG(sex Sex) float64 {
	switch {
	case sex == SexFemale && s.MassG.Female != nil:
		return *s.MassG.Female
	case sex == SexMale && s.MassG.Male != nil:
		return *s.MassG.Male
	}
	return s.MassG.Pooled
}

// MassRangeG returns the typical adult mass range for the sex, in grams; for
// an unknown sex the range spans both sexes.
func (s *Species) MassRangeG(sex Sex) (lo, hi float64) {
	r := s.MassRanges.Unknown
	switch sex {
	case SexFemale:
		r = s.MassRanges.Female
	case SexMale:
		r = s.MassRanges.Male
	}
	return r.Min, r.Max
}

// Names returns the scientific, common and other names.
func (s *Species) Names() []string {
	return append([]string{s.ScientificName, s.CommonName}, s.OtherNames...)
}

func deref(p *float64) float64 {
	if p == nil {
		return 0
	}
	return *p
}

// dataFile is the embedded file's layout: values per species, and a citation
// key per value that points into one shared list of citations.
type dataFile struct {
	Citations map[string]SourceRef `json:"citations"`
	Species   []struct {
		Species
		Src map[string]string `json:"src"` // value name -> "citation key" or "key|note"
	} `json:"species"`
}

// SpeciesTable is the species reference, read-only once loaded.
type SpeciesTable struct {
	species []*Species
	byName  map[string]*Species // normalised names
}

// LoadSpecies parses the embedded species reference. Each call parses afresh
// (about 20 ms for some 540 species), so callers load it once and keep it;
// the table is read-only and safe to share between goroutines.
func LoadSpecies() (*SpeciesTable, error) {
	return parseSpecies(speciesJSON)
}

func parseSpecies(data []byte) (*SpeciesTable, error) {
	var f dataFile
	if err := json.Unmarshal(data, &f); err != nil {
		return nil, fmt.Errorf("assess: species data: %w", err)
	}
	t := &SpeciesTable{byName: map[string]*Species{}}
	for i := range f.Species {
		s := f.Species[i].Species
		srcs, err := expandSources(f.Species[i].Src, f.Citations)
		if err != nil {
			return nil, fmt.Errorf("assess: species data: %s: %w", s.ScientificName, err)
		}
		s.Sources = srcs
		for _, n := range s.Names() {
			k := normName(n)
			if prev, dup := t.byName[k]; dup && prev.ScientificName != s.ScientificName {
				return nil, fmt.Errorf("assess: species data: name %q used by %s and %s", n, prev.ScientificName, s.ScientificName)
			}
			t.byName[k] = &s
		}
		t.species = append(t.species, &s)
	}
	return t, nil
}

func expandSources(src map[string]string, cites map[string]SourceRef) (map[string]SourceRef, error) {
	out := make(map[string]SourceRef, len(src))
	for field, v := range src {
		key, note, _ := strings.Cut(v, "|")
		c, ok := cites[key]
		if !ok {
			return nil, fmt.Errorf("%s: unknown citation %q", field, key)
		}
		if note != "" {
			c.Note = note
		}
		out[field] = c
	}
	return out, nil
}

// normName folds case, hyphens, underscores, curly apostrophes and runs of
// spaces, so "red tailed hawk" finds "Red-tailed Hawk".
func normName(s string) string {
	s = strings.ToLower(strings.TrimSpace(s))
	s = strings.NewReplacer("-", " ", "_", " ", "’", "'", "‘", "'").Replace(s)
	return strings.Join(strings.Fields(s), " ")
}

// All returns every species, in the table's order (taxonomic within group).
// The slice is fresh; the species are shared and must not be modified.
func (t *SpeciesTable) All() []*Species {
	out := make([]*Species, len(t.species))
	copy(out, t.species)
	return out
}

// Len is the number of species.
func (t *SpeciesTable) Len() int { return len(t.species) }

// Find returns the species with the given scientific, common or other name,
// ignoring case, hyphens and extra spaces. Otherwise the error wraps
// ErrUnknownSpecies.
func (t *SpeciesTable) Find(name string) (*Species, error) {
	if s, ok := t.byName[normName(name)]; ok {
		return s, nil
	}
	return nil, fmt.Errorf("%w: %q", ErrUnknownSpecies, name)
}

// Search returns up to limit species (all when limit ≤ 0) whose scientific,
// common or other names match q, ignoring case: exact matches first, then
// names that start with q, then names with a word that starts with q, then
// names that contain q; alphabetical by common name within each rank. An
// empty q matches nothing.
func (t *SpeciesTable) Search(q string, limit int) []*Species {
	q = normName(q)
	if q == "" {
		return nil
	}
	const none = 99
	buckets := make([][]*Species, 4)
	for _, s := range t.species {
		best := none
		for _, n := range s.Names() {
			best = min(best, matchRank(normName(n), q))
		}
		if best != none {
			buckets[best] = append(buckets[best], s)
		}
	}
	var out []*Species
	for _, b := range buckets {
		slices.SortStableFunc(b, func(x, y *Species) int { return strings.Compare(x.CommonName, y.CommonName) })
		out = append(out, b...)
	}
	if limit > 0 && len(out) > limit {
		out = out[:limit]
	}
	return out
}

// matchRank: 0 exact, 1 prefix, 2 word prefix, 3 substring, 99 none.
func matchRank(name, q string) int {
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

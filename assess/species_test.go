package assess

import (
	"errors"
	"math"
	"slices"
	"testing"
)

// loadSpeciesTable loads the embedded species reference or stops the test.
func loadSpeciesTable(t *testing.T) *SpeciesTable {
	t.Helper()
	tab, err := LoadSpecies()
	if err != nil {
		t.Fatalf("LoadSpecies: %v", err)
	}
	return tab
}

// requiredSpecies are the species issue 4 names (AVONET/BirdLife names).
var requiredSpecies = []string{"Buteo jamaicensis", "Accipiter cooperii", "Accipiter striatus",
	"Accipiter gentilis", "Accipiter nisus", "Buteo buteo", "Haliaeetus leucocephalus",
	"Aquila chrysaetos", "Pandion haliaetus", "Falco sparverius", "Falco tinnunculus",
	"Falco peregrinus", "Cathartes aura", "Tyto alba", "Bubo virginianus", "Strix aluco",
	"Megascops asio", "Anas platyrhynchos", "Branta canadensis", "Cygnus olor",
	"Somateria mollissima", "Larus argentatus", "Larus smithsonianus", "Larus delawarensis",
	"Sterna hirundo", "Ardea herodias", "Ardea cinerea", "Gavia immer", "Podiceps cristatus",
	"Uria aalge", "Morus bassanus", "Fulmarus glacialis", "Charadrius vociferus",
	"Turdus migratorius", "Turdus merula", "Turdus philomelos", "Bombycilla cedrorum",
	"Sturnus vulgaris", "Passer domesticus", "Cardinalis cardinalis", "Cyanocitta cristata",
	"Corvus brachyrhynchos", "Corvus corone", "Pica pica", "Parus major", "Apus apus",
	"Chaetura pelagica", "Hirundo rustica", "Delichon urbicum", "Archilochus colubris",
	"Zenaida macroura", "Columba livia", "Dendrocopos major", "Colaptes auratus",
	"Phasianus colchicus"}

// demoSpecies are the demo centre's species, by common name (DESIGN.md).
var demoSpecies = []string{"Red-tailed Hawk", "Cooper's Hawk", "Peregrine Falcon", "Osprey",
	"Mallard", "Mute Swan", "Herring Gull", "Common Loon", "Northern Gannet", "Great Blue Heron",
	"American Robin", "Cedar Waxwing", "Common Swift"}

func TestLoadSpecies_Coverage(t *testing.T) {
	tab := loadSpeciesTable(t)
	// Issue 4: at least 300 species.
	if got := tab.Len(); got < 300 {
		t.Errorf("got %d species, want at least 300", got)
	}
	for _, name := range requiredSpecies {
		if _, err := tab.Find(name); err != nil {
			t.Errorf("required species %s: %v", name, err)
		}
	}
	for _, name := range demoSpecies {
		if _, err := tab.Find(name); err != nil && name != "Herring Gull" {
			t.Errorf("demo species %s: %v", name, err)
		}
	}
	// "Herring Gull" is two species (European and American): intake finds both by search.
	if got := tab.Search("Herring Gull", 0); len(got) != 2 {
		t.Errorf("Search(Herring Gull) got %d species, want 2", len(got))
	}
}

func TestSpeciesTable_Find(t *testing.T) {
	tab := loadSpeciesTable(t)
	tests := []struct {
		name, query, want string
	}{
		{"scientific", "Buteo jamaicensis", "Buteo jamaicensis"},
		{"scientific lower case", "buteo jamaicensis", "Buteo jamaicensis"},
		{"common", "Red-tailed Hawk", "Buteo jamaicensis"},
		{"common upper case", "RED-TAILED HAWK", "Buteo jamaicensis"},
		{"common without hyphen", "red tailed  hawk", "Buteo jamaicensis"},
		{"apostrophe", "cooper's hawk", "Accipiter cooperii"},
		{"curly apostrophe", "Cooper’s Hawk", "Accipiter cooperii"},
		{"other name", "Rock Pigeon", "Columba livia"},
		{"other name, British", "Great Northern Diver", "Gavia immer"},
		{"IOC name chosen over", "Western Barn Owl", "Tyto alba"},
		{"surrounding spaces", "  Osprey ", "Pandion haliaetus"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := tab.Find(tc.query)
			if err != nil {
				t.Fatalf("Find(%q): %v", tc.query, err)
			}
			if s.ScientificName != tc.want {
				t.Errorf("Find(%q) got %s, want %s", tc.query, s.ScientificName, tc.want)
			}
		})
	}
}

func TestSpeciesTable_Find_ErrUnknownSpecies(t *testing.T) {
	tab := loadSpeciesTable(t)
	for _, q := range []string{"", "Dodo", "Raphus cucullatus", "hawk"} {
		_, err := tab.Find(q)
		if !errors.Is(err, ErrUnknownSpecies) {
			t.Errorf("Find(%q) got error %v, want ErrUnknownSpecies", q, err)
		}
	}
}

func TestSpeciesTable_Search(t *testing.T) {
	tab := loadSpeciesTable(t)
	tests := []struct {
		name      string
		query     string
		limit     int
		wantFirst string // scientific name of the first result; "" = no results
		wantMin   int    // at least this many results
	}{
		{"exact common name first", "Mallard", 5, "Anas platyrhynchos", 1},
		{"prefix", "red-tai", 5, "Buteo jamaicensis", 1},
		{"word prefix, alphabetical", "swift", 0, "Tachymarptis melba", 5}, // Alpine Swift first
		{"scientific prefix", "Buteo", 0, "", 6},
		{"substring", "robin", 0, "", 2},
		{"limit", "gull", 3, "", 3},
		{"empty", "", 10, "", 0},
		{"no match", "zzz", 10, "", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := tab.Search(tc.query, tc.limit)
			if len(got) < tc.wantMin {
				t.Errorf("Search(%q, %d) got %d results, want at least %d", tc.query, tc.limit, len(got), tc.wantMin)
			}
			if tc.limit > 0 && len(got) > tc.limit {
				t.Errorf("Search(%q, %d) got %d results, want at most %d", tc.query, tc.limit, len(got), tc.limit)
			}
			if tc.wantMin == 0 && len(got) != 0 {
				t.Errorf("Search(%q) got %d results, want none", tc.query, len(got))
			}
			if tc.wantFirst != "" && (len(got) == 0 || got[0].ScientificName != tc.wantFirst) {
				t.Errorf("Search(%q) first got %v, want %s", tc.query, speciesNames(got), tc.wantFirst)
			}
		})
	}
}

func speciesNames(ss []*Species) []string {
	var out []string
	for _, s := range ss {
		out = append(out, s.ScientificName)
	}
	return out
}

func TestSpecies_Reference(t *testing.T) {
	tab := loadSpeciesTable(t)
	tests := []struct {
		name    string
		species string
		sex     Sex
		wantKg  float64 // the table's mean for the sex
		source  string  // where the want comes from
	}{
		// AVONET Mass (Tobias et al. 2022), sexes pooled.
		{"pooled, unknown sex", "Buteo jamaicensis", SexUnknown, 1.10116, "AVONET"},
		// Female and male means, typed from knowledge (from memory; cf. Dunning 2008).
		{"female mean", "Buteo jamaicensis", SexFemale, 1.224, "from memory"},
		{"male mean", "Buteo jamaicensis", SexMale, 1.028, "from memory"},
		// Bruderer 2010 via BirdWingData: both sexes of the one study.
		{"female from a study", "Falco peregrinus", SexFemale, 0.998, "Bruderer 2010"},
		// A species without sex means falls back to the pooled mean.
		{"no sex means", "Turdus migratorius", SexFemale, 0.0785, "AVONET"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := tab.Find(tc.species)
			if err != nil {
				t.Fatal(err)
			}
			r := s.Reference(tc.sex)
			if math.Abs(r.MassKg-tc.wantKg) > 1e-9 {
				t.Errorf("%s %s MassKg got %g, want %g (%s)", tc.species, tc.sex, r.MassKg, tc.wantKg, tc.source)
			}
			if r.SpanM != s.SpanMM/1000 || r.AreaM2 != s.AreaCM2/1e4 {
				t.Errorf("%s span/area got %g m, %g m², want %g mm, %g cm² in SI", tc.species, r.SpanM, r.AreaM2, s.SpanMM, s.AreaCM2)
			}
			if r.ExpectedMargin != 0 || r.FlightMuscleFraction != 0 {
				t.Errorf("%s: blank margin and muscle fraction must be 0, got %g, %g", tc.species, r.ExpectedMargin, r.FlightMuscleFraction)
			}
		})
	}
}

func TestSpecies_MassRangeG(t *testing.T) {
	tab := loadSpeciesTable(t)
	// Cooper's hawk: female 529 g, male 349 g (from memory); ranges ± 25 % (project default).
	s, err := tab.Find("Accipiter cooperii")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		sex          Sex
		wantLo, want float64
	}{
		{SexFemale, 396.8, 661.3},
		{SexMale, 261.8, 436.3},
		{SexUnknown, 261.8, 661.3}, // spans both sexes
	}
	for _, tc := range tests {
		lo, hi := s.MassRangeG(tc.sex)
		if math.Abs(lo-tc.wantLo) > 0.06 || math.Abs(hi-tc.want) > 0.06 {
			t.Errorf("MassRangeG(%s) got %g–%g, want %g–%g", tc.sex, lo, hi, tc.wantLo, tc.want)
		}
	}
	// Every species: the unknown-sex range spans both sexes and holds each mean.
	for _, s := range tab.All() {
		flo, fhi := s.MassRangeG(SexFemale)
		mlo, mhi := s.MassRangeG(SexMale)
		ulo, uhi := s.MassRangeG(SexUnknown)
		if ulo != min(flo, mlo) || uhi != max(fhi, mhi) {
			t.Errorf("%s: unknown-sex range %g–%g does not span %g–%g and %g–%g", s.ScientificName, ulo, uhi, flo, fhi, mlo, mhi)
		}
		for _, sex := range Sexes {
			m := s.Reference(sex).MassKg * 1000
			lo, hi := s.MassRangeG(sex)
			if m < lo || m > hi {
				t.Errorf("%s %s: mean %g g outside its range %g–%g", s.ScientificName, sex, m, lo, hi)
			}
		}
	}
}

func TestGroup_Helpers(t *testing.T) {
	tests := []struct {
		g                        Group
		aquatic, aerial, raptorL bool
		normal                   LaunchMode
	}{
		// Launch modes: PRACTICE.md "Launch modes".
		{GroupRaptor, false, false, true, LaunchStanding},
		{GroupOwl, false, false, true, LaunchStanding},
		{GroupSongbird, false, false, false, LaunchStanding},
		{GroupSwift, false, true, false, LaunchHand},
		{GroupSwallow, false, true, false, LaunchStanding},
		{GroupNightjar, false, true, false, LaunchStanding},
		{GroupHummingbird, false, false, false, LaunchHover},
		{GroupDabblingDuck, true, false, false, LaunchWaterSpring},
		{GroupDivingDuck, true, false, false, LaunchRunUpWater},
		{GroupLoonGrebeAlcid, true, false, false, LaunchRunUpWater},
		{GroupSwanGoose, true, false, false, LaunchRunUpWater},
		{GroupSeabird, true, false, false, LaunchWindOrHeight},
		{GroupGull, false, false, false, LaunchStanding},
	}
	for _, tc := range tests {
		t.Run(string(tc.g), func(t *testing.T) {
			if got := tc.g.Aquatic(); got != tc.aquatic {
				t.Errorf("Aquatic got %v, want %v", got, tc.aquatic)
			}
			if got := tc.g.AerialInsectivore(); got != tc.aerial {
				t.Errorf("AerialInsectivore got %v, want %v", got, tc.aerial)
			}
			if got := tc.g.RaptorLike(); got != tc.raptorL {
				t.Errorf("RaptorLike got %v, want %v", got, tc.raptorL)
			}
			if got := tc.g.NormalLaunchMode(); got != tc.normal {
				t.Errorf("NormalLaunchMode got %s, want %s", got, tc.normal)
			}
		})
	}
	for _, g := range Groups {
		modes := g.SafeTrialModes()
		if !g.Valid() || g.Label() == "" || len(modes) == 0 || modes[0] != g.NormalLaunchMode() {
			t.Errorf("%s: valid %v, label %q, safe modes %v: want valid, labelled, normal mode first", g, g.Valid(), g.Label(), modes)
		}
		for _, m := range modes {
			if !slices.Contains(TrialModes, m) {
				t.Errorf("%s: safe mode %q is not a trial mode", g, m)
			}
		}
	}
	// PRACTICE.md "Safety": never a land trial for loons, grebes, alcids; never a drop for swifts.
	if modes := GroupLoonGrebeAlcid.SafeTrialModes(); slices.Contains(modes, LaunchStanding) || slices.Contains(modes, LaunchRunUpLand) || slices.Contains(modes, TrialDrop) {
		t.Errorf("loon-grebe-alcid safe modes %v include a land trial", modes)
	}
	if modes := GroupSwift.SafeTrialModes(); slices.Contains(modes, TrialDrop) || slices.Contains(modes, LaunchWindOrHeight) {
		t.Errorf("swift safe modes %v include a drop", modes)
	}
	if Group("penguin").Valid() || Group("penguin").SafeTrialModes() != nil {
		t.Error("an unknown group must be invalid with no safe modes")
	}
}

func TestEnclosure(t *testing.T) {
	// Minimum Standards 2012 via Hand-Rearing Birds 2020 (PRACTICE.md): metric sizes.
	tests := []struct {
		id      string
		l, w, h float64
		prov    Provenance
	}{
		{"raptor-small", 4.9, 2.4, 2.4, ProvPublished},
		{"raptor-largest", 30.5, 6.1, 4.9, ProvPublished},
		{"owl-large", 15, 3, 3.6, ProvPublished},
		{"dove", 3.6, 2.5, 2.5, ProvPublished},
		{"eagle", 30.5, 6.1, 4.9, ProvFromMemory},
	}
	for _, tc := range tests {
		e, ok := Enclosure(tc.id)
		if !ok || e.LengthM != tc.l || e.WidthM != tc.w || e.HeightM != tc.h || e.Provenance != tc.prov {
			t.Errorf("Enclosure(%s) got %+v, want %g×%g×%g m, %s", tc.id, e, tc.l, tc.w, tc.h, tc.prov)
		}
	}
	if _, ok := Enclosure("aviary"); ok {
		t.Error("Enclosure(aviary) found an unknown class")
	}
}

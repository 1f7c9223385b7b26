package assess

import (
	"encoding/csv"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// within reports whether got is within relTol of want, relatively.
func within(got, want, relTol float64) bool {
	return math.Abs(got-want) <= relTol*math.Abs(want)
}

func ptr[T any](v T) *T { return &v }

// pinnedBird is SCIENCE.md §8's pinned bird: 100 g non-passerine, b 0.40 m,
// S 0.030 m², sea level, the default parameter set.
func pinnedBird() FlightInput {
	return FlightInput{MassKg: 0.1, SpanM: 0.4, AreaM2: 0.03}
}

func mustFlight(t testing.TB, in FlightInput) FlightResult {
	t.Helper()
	r, err := Flight(in)
	if err != nil {
		t.Fatalf("Flight(%+v): %v", in, err)
	}
	return r
}

// alerstamSpecies is one row of testdata/alerstam2007_flight_speeds.csv
// (Alerstam et al. 2007, PLoS Biol. 5:e197, Table S1; see the README there).
type alerstamSpecies struct {
	name                  string
	passerine             bool
	ueMS, uzMS            float64
	massKg, spanM, areaM2 float64
}

func loadAlerstam(t testing.TB) []alerstamSpecies {
	t.Helper()
	f, err := os.Open("testdata/alerstam2007_flight_speeds.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	num := func(r []string, name string) float64 {
		v, err := strconv.ParseFloat(r[col[name]], 64)
		if err != nil {
			t.Fatalf("%s %s: %v", r[col["species"]], name, err)
		}
		return v
	}
	var out []alerstamSpecies
	for _, r := range rows[1:] {
		name := r[col["species"]]
		out = append(out, alerstamSpecies{
			name: name,
			// The group's only non-passerines are the falcons.
			passerine: r[col["taxon_group"]] == "Falcons, crows & songbirds" && !strings.HasPrefix(name, "Falco "),
			ueMS:      num(r, "Ue_m_s"),
			massKg:    num(r, "mass_kg"), spanM: num(r, "wingspan_m"), areaM2: num(r, "wing_area_m2"),
		})
	}
	return out
}

func alerstamByName(t testing.TB, name string) alerstamSpecies {
	t.Helper()
	for _, s := range loadAlerstam(t) {
		if s.name == name {
			return s
		}
	}
	t.Fatalf("%s not in testdata", name)
	return alerstamSpecies{}
}

// healthy is the species as its own healthy reference at sea level.
func (s alerstamSpecies) healthy() FlightInput {
	return FlightInput{MassKg: s.massKg, SpanM: s.spanM, AreaM2: s.areaM2, Passerine: s.passerine}
}

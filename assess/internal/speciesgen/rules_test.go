package main

import (
	"testing"

	"aloft/assess"
)

func TestGroupOf(t *testing.T) {
	tests := []struct {
		name, family, order string
		want                assess.Group
	}{
		{"Cygnus olor", "Anatidae", "Anseriformes", assess.GroupSwanGoose},
		{"Anas platyrhynchos", "Anatidae", "Anseriformes", assess.GroupDabblingDuck},
		{"Somateria mollissima", "Anatidae", "Anseriformes", assess.GroupDivingDuck},
		{"Fulica atra", "Rallidae", "Gruiformes", assess.GroupDivingDuck}, // PRACTICE.md: coots launch like diving ducks
		{"Rallus aquaticus", "Rallidae", "Gruiformes", assess.GroupRail},
		{"Corvus corax", "Corvidae", "Passeriformes", assess.GroupCorvid},
		{"Hirundo rustica", "Hirundinidae", "Passeriformes", assess.GroupSwallow},
		{"Turdus merula", "Turdidae", "Passeriformes", assess.GroupSongbird},
		{"Uria aalge", "Alcidae", "Charadriiformes", assess.GroupLoonGrebeAlcid},
		{"Catharacta skua", "Stercorariidae", "Charadriiformes", assess.GroupGull},
		{"Cathartes aura", "Cathartidae", "Cathartiformes", assess.GroupRaptor},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := groupOf(&avonetRow{Name: tc.name, Family: tc.family, Order: tc.order})
			if err != nil || got != tc.want {
				t.Errorf("groupOf(%s) got %s, %v; want %s", tc.name, got, err, tc.want)
			}
		})
	}
	if _, err := groupOf(&avonetRow{Name: "Psittacula krameri", Family: "Psittaculidae", Order: "Psittaciformes"}); err == nil {
		t.Error("a family outside the groups must be an error")
	}
}

func TestUsable(t *testing.T) {
	a := &avonetRow{Name: "X y", MassG: 100}
	tests := []struct {
		name string
		c    candidate
		want bool
	}{
		{"good", candidate{massG: 100, spanM: 0.5, areaM2: 0.04}, true},             // AR 6.25
		{"mass 1.5× AVONET", candidate{massG: 150, spanM: 0.5, areaM2: 0.04}, true}, // issue 4: factor 1.5 allowed
		{"mass 1.6× AVONET", candidate{massG: 160, spanM: 0.5, areaM2: 0.04}, false},
		{"mass ÷ 1.6", candidate{massG: 62, spanM: 0.5, areaM2: 0.04}, false},
		{"AR below 3", candidate{massG: 100, spanM: 0.3, areaM2: 0.031}, false},
		{"AR above 20", candidate{massG: 100, spanM: 1, areaM2: 0.049}, false},
		{"no area", candidate{massG: 100, spanM: 0.5}, false},
	}
	for _, tc := range tests {
		if got := usable(tc.c, a); got != tc.want {
			t.Errorf("%s: usable got %v, want %v", tc.name, got, tc.want)
		}
	}
}

func TestBest(t *testing.T) {
	a := &avonetRow{Name: "X y", MassG: 100}
	c := func(ds, def, sex string, m float64, study string) candidate {
		return candidate{dataset: ds, defSpan: def, defArea: def, sex: sex, massG: m, study: study}
	}
	tests := []struct {
		name      string
		cs        []candidate
		wantStudy string
	}{
		{"A-II before A?-II?", []candidate{c("birdwingdata", "A?-II?", "NA", 100, "S1"), c("birdwingdata", "A-II", "NA", 130, "S2")}, "S2"},
		{"Alerstam file first", []candidate{c("birdwingdata", "A-II", "NA", 100, "S1"), c("alerstam2007", "A-II", "", 120, "AL")}, "AL"},
		{"unsexed before sexed", []candidate{c("birdwingdata", "A-II", "F", 100, "S1"), c("birdwingdata", "A-II", "NA", 140, "S2")}, "S2"},
		{"nearest mass", []candidate{c("birdwingdata", "A-II", "NA", 130, "S1"), c("birdwingdata", "A-II", "NA", 95, "S2")}, "S2"},
	}
	for _, tc := range tests {
		got, ok := best(tc.cs, a)
		if !ok || got.study != tc.wantStudy {
			t.Errorf("%s: got %s, want %s", tc.name, got.study, tc.wantStudy)
		}
	}
	if _, ok := best(nil, a); ok {
		t.Error("best of nothing must report none")
	}
}

func TestResolveBWD(t *testing.T) {
	av := map[string]*avonetRow{"Falco peregrinus": {}, "Corvus corone": {}, "Ardea herodias": {}, "Ardea occidentalis": {}}
	r := &resolver{avonet: av, syn: map[string]synonym{
		"birdwingdata|Falco pelegrinoides": {BirdLife: "Falco peregrinus", Relation: relExclude},
		"birdwingdata|Corvus cornix":       {BirdLife: "Corvus corone", Relation: relPart},
	}}
	tests := []struct {
		name, original, ioc string
		want, other         string
		excluded            bool
	}{
		{"excluded population", "Falco pelegrinoides", "Falco peregrinus", "", "", true},
		{"lumped taxon", "Corvus cornix", "Corvus cornix", "Corvus corone", "", false},
		{"the study's name wins", "Ardea occidentalis", "Ardea herodias", "Ardea occidentalis", "Ardea herodias", false},
		{"IOC name when the study's is unknown", "Stellula x", "Falco peregrinus", "Falco peregrinus", "", false},
		{"unknown", "A b", "C d", "", "", false},
	}
	for _, tc := range tests {
		sp, _, excl, other := r.resolveBWD(bwdRow{Original: tc.original, IOC: tc.ioc})
		if sp != tc.want || excl != tc.excluded || other != tc.other {
			t.Errorf("%s: got %q excluded %v other %q; want %q, %v, %q", tc.name, sp, excl, other, tc.want, tc.excluded, tc.other)
		}
	}
}

func TestMassRanges(t *testing.T) {
	f, m := 500.0, 300.0
	// ± 25 % per sex [project default]; unknown spans both.
	got := massRanges(assess.MassesG{Pooled: 400, Female: &f, Male: &m})
	want := assess.MassRanges{Female: assess.RangeG{Min: 375, Max: 625}, Male: assess.RangeG{Min: 225, Max: 375},
		Unknown: assess.RangeG{Min: 225, Max: 625}}
	if got != want {
		t.Errorf("massRanges got %+v, want %+v", got, want)
	}
}

package main

import (
	"fmt"
	"strings"
)

// Relations of a synonym (synonyms.csv).
const (
	relSame    = "same"    // another name for the same taxon
	relPart    = "part"    // a taxon BirdLife includes in the species
	relExclude = "exclude" // a population whose values are not used
	relExact   = "exact"   // the name is AVONET's own
)

// synonym is one row of synonyms.csv.
type synonym struct {
	Dataset, Source, BirdLife, Relation, Note string
}

// resolver joins names of the datasets to AVONET species.
type resolver struct {
	avonet map[string]*avonetRow
	syn    map[string]synonym // dataset|source name
}

func readSynonyms(path string, avonet map[string]*avonetRow) (*resolver, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, err
	}
	r := &resolver{avonet: avonet, syn: map[string]synonym{}}
	for _, row := range t.rows {
		s := synonym{t.get(row, "dataset"), t.get(row, "source_name"), t.get(row, "birdlife_name"),
			t.get(row, "relation"), t.get(row, "note")}
		switch s.Relation {
		case relSame, relPart, relExclude:
		default:
			return nil, fmt.Errorf("%s: %s: bad relation %q", path, s.Source, s.Relation)
		}
		if _, ok := avonet[s.BirdLife]; !ok {
			return nil, fmt.Errorf("%s: %s: %q is not an AVONET species", path, s.Source, s.BirdLife)
		}
		key := s.Dataset + "|" + s.Source
		if _, dup := r.syn[key]; dup {
			return nil, fmt.Errorf("%s: %s listed twice", path, key)
		}
		r.syn[key] = s
	}
	return r, nil
}

// resolve returns the AVONET species a dataset's name stands for and how:
// a synonym first, then AVONET's own name. ok is false when neither knows it.
func (r *resolver) resolve(dataset, name string) (species, relation string, ok bool) {
	if s, found := r.syn[dataset+"|"+name]; found {
		return s.BirdLife, s.Relation, true
	}
	if _, found := r.avonet[name]; found {
		return name, relExact, true
	}
	return "", "", false
}

// resolveBWD joins a BirdWingData row by the original study's name, or when
// that is unknown by the IOC name. excluded is true when a synonym excludes
// the row. other is the species the IOC name would join when it differs (a
// row is ambiguous when both are in the table).
func (r *resolver) resolveBWD(b bwdRow) (species, relation string, excluded bool, other string) {
	s1, rel1, ok1 := r.resolve("birdwingdata", b.Original)
	s2, rel2, ok2 := r.resolve("birdwingdata", b.IOC)
	switch {
	case ok1 && rel1 == relExclude:
		return "", "", true, ""
	case ok1:
		if ok2 && s2 != s1 && rel2 != relExclude {
			other = s2
		}
		return s1, rel1, false, other
	case ok2 && rel2 == relExclude:
		return "", "", true, ""
	case ok2:
		return s2, rel2, false, ""
	}
	return "", "", false, ""
}

// joined is what the datasets hold for one selected species.
type joined struct {
	av         *avonetRow
	sel        selected
	candidates []candidate // span-and-area rows that pass the filters
	spanOnly   []candidate // rows with a span but no area that pass the mass filter
	sexRows    []candidate // BirdWingData rows with a sex
	iocExact   string      // IOC English name where the IOC name is the BirdLife name
	iocSame    string      // IOC English name of a synonym of the same taxon
	iocSameSci string
	alRows     [][]string // Alerstam rows joined to the species
	allMasses  []float64  // every row's mass (0 = none), both datasets
}

// join attaches every dataset row to the selected species it names.
func join(in *inputs) (map[string]*joined, error) {
	js := map[string]*joined{}
	for _, s := range in.sel {
		a, ok := in.avonet[s.Name]
		if !ok {
			return nil, fmt.Errorf("selection: %q is not an AVONET (BirdLife) species", s.Name)
		}
		if _, dup := js[s.Name]; dup {
			return nil, fmt.Errorf("selection: %q listed twice", s.Name)
		}
		if a.MassG <= 0 || a.ChordMM <= 0 {
			return nil, fmt.Errorf("selection: %q lacks AVONET mass or wing length", s.Name)
		}
		js[s.Name] = &joined{av: a, sel: s}
	}
	if err := joinAlerstam(in, js); err != nil {
		return nil, err
	}
	return js, joinBirdWing(in, js)
}

func joinAlerstam(in *inputs, js map[string]*joined) error {
	for _, r := range in.alerstam {
		sp, rel, ok := in.res.resolve("alerstam2007", r.Species)
		if !ok {
			return fmt.Errorf("alerstam2007: %q joins no AVONET species: add a synonym", r.Species)
		}
		j := js[sp]
		if j == nil || rel == relExclude {
			continue
		}
		j.alRows = append(j.alRows, r.raw)
		j.allMasses = append(j.allMasses, r.MassG)
		c := candidate{dataset: "alerstam2007", sourceName: r.Species, massG: r.MassG, spanM: r.SpanM,
			areaM2: r.AreaM2, defSpan: "A-II", defArea: "A-II", study: "Alerstam et al. 2007, Table S1"}
		if usable(c, j.av) {
			j.candidates = append(j.candidates, c)
		}
	}
	return nil
}

func joinBirdWing(in *inputs, js map[string]*joined) error {
	var bad []string
	for _, b := range in.bwd {
		sp, _, excluded, other := in.res.resolveBWD(b)
		if other != "" && js[sp] != nil && js[other] != nil {
			bad = append(bad, fmt.Sprintf("birdwingdata row %q / %q (%s) joins both %s and %s: add a synonym",
				b.Original, b.IOC, b.Ref, sp, other))
			continue
		}
		j := js[sp]
		if excluded || j == nil {
			continue
		}
		iocSp, iocRel, _ := in.res.resolve("birdwingdata", b.IOC)
		switch {
		case b.English == "" || iocSp != sp:
		case iocRel == relExact && j.iocExact == "":
			j.iocExact = b.English
		case iocRel == relSame && j.iocSame == "":
			j.iocSame, j.iocSameSci = b.English, b.IOC
		}
		if b.Ref == "Alerstam 2007" && in.inAlerstam[sp] {
			continue // the same values as the Alerstam et al. 2007 file, used from there
		}
		j.allMasses = append(j.allMasses, b.MassG)
		c := candidate{dataset: "birdwingdata", sourceName: b.Original, iocName: b.IOC, sex: b.Sex,
			massG: b.MassG, spanM: b.SpanM, areaM2: b.AreaM2, defSpan: b.DefSpan, defArea: b.DefArea, study: b.Ref}
		if (b.Sex == "F" || b.Sex == "M") && b.MassG > 0 {
			j.sexRows = append(j.sexRows, c)
		}
		switch {
		case goodDefinition(c) && usable(c, j.av):
			j.candidates = append(j.candidates, c)
		case spanOnly(c, j.av):
			j.spanOnly = append(j.spanOnly, c)
		}
	}
	if len(bad) > 0 {
		return fmt.Errorf("%s", strings.Join(bad, "\n"))
	}
	return nil
}

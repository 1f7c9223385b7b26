package main

import "fmt"

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

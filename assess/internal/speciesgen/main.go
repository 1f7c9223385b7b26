// Command speciesgen builds Aloft's species reference from published
// datasets. Run it from the module root:
//
//	go run ./assess/internal/speciesgen [-data ../shared/data] [-assess assess]
//
// It reads AVONET (Tobias et al. 2022), Alerstam et al. 2007 Table S1 and
// BirdWingData v2.1 from -data, and the hand-kept lists beside it
// (selection.csv, sexmass.csv) and in assess/testdata/species (synonyms.csv).
// It writes assess/species_data.json (embedded in the binary) and, under
// assess/testdata/species, the AVONET and Alerstam subsets it used, the
// measured values it took from BirdWingData rows with their studies, and the
// wing-loading ranges per group that the tests check against. It prints the
// hold-out errors of the span and area estimates.
//
// Nothing else reads -data: the tests and the build use only the outputs.
package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

func main() {
	data := flag.String("data", "../shared/data", "folder holding the published datasets")
	dir := flag.String("assess", "assess", "the assess package folder (outputs go there)")
	flag.Parse()
	if err := run(*data, *dir, os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "speciesgen:", err)
		os.Exit(1)
	}
}

func run(data, dir string, log io.Writer) error {
	in, err := load(data, dir)
	if err != nil {
		return err
	}
	bs, err := buildAll(in, log)
	if err != nil {
		return err
	}
	td := filepath.Join(dir, "testdata", "species")
	steps := []struct {
		name string
		fn   func() error
	}{
		{"species_data.json", func() error { return writeData(filepath.Join(dir, "species_data.json"), bs) }},
		{"avonet_subset.csv", func() error { return writeAvonetSubset(filepath.Join(td, "avonet_subset.csv"), in, bs) }},
		{"alerstam2007_subset.csv", func() error { return writeAlerstamSubset(filepath.Join(td, "alerstam2007_subset.csv"), in, bs) }},
		{"wing_values.csv", func() error { return writeValues(filepath.Join(td, "wing_values.csv"), bs) }},
		{"wing_loading_ranges.csv", func() error { return writeLoadingRanges(filepath.Join(td, "wing_loading_ranges.csv"), in) }},
	}
	for _, s := range steps {
		if err := s.fn(); err != nil {
			return fmt.Errorf("write %s: %w", s.name, err)
		}
	}
	summarise(log, bs)
	return nil
}

func load(data, dir string) (*inputs, error) {
	in := &inputs{}
	var err error
	if in.avonet, in.avTable, err = readAvonet(filepath.Join(data, "avonet1_birdlife.csv")); err != nil {
		return nil, err
	}
	if in.alerstam, in.alTable, err = readAlerstam(filepath.Join(data, "alerstam2007_flight_speeds.csv")); err != nil {
		return nil, err
	}
	if in.bwd, err = readBirdWing(filepath.Join(data, "birdwingdata_v2.1.csv")); err != nil {
		return nil, err
	}
	gen := filepath.Join(dir, "internal", "speciesgen")
	if in.sel, err = readSelection(filepath.Join(gen, "selection.csv")); err != nil {
		return nil, err
	}
	if in.sexMass, err = readSexMass(filepath.Join(gen, "sexmass.csv")); err != nil {
		return nil, err
	}
	if in.res, err = readSynonyms(filepath.Join(dir, "testdata", "species", "synonyms.csv"), in.avonet); err != nil {
		return nil, err
	}
	in.inAlerstam = map[string]bool{}
	for _, r := range in.alerstam {
		if sp, _, ok := in.res.resolve("alerstam2007", r.Species); ok {
			in.inAlerstam[sp] = true
		}
	}
	return in, nil
}

func summarise(log io.Writer, bs []*built) {
	var measured, sexed, memNames int
	for _, b := range bs {
		if b.measured != nil {
			measured++
		}
		if b.sp.MassG.Female != nil {
			sexed++
		}
		if b.src["common_name"] == "name-memory" {
			memNames++
		}
	}
	fmt.Fprintf(log, "%d species: %d with measured span and area, %d estimated; %d with female and male means; %d English names typed from knowledge\n",
		len(bs), measured, len(bs)-measured, sexed, memNames)
}

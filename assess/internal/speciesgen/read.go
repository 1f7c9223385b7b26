package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
)

// table is a CSV file held as a header and records.
type table struct {
	header []string
	rows   [][]string
	col    map[string]int
}

// readCSV reads a CSV file; lines starting with '#' are comments, a UTF-8
// byte-order mark is dropped.
func readCSV(path string) (*table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	r.FieldsPerRecord = -1
	all, err := r.ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(all) == 0 {
		return nil, fmt.Errorf("%s: empty", path)
	}
	t := &table{header: all[0], rows: all[1:], col: map[string]int{}}
	t.header[0] = strings.TrimPrefix(t.header[0], "\ufeff")
	for i, h := range t.header {
		t.col[h] = i
	}
	return t, nil
}

// get returns field name of row, "" when the column is missing.
func (t *table) get(row []string, name string) string {
	i, ok := t.col[name]
	if !ok || i >= len(row) {
		return ""
	}
	return strings.TrimSpace(row[i])
}

// num parses a number; "", "NA" and unparsable give 0, which means absent.
func num(s string) float64 {
	if s == "" || s == "NA" {
		return 0
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0
	}
	return v
}

func writeCSV(w io.Writer, header []string, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	cw.Flush()
	return cw.Error()
}

// avonetRow is one AVONET species (BirdLife taxonomy).
type avonetRow struct {
	Seq        int
	Name       string
	Family     string
	Order      string
	MassG      float64
	MassSource string
	ChordMM    float64
	Migration  int
	raw        []string
}

func readAvonet(path string) (map[string]*avonetRow, *table, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, nil, err
	}
	out := map[string]*avonetRow{}
	for _, r := range t.rows {
		a := &avonetRow{
			Name:       t.get(r, "Species1"),
			Family:     t.get(r, "Family1"),
			Order:      t.get(r, "Order1"),
			MassG:      num(t.get(r, "Mass")),
			MassSource: t.get(r, "Mass.Source"),
			ChordMM:    num(t.get(r, "Wing.Length")),
			raw:        r,
		}
		a.Seq, _ = strconv.Atoi(t.get(r, "Sequence"))
		a.Migration, _ = strconv.Atoi(t.get(r, "Migration"))
		out[a.Name] = a
	}
	return out, t, nil
}

// alerstamRow is one row of Alerstam et al. 2007, Table S1.
type alerstamRow struct {
	Species string
	Source  string
	MassG   float64
	SpanM   float64
	AreaM2  float64
	raw     []string
}

func readAlerstam(path string) ([]alerstamRow, *table, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, nil, err
	}
	var out []alerstamRow
	for _, r := range t.rows {
		out = append(out, alerstamRow{
			Species: t.get(r, "species"),
			Source:  t.get(r, "source"),
			MassG:   num(t.get(r, "mass_kg")) * 1000,
			SpanM:   num(t.get(r, "wingspan_m")),
			AreaM2:  num(t.get(r, "wing_area_m2")),
			raw:     r,
		})
	}
	return out, t, nil
}

// bwdRow is one BirdWingData v2.1 row.
type bwdRow struct {
	Original, IOC, English string
	Sex, Ref               string
	DefSpan, DefArea       string
	MassG, SpanM, AreaM2   float64
}

func readBirdWing(path string) ([]bwdRow, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, err
	}
	var out []bwdRow
	for _, r := range t.rows {
		out = append(out, bwdRow{
			Original: t.get(r, "Species_original"),
			IOC:      t.get(r, "Species_IOC13.1"),
			English:  t.get(r, "English.name_IOC13.1"),
			Sex:      t.get(r, "Sex"),
			Ref:      t.get(r, "ref"),
			DefSpan:  t.get(r, "def_span"),
			DefArea:  t.get(r, "def_area"),
			MassG:    num(t.get(r, "body.mass_g")),
			SpanM:    num(t.get(r, "wingspan_m")),
			AreaM2:   num(t.get(r, "wing.area_m2")),
		})
	}
	return out, nil
}

// selected is one species of selection.csv.
type selected struct {
	Name       string
	CommonName string
	OtherNames []string
	Override   bool
}

func readSelection(path string) ([]selected, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, err
	}
	var out []selected
	for _, r := range t.rows {
		s := selected{
			Name:       t.get(r, "scientific_name"),
			CommonName: t.get(r, "common_name"),
			Override:   t.get(r, "override") == "y",
		}
		if o := t.get(r, "other_names"); o != "" {
			s.OtherNames = strings.Split(o, ";")
		}
		out = append(out, s)
	}
	return out, nil
}

// sexMass is one row of sexmass.csv.
type sexMass struct{ FemaleG, MaleG float64 }

func readSexMass(path string) (map[string]sexMass, error) {
	t, err := readCSV(path)
	if err != nil {
		return nil, err
	}
	out := map[string]sexMass{}
	for _, r := range t.rows {
		out[t.get(r, "scientific_name")] = sexMass{num(t.get(r, "female_g")), num(t.get(r, "male_g"))}
	}
	return out, nil
}

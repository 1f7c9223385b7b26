package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"aloft/assess"
)

// outSpecies is a species as the embedded file holds it: the values, and a
// citation key (with an optional note) per value instead of full sources.
type outSpecies struct {
	assess.Species
	Sources *int              `json:"sources,omitempty"` // hides Species.Sources
	Src     map[string]string `json:"src"`
}

// writeData writes the embedded species file, one species per line.
func writeData(path string, bs []*built) error {
	used := map[string]assess.SourceRef{}
	for _, b := range bs {
		for _, v := range b.src {
			key, _, _ := strings.Cut(v, "|")
			c, ok := citations[key]
			if !ok {
				return fmt.Errorf("unknown citation %q", key)
			}
			used[key] = c
		}
	}
	var buf bytes.Buffer
	buf.WriteString("{\"generated_by\":\"go run ./assess/internal/speciesgen (see assess/testdata/species/README.md)\",\n\"citations\":")
	if err := encode(&buf, used); err != nil {
		return err
	}
	buf.WriteString(",\n\"species\":[\n")
	for i, b := range bs {
		if i > 0 {
			buf.WriteString(",\n")
		}
		if err := encode(&buf, outSpecies{Species: b.sp, Src: b.src}); err != nil {
			return err
		}
	}
	buf.WriteString("\n]}\n")
	return os.WriteFile(path, buf.Bytes(), 0o644)
}

func encode(buf *bytes.Buffer, v any) error {
	var tmp bytes.Buffer
	enc := json.NewEncoder(&tmp)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return err
	}
	buf.Write(bytes.TrimRight(tmp.Bytes(), "\n"))
	return nil
}

// avonetColumns are the AVONET columns the table uses.
var avonetColumns = []string{"Sequence", "Species1", "Family1", "Order1", "Mass", "Mass.Source", "Wing.Length", "Migration"}

func writeAvonetSubset(path string, in *inputs, bs []*built) error {
	var rows [][]string
	for _, b := range bs {
		raw := in.avonet[b.sp.ScientificName].raw
		row := make([]string, len(avonetColumns))
		for i, c := range avonetColumns {
			row[i] = in.avTable.get(raw, c)
		}
		rows = append(rows, row)
	}
	slices.SortFunc(rows, func(x, y []string) int { return strings.Compare(x[1], y[1]) })
	return writeFile(path, avonetColumns, rows)
}

func writeAlerstamSubset(path string, in *inputs, bs []*built) error {
	var rows [][]string
	for _, b := range bs {
		rows = append(rows, b.alRows...)
	}
	return writeFile(path, in.alTable.header, rows)
}

var valueColumns = []string{"use", "dataset", "source_name", "ioc_name", "sex", "body_mass_g",
	"wingspan_m", "wing_area_m2", "def_span", "def_area", "study"}

// writeValues writes every measured row the table uses: the chosen span and
// area of each measured species and the rows behind female and male means.
func writeValues(path string, bs []*built) error {
	var rows [][]string
	row := func(use string, c candidate) []string {
		return []string{use, c.dataset, c.sourceName, c.iocName, c.sex, fnum(c.massG), fnum(c.spanM),
			fnum(c.areaM2), c.defSpan, c.defArea, c.study}
	}
	for _, b := range bs {
		if b.measured != nil {
			rows = append(rows, row("span-area", *b.measured))
		}
		if b.spanRow != nil {
			rows = append(rows, row("span", *b.spanRow))
		}
		for _, c := range b.sexRows {
			rows = append(rows, row("sex-mass", c))
		}
	}
	return writeFile(path, valueColumns, rows)
}

func fnum(v float64) string {
	if v == 0 {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// loadingRange is the wing loading the datasets show for one group.
type loadingRange struct {
	n        int
	min, max float64
}

// writeLoadingRanges writes, per group, the range of wing loading
// (mass·g/area, N/m²) over every row of both datasets for species of the
// group's families, whatever the row's definitions, after the same mass and
// aspect-ratio filters.
func writeLoadingRanges(path string, in *inputs) error {
	rs := map[assess.Group]*loadingRange{}
	add := func(species string, massG, spanM, areaM2 float64) {
		a := in.avonet[species]
		if a == nil {
			return
		}
		grp, err := groupOf(a)
		if err != nil || !usable(candidate{massG: massG, spanM: spanM, areaM2: areaM2}, a) {
			return
		}
		q := massG / 1000 * 9.81 / areaM2
		r := rs[grp]
		if r == nil {
			r = &loadingRange{min: math.Inf(1), max: math.Inf(-1)}
			rs[grp] = r
		}
		r.n++
		r.min, r.max = min(r.min, q), max(r.max, q)
	}
	for _, r := range in.alerstam {
		if sp, rel, ok := in.res.resolve("alerstam2007", r.Species); ok && rel != relExclude {
			add(sp, r.MassG, r.SpanM, r.AreaM2)
		}
	}
	for _, b := range in.bwd {
		if sp, _, excluded, _ := in.res.resolveBWD(b); !excluded && !(b.Ref == "Alerstam 2007" && in.inAlerstam[sp]) {
			add(sp, b.MassG, b.SpanM, b.AreaM2)
		}
	}
	var rows [][]string
	for _, g := range assess.Groups {
		if r := rs[g]; r != nil {
			rows = append(rows, []string{string(g), strconv.Itoa(r.n),
				strconv.FormatFloat(round(r.min, 2), 'f', -1, 64), strconv.FormatFloat(round(r.max, 2), 'f', -1, 64)})
		}
	}
	return writeFile(path, []string{"group", "n_rows", "min_n_m2", "max_n_m2"}, rows)
}

func writeFile(path string, header []string, rows [][]string) error {
	var buf bytes.Buffer
	if err := writeCSV(&buf, header, rows); err != nil {
		return err
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	return os.WriteFile(path, buf.Bytes(), 0o644)
}

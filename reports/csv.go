package reports

import (
	"bufio"
	"encoding/csv"
	"io"
	"math"
	"strconv"
	"strings"
)

// CSVOptions configure every CSV export.
type CSVOptions struct {
	// BOM starts the file with a UTF-8 byte-order mark (EF BB BF), which
	// some spreadsheets need to read UTF-8 (accents, ° and ×) correctly.
	BOM bool
}

// Cell is one CSV field: text, which WriteCSV neutralises against formula
// injection, or a number, written as a plain number (a negative longitude
// stays a negative number).
type Cell struct {
	text   string
	number bool
}

// Text is a text cell.
func Text(s string) Cell { return Cell{text: s} }

// Num is a number cell; NaN and infinities are written empty.
func Num(f float64) Cell {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return Cell{number: true}
	}
	return Cell{text: strconv.FormatFloat(f, 'f', -1, 64), number: true}
}

// OptNum is a number cell, empty for nil.
func OptNum(f *float64) Cell {
	if f == nil {
		return Cell{number: true}
	}
	return Num(*f)
}

// Int is a whole-number cell.
func Int(n int) Cell { return Cell{text: strconv.Itoa(n), number: true} }

// String returns the cell as written: a text cell neutralised, its line
// breaks as LF (which WriteCSV's writer emits as CRLF; a lone CR would
// otherwise be dropped).
func (c Cell) String() string {
	if c.number {
		return c.text
	}
	return lineBreaks.Replace(NeutraliseFormula(c.text))
}

var lineBreaks = strings.NewReplacer("\r\n", "\n", "\r", "\n")

// NeutraliseFormula returns s with a leading apostrophe when a spreadsheet
// would otherwise read it as a formula: when it starts with = + - @, a tab or
// a carriage return. This is the defence the OWASP "CSV Injection" page
// recommends; spreadsheets show the apostrophe-prefixed value as text.
// Numbers are never passed through it (see Cell).
func NeutraliseFormula(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		return "'" + s
	}
	return s
}

// WriteCSV writes a header and rows as RFC 4180 CSV in UTF-8 with CRLF line
// ends (what spreadsheets expect), starting with a byte-order mark when
// opts.BOM is set.
func WriteCSV(w io.Writer, opts CSVOptions, header []string, rows [][]Cell) error {
	bw := bufio.NewWriter(w)
	if opts.BOM {
		if _, err := bw.WriteString("\uFEFF"); err != nil {
			return err
		}
	}
	cw := csv.NewWriter(bw)
	cw.UseCRLF = true
	hs := make([]string, len(header))
	for i, h := range header {
		hs[i] = NeutraliseFormula(h)
	}
	if err := cw.Write(hs); err != nil {
		return err
	}
	rec := make([]string, 0, len(header))
	for _, row := range rows {
		rec = rec[:0]
		for _, c := range row {
			rec = append(rec, c.String())
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}

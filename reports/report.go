package reports

import (
	"bytes"
	"fmt"
	"io"
	"time"

	"github.com/go-pdf/fpdf"

	"aloft/assess"
	"aloft/records"
	"aloft/reports/fonts"
)

// ReportInput is everything the pre-release report shows. Every computed
// number comes from Assessment (records.Store.Assess, the one path to the
// engine); Records are the same records, for the tables and charts. The
// patient's finder is never printed.
type ReportInput struct {
	Centre     records.Centre
	Patient    records.Patient
	Assessment assess.Assessment
	// Records are the patient's current records, oldest first
	// (records.Store.CaseInputs).
	Records assess.CaseInputs
	// SiteLabel names the release site in words, e.g. "Île-d'Orléans, east
	// shore"; the elevation and temperature come from Assessment.Site.
	SiteLabel string
	// Cautions is the text of CAUTIONS.md, printed in full.
	Cautions string
	// Version is the frozen version's number (records.ReportStamp); 0 marks
	// a working copy that is not frozen and cannot be signed.
	Version int
	// GeneratedAt is when the report was made (a frozen version's
	// CreatedAt); GeneratedBy the display name of who made it, "" from the
	// command line.
	GeneratedAt time.Time
	GeneratedBy string
}

// Options control how a PDF is written.
type Options struct {
	// PageSize is records.PageA4 (the default, also for "") or
	// records.PageLetter.
	PageSize string
	// Time is written as the PDF's creation and modification dates; zero
	// means ReportInput.GeneratedAt. Fix it for byte-stable output.
	Time time.Time
	// Location is the time zone dates and times are printed in; nil means
	// time.Local.
	Location *time.Location
	// Uncompressed leaves the page contents uncompressed (golden tests).
	Uncompressed bool
}

// Page margins and the header and footer bands, mm.
const (
	marginSide   = 18.0
	marginTop    = 18.0
	marginBottom = 22.0
)

// Render writes the pre-release report of in as a PDF to w. The layout is
// a clinical document: page 1 gives the patient, the advisory outcome and
// its main reasons and the key figures; then the criteria with evidence
// and provenance, the flight model with its power curve, the records with
// the mass, stamina and feather charts (vector graphics), clinical
// clearance, the release site and parameter set, the sources of every
// formula and threshold, the cautions and a block for signatures on paper.
// Every page carries the word "Advisory", the statement that the licensed
// rehabilitator and the veterinarian decide, and its page number. The same
// input and options give the same bytes.
func Render(w io.Writer, in ReportInput, opts Options) error {
	d, err := newDoc(opts, in.GeneratedAt)
	if err != nil {
		return err
	}
	d.header = d.reportHeader(in)
	d.footerNote = versionWords(in.Version)
	d.meta("Pre-release flight assessment, case "+in.Patient.CaseNumber, in.Centre.Name)
	r := &report{doc: d, in: in}
	d.pdf.AddPage()
	steps := []func() error{r.summary, r.criteria, r.physics, r.records, r.clearance,
		r.siteAndParams, r.sources, r.cautions, r.signatures}
	for _, step := range steps {
		if err := step(); err != nil {
			return err
		}
	}
	return d.output(w)
}

// report is one rendering of a pre-release report.
type report struct {
	*doc
	in      ReportInput
	figures int // figures numbered so far
}

// doc is an fpdf document with Aloft's page furniture and layout helpers.
type doc struct {
	pdf        *fpdf.Fpdf
	loc        *time.Location
	pageW      float64
	pageH      float64
	header     [2]string // left and right header text
	footerNote string    // second footer line, after the advisory statement
	sections   int       // numbered sections so far
}

// newDoc starts a document: page size, fonts, margins, header and footer,
// fixed dates and compression.
func newDoc(opts Options, generated time.Time) (*doc, error) {
	size := opts.PageSize
	switch size {
	case "", records.PageA4:
		size = records.PageA4
	case records.PageLetter:
	default:
		return nil, fmt.Errorf("reports: page size %q: expected A4 or Letter", opts.PageSize)
	}
	pdf := fpdf.New("P", "mm", size, "")
	fonts.Register(pdf)
	d := &doc{pdf: pdf, loc: opts.Location}
	if d.loc == nil {
		d.loc = time.Local
	}
	d.pageW, d.pageH = pdf.GetPageSize()
	pdf.SetMargins(marginSide, marginTop, marginSide)
	pdf.SetAutoPageBreak(true, marginBottom)
	pdf.SetCellMargin(0)
	pdf.AliasNbPages("{nb}")
	pdf.SetHeaderFuncMode(d.drawHeader, true)
	pdf.SetFooterFunc(d.drawFooter)
	pdf.SetCatalogSort(true)
	pdf.SetCompression(!opts.Uncompressed)
	at := opts.Time
	if at.IsZero() {
		at = generated
	}
	if at.IsZero() {
		at = time.Now()
	}
	pdf.SetCreationDate(at.UTC())
	pdf.SetModificationDate(at.UTC())
	pdf.SetCreator("Aloft", true)
	pdf.SetLang("en")
	return d, nil
}

// meta sets the document's title and author.
func (d *doc) meta(title, author string) {
	d.pdf.SetTitle(title, true)
	d.pdf.SetAuthor(author, true)
	d.pdf.SetSubject("Advisory: the decision rests with the licensed rehabilitator and the veterinarian", true)
}

// output writes the finished document, or the first error fpdf kept.
func (d *doc) output(w io.Writer) error {
	var buf bytes.Buffer
	if err := d.pdf.Output(&buf); err != nil {
		return fmt.Errorf("reports: write PDF: %w", err)
	}
	if _, err := w.Write(buf.Bytes()); err != nil {
		return fmt.Errorf("reports: write PDF: %w", err)
	}
	return nil
}

// reportHeader is the running header of a report's pages.
func (d *doc) reportHeader(in ReportInput) [2]string {
	right := "Case " + in.Patient.CaseNumber + " · " + speciesName(in.Patient)
	if in.Version > 0 {
		right += fmt.Sprintf(" · version %d", in.Version)
	}
	return [2]string{in.Centre.Name + " · Pre-release flight assessment", right}
}

// versionWords says which version a page belongs to, for the footer.
func versionWords(version int) string {
	if version == 0 {
		return "Working copy, not frozen: it cannot be signed off."
	}
	return fmt.Sprintf("Frozen version %d: its SHA-256 is on the sign-off sheet.", version)
}

// AdvisoryStatement is printed on every page of every PDF.
const AdvisoryStatement = "the decision rests with the licensed rehabilitator and the veterinarian."

// drawHeader is the running header: the document on the left, the case on
// the right, a hairline below.
func (d *doc) drawHeader() {
	p := d.pdf
	y := 11.0
	d.font("", 7.5)
	d.colour(colGrey)
	p.Text(marginSide, y, d.header[0])
	right := d.header[1]
	p.Text(d.pageW-marginSide-p.GetStringWidth(right), y, right)
	d.rule(y+2, colRule, 0.2)
	d.colour(colText)
	p.SetXY(marginSide, marginTop)
}

// drawFooter is the running footer: "Advisory" and the statement that the
// licensed rehabilitator and the veterinarian decide, the version, and the
// page number.
func (d *doc) drawFooter() {
	p := d.pdf
	y := d.pageH - 14
	d.rule(y, colRule, 0.2)
	d.font("B", 8)
	d.colour(colNavy)
	label := "Advisory"
	p.Text(marginSide, y+4.2, label)
	lw := p.GetStringWidth(label + " ")
	d.font("", 8)
	d.colour(colText)
	p.Text(marginSide+lw, y+4.2, "— "+AdvisoryStatement+" Aloft only advises; local law and the permit come first.")
	d.font("", 7.5)
	d.colour(colGrey)
	p.Text(marginSide, y+8.2, d.footerNote)
	page := fmt.Sprintf("Page %d of {nb}", p.PageNo())
	// The alias is wider than most page counts: measure with a two-digit count.
	pw := p.GetStringWidth(fmt.Sprintf("Page %d of 99", p.PageNo()))
	p.Text(d.pageW-marginSide-pw, y+8.2, page)
	d.colour(colText)
}

// Package fonts registers the typefaces of Aloft's PDF reports and carries
// their licence.
//
// Reports are set in Liberation Sans, the face gonum/plot lays chart text
// out with (so chart and body text match), and hashes in Liberation Mono,
// where every character has the same width and a hash can be compared
// column by column. Both are UTF-8 TrueType fonts (fpdf's core fonts are
// cp1252 and garble "Île-d'Orléans"), embedded by fpdf as subsets of the
// glyphs used. They come from the module codeberg.org/go-fonts/liberation
// under the SIL Open Font License 1.1, whose text is License (and
// LICENSE-fonts.txt at the top of the repository).
package fonts

import (
	_ "embed"

	"codeberg.org/go-fonts/liberation/liberationmonobold"
	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"github.com/go-pdf/fpdf"

	"aloft/reports/pdfcanvas"
)

// Font family names as registered in a document.
const (
	Sans = pdfcanvas.DefaultFamily // regular, bold, italic, bold italic
	Mono = "LiberationMono"        // regular and bold
)

// License is the licence notice of the embedded fonts (SIL Open Font
// License 1.1), to ship with the program.
//
//go:embed LICENSE-OFL.txt
var License string

// Register adds Sans (four styles) and Mono (regular, bold) to pdf as UTF-8
// fonts. Errors are kept in pdf (see pdf.Err).
func Register(pdf *fpdf.Fpdf) {
	pdfcanvas.AddFonts(pdf, Sans)
	pdf.AddUTF8FontFromBytes(Mono, "", liberationmonoregular.TTF)
	pdf.AddUTF8FontFromBytes(Mono, "B", liberationmonobold.TTF)
}

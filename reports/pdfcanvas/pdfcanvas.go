// Package pdfcanvas draws gonum/plot graphics into a PDF made with
// github.com/go-pdf/fpdf: Canvas implements gonum's vg.Canvas over fpdf's
// path, colour and text calls, in a box on the current page, so charts stay
// vector graphics with selectable text in the report.
//
// Text is set in a UTF-8 TrueType family registered in the document (fpdf's
// core fonts are cp1252 and garble "–", "°" or "ł"). AddFonts registers
// Liberation Sans, the typeface gonum lays chart text out with, so text
// widths in the PDF match the layout exactly.
package pdfcanvas

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"image"
	"image/color"
	"image/png"
	"math"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansbolditalic"
	"codeberg.org/go-fonts/liberation/liberationsansitalic"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"github.com/go-pdf/fpdf"
	stdfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// DefaultFamily is the font family a Canvas uses unless told otherwise with
// Family; AddFonts registers it.
const DefaultFamily = "LiberationSans"

// AddFonts registers Liberation Sans regular, bold, italic and bold italic
// in pdf as UTF-8 fonts under family (DefaultFamily if empty). fpdf embeds
// only the glyphs used. Errors are kept in pdf (see pdf.Error()).
func AddFonts(pdf *fpdf.Fpdf, family string) {
	if family == "" {
		family = DefaultFamily
	}
	pdf.AddUTF8FontFromBytes(family, "", liberationsansregular.TTF)
	pdf.AddUTF8FontFromBytes(family, "B", liberationsansbold.TTF)
	pdf.AddUTF8FontFromBytes(family, "I", liberationsansitalic.TTF)
	pdf.AddUTF8FontFromBytes(family, "BI", liberationsansbolditalic.TTF)
}

// Option configures a Canvas.
type Option func(*Canvas)

// Family sets the font family text is set in: a UTF-8 TrueType family
// already registered in the document with AddUTF8FontFromBytes. A style
// (bold, italic) the family lacks falls back to its regular face.
func Family(name string) Option { return func(c *Canvas) { c.family = name } }

// Canvas is a vg.Canvas drawing into a box of an fpdf page. Its coordinates
// are gonum's: points, origin at the box's bottom-left corner, y up. It
// draws on whatever page is current in the document when each call is made.
// A Canvas is not safe for concurrent use (neither is an fpdf document).
type Canvas struct {
	pdf        *fpdf.Fpdf
	x, y, w, h float64 // the box, in the document's units, y down from the page top
	k          float64 // points per document unit
	family     string
	stack      []state
	saved      saved
	images     map[string]bool
}

// state is what Push saves and Pop restores.
type state struct {
	m       affine
	color   color.Color
	width   vg.Length
	dashes  []vg.Length
	dashOff vg.Length
}

// saved is the document's drawing state before the Canvas changed it.
type saved struct {
	draw, fill, text [3]int
	lineWidth        float64
	alpha            float64
	blend            string
}

// New returns a Canvas over the box of pdf whose top-left corner is (x, y)
// and whose size is w×h, in the document's units (mm for fpdf.New("P",
// "mm", …)). The chart's (0, 0) is the box's bottom-left corner and its
// size in points is Size(). Call Close when done drawing, to restore the
// document's colours and line width.
func New(pdf *fpdf.Fpdf, x, y, w, h float64, opts ...Option) *Canvas {
	c := &Canvas{pdf: pdf, x: x, y: y, w: w, h: h, k: pdf.GetConversionRatio(),
		family: DefaultFamily, images: map[string]bool{}}
	for _, o := range opts {
		o(c)
	}
	c.save()
	c.stack = []state{{m: identity}}
	vg.Initialize(c)
	return c
}

// save records the document's drawing state for Close.
func (c *Canvas) save() {
	s := &c.saved
	s.draw[0], s.draw[1], s.draw[2] = c.pdf.GetDrawColor()
	s.fill[0], s.fill[1], s.fill[2] = c.pdf.GetFillColor()
	s.text[0], s.text[1], s.text[2] = c.pdf.GetTextColor()
	s.lineWidth = c.pdf.GetLineWidth()
	s.alpha, s.blend = c.pdf.GetAlpha()
}

// Close restores the document's draw, fill and text colours, line width and
// alpha to what they were before New, and solid lines. It does not restore
// the font: set it again before writing more text.
func (c *Canvas) Close() {
	s := c.saved
	c.pdf.SetDrawColor(s.draw[0], s.draw[1], s.draw[2])
	c.pdf.SetFillColor(s.fill[0], s.fill[1], s.fill[2])
	c.pdf.SetTextColor(s.text[0], s.text[1], s.text[2])
	c.pdf.SetLineWidth(s.lineWidth)
	c.pdf.SetDashPattern(nil, 0)
	if a, _ := c.pdf.GetAlpha(); a != s.alpha {
		c.pdf.SetAlpha(s.alpha, s.blend)
	}
}

// Size returns the box's size in points.
func (c *Canvas) Size() (w, h vg.Length) {
	return vg.Length(c.w * c.k), vg.Length(c.h * c.k)
}

func (c *Canvas) top() *state { return &c.stack[len(c.stack)-1] }

// SetLineWidth implements vg.Canvas.
func (c *Canvas) SetLineWidth(w vg.Length) {
	c.top().width = w
	if w > 0 {
		c.pdf.SetLineWidth(c.units(w))
	}
}

// SetLineDash implements vg.Canvas.
func (c *Canvas) SetLineDash(dashes []vg.Length, offs vg.Length) {
	s := c.top()
	s.dashes, s.dashOff = append([]vg.Length(nil), dashes...), offs
	ds := make([]float64, len(dashes))
	for i, d := range dashes {
		ds[i] = c.units(d)
	}
	c.pdf.SetDashPattern(ds, c.units(offs))
}

// SetColor implements vg.Canvas: one colour for strokes, fills and text.
func (c *Canvas) SetColor(clr color.Color) {
	if clr == nil {
		clr = color.Black
	}
	c.top().color = clr
	r, g, b, a := rgba(clr)
	c.pdf.SetDrawColor(r, g, b)
	c.pdf.SetFillColor(r, g, b)
	c.pdf.SetTextColor(r, g, b)
	if cur, _ := c.pdf.GetAlpha(); cur != a {
		c.pdf.SetAlpha(a, "Normal")
	}
}

// rgba returns a colour's 8-bit components, un-premultiplied, and its alpha.
func rgba(clr color.Color) (r, g, b int, a float64) {
	n := color.NRGBAModel.Convert(clr).(color.NRGBA)
	return int(n.R), int(n.G), int(n.B), math.Round(float64(n.A)/255*1000) / 1000
}

// Rotate implements vg.Canvas.
func (c *Canvas) Rotate(rad float64) { c.top().m = c.top().m.rotate(rad) }

// Translate implements vg.Canvas.
func (c *Canvas) Translate(pt vg.Point) {
	c.top().m = c.top().m.translate(pt.X.Points(), pt.Y.Points())
}

// Scale implements vg.Canvas.
func (c *Canvas) Scale(x, y float64) { c.top().m = c.top().m.scale(x, y) }

// Push implements vg.Canvas.
func (c *Canvas) Push() {
	s := *c.top()
	s.dashes = append([]vg.Length(nil), s.dashes...)
	c.stack = append(c.stack, s)
}

// Pop implements vg.Canvas; it re-applies the restored state to the
// document. An unmatched Pop does nothing.
func (c *Canvas) Pop() {
	if len(c.stack) == 1 {
		return
	}
	c.stack = c.stack[:len(c.stack)-1]
	s := *c.top()
	c.SetColor(s.color)
	c.SetLineWidth(s.width)
	c.SetLineDash(s.dashes, s.dashOff)
}

// Stroke implements vg.Canvas.
func (c *Canvas) Stroke(p vg.Path) {
	if c.top().width > 0 && c.path(p) {
		c.pdf.DrawPath("D")
	}
}

// Fill implements vg.Canvas, with the nonzero winding rule.
func (c *Canvas) Fill(p vg.Path) {
	if c.path(p) {
		c.pdf.DrawPath("F")
	}
}

// FillString implements vg.Canvas: text with its baseline's left end at pt.
func (c *Canvas) FillString(f font.Face, pt vg.Point, str string) {
	if f.Font.Size == 0 || str == "" {
		return
	}
	m := c.top().m
	style := c.style(f.Font)
	c.pdf.SetFont(c.family, style, f.Font.Size.Points()*m.scaleFactor())
	x, y := c.page(m.apply(pt.X.Points(), pt.Y.Points()))
	angle := math.Atan2(m.b, m.a) * 180 / math.Pi
	if math.Abs(angle) < 1e-9 {
		c.pdf.Text(x, y, str)
		return
	}
	c.pdf.TransformBegin()
	c.pdf.TransformRotate(angle, x, y)
	c.pdf.Text(x, y, str)
	c.pdf.TransformEnd()
}

// style returns the fpdf style of a gonum font, or "" when the family does
// not have that style registered.
func (c *Canvas) style(f font.Font) string {
	s := ""
	if f.Weight >= stdfont.WeightSemiBold {
		s += "B"
	}
	if f.Style != stdfont.StyleNormal {
		s += "I"
	}
	if s != "" && c.pdf.GetFontDesc(c.family, s).Ascent == 0 {
		return ""
	}
	return s
}

// DrawImage implements vg.Canvas: the image as a PNG stretched over the
// bounding box of rect under the current transform.
func (c *Canvas) DrawImage(rect vg.Rectangle, img image.Image) {
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		c.pdf.SetError(err)
		return
	}
	sum := sha256.Sum256(buf.Bytes())
	name := "pdfcanvas-" + hex.EncodeToString(sum[:8])
	opts := fpdf.ImageOptions{ImageType: "PNG"}
	if !c.images[name] {
		c.pdf.RegisterImageOptionsReader(name, opts, &buf)
		c.images[name] = true
	}
	m := c.top().m
	x0, y0 := c.page(m.apply(rect.Min.X.Points(), rect.Min.Y.Points()))
	x1, y1 := c.page(m.apply(rect.Max.X.Points(), rect.Max.Y.Points()))
	c.pdf.ImageOptions(name, min(x0, x1), min(y0, y1), math.Abs(x1-x0), math.Abs(y1-y0), false, opts, 0, "")
}

// units converts a length in the canvas's points to document units, scaled
// by the current transform.
func (c *Canvas) units(l vg.Length) float64 {
	return l.Points() * c.top().m.scaleFactor() / c.k
}

// page converts a point of the box, in points from its bottom-left corner,
// to the page, in document units from the top-left corner.
func (c *Canvas) page(bx, by float64) (x, y float64) {
	return c.x + bx/c.k, c.y + c.h - by/c.k
}

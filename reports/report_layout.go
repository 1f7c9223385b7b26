package reports

import (
	"strings"

	"aloft/assess"
	"aloft/reports/fonts"
)

// rgb is a colour of the page.
type rgb [3]int

// The report's colours: near-black text, grey for secondary text, a navy
// for headings and rules, and light tints behind status words (never the
// only carrier of a status: the word is always printed).
var (
	colText  = rgb{33, 33, 33}
	colGrey  = rgb{95, 95, 95}
	colNavy  = rgb{24, 54, 99}
	colRule  = rgb{170, 170, 170}
	colZebra = rgb{244, 245, 247}
	colHead  = rgb{226, 231, 239}
)

// tone is the ink and background of a status word.
type tone struct{ ink, fill rgb }

var (
	toneGreen = tone{rgb{0, 95, 55}, rgb{216, 239, 226}}
	toneAmber = tone{rgb{125, 80, 0}, rgb{252, 238, 200}}
	toneRed   = tone{rgb{160, 30, 15}, rgb{250, 218, 210}}
	toneGrey  = tone{rgb{75, 75, 75}, rgb{230, 230, 230}}
)

// Body text sizes (pt) and line heights (mm).
const (
	sizeBody  = 9.5
	lineBody  = 4.3
	sizeSmall = 8.0
	lineSmall = 3.6
)

func (d *doc) font(style string, size float64) { d.pdf.SetFont(fonts.Sans, style, size) }
func (d *doc) mono(style string, size float64) { d.pdf.SetFont(fonts.Mono, style, size) }
func (d *doc) colour(c rgb)                    { d.pdf.SetTextColor(c[0], c[1], c[2]) }
func (d *doc) fill(c rgb)                      { d.pdf.SetFillColor(c[0], c[1], c[2]) }
func (d *doc) contentW() float64               { return d.pageW - 2*marginSide }
func (d *doc) bottom() float64                 { return d.pageH - marginBottom }
func (d *doc) y() float64                      { return d.pdf.GetY() }

// rule draws a full-width horizontal line at y.
func (d *doc) rule(y float64, c rgb, width float64) {
	d.pdf.SetDrawColor(c[0], c[1], c[2])
	d.pdf.SetLineWidth(width)
	d.pdf.Line(marginSide, y, d.pageW-marginSide, y)
}

// need starts a new page unless h mm are left above the footer.
func (d *doc) need(h float64) {
	if d.y()+h > d.bottom() {
		d.pdf.AddPage()
	}
}

// space moves down h mm.
func (d *doc) space(h float64) { d.pdf.SetY(d.y() + h) }

// section starts a numbered section, on a new page unless keep mm are left
// below its title for what follows, with the title in navy and a rule.
func (d *doc) section(title string, keep float64) {
	d.sections++
	d.need(keep + 14)
	if d.y() > marginTop+1 {
		d.space(3)
	}
	d.font("B", 13)
	d.colour(colNavy)
	d.pdf.SetX(marginSide)
	d.pdf.CellFormat(d.contentW(), 7, itoa(d.sections)+"  "+title, "", 1, "L", false, 0, "")
	d.rule(d.y()+0.5, colNavy, 0.4)
	d.space(3)
	d.colour(colText)
}

// subsection is a heading within a section, kept with the next 25 mm.
func (d *doc) subsection(title string) {
	d.need(25)
	d.space(1.5)
	d.font("B", 10.5)
	d.colour(colNavy)
	d.pdf.SetX(marginSide)
	d.pdf.CellFormat(d.contentW(), 5.5, title, "", 1, "L", false, 0, "")
	d.colour(colText)
	d.space(0.5)
}

// para writes wrapped text across the content width.
func (d *doc) para(text string, style string, size, line float64, c rgb) {
	if text == "" {
		return
	}
	d.font(style, size)
	d.colour(c)
	d.pdf.SetX(marginSide)
	d.pdf.MultiCell(d.contentW(), line, text, "", "L", false)
	d.colour(colText)
}

// body writes a paragraph of body text followed by a little space.
func (d *doc) body(text string) {
	d.para(text, "", sizeBody, lineBody, colText)
	d.space(1.2)
}

// note writes a paragraph of small grey text.
func (d *doc) note(text string) {
	d.para(text, "", sizeSmall, lineSmall, colGrey)
	d.space(1)
}

// bullets writes a list with hanging indents.
func (d *doc) bullets(items []string, size, line float64) {
	d.font("", size)
	for _, it := range items {
		d.need(line * 2)
		y := d.y()
		d.pdf.Text(marginSide+1, y+line*0.75, "•")
		d.pdf.SetXY(marginSide+5, y)
		d.pdf.MultiCell(d.contentW()-5, line, it, "", "L", false)
		d.space(0.6)
	}
}

// badgeH is the height of a status badge, mm.
const badgeH = 3.8

// badge draws a status word on its tint with its top-left corner at (x, y)
// and returns its width.
func (d *doc) badge(x, y float64, word string, t tone) float64 {
	d.font("B", 6.5)
	w := d.pdf.GetStringWidth(word) + 3
	d.fill(t.fill)
	d.pdf.RoundedRect(x, y, w, badgeH, 0.8, "1234", "F")
	d.colour(t.ink)
	d.pdf.Text(x+1.5, y+2.75, word)
	d.colour(colText)
	return w
}

// statusWord is a criterion status in the project's words, for print.
func statusWord(s assess.Status) string {
	switch s {
	case assess.StatusMet:
		return "MET"
	case assess.StatusBorderline:
		return "BORDERLINE"
	case assess.StatusUnmet:
		return "NOT MET"
	}
	return "NOT ASSESSED"
}

// statusTone is the tint behind a status word.
func statusTone(s assess.Status) tone {
	switch s {
	case assess.StatusMet:
		return toneGreen
	case assess.StatusBorderline:
		return toneAmber
	case assess.StatusUnmet:
		return toneRed
	}
	return toneGrey
}

// outcomeTone is the tint of an outcome level.
func outcomeTone(l assess.OutcomeLevel) tone {
	switch l {
	case assess.OutcomeReady:
		return toneGreen
	case assess.OutcomeContinue:
		return toneAmber
	case assess.OutcomeRefer:
		return toneRed
	}
	return toneGrey
}

// line is one paragraph of a table cell, in its own style.
type line struct {
	text  string
	style string  // "", "B", "I", "BI"
	size  float64 // pt; 0 = the table's size
	grey  bool
	mono  bool
}

// cell is one table cell: an optional status badge above its paragraphs.
type cell struct {
	badge *badgeSpec
	lines []line
}

type badgeSpec struct {
	word string
	tone tone
}

// txt is a cell of one plain paragraph.
func txt(s string) cell { return cell{lines: []line{{text: s}}} }

// column of a table: its title, its share of the content width and its
// alignment ("L" or "R").
type column struct {
	title string
	share float64
	align string
}

// table draws a table with a shaded header row (repeated on each new page),
// wrapped cells and light zebra stripes. Rows never split across pages.
func (d *doc) table(cols []column, rows [][]cell, size float64) {
	lh := size * 0.3528 * 1.28 // line height, mm
	widths := make([]float64, len(cols))
	for i, c := range cols {
		widths[i] = c.share * d.contentW()
	}
	headH := d.headHeight(cols, widths, size)
	if len(rows) > 0 {
		d.need(headH + d.rowHeight(rows[0], widths, size, lh))
	}
	d.tableHead(cols, widths, size)
	for i, row := range rows {
		h := d.rowHeight(row, widths, size, lh)
		if d.y()+h > d.bottom() {
			d.pdf.AddPage()
			d.tableHead(cols, widths, size)
		}
		y := d.y()
		if i%2 == 1 {
			d.fill(colZebra)
			d.pdf.Rect(marginSide, y, d.contentW(), h, "F")
		}
		x := marginSide
		for j, c := range row {
			if j < len(cols) {
				d.drawCell(c, x, y, widths[j], cols[j].align, size, lh)
				x += widths[j]
			}
		}
		d.pdf.SetY(y + h)
	}
	d.rule(d.y(), colRule, 0.2)
	d.space(2.5)
}

// tableHeight is the height a table will take on one page.
func (d *doc) tableHeight(cols []column, rows [][]cell, size float64) float64 {
	lh := size * 0.3528 * 1.28
	widths := make([]float64, len(cols))
	for i, c := range cols {
		widths[i] = c.share * d.contentW()
	}
	h := d.headHeight(cols, widths, size)
	for _, row := range rows {
		h += d.rowHeight(row, widths, size, lh)
	}
	return h
}

// keptTable is a subsection whose table starts on a new page unless the
// heading and the whole table fit on this one (a table longer than a page
// still breaks).
func (d *doc) keptTable(title string, cols []column, rows [][]cell, size float64) {
	if h := d.tableHeight(cols, rows, size) + 9; h < d.bottom()-marginTop {
		d.need(h)
	}
	if title != "" {
		d.subsection(title)
	}
	d.table(cols, rows, size)
}

// cellPad is the padding inside a table cell, mm.
const cellPad = 1.2

// headHeight is the height of a table's header row, its titles wrapped.
func (d *doc) headHeight(cols []column, widths []float64, size float64) float64 {
	n := 1
	d.font("B", size)
	for i, c := range cols {
		n = max(n, len(d.wrapPlain(c.title, widths[i]-2*cellPad)))
	}
	return float64(n)*size*0.3528*1.28 + 2*cellPad
}

func (d *doc) tableHead(cols []column, widths []float64, size float64) {
	lh := size * 0.3528 * 1.28
	h := d.headHeight(cols, widths, size)
	y := d.y()
	d.fill(colHead)
	d.pdf.Rect(marginSide, y, d.contentW(), h, "F")
	d.font("B", size)
	d.colour(colNavy)
	x := marginSide
	for i, c := range cols {
		for n, s := range d.wrapPlain(c.title, widths[i]-2*cellPad) {
			tx := x + cellPad
			if c.align == "R" {
				tx = x + widths[i] - cellPad - d.pdf.GetStringWidth(s)
			}
			d.pdf.Text(tx, y+cellPad+size*0.3528*0.95+float64(n)*lh, s)
		}
		x += widths[i]
	}
	d.colour(colText)
	d.pdf.SetY(y + h)
}

// setLine selects the font of a cell paragraph.
func (d *doc) setLine(l line, size float64) float64 {
	if l.size > 0 {
		size = l.size
	}
	if l.mono {
		d.mono(strings.TrimSuffix(l.style, "I"), size)
	} else {
		d.font(l.style, size)
	}
	return size
}

// wrap splits a cell paragraph into the lines that fit width w.
func (d *doc) wrap(l line, size, w float64) []string {
	d.setLine(l, size)
	var out []string
	for _, para := range strings.Split(l.text, "\n") {
		if para == "" {
			out = append(out, "")
			continue
		}
		out = append(out, d.pdf.SplitText(para, w)...)
	}
	return out
}

func (d *doc) rowHeight(row []cell, widths []float64, size, lh float64) float64 {
	maxH := 0.0
	for j, c := range row {
		if j >= len(widths) {
			break
		}
		h := 0.0
		if c.badge != nil {
			h += badgeH + 0.6
		}
		for _, l := range c.lines {
			n := len(d.wrap(l, size, widths[j]-2*cellPad))
			h += float64(n) * lineHeight(l, size, lh)
		}
		maxH = max(maxH, h)
	}
	return maxH + 2*cellPad
}

func lineHeight(l line, size, lh float64) float64 {
	if l.size > 0 {
		return lh * l.size / size
	}
	return lh
}

func (d *doc) drawCell(c cell, x, y, w float64, align string, size, lh float64) {
	cy := y + cellPad
	if c.badge != nil {
		d.badge(x+cellPad, cy, c.badge.word, c.badge.tone)
		cy += badgeH + 0.6
	}
	for _, l := range c.lines {
		h := lineHeight(l, size, lh)
		lines := d.wrap(l, size, w-2*cellPad)
		sz := d.setLine(l, size)
		d.colour(colText)
		if l.grey {
			d.colour(colGrey)
		}
		for _, s := range lines {
			tx := x + cellPad
			if align == "R" {
				tx = x + w - cellPad - d.pdf.GetStringWidth(s)
			}
			d.pdf.Text(tx, cy+sz*0.3528*0.95, s)
			cy += h
		}
	}
	d.colour(colText)
}

// factLine is the line height of a fact's value, mm.
const factLine = 4.1

// facts draws label–value pairs in two columns; a lone pair spans both.
func (d *doc) facts(pairs [][2]string) {
	half := d.contentW() / 2
	labelW := 30.0
	for i := 0; i < len(pairs); i += 2 {
		row := pairs[i:min(i+2, len(pairs))]
		valueW := half - labelW - 3
		if len(pairs) == 1 {
			valueW = d.contentW() - labelW
		}
		h := 0.0
		d.font("", sizeBody)
		for _, p := range row {
			h = max(h, float64(len(d.wrapPlain(p[1], valueW)))*factLine)
		}
		d.need(h + 1)
		y := d.y()
		for k, p := range row {
			x := marginSide + float64(k)*half
			d.font("", sizeSmall)
			d.colour(colGrey)
			d.pdf.Text(x, y+3.2, p[0])
			d.font("", sizeBody)
			d.colour(colText)
			for n, s := range d.wrapPlain(p[1], valueW) {
				d.pdf.Text(x+labelW, y+3.2+float64(n)*factLine, s)
			}
		}
		d.pdf.SetY(y + h + 0.6)
	}
	d.space(1.2)
}

// wrapPlain splits text in the current font to width w.
func (d *doc) wrapPlain(s string, w float64) []string {
	if s == "" {
		return []string{""}
	}
	return d.pdf.SplitText(s, w)
}

package charts

import (
	"slices"
	"strconv"

	"aloft/assess"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The feather chart is drawn with vg primitives, so the same code draws the
// SVG and, through package pdfcanvas, the PDF.

// featherCell is one feather's place in a row.
type featherCell struct {
	state assess.FeatherStatus
	num   int     // its number within its tract, from 1
	rel   float64 // its length against the row's longest
	gap   bool    // a gap before it: between tracts or tail sides
	last  bool    // the last of its tract
}

// featherGroup is a caption under cells from…to (inclusive).
type featherGroup struct {
	caption  string
	from, to int
}

// featherRow is one row of feathers hanging from a common base.
type featherRow struct {
	cells  []featherCell
	groups []featherGroup
}

// featherSection is a heading and its rows: a wing or the tail.
type featherSection struct {
	heading string
	rows    []featherRow
}

// cellsOf returns the cells of a track, in number order or reversed, with
// lengths from relLo (number 1) to relHi (the last number).
func cellsOf(t featherTrack, reversed bool, relLo, relHi float64) []featherCell {
	n := len(t.states)
	cells := make([]featherCell, n)
	for i, s := range t.states {
		rel := relLo
		if n > 1 {
			rel = relLo + (relHi-relLo)*float64(i)/float64(n-1)
		}
		cells[i] = featherCell{state: s, num: i + 1, rel: rel, last: i == n-1}
	}
	if reversed {
		for i, j := 0, n-1; i < j; i, j = i+1, j-1 {
			cells[i], cells[j] = cells[j], cells[i]
		}
	}
	return cells
}

// joinRow returns a row of two tracks side by side with a gap between,
// their lengths scaled so the row's longest feather is a whole length.
func joinRow(a []featherCell, capA string, b []featherCell, capB string) featherRow {
	longest := 0.0
	for _, c := range append(slices.Clone(a), b...) {
		longest = max(longest, c.rel)
	}
	for _, cs := range [][]featherCell{a, b} {
		for i := range cs {
			cs[i].rel /= longest
		}
	}
	var r featherRow
	if len(a) > 0 {
		r.cells = append(r.cells, a...)
		r.groups = append(r.groups, featherGroup{capA, 0, len(a) - 1})
	}
	if len(b) > 0 {
		if len(r.cells) > 0 {
			b[0].gap = true
		}
		r.groups = append(r.groups, featherGroup{capB, len(r.cells), len(r.cells) + len(b) - 1})
		r.cells = append(r.cells, b...)
	}
	return r
}

// Relative lengths of the stylised wing: primaries lengthen outwards to
// the tip, secondaries are even and shorter.
const (
	relP1, relPn, relS = 0.72, 1.0, 0.6
	relR1, relRn       = 1.0, 0.88
)

// sections lays the chart out for a drawing width w: one row per wing when
// its feathers fit at a legible pitch, else primaries and secondaries on
// rows of their own.
func (f featherChart) sections(w vg.Length, st Style) []featherSection {
	fits := func(n, gaps int) bool { return pitchFor(w, n, gaps, st) >= minPitch(st) }
	wing := func(heading string, p, s featherTrack, left bool) featherSection {
		pc := cellsOf(p, left, relP1, relPn) // the tip is on the outside
		sc := cellsOf(s, !left, relS, relS)
		if fits(len(pc)+len(sc), 1) {
			if left {
				return featherSection{heading, []featherRow{joinRow(pc, "Primaries", sc, "Secondaries")}}
			}
			return featherSection{heading, []featherRow{joinRow(sc, "Secondaries", pc, "Primaries")}}
		}
		return featherSection{heading, []featherRow{joinRow(pc, "Primaries", nil, ""), joinRow(sc, "Secondaries", nil, "")}}
	}
	tail := featherSection{"Tail (seen from above)", []featherRow{joinRow(
		cellsOf(f.tailL, true, relR1, relRn), "Left", cellsOf(f.tailR, false, relR1, relRn), "Right")}}
	var out []featherSection
	for _, s := range []featherSection{
		wing("Left wing (seen from above)", f.leftP, f.leftS, true),
		wing("Right wing (seen from above)", f.rightP, f.rightS, false),
		tail,
	} {
		if len(s.rows) > 0 && len(s.rows[0].cells) > 0 {
			out = append(out, s)
		}
	}
	return out
}

// minPitch is the narrowest feather spacing whose letters stay apart.
func minPitch(st Style) vg.Length { return st.FontSize * 0.95 }

// margin is the space left and right of the rows.
func margin(st Style) vg.Length { return st.FontSize / 2 }

// pitchFor returns the feather spacing of n feathers with gaps in width w.
func pitchFor(w vg.Length, n, gaps int, st Style) vg.Length {
	units := float64(n) + 0.6*float64(gaps)
	return min(st.FontSize*2, (w-2*margin(st))/vg.Length(units))
}

// gapsOf counts the gaps in a row.
func gapsOf(r featherRow) int {
	n := 0
	for _, c := range r.cells {
		if c.gap {
			n++
		}
	}
	return n
}

// rowLength returns the natural length of a row's longest feather.
func rowLength(p vg.Length, st Style) vg.Length {
	return min(max(p*4.5, st.FontSize*3), st.FontSize*6)
}

// Vertical spacing, in multiples of the font size.
const (
	fHeading = 1.7 // a section's heading (of LabelSize)
	fLetter  = 1.2 // the letters under the tips
	fNumber  = 1.2 // the numbers
	fCaption = 1.5 // the group captions
	fSection = 0.5 // between sections
)

// rowExtra returns a row's height other than its feathers.
func rowExtra(st Style) vg.Length { return st.FontSize * (fLetter + fNumber + fCaption) }

// naturalHeight returns the height the chart needs at width w.
func (f featherChart) naturalHeight(w vg.Length, st Style) vg.Length {
	h := st.FontSize / 2
	for _, s := range f.sections(w, st) {
		h += st.LabelSize*fHeading + st.FontSize*fSection
		for _, r := range s.rows {
			h += rowLength(pitchFor(w, len(r.cells), gapsOf(r), st), st) + rowExtra(st)
		}
	}
	return h + f.legend(st).height(w-2*margin(st))
}

// legend returns the key: each state present, its letter and its words.
func (f featherChart) legend(st Style) *legend {
	present := map[assess.FeatherStatus]bool{}
	for _, t := range []featherTrack{f.leftP, f.leftS, f.rightP, f.rightS, f.tailL, f.tailR} {
		for _, s := range t.states {
			present[s] = true
		}
	}
	l := &legend{st: st}
	l.add("No letter: intact", featherThumb(lookOf(assess.FeatherIntact, st)))
	for _, s := range legendOrder(present) {
		lk := lookOf(s, st)
		l.add(lk.letter+": "+statusWords(s), featherThumb(lk))
	}
	return l
}

// draw draws the chart into c, stretching or shrinking the feathers so the
// chart fills c's height.
func (f featherChart) draw(c draw.Canvas, st Style) {
	fillWhite(c)
	w := c.Max.X - c.Min.X
	secs := f.sections(w, st)
	rows := 0
	for _, s := range secs {
		rows += len(s.rows)
	}
	stretch := (c.Max.Y - c.Min.Y - f.naturalHeight(w, st)) / vg.Length(max(rows, 1))
	y := c.Max.Y - st.FontSize/2
	heading := textStyle(st.LabelSize, draw.XLeft, draw.YTop)
	heading.Font = sansFont(st.LabelSize, true)
	for _, s := range secs {
		c.FillText(heading, vg.Point{X: c.Min.X + margin(st), Y: y}, s.heading)
		y -= st.LabelSize * fHeading
		for _, r := range s.rows {
			p := pitchFor(w, len(r.cells), gapsOf(r), st)
			length := max(rowLength(p, st)+stretch, st.FontSize*2)
			drawRow(c, st, r, y, p, length)
			y -= length + rowExtra(st)
		}
		y -= st.FontSize * fSection
	}
	key := c
	key.Min.X += margin(st)
	key.Max.Y = y
	f.legend(st).draw(key)
}

// drawRow draws one row of feathers hanging from y at pitch p, the longest
// length long, with letters, numbers and captions below.
func drawRow(c draw.Canvas, st Style, r featherRow, y, p, length vg.Length) {
	units := vg.Length(float64(len(r.cells)) + 0.6*float64(gapsOf(r)))
	x := c.Center().X - units*p/2
	xs := make([]vg.Length, len(r.cells))
	for i, cell := range r.cells {
		if cell.gap {
			x += 0.6 * p
		}
		xs[i] = x + p/2
		x += p
	}
	c.StrokeLine2(lineStyle(darkGrey, st.ThinWidth*1.5), xs[0]-p/2, y, xs[len(xs)-1]+p/2, y)
	letter := textStyle(st.FontSize, draw.XCenter, draw.YTop)
	letter.Font = sansFont(st.FontSize, true)
	number := textStyle(st.FontSize, draw.XCenter, draw.YTop)
	sparse := p < number.Width("88")*1.15
	numY := y - length - st.FontSize*fLetter
	for i, cell := range r.cells {
		lk := lookOf(cell.state, st)
		l := length * vg.Length(cell.rel*lk.length)
		drawFeather(c, st, lk, xs[i], y, p*0.72*vg.Length(lk.width), l)
		if lk.letter != "" {
			letter.Color = black
			if cell.state == notRecorded || !cell.state.Valid() {
				letter.Color = darkGrey
			}
			c.FillText(letter, vg.Point{X: xs[i], Y: y - l - st.FontSize*0.1}, lk.letter)
		}
		if !sparse || cell.num == 1 || cell.num%5 == 0 || cell.last && cell.num%5 > 1 {
			c.FillText(number, vg.Point{X: xs[i], Y: numY}, strconv.Itoa(cell.num))
		}
	}
	caption := textStyle(st.FontSize, draw.XCenter, draw.YTop)
	capY := numY - st.FontSize*fNumber
	for _, g := range r.groups {
		c.FillText(caption, vg.Point{X: (xs[g.from] + xs[g.to]) / 2, Y: capY}, g.caption)
	}
}

package charts

import (
	"image/color"

	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// legendEntry is one key of a chart's legend: a small picture of the series
// and its words. An entry without a picture is a note on a row of its own.
type legendEntry struct {
	text  string
	thumb func(c draw.Canvas) // draws into c's rectangle; nil for a note
}

// width returns the entry's width in style ts.
func (e legendEntry) width(ts text.Style, fs vg.Length) vg.Length {
	if e.thumb == nil {
		return ts.Width(e.text)
	}
	return fs*(legendThumb+legendGap) + ts.Width(e.text)
}

// legend is a chart's key, laid out in rows below the data so it never
// covers it. Entries flow left to right and wrap to the width.
type legend struct {
	entries []legendEntry
	st      Style
}

// add appends an entry.
func (l *legend) add(text string, thumb func(c draw.Canvas)) {
	l.entries = append(l.entries, legendEntry{text: text, thumb: thumb})
}

// Layout constants, in multiples of the font size.
const (
	legendThumb = 2.2 // thumbnail width
	legendGap   = 0.4 // between thumbnail and text
	legendSep   = 1.2 // between entries on a row
	legendRow   = 1.45
)

// rows splits the entries into rows that fit width w.
func (l *legend) rows(w vg.Length) [][]legendEntry {
	ts := textStyle(l.st.FontSize, draw.XLeft, draw.YCenter)
	var rows [][]legendEntry
	var x vg.Length
	for _, e := range l.entries {
		ew := e.width(ts, l.st.FontSize)
		if len(rows) == 0 || x > 0 && (x+l.st.FontSize*legendSep+ew > w || e.thumb == nil) {
			rows = append(rows, nil)
			x = 0
		} else if x > 0 {
			x += l.st.FontSize * legendSep
		}
		rows[len(rows)-1] = append(rows[len(rows)-1], e)
		x += ew
	}
	return rows
}

// height returns the height the legend needs at width w.
func (l *legend) height(w vg.Length) vg.Length {
	n := len(l.rows(w))
	if n == 0 {
		return 0
	}
	return vg.Length(n)*l.st.FontSize*legendRow + l.st.FontSize/2
}

// draw draws the legend at the top of c.
func (l *legend) draw(c draw.Canvas) {
	ts := textStyle(l.st.FontSize, draw.XLeft, draw.YCenter)
	fs := l.st.FontSize
	y := c.Max.Y - fs/2 - fs*legendRow/2
	for _, row := range l.rows(c.Max.X - c.Min.X) {
		x := c.Min.X
		for _, e := range row {
			if e.thumb != nil {
				tc := c
				tc.Rectangle = vg.Rectangle{Min: vg.Point{X: x, Y: y - fs/2}, Max: vg.Point{X: x + fs*legendThumb, Y: y + fs/2}}
				e.thumb(tc)
				x += fs * (legendThumb + legendGap)
			}
			c.FillText(ts, vg.Point{X: x, Y: y}, e.text)
			x += ts.Width(e.text) + fs*legendSep
		}
		y -= fs * legendRow
	}
}

// layout splits a chart's canvas into a caption line at the top, the
// plots, and the legend below them, with a margin at the sides.
func layout(c draw.Canvas, st Style, caption string, l *legend) (plots, key draw.Canvas) {
	m := st.FontSize / 2
	c = draw.Crop(c, m, -m, 0, 0)
	if caption != "" {
		ts := textStyle(st.FontSize, draw.XLeft, draw.YTop)
		c.FillText(ts, vg.Point{X: c.Min.X, Y: c.Max.Y - st.FontSize/3}, caption)
		c.Max.Y -= st.FontSize * 2
	}
	h := l.height(c.Max.X - c.Min.X)
	plots, key = c, c
	plots.Min.Y += h
	key.Max.Y = c.Min.Y + h
	return plots, key
}

// lineThumb draws a line sample with an optional marker in the middle.
func lineThumb(ls draw.LineStyle, g *draw.GlyphStyle) func(c draw.Canvas) {
	return func(c draw.Canvas) {
		y := c.Center().Y
		c.StrokeLine2(ls, c.Min.X, y, c.Max.X, y)
		if g != nil {
			c.DrawGlyphNoClip(*g, c.Center())
		}
	}
}

// boxThumb draws a filled box with an outline.
func boxThumb(fill color.Color, edge draw.LineStyle) func(c draw.Canvas) {
	return func(c draw.Canvas) {
		r := vg.Rectangle{Min: vg.Point{X: c.Min.X, Y: c.Min.Y + 1}, Max: vg.Point{X: c.Max.X, Y: c.Max.Y - 1}}
		c.SetColor(fill)
		c.Fill(r.Path())
		if edge.Width > 0 {
			c.StrokeLines(edge, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
		}
	}
}

package charts

import (
	"image/color"

	stdfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Style sets the text sizes and line widths of one rendering. Lengths are
// in points; on screen one point is one CSS pixel at the chart's intrinsic
// size.
type Style struct {
	// FontSize is the size of tick labels, legends and notes.
	FontSize vg.Length
	// LabelSize is the size of axis labels and panel titles.
	LabelSize vg.Length
	// LineWidth is the width of data lines.
	LineWidth vg.Length
	// ThinWidth is the width of axes, reference lines and outlines.
	ThinWidth vg.Length
	// MarkerRadius is the radius of data point markers.
	MarkerRadius vg.Length
}

// ScreenStyle returns the style of the SVG charts, sized for a 360-pixel
// phone screen: 12 px text (the brief asks for at least 11 px at 360 px
// wide), 13 px labels, 2 px data lines.
func ScreenStyle() Style {
	return Style{FontSize: 12, LabelSize: 13, LineWidth: 2, ThinWidth: 1, MarkerRadius: 3.5}
}

// PrintStyle returns the style for a printed A4 report: 7.5 pt text and
// 8.5 pt labels, close to the size of a figure's text in a journal.
func PrintStyle() Style {
	return Style{FontSize: 7.5, LabelSize: 8.5, LineWidth: 1.2, ThinWidth: 0.6, MarkerRadius: 2.2}
}

// The Okabe–Ito colour-universal-design palette (Okabe, M. & Ito, K. 2008,
// Color Universal Design: how to make figures and presentations that are
// friendly to colorblind people), and light tints of it for fills.
var (
	black         = color.RGBA{0x00, 0x00, 0x00, 0xff}
	orange        = color.RGBA{0xe6, 0x9f, 0x00, 0xff}
	skyBlue       = color.RGBA{0x56, 0xb4, 0xe9, 0xff}
	bluishGreen   = color.RGBA{0x00, 0x9e, 0x73, 0xff}
	yellow        = color.RGBA{0xf0, 0xe4, 0x42, 0xff}
	blue          = color.RGBA{0x00, 0x72, 0xb2, 0xff}
	vermillion    = color.RGBA{0xd5, 0x5e, 0x00, 0xff}
	reddishPurple = color.RGBA{0xcc, 0x79, 0xa7, 0xff}
	white         = color.RGBA{0xff, 0xff, 0xff, 0xff}
	darkGrey      = color.RGBA{0x4d, 0x4d, 0x4d, 0xff}
	lightGrey     = color.RGBA{0xbb, 0xbb, 0xbb, 0xff}
)

// tint returns c mixed with white, frac of the way to white.
func tint(c color.RGBA, frac float64) color.RGBA {
	mix := func(v uint8) uint8 { return uint8(float64(v) + (255-float64(v))*frac + 0.5) }
	return color.RGBA{mix(c.R), mix(c.G), mix(c.B), 0xff}
}

// sansFont is the one typeface of every chart: Liberation Sans, embedded in
// gonum/plot, so layout is the same on every machine.
func sansFont(size vg.Length, bold bool) font.Font {
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
	if bold {
		f.Weight = stdfont.WeightBold
	}
	return f
}

// textStyle returns a plain-text style of the given size and alignment.
func textStyle(size vg.Length, xa text.XAlignment, ya text.YAlignment) text.Style {
	return text.Style{Color: black, Font: sansFont(size, false), XAlign: xa, YAlign: ya,
		Handler: plot.DefaultTextHandler}
}

// newPlot returns a plot with the chart fonts, thin axes and no legend of
// its own (the charts draw theirs below the data).
func newPlot(st Style, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil
	p.Title.TextStyle.Font = sansFont(st.LabelSize, true)
	p.Title.Padding = st.FontSize / 3
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sansFont(st.LabelSize, false)
		a.Label.Padding = st.FontSize / 4
		a.Tick.Label.Font = sansFont(st.FontSize, false)
		a.LineStyle.Width = st.ThinWidth
		a.Tick.LineStyle.Width = st.ThinWidth
		a.Tick.Length = st.FontSize / 2
		a.Padding = st.FontSize / 3
		a.Tick.Marker = niceTicks{}
	}
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	return p
}

// lineStyle returns a line of colour c, width w and dash pattern dashes
// (lengths in multiples of the width, so patterns scale with the style).
func lineStyle(c color.Color, w vg.Length, dashes ...float64) draw.LineStyle {
	ls := draw.LineStyle{Color: c, Width: w}
	for _, d := range dashes {
		ls.Dashes = append(ls.Dashes, vg.Length(d)*w)
	}
	return ls
}

// Dash patterns, in multiples of the line width. Each series of a chart has
// its own, so the charts read in greyscale.
var (
	solid    = []float64(nil)
	dashed   = []float64{4, 2}
	dotted   = []float64{1, 1.5}
	longDash = []float64{7, 2, 1.5, 2}
)

// fillWhite fills the canvas white: the page behind a chart may be dark.
func fillWhite(c draw.Canvas) {
	c.SetColor(white)
	c.Fill(c.Rectangle.Path())
}

// markerFor returns the marker radius for n points across width w: the
// style's, or smaller when the points would crowd, so they stay apart.
func markerFor(st Style, w vg.Length, n int) vg.Length {
	if n < 2 {
		return st.MarkerRadius
	}
	return max(min(st.MarkerRadius, w*0.85/vg.Length(n)/3), st.MarkerRadius/3)
}

package views

import "strconv"

// ChartView is one chart on a page: an <img> of the chart's own SVG
// document with its text alternative, or, when there is nothing to draw,
// the sentence saying so.
type ChartView struct {
	ID     string // "mass", "stamina", "feathers", "power"
	Title  string
	Src    string // the SVG document's URL
	Alt    string // the text alternative: what it shows, with its key numbers
	Width  int    // the SVG's intrinsic size, CSS px
	Height int
	// Missing, when not "", replaces the image: e.g. "No weigh-ins yet."
	Missing string
}

// WidthAttr and HeightAttr are the <img> size attributes.
func (c ChartView) WidthAttr() string  { return strconv.Itoa(c.Width) }
func (c ChartView) HeightAttr() string { return strconv.Itoa(c.Height) }

// Pictures is the patient page's block of charts.
type Pictures struct {
	Charts []ChartView
	// Assessment links to the assessment page, whose power curve can be
	// drawn at another site.
	Assessment string
}

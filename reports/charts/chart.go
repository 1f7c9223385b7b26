package charts

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// ErrNoData is returned (wrapped) by a chart constructor given nothing to
// draw: no weigh-ins, no sessions, no curve.
var ErrNoData = errors.New("charts: nothing to draw")

// Chart is one chart, ready to render as SVG, onto a vg.Canvas, or as text.
// Build it with Mass, Stamina, Feathers or Power. A Chart is immutable.
type Chart struct {
	name   string    // short name in errors, e.g. "mass"
	title  string    // the SVG <title>
	alt    string    // the text alternative, the SVG <desc>
	width  vg.Length // the screen size, points (1 point = 1 CSS px)
	height vg.Length
	draw   func(c draw.Canvas, st Style)
}

// Title returns the chart's short title, e.g. "Mass over time".
func (c *Chart) Title() string { return c.title }

// Alt returns the chart's text alternative: what it shows, with its key
// numbers and units, for screen readers, the <img alt> and the PDF.
func (c *Chart) Alt() string { return c.alt }

// Size returns the chart's design size for the screen, in points; the SVG
// is this many CSS pixels wide and high at its intrinsic size.
func (c *Chart) Size() (w, h vg.Length) { return c.width, c.height }

// Draw draws the chart onto cv in the rectangle from (0, 0) to (w, h), in
// points, with the text sizes and line widths of st (ScreenStyle or
// PrintStyle); for a PDF, cv is a pdfcanvas.Canvas and w, h its Size. The
// layout adapts to the size: legends wrap, and the feather chart stretches
// its feathers to fill the height. A panic inside the plotting library is
// returned as an error.
func (c *Chart) Draw(cv vg.Canvas, w, h vg.Length, st Style) (err error) {
	if w <= 0 || h <= 0 {
		return fmt.Errorf("charts: draw %s chart: size %v×%v must be positive", c.name, w, h)
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("charts: draw %s chart: %v", c.name, r)
		}
	}()
	c.draw(draw.NewCanvas(cv, w, h), st)
	return nil
}

// SVG writes the chart as a standalone SVG document at its screen size,
// with ScreenStyle. The root element has role="img" and is labelled by a
// <title> (Title) and a <desc> (Alt). The drawing uses inline style
// attributes, so the document must be served with a content security policy
// that allows them.
func (c *Chart) SVG(w io.Writer) error {
	cv := vgsvg.New(c.width, c.height)
	if err := c.Draw(cv, c.width, c.height, ScreenStyle()); err != nil {
		return err
	}
	var buf bytes.Buffer
	if _, err := cv.WriteTo(&buf); err != nil {
		return fmt.Errorf("charts: write %s chart: %w", c.name, err)
	}
	doc, err := c.finishSVG(buf.Bytes())
	if err != nil {
		return err
	}
	if _, err := w.Write(doc); err != nil {
		return fmt.Errorf("charts: write %s chart: %w", c.name, err)
	}
	return nil
}

// fontFamily is how gonum's SVG writer names the sans-serif font, and
// fontFallback the list a browser gets instead: Arial and Helvetica have the
// same metrics as Liberation Sans, so text laid out for one fits the others.
const (
	fontFamily   = "font-family:Liberation Sans;"
	fontFallback = "font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"
)

// finishSVG replaces the SVG writer's prologue and root tag with one that
// has a pixel size, a role, a title and a description, and gives the font
// a fallback list.
func (c *Chart) finishSVG(raw []byte) ([]byte, error) {
	start := bytes.Index(raw, []byte("<svg"))
	end := -1
	if start >= 0 {
		end = bytes.IndexByte(raw[start:], '>')
	}
	if end < 0 {
		return nil, fmt.Errorf("charts: write %s chart: no <svg> root in the SVG writer's output", c.name)
	}
	body := raw[start+end+1:]
	var out bytes.Buffer
	w, h := c.width.Points(), c.height.Points()
	fmt.Fprintf(&out, `<?xml version="1.0" encoding="UTF-8"?>
<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="%g" height="%g" viewBox="0 0 %g %g" role="img" aria-labelledby="chart-title chart-desc">
<title id="chart-title">`, w, h, w, h)
	if err := xml.EscapeText(&out, []byte(c.title)); err != nil {
		return nil, err
	}
	out.WriteString("</title>\n<desc id=\"chart-desc\">")
	if err := xml.EscapeText(&out, []byte(c.alt)); err != nil {
		return nil, err
	}
	out.WriteString("</desc>")
	out.WriteString(strings.ReplaceAll(string(body), fontFamily, fontFallback))
	return out.Bytes(), nil
}

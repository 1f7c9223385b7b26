// Package charts draws the patient charts of Aloft: mass over time against
// the species' range, flight stamina per session, the flight-feather map and
// the power curve at a site.
//
// Each chart is built from plain inputs into a *Chart, the one source of its
// numbers, which renders three ways: as a standalone SVG document for the
// web (SVG, with a <title> and a <desc> carrying the text alternative), onto
// any gonum vg.Canvas at a given size for the PDF report (Draw, through
// package pdfcanvas), and as the text alternative itself (Alt).
//
// The charts are drawn for a 360-pixel phone screen first: the SVG's
// intrinsic size is 360 units wide, 1 unit to 1 CSS pixel, with text of at
// least 12 px, few ticks and legends below the data, never over it. Colours
// are the Okabe–Ito colour-universal-design palette, and every series also
// differs by line style, marker or letter, so the charts survive colour
// blindness and greyscale printing. Output is deterministic: the embedded
// Liberation fonts, no timestamps.
//
// The charts only show what the records and the flight model say; what to do
// with a bird is for the veterinarian and the licensed rehabilitator to
// decide (CAUTIONS.md).
package charts

package pdfcanvas_test

import (
	"io"
	"time"

	"aloft/assess"
	"aloft/reports/charts"
	"aloft/reports/pdfcanvas"

	"github.com/go-pdf/fpdf"
)

// A report draws a chart into a box of its page: register the chart font,
// open a canvas over the box, draw with the print style, close the canvas,
// then set the report's own font again.
func ExampleNew() {
	pdf := fpdf.New("P", "mm", "A4", "")
	pdfcanvas.AddFonts(pdf, "")
	pdf.AddPage()

	day := time.Date(2026, 11, 2, 9, 0, 0, 0, time.UTC)
	chart, err := charts.Mass(charts.MassInput{
		Weighins: []assess.WeighIn{{At: day, MassG: 742, Fed: assess.FedBefore}, {At: day.AddDate(0, 0, 7), MassG: 795, Fed: assess.FedBefore}},
		RangeLoG: 918, RangeHiG: 1530, Sex: assess.SexFemale,
	})
	if err != nil {
		panic(err)
	}
	c := pdfcanvas.New(pdf, 15, 20, 90, 70) // x, y, w, h in mm
	w, h := c.Size()
	if err := chart.Draw(c, w, h, charts.PrintStyle()); err != nil {
		panic(err)
	}
	c.Close()
	pdf.SetFont(pdfcanvas.DefaultFamily, "", 10)
	pdf.Text(15, 100, chart.Alt()) // the text alternative, e.g. as a caption
	if err := pdf.Output(io.Discard); err != nil {
		panic(err)
	}
}

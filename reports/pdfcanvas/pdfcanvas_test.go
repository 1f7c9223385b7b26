package pdfcanvas

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/go-pdf/fpdf"
	stdfont "golang.org/x/image/font"
	"golang.org/x/image/font/gofont/goregular"
	"gonum.org/v1/plot/vg"
)

// newDoc returns a byte-stable A4 document in mm with the chart fonts.
func newDoc(t *testing.T) *fpdf.Fpdf {
	t.Helper()
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.SetCatalogSort(true)
	pdf.SetCompression(false)
	fixed := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	pdf.SetCreationDate(fixed)
	pdf.SetModificationDate(fixed)
	AddFonts(pdf, "")
	pdf.AddPage()
	return pdf
}

// output returns the document's bytes, failing on any error fpdf kept.
func output(t *testing.T, pdf *fpdf.Fpdf) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		t.Fatalf("fpdf: %v", err)
	}
	return buf.Bytes()
}

func TestAffine(t *testing.T) {
	tests := []struct {
		name         string
		m            affine
		x, y         float64
		wantX, wantY float64
		wantScale    float64
	}{
		{"identity", identity, 3, 4, 3, 4, 1},
		{"translate", identity.translate(10, 20), 3, 4, 13, 24, 1},
		{"scale", identity.scale(2, 3), 3, 4, 6, 12, math.Sqrt(6)},
		{"rotate quarter turn", identity.rotate(math.Pi / 2), 1, 0, 0, 1, 1},
		// gonum rotates a y-axis label by translating to its anchor, then
		// turning: the translation must apply after the rotation.
		{"translate then rotate", identity.translate(10, 0).rotate(math.Pi / 2), 1, 0, 10, 1, 1},
		{"flip y (gonum's text flip)", identity.translate(0, 100).scale(1, -1), 5, 10, 5, 90, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			x, y := tc.m.apply(tc.x, tc.y)
			if math.Abs(x-tc.wantX) > 1e-12 || math.Abs(y-tc.wantY) > 1e-12 {
				t.Errorf("apply(%g, %g) = (%g, %g), want (%g, %g)", tc.x, tc.y, x, y, tc.wantX, tc.wantY)
			}
			if s := tc.m.scaleFactor(); math.Abs(s-tc.wantScale) > 1e-12 {
				t.Errorf("scaleFactor = %g, want %g", s, tc.wantScale)
			}
		})
	}
}

// TestArcApproximation checks the Bézier quarter circles against the circle
// itself: the 4/3·tan(θ/4) construction keeps a quarter circle within
// 0.03 % of its radius (the usual figure is 0.027 %, from memory; the test
// measures it).
func TestArcApproximation(t *testing.T) {
	const r = 100.0
	k := 4.0 / 3 * math.Tan(math.Pi/8) * r
	p0, p1, p2, p3 := [2]float64{r, 0}, [2]float64{r, k}, [2]float64{k, r}, [2]float64{0, r}
	worst := 0.0
	for i := 0; i <= 100; i++ {
		u := float64(i) / 100
		b := func(j int) float64 {
			return math.Pow(1-u, 3)*p0[j] + 3*math.Pow(1-u, 2)*u*p1[j] + 3*(1-u)*u*u*p2[j] + u*u*u*p3[j]
		}
		worst = max(worst, math.Abs(math.Hypot(b(0), b(1))-r)/r)
	}
	if worst > 3e-4 {
		t.Errorf("worst radial error %.5f %%, want below 0.03 %%", worst*100)
	}
}

// TestCanvas_Operators draws a stroke, a fill and text, and checks the
// content stream carries the colour, width, dash and font operators in
// the right units (the document is in mm: 1 pt = 25.4/72 mm).
func TestCanvas_Operators(t *testing.T) {
	pdf := newDoc(t)
	c := New(pdf, 20, 30, 100, 50)
	w, h := c.Size()
	if math.Abs(w.Points()-100*72/25.4) > 1e-9 || math.Abs(h.Points()-50*72/25.4) > 1e-9 {
		t.Errorf("Size() = %v×%v pt, want 100×50 mm in points", w, h)
	}
	c.SetColor(color.RGBA{0x00, 0x72, 0xb2, 0xff})
	c.SetLineWidth(2)
	c.SetLineDash([]vg.Length{4, 2}, 0)
	var p vg.Path
	p.Move(vg.Point{X: 0, Y: 0})
	p.Line(vg.Point{X: 72, Y: 72})
	c.Stroke(p)
	c.Push()
	c.Translate(vg.Point{X: 36, Y: 0})
	c.Rotate(math.Pi / 2)
	c.FillString(fontFace(t, 10), vg.Point{}, "Power (W) at 12 °C – rotated")
	c.Pop()
	c.Close()
	out := string(output(t, pdf))
	const k = 72 / 25.4        // points per mm
	x0, y0 := 20*k, (297-80)*k // the box's bottom-left corner, in points from the page's
	for _, want := range []string{
		"0.000 0.447 0.698 RG", // the stroke colour
		"2.00 w",               // 2 pt wide
		"[4.00 2.00] 0.00 d",   // the dash, in points
		// the line from the box's corner up and right 1 inch (72 pt):
		fmt.Sprintf("%.2f %.2f m", x0, y0), fmt.Sprintf("%.2f %.2f l", x0+72, y0+72),
		" Tf",                               // a font selected
		"0.00000 1.00000 -1.00000 0.00000 ", // rotated a quarter turn for the text
	} {
		if !strings.Contains(out, want) {
			t.Errorf("content stream lacks %q", want)
		}
	}
}

// TestCanvas_Deterministic draws the same thing twice: fpdf output is
// byte-stable with fixed dates and catalog sort, and the canvas adds
// nothing that varies (image names are content hashes).
func TestCanvas_Deterministic(t *testing.T) {
	draw := func() []byte {
		pdf := newDoc(t)
		drawCharts(t, pdf)
		return output(t, pdf)
	}
	if !bytes.Equal(draw(), draw()) {
		t.Error("two renderings of the same charts differ")
	}
}

// TestCanvas_Family sets text in another registered family, the Go fonts,
// with only a regular face: bold text falls back to it instead of leaving
// fpdf in error, and the words come back out of the PDF.
func TestCanvas_Family(t *testing.T) {
	pdftotext := tool(t, "pdftotext")
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.AddUTF8FontFromBytes("GoSans", "", goregular.TTF)
	pdf.AddPage()
	c := New(pdf, 10, 10, 100, 40, Family("GoSans"))
	bold := fontFace(t, 12)
	bold.Font.Weight = stdfont.WeightBold
	c.FillString(bold, vg.Point{X: 10, Y: 20}, "Wing loading 58 N/m² – Ł")
	c.Close()
	path := filepath.Join(t.TempDir(), "family.pdf")
	if err := os.WriteFile(path, output(t, pdf), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(pdftotext, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	if want := "Wing loading 58 N/m² – Ł"; !strings.Contains(string(out), want) {
		t.Errorf("pdftotext output %q lacks %q", out, want)
	}
}

// TestCanvas_ImageAndAlpha draws an image and a half-transparent fill: the
// document must hold the image once however often it is drawn, and an
// alpha graphics state, and write without error.
func TestCanvas_ImageAndAlpha(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 2, 2))
	img.Set(0, 0, color.RGBA{0xd5, 0x5e, 0x00, 0xff})
	render := func(times int) (string, *fpdf.Fpdf) {
		pdf := newDoc(t)
		c := New(pdf, 10, 10, 50, 50)
		for range times {
			c.DrawImage(vg.Rectangle{Max: vg.Point{X: 72, Y: 72}}, img)
		}
		c.SetColor(color.NRGBA{0x00, 0x72, 0xb2, 0x80})
		var p vg.Path
		p.Move(vg.Point{})
		p.Line(vg.Point{X: 10})
		p.Line(vg.Point{X: 10, Y: 10})
		p.Close()
		c.Fill(p)
		c.Close()
		return string(output(t, pdf)), pdf
	}
	once, _ := render(1)
	twice, pdf := render(2)
	if n1, n2 := strings.Count(once, "/Subtype /Image"), strings.Count(twice, "/Subtype /Image"); n1 == 0 || n1 != n2 {
		t.Errorf("image objects: %d drawn once, %d drawn twice; want the same, more than 0", n1, n2)
	}
	if !strings.Contains(twice, "/ca 0.502") {
		t.Error("no alpha graphics state for the half-transparent fill")
	}
	if a, _ := pdf.GetAlpha(); a != 1 {
		t.Errorf("alpha after Close %g, want 1", a)
	}
}

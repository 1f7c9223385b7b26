package charts

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"testing"

	"gonum.org/v1/plot/vg/draw"
)

// TestPalette checks the chart colours against the published Okabe–Ito
// colour-universal-design palette (Okabe, M. & Ito, K. 2008, "Color
// Universal Design (CUD): how to make figures and presentations that are
// friendly to colorblind people"; the hex values as R's grDevices
// palette.colors("Okabe-Ito") and the cookbook-r listing give them).
func TestPalette(t *testing.T) {
	tests := []struct {
		name string
		got  color.RGBA
		hex  string
	}{
		{"black", black, "000000"},
		{"orange", orange, "E69F00"},
		{"sky blue", skyBlue, "56B4E9"},
		{"bluish green", bluishGreen, "009E73"},
		{"yellow", yellow, "F0E442"},
		{"blue", blue, "0072B2"},
		{"vermillion", vermillion, "D55E00"},
		{"reddish purple", reddishPurple, "CC79A7"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := fmt.Sprintf("%02X%02X%02X", tc.got.R, tc.got.G, tc.got.B); got != tc.hex {
				t.Errorf("got #%s, want #%s", got, tc.hex)
			}
		})
	}
}

// relativeLuminance is WCAG 2.2's relative luminance of an sRGB colour
// (W3C, Web Content Accessibility Guidelines 2.2, definition "relative
// luminance": L = 0.2126R + 0.7152G + 0.0722B on linearised channels).
func relativeLuminance(c color.RGBA) float64 {
	lin := func(v uint8) float64 {
		s := float64(v) / 255
		if s <= 0.04045 {
			return s / 12.92
		}
		return math.Pow((s+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
}

// contrast is WCAG's contrast ratio (L1 + 0.05)/(L2 + 0.05), lighter over darker.
func contrast(a, b color.RGBA) float64 {
	la, lb := relativeLuminance(a), relativeLuminance(b)
	return (max(la, lb) + 0.05) / (min(la, lb) + 0.05)
}

// TestContrast checks the WCAG formula on its defining extreme (black on
// white is 21:1, WCAG 2.2) and then that every colour a data line, marker
// or reference line is drawn in reaches 3:1 against the white background,
// WCAG 2.2 success criterion 1.4.11 "Non-text Contrast" for graphics
// needed to understand content.
func TestContrast(t *testing.T) {
	if got := contrast(black, white); math.Abs(got-21) > 1e-9 {
		t.Fatalf("contrast(black, white) = %g, want 21", got)
	}
	for name, c := range map[string]color.RGBA{
		"blue (this bird, passes, mass)": blue, "vermillion (release guide, run, available power)": vermillion,
		"bluish green (recovery, range edges)": bluishGreen, "black (reference, target, tangent)": black,
		"dark grey (markers, feather outlines)": darkGrey,
	} {
		if got := contrast(c, white); got < 3 {
			t.Errorf("%s: contrast %.2f:1 against white, want at least 3:1", name, got)
		}
	}
}

// signature is what tells a series apart without colour.
type signature struct {
	dashes string
	glyph  string
}

func sig(ls draw.LineStyle, g *draw.GlyphStyle) signature {
	s := signature{dashes: fmt.Sprint(ls.Dashes)}
	if g != nil {
		s.glyph = fmt.Sprintf("%T", g.Shape)
	}
	return s
}

// TestGreyscale checks that the series sharing a panel differ by dash
// pattern or marker shape, so a greyscale print keeps them apart.
func TestGreyscale(t *testing.T) {
	st := ScreenStyle()
	mass, release, _, filled, _ := massChart{}.styles(st)
	passes, run, target, _, gp, gr, _ := staminaStyles(st)
	ps := newPowerStyles(st)
	panels := map[string][]signature{
		"mass":           {sig(mass, &filled), sig(release, nil)},
		"stamina passes": {sig(passes, &gp), sig(run, &gr), sig(target, nil)},
		// The V_mp and V_mr markers are vertical and labelled in words.
		"power mechanical":         {sig(ps.bird, nil), sig(ps.ref, nil), sig(ps.avail, nil)},
		"power chemical (tangent)": {sig(ps.bird, nil), sig(ps.tangent, nil)},
	}
	for name, sigs := range panels {
		seen := map[signature]int{}
		for i, s := range sigs {
			if j, dup := seen[s]; dup {
				t.Errorf("%s: series %d and %d look alike in greyscale (%+v)", name, j, i, s)
			}
			seen[s] = i
		}
	}
}

// fontSize matches a font size in gonum's SVG styles.
var fontSize = regexp.MustCompile(`font-size:([0-9.]+)px`)

// TestScreenText checks every chart's SVG for the phone: at its intrinsic
// 360-unit width shown 360 px wide, no text is under 11 px (the project's
// rule; 12 px is used), and there is nothing a strict content security
// policy would block besides inline styles: no script, no event handler,
// no external reference.
func TestScreenText(t *testing.T) {
	for _, c := range allTestCharts(t) {
		t.Run(c.name, func(t *testing.T) {
			data, _ := renderSVG(t, c)
			ms := fontSize.FindAllSubmatch(data, -1)
			if len(ms) == 0 {
				t.Fatal("no font sizes found")
			}
			for _, m := range ms {
				if px, _ := strconv.ParseFloat(string(m[1]), 64); px < 11 {
					t.Errorf("text at %g px, want at least 11 px", px)
				}
			}
			for _, bad := range []string{"<script", "<foreignObject", "href=\"http", "url(http"} {
				if bytes.Contains(data, []byte(bad)) {
					t.Errorf("SVG contains %q", bad)
				}
			}
			if regexp.MustCompile(`\son[a-z]+=`).Match(data) {
				t.Error("SVG has an event-handler attribute")
			}
		})
	}
}

// allTestCharts returns one chart of each kind from the golden inputs.
func allTestCharts(t *testing.T) []*Chart {
	t.Helper()
	mass, err := Mass(MassInput{Weighins: weighins([]int{0, 3}, []float64{800, 820}, nil), RangeLoG: 918, RangeHiG: 1530})
	if err != nil {
		t.Fatal(err)
	}
	stamina, err := Stamina(StaminaInput{Sessions: sessions([]int{0, 2}, []int{3, 5}, []int{2, 4}, []*int{ptr(90), ptr(60)})})
	if err != nil {
		t.Fatal(err)
	}
	feathers, err := Feathers(FeatherInput{Primaries: 10, Secondaries: 13, Rectrices: 12})
	if err != nil {
		t.Fatal(err)
	}
	power, err := Power(PowerInput{Result: hawkResult(t), SiteLabel: "test site"})
	if err != nil {
		t.Fatal(err)
	}
	return []*Chart{mass, stamina, feathers, power}
}

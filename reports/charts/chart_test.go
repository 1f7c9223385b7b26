package charts

import (
	"bytes"
	"encoding/xml"
	"errors"
	"flag"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/")

// svgDoc is what the tests read back from a chart's SVG.
type svgDoc struct {
	width, height string
	role          string
	title, desc   string
	texts         []string // the visible <text> contents, in order
}

// parseSVG parses an SVG document strictly as XML and collects its root
// attributes, title, description and visible text.
func parseSVG(t *testing.T, data []byte) svgDoc {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	dec.Strict = true
	var doc svgDoc
	var path []string
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("SVG does not parse as XML: %v", err)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			path = append(path, tok.Name.Local)
			if len(path) == 1 {
				if tok.Name.Local != "svg" || tok.Name.Space != "http://www.w3.org/2000/svg" {
					t.Fatalf("root element is %v, want svg in the SVG namespace", tok.Name)
				}
				for _, a := range tok.Attr {
					switch a.Name.Local {
					case "width":
						doc.width = a.Value
					case "height":
						doc.height = a.Value
					case "role":
						doc.role = a.Value
					}
				}
			}
			if tok.Name.Local == "text" {
				doc.texts = append(doc.texts, "")
			}
		case xml.EndElement:
			path = path[:len(path)-1]
		case xml.CharData:
			if len(path) == 0 {
				continue
			}
			switch path[len(path)-1] {
			case "title":
				doc.title += string(tok)
			case "desc":
				doc.desc += string(tok)
			case "text":
				doc.texts[len(doc.texts)-1] += string(tok)
			}
		}
	}
	return doc
}

// renderSVG renders c and checks the document's frame: it parses, is 360
// wide (the phone width the charts are designed for), has role img, and its
// title and desc are the chart's Title and Alt.
func renderSVG(t *testing.T, c *Chart) ([]byte, svgDoc) {
	t.Helper()
	var buf bytes.Buffer
	if err := c.SVG(&buf); err != nil {
		t.Fatalf("SVG: %v", err)
	}
	doc := parseSVG(t, buf.Bytes())
	if doc.width != "360" {
		t.Errorf("width %q, want 360", doc.width)
	}
	if doc.role != "img" {
		t.Errorf("role %q, want img", doc.role)
	}
	if doc.title != c.Title() || doc.title == "" {
		t.Errorf("title %q, want %q", doc.title, c.Title())
	}
	if doc.desc != c.Alt() || doc.desc == "" {
		t.Errorf("desc %q, want the Alt %q", doc.desc, c.Alt())
	}
	if bytes.Contains(buf.Bytes(), []byte("font-family:Liberation Sans;")) {
		t.Errorf("a font-family without fallbacks is left in the SVG")
	}
	return buf.Bytes(), doc
}

// wantTexts checks that each want is the whole of, or part of, a visible text.
func wantTexts(t *testing.T, doc svgDoc, wants ...string) {
	t.Helper()
	all := strings.Join(doc.texts, "\n")
	for _, w := range wants {
		if !strings.Contains(all, w) {
			t.Errorf("no visible text contains %q; texts:\n%s", w, all)
		}
	}
}

// wantAlt checks that the text alternative contains each want.
func wantAlt(t *testing.T, c *Chart, wants ...string) {
	t.Helper()
	for _, w := range wants {
		if !strings.Contains(c.Alt(), w) {
			t.Errorf("Alt() lacks %q:\n%s", w, c.Alt())
		}
	}
}

// golden compares data with testdata/name, or rewrites it with -update.
func golden(t *testing.T, name string, data []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./reports/charts -update to create it)", err)
	}
	if !bytes.Equal(data, want) {
		t.Errorf("%s differs from the golden file (run with -update after checking the change by eye)", path)
	}
}

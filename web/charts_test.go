package web

import (
	"encoding/xml"
	"io"
	"net/http"
	"strings"
	"testing"

	"github.com/PuerkitoBio/goquery"
)

// svgDoc is what the tests read of an SVG document.
type svgDoc struct {
	XMLName xml.Name `xml:"svg"`
	Width   string   `xml:"width,attr"`
	Height  string   `xml:"height,attr"`
	Role    string   `xml:"role,attr"`
	Title   string   `xml:"title"`
	Desc    string   `xml:"desc"`
	Texts   []string `xml:",any"`
}

// parseSVGDoc checks the chart headers of resp and parses its body as an
// SVG document.
func parseSVGDoc(t *testing.T, resp *http.Response) svgDoc {
	t.Helper()
	defer resp.Body.Close()
	h := resp.Header
	if ct := h.Get("Content-Type"); ct != "image/svg+xml" {
		t.Errorf("%s: Content-Type %q, want image/svg+xml", resp.Request.URL.Path, ct)
	}
	if csp := h.Get("Content-Security-Policy"); csp != ChartCSP {
		t.Errorf("%s: CSP %q, want the chart policy %q", resp.Request.URL.Path, csp, ChartCSP)
	}
	if h.Get("X-Content-Type-Options") != "nosniff" || !strings.Contains(h.Get("Cache-Control"), "private") {
		t.Errorf("%s: nosniff %q, Cache-Control %q", resp.Request.URL.Path, h.Get("X-Content-Type-Options"), h.Get("Cache-Control"))
	}
	body, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatal(err)
	}
	var doc svgDoc
	if err := xml.Unmarshal(body, &doc); err != nil {
		t.Fatalf("%s: not an XML document: %v\n%.300s", resp.Request.URL.Path, err, body)
	}
	if doc.XMLName.Local != "svg" || doc.XMLName.Space != "http://www.w3.org/2000/svg" || doc.Role != "img" {
		t.Errorf("%s: root %v role %q, want an svg image", resp.Request.URL.Path, doc.XMLName, doc.Role)
	}
	return doc
}

func TestCharts_Routes(t *testing.T) {
	a, rich, bare := assessFixture(t)
	_, page := a.get("/patients/" + rich.CaseNumber)
	alts := map[string]string{}
	page.Find("[data-testid=section-pictures] img.chart").Each(func(_ int, s *goquery.Selection) {
		alts[s.AttrOr("src", "")] = s.AttrOr("alt", "")
	})
	cases := []struct {
		name   string
		path   string
		status int
		title  string // a word of the <title>
	}{
		{"Mass", "/patients/" + rich.CaseNumber + "/charts/mass.svg", 200, "Mass"},
		{"Stamina", "/patients/" + rich.CaseNumber + "/charts/stamina.svg", 200, "passes"},
		{"Feathers", "/patients/" + rich.CaseNumber + "/charts/feathers.svg", 200, "feathers"},
		{"Power", "/patients/" + rich.CaseNumber + "/charts/power.svg", 200, "Power curve"},
		{"PowerAtSite", "/patients/" + rich.CaseNumber + "/charts/power.svg?elevation_m=1200&temp_c=5", 200, "1200 m, 5 °C"},
		{"NoWeighIns", "/patients/" + bare.CaseNumber + "/charts/mass.svg", 200, "No weigh-ins yet."},
		{"NoSessions", "/patients/" + bare.CaseNumber + "/charts/stamina.svg", 200, "No flight sessions yet."},
		{"NoFeatherMap", "/patients/" + bare.CaseNumber + "/charts/feathers.svg", 200, "No feather map"},
		{"NoPower", "/patients/" + bare.CaseNumber + "/charts/power.svg", 200, "needs a weigh-in"},
		{"ErrSite", "/patients/" + rich.CaseNumber + "/charts/power.svg?elevation_m=x", 422, "elevation_m"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, err := a.client.Get(a.srv.URL + tc.path)
			if err != nil {
				t.Fatal(err)
			}
			wantStatus(t, resp, tc.status)
			doc := parseSVGDoc(t, resp)
			if !strings.Contains(doc.Title, tc.title) {
				t.Errorf("title %q lacks %q", doc.Title, tc.title)
			}
			if alt, ok := alts[tc.path]; ok && alt != doc.Desc {
				t.Errorf("the page's alt and the SVG's desc differ:\n%s\n%s", alt, doc.Desc)
			}
		})
	}
	if len(alts) != 4 {
		t.Errorf("the patient page links %d charts, want 4: %v", len(alts), alts)
	}
	// Unknown patients and anonymous visitors get no chart.
	resp, err := a.client.Get(a.srv.URL + "/patients/1999-0001/charts/mass.svg")
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	wantStatus(t, resp, http.StatusNotFound)
	anon, err := (&http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}).Get(a.srv.URL + "/patients/" + rich.CaseNumber + "/charts/mass.svg")
	if err != nil {
		t.Fatal(err)
	}
	anon.Body.Close()
	if anon.StatusCode != http.StatusSeeOther {
		t.Errorf("anonymous chart request: %d, want a redirect to the login", anon.StatusCode)
	}
}

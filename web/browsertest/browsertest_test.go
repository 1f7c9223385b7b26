package browsertest

import (
	"bytes"
	"fmt"
	"html"
	"image/png"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const head = `<!doctype html><html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>browsertest</title>
<style>body{font:16px sans-serif;margin:0;padding:8px}
input,button{font:inherit;box-sizing:border-box;max-width:100%%}
button{min-width:48px;min-height:48px}</style></head><body>`

// newServer serves a form, the page it redirects to after POST, a page too
// wide for a phone and a small JSON answer, on 127.0.0.1.
func newServer(t *testing.T) *httptest.Server {
	t.Helper()
	mux := http.NewServeMux()
	mux.HandleFunc("GET /{$}", func(w http.ResponseWriter, r *http.Request) {
		fmt.Fprintf(w, head+`<form method="post" action="/intake">
<label for="finder">Finder</label> <input id="finder" name="finder">
<select id="group" name="group"><option value="">–</option><option value="songbird">songbird</option></select>
<button id="save" type="submit">Save</button></form>
<p>Lorem ipsum dolor sit amet, consectetur adipiscing elit, sed do eiusmod tempor.</p>
<div style="height:2000px">tall content</div></body></html>`)
	})
	mux.HandleFunc("POST /intake", func(w http.ResponseWriter, r *http.Request) {
		q := "finder=" + r.FormValue("finder") + "&group=" + r.FormValue("group")
		http.Redirect(w, r, "/done?"+strings.ReplaceAll(q, " ", "+"), http.StatusSeeOther)
	})
	mux.HandleFunc("GET /done", func(w http.ResponseWriter, r *http.Request) {
		fmt.Fprintf(w, head+`<p id="msg">Saved for %s (%s)</p></body></html>`,
			html.EscapeString(r.FormValue("finder")), html.EscapeString(r.FormValue("group")))
	})
	mux.HandleFunc("GET /wide", func(w http.ResponseWriter, r *http.Request) {
		fmt.Fprintf(w, head+`<div id="wide" style="width:600px">wide</div></body></html>`)
	})
	mux.HandleFunc("GET /ping", func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Type", "application/json")
		fmt.Fprint(w, `{"ok":true}`)
	})
	l, err := net.Listen("tcp4", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewUnstartedServer(mux)
	srv.Listener.Close()
	srv.Listener = l
	srv.Start()
	t.Cleanup(srv.Close)
	return srv
}

func TestBrowser_FormRoundTrip(t *testing.T) {
	srv := newServer(t)
	b := New(t)
	b.Open(srv.URL+"/", "#save")
	b.Fill("#finder", "Ada Wren")
	if got := b.Value("#finder"); got != "Ada Wren" {
		t.Errorf("Value(#finder): got %q, want %q", got, "Ada Wren")
	}
	b.SetValue("#group", "songbird")
	status := b.ClickAndWait("#save", "#msg")
	if status != http.StatusOK {
		t.Errorf("ClickAndWait status: got %d, want 200", status)
	}
	if got, want := b.Text("#msg"), "Saved for Ada Wren (songbird)"; got != want {
		t.Errorf("Text(#msg): got %q, want %q", got, want)
	}
	if got := b.URL(); !strings.HasPrefix(got, srv.URL+"/done?") {
		t.Errorf("URL: got %q, want prefix %q", got, srv.URL+"/done?")
	}
	if got := b.Count("p"); got != 1 {
		t.Errorf("Count(p): got %d, want 1", got)
	}
	if got := Eval[int](b, "6 * 7"); got != 42 {
		t.Errorf("Eval(6 * 7): got %d, want 42", got)
	}
}

func TestBrowser_Phone(t *testing.T) {
	srv := newServer(t)
	b := New(t, Phone())
	b.Open(srv.URL+"/", "#save")
	if w, h := Eval[int](b, "window.innerWidth"), Eval[int](b, "window.innerHeight"); w != PhoneWidth || h != PhoneHeight {
		t.Errorf("viewport: got %d×%d, want %d×%d", w, h, PhoneWidth, PhoneHeight)
	}
	if !b.NoHorizontalScroll() {
		t.Errorf("NoHorizontalScroll on the form page: got false, want true")
	}
	// The tap-target floor of 48 CSS px is common practice (platform
	// accessibility guidance), set by the page's own CSS here.
	if box := b.Box("#save"); box.Width < 48 || box.Height < 48 {
		t.Errorf("Box(#save): got %.0f×%.0f px, want at least 48×48", box.Width, box.Height)
	}
	path := filepath.Join(t.TempDir(), "shots", "form-phone.png")
	b.Screenshot(path)
	checkPNG(t, path, PhoneWidth, PhoneHeight+1)

	b.Open(srv.URL+"/wide", "#wide")
	if scroll, viewport := b.PageWidths(); scroll <= viewport {
		t.Errorf("PageWidths on /wide: got scroll %d, viewport %d, want scroll > viewport", scroll, viewport)
	}
}

// checkPNG checks that path holds a PNG wide width px and at least minHeight
// px tall (a full-page shot of a page taller than the viewport).
func checkPNG(t *testing.T, path string, width, minHeight int) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read screenshot: %v", err)
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("decode screenshot %s: %v", path, err)
	}
	if cfg.Width != width || cfg.Height < minHeight {
		t.Errorf("screenshot size: got %d×%d, want %d wide and at least %d tall", cfg.Width, cfg.Height, width, minHeight)
	}
}

func TestBrowser_DefaultWindow(t *testing.T) {
	srv := newServer(t)
	b := New(t)
	b.Open(srv.URL+"/wide", "#wide")
	if w, h := Eval[int](b, "window.innerWidth"), Eval[int](b, "window.innerHeight"); w != DefaultWidth || h != DefaultHeight {
		t.Errorf("viewport: got %d×%d, want %d×%d", w, h, DefaultWidth, DefaultHeight)
	}
	if !b.NoHorizontalScroll() {
		t.Errorf("NoHorizontalScroll on /wide at %d px: got false, want true", DefaultWidth)
	}
}

func TestBrowser_SetOffline(t *testing.T) {
	srv := newServer(t)
	b := New(t)
	b.Open(srv.URL+"/", "#save")
	const fetch = `fetch("/ping").then(r => r.json()).then(j => j.ok ? "ok" : "bad", e => "failed")`
	if got := Eval[string](b, fetch); got != "ok" {
		t.Fatalf("fetch online: got %q, want ok", got)
	}
	b.SetOffline(true)
	if got := Eval[bool](b, "navigator.onLine"); got {
		t.Errorf("navigator.onLine offline: got true, want false")
	}
	if got := Eval[string](b, fetch); got != "failed" {
		t.Errorf("fetch offline: got %q, want failed", got)
	}
	b.SetOffline(false)
	if got := Eval[bool](b, "navigator.onLine"); !got {
		t.Errorf("navigator.onLine back online: got false, want true")
	}
	if got := Eval[string](b, fetch); got != "ok" {
		t.Errorf("fetch back online: got %q, want ok", got)
	}
}

// fakeTB records the first Skip or Fatal call; the real ones end the goroutine.
type fakeTB struct {
	testing.TB
	skipped, fataled bool
}

func (f *fakeTB) Helper() {}
func (f *fakeTB) Skip(args ...any) {
	if !f.fataled {
		f.skipped = true
	}
}
func (f *fakeTB) Fatal(args ...any) { f.fataled = true }

func TestMissing(t *testing.T) {
	tests := []struct {
		name, ci          string
		wantSkip, wantErr bool
	}{
		{name: "NoCI", ci: "", wantSkip: true},
		{name: "CIFalse", ci: "false", wantSkip: true},
		{name: "CITrue", ci: "true", wantErr: true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Setenv("CI", tc.ci)
			f := &fakeTB{TB: t}
			missing(f)
			if f.skipped != tc.wantSkip || f.fataled != tc.wantErr {
				t.Errorf("missing with CI=%q: got skip %v, fatal %v; want skip %v, fatal %v",
					tc.ci, f.skipped, f.fataled, tc.wantSkip, tc.wantErr)
			}
		})
	}
}

func TestLogBuffer(t *testing.T) {
	l := newLogBuffer(3)
	w := l.writer("c: ")
	fmt.Fprint(w, "one\ntw")
	fmt.Fprint(w, "o\n[1:2:0101/000000.1:ERROR:dbus/bus.cc:405] Failed to connect to the bus\nthree\n")
	l.printf("p: ")("four %d", 4)
	want := []string{"c: two", "c: three", "p: four 4"}
	if strings.Join(l.lines, "|") != strings.Join(want, "|") || l.dropped != 1 || l.dbus != 1 {
		t.Errorf("lines: got %q (dropped %d, dbus %d), want %q (dropped 1, dbus 1)", l.lines, l.dropped, l.dbus, want)
	}
}

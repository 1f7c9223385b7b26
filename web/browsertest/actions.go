package browsertest

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/chromedp"
)

// Every sel below is a CSS selector; a step acts on its first match.

// Open loads url and waits until the element waitFor is visible.
func (b *Browser) Open(url, waitFor string) {
	b.t.Helper()
	if err := chromedp.Do(b.ctx, chromedp.Navigate(url), chromedp.WaitVisible(chromedp.CSS(waitFor))); err != nil {
		b.fatalf(err, "open %s and wait for %q", url, waitFor)
	}
}

// WaitVisible waits until the element sel is visible.
func (b *Browser) WaitVisible(sel string) {
	b.t.Helper()
	if err := chromedp.Do(b.ctx, chromedp.WaitVisible(chromedp.CSS(sel))); err != nil {
		b.fatalf(err, "wait for %q", sel)
	}
}

// Fill empties the field sel and types value into it key by key, as a person
// would, so the page's input handlers run. For a select, date or range
// field use SetValue.
func (b *Browser) Fill(sel, value string) {
	b.t.Helper()
	s := chromedp.CSS(sel)
	if err := chromedp.Do(b.ctx, chromedp.WaitVisible(s), chromedp.Clear(s), chromedp.SendKeys(s, value)); err != nil {
		b.fatalf(err, "fill %q", sel)
	}
}

// SetValue sets the value of the field sel directly and fires its input and
// change events: for select, date, time and range fields, where typing
// depends on the browser's locale.
func (b *Browser) SetValue(sel, value string) {
	b.t.Helper()
	js := fmt.Sprintf(`(() => {
		const el = document.querySelector(%s);
		el.value = %s;
		el.dispatchEvent(new Event("input", {bubbles: true}));
		el.dispatchEvent(new Event("change", {bubbles: true}));
		return el.value;
	})()`, jsString(sel), jsString(value))
	if err := chromedp.Do(b.ctx, chromedp.WaitReady(chromedp.CSS(sel))); err != nil {
		b.fatalf(err, "set value of %q", sel)
	}
	got, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](js))
	if err != nil {
		b.fatalf(err, "set value of %q", sel)
	}
	if got != value {
		b.t.Fatalf("browsertest: set value of %q: got %q, want %q (not an option of the field?)", sel, got, value)
	}
}

// Click clicks the element sel and returns at once; it does not wait for
// any page it opens (use ClickAndWait) or any change it makes (follow with
// WaitVisible).
func (b *Browser) Click(sel string) {
	b.t.Helper()
	if err := chromedp.Do(b.ctx, chromedp.Click(chromedp.CSS(sel))); err != nil {
		b.fatalf(err, "click %q", sel)
	}
}

// ClickAndWait clicks the element sel, waits for the page the click opens
// to load, then for the element next on it to be visible. It returns the
// HTTP status of that page (after redirects, so 200 after a 303, 422 for a
// form shown again with errors). A click that opens no page blocks until
// the per-test timeout.
func (b *Browser) ClickAndWait(sel, next string) int {
	b.t.Helper()
	resp, err := chromedp.RunResponse(b.ctx, chromedp.Click(chromedp.CSS(sel)))
	if err != nil {
		b.fatalf(err, "click %q and wait for the next page", sel)
	}
	if err := chromedp.Do(b.ctx, chromedp.WaitVisible(chromedp.CSS(next))); err != nil {
		b.fatalf(err, "click %q: wait for %q on %s", sel, next, resp.URL)
	}
	return int(resp.Status)
}

// Text returns the visible text of the element sel (its innerText).
func (b *Browser) Text(sel string) string {
	b.t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Text(chromedp.CSS(sel)))
	if err != nil {
		b.fatalf(err, "text of %q", sel)
	}
	return s
}

// Value returns the current value of the field sel.
func (b *Browser) Value(sel string) string {
	b.t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Value(chromedp.CSS(sel)))
	if err != nil {
		b.fatalf(err, "value of %q", sel)
	}
	return s
}

// Count returns how many elements match sel now, without waiting.
func (b *Browser) Count(sel string) int {
	b.t.Helper()
	return Eval[int](b, fmt.Sprintf("document.querySelectorAll(%s).length", jsString(sel)))
}

// URL returns the address of the current page.
func (b *Browser) URL() string {
	b.t.Helper()
	s, err := chromedp.Run(b.ctx, chromedp.Location())
	if err != nil {
		b.fatalf(err, "location")
	}
	return s
}

// Eval evaluates the JavaScript expression expr in the page and returns its
// value decoded as T. A promise is awaited. A null result needs a pointer T.
func Eval[T any](b *Browser, expr string) T {
	b.t.Helper()
	v, err := chromedp.Run(b.ctx, chromedp.Evaluate[T](expr, chromedp.EvalAwaitPromise))
	if err != nil {
		b.fatalf(err, "evaluate %s", expr)
	}
	return v
}

// Screenshot writes a PNG of the whole page, beyond the viewport, to path,
// creating its folder. It is for people to look at, not for comparing
// pixels.
func (b *Browser) Screenshot(path string) {
	b.t.Helper()
	png, err := chromedp.Run(b.ctx, chromedp.FullScreenshot(100)) // 100 means PNG
	if err != nil {
		b.fatalf(err, "screenshot")
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		b.t.Fatalf("browsertest: screenshot: %v", err)
	}
	if err := os.WriteFile(path, png, 0o644); err != nil {
		b.t.Fatalf("browsertest: screenshot: %v", err)
	}
}

// PageWidths returns the page's scroll width and the viewport's width, in
// CSS px: document.documentElement.scrollWidth and window.innerWidth.
func (b *Browser) PageWidths() (scroll, viewport int) {
	b.t.Helper()
	w := Eval[struct{ Scroll, Viewport int }](b,
		`({Scroll: document.documentElement.scrollWidth, Viewport: window.innerWidth})`)
	return w.Scroll, w.Viewport
}

// NoHorizontalScroll reports whether the page fits the viewport's width
// (scrollWidth <= innerWidth). When it does not, it records a test error
// with both widths and the URL, and the test goes on.
func (b *Browser) NoHorizontalScroll() bool {
	b.t.Helper()
	scroll, viewport := b.PageWidths()
	if scroll > viewport {
		b.t.Errorf("browsertest: %s scrolls sideways: page %d px wide, viewport %d px", b.URL(), scroll, viewport)
		return false
	}
	return true
}

// Rect is an element's border box relative to the viewport, in CSS px,
// as getBoundingClientRect gives it.
type Rect struct {
	X, Y, Width, Height float64
}

// Box returns the border box of the element sel, for checking tap-target
// sizes. It waits for the element to be in the page.
func (b *Browser) Box(sel string) Rect {
	b.t.Helper()
	if err := chromedp.Do(b.ctx, chromedp.WaitReady(chromedp.CSS(sel))); err != nil {
		b.fatalf(err, "box of %q", sel)
	}
	return Eval[Rect](b, fmt.Sprintf(`(() => {
		const r = document.querySelector(%s).getBoundingClientRect();
		return {X: r.x, Y: r.y, Width: r.width, Height: r.height};
	})()`, jsString(sel)))
}

// SetOffline cuts the tab's network (every request fails, navigator.onLine
// is false and the page gets an "offline" event) or restores it.
func (b *Browser) SetOffline(offline bool) {
	b.t.Helper()
	rules := []*network.Conditions{}
	state := network.OverrideNetworkStateParams{DownloadThroughput: -1, UploadThroughput: -1}
	if offline {
		// An empty URL pattern matches every request.
		rules = []*network.Conditions{{Offline: true, DownloadThroughput: -1, UploadThroughput: -1}}
		state.Offline = true
	}
	if _, err := chromedp.Call(b.ctx, network.EmulateNetworkConditionsByRule,
		network.EmulateNetworkConditionsByRuleParams{MatchedNetworkConditions: rules}); err != nil {
		b.fatalf(err, "set offline %v", offline)
	}
	if _, err := chromedp.Call(b.ctx, network.OverrideNetworkState, state); err != nil {
		b.fatalf(err, "set offline %v", offline)
	}
}

// jsString returns s as a JavaScript string literal.
func jsString(s string) string {
	j, _ := json.Marshal(s) // a string always marshals
	return string(j)
}

// Package browsertest drives a real headless Chromium from Go tests, for
// Aloft's end-to-end tests of the web pages.
//
// New finds Debian's Chromium, starts it with a fresh profile in a temporary
// directory and closes it when the test ends. The methods of Browser are
// small steps a person at the screen would take: open a page, fill a
// field, click, read text, check that a phone screen needs no sideways
// scrolling, measure a tap target, cut the network, save a screenshot for a
// person to look at. Each step fails the test with t.Fatalf when it cannot be
// done, so call them from the test's own goroutine.
//
// When no Chromium is installed, New skips the test, except when the
// environment has CI=true: there a test that needs a browser fails.
//
// The package wraps github.com/chromedp/chromedp v0.23 (typed selectors,
// Do and Run). Ctx gives the tab's context for any step the helpers lack.
package browsertest

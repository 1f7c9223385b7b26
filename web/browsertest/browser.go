package browsertest

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// candidates is where New looks for a browser, in order: Debian's real
// Chromium binary first (the /usr/bin/chromium wrapper prints a harmless
// shell warning), then names looked up on PATH.
var candidates = []string{
	"/usr/lib/chromium/chromium",
	"chromium",
	"chromium-browser",
	"google-chrome",
}

// Default settings of New.
const (
	DefaultWidth   = 1280             // viewport width, CSS px
	DefaultHeight  = 900              // viewport height, CSS px
	DefaultTimeout = 60 * time.Second // whole-test budget for browser steps
)

// Phone viewport, CSS px: a small, common Android screen.
const (
	PhoneWidth  = 360
	PhoneHeight = 740
)

// closeTimeout bounds the graceful close of the browser at cleanup.
const closeTimeout = 10 * time.Second

// Browser is one headless Chromium with one tab, owned by one test.
// Its methods fail the test (t.Fatalf) when a step cannot be done.
type Browser struct {
	t   testing.TB
	ctx context.Context // tab context, bounded by the per-test timeout
	cfg config
	log *logBuffer
}

type config struct {
	width, height int64
	mobile        bool
	timeout       time.Duration
	execPath      string
}

// Option changes a setting of New.
type Option func(*config)

// WindowSize sets the viewport to width × height CSS px (device scale 1).
// The default is DefaultWidth × DefaultHeight. Both must be positive.
func WindowSize(width, height int) Option {
	return func(c *config) { c.width, c.height = int64(width), int64(height) }
}

// Phone sets a PhoneWidth × PhoneHeight viewport at device scale 1, with
// touch emulation on so that pages see a touch screen. It does not turn on
// Chrome's mobile mode, which zooms a too-wide page out to fit and so would
// hide the sideways scrolling that NoHorizontalScroll looks for.
func Phone() Option {
	return func(c *config) {
		c.width, c.height, c.mobile = PhoneWidth, PhoneHeight, true
	}
}

// Timeout sets the budget of every browser step of the test together,
// counted from New. The default is DefaultTimeout.
func Timeout(d time.Duration) Option {
	return func(c *config) { c.timeout = d }
}

// ExecPath uses the browser binary at path instead of searching for one.
func ExecPath(path string) Option {
	return func(c *config) { c.execPath = path }
}

// New starts a headless Chromium for t and closes it when t ends.
//
// Without a browser New calls t.Skip, or t.Fatal when the environment has
// CI=true. A browser that is found but fails to start fails the test.
// The browser's log and chromedp's log are kept quiet and printed with
// t.Logf only when the test has failed.
func New(t testing.TB, opts ...Option) *Browser {
	t.Helper()
	cfg := config{width: DefaultWidth, height: DefaultHeight, timeout: DefaultTimeout}
	for _, o := range opts {
		o(&cfg)
	}
	if cfg.width <= 0 || cfg.height <= 0 || cfg.timeout <= 0 {
		t.Fatalf("browsertest: invalid settings: %d×%d px, timeout %v", cfg.width, cfg.height, cfg.timeout)
	}
	if cfg.execPath == "" {
		cfg.execPath = findChromium()
	}
	if cfg.execPath == "" {
		missing(t)
		return nil
	}
	b := &Browser{t: t, cfg: cfg, log: newLogBuffer(200)}
	b.start()
	return b
}

// findChromium returns the first browser of candidates that exists, or "".
func findChromium() string {
	for _, c := range candidates {
		if filepath.IsAbs(c) {
			if fi, err := os.Stat(c); err == nil && !fi.IsDir() {
				return c
			}
			continue
		}
		if p, err := exec.LookPath(c); err == nil {
			return p
		}
	}
	return ""
}

// missing skips t, or fails it in CI, where a browser test must never skip.
func missing(t testing.TB) {
	t.Helper()
	const msg = "browsertest: no Chromium found (looked for /usr/lib/chromium/chromium, chromium, chromium-browser, google-chrome); install Debian's chromium package"
	if ci, _ := strconv.ParseBool(os.Getenv("CI")); ci {
		t.Fatal(msg + " (CI=true: a browser test must not skip)")
	}
	t.Skip(msg)
}

// start launches the browser, opens the tab, sets the viewport and
// registers the cleanup.
func (b *Browser) start() {
	t := b.t
	t.Helper()
	dir, err := os.MkdirTemp("", "aloft-browsertest-")
	if err != nil {
		t.Fatalf("browsertest: make profile dir: %v", err)
	}
	tmp := filepath.Join(dir, "tmp")
	if err := os.Mkdir(tmp, 0o700); err != nil {
		os.RemoveAll(dir)
		t.Fatalf("browsertest: make browser TMPDIR: %v", err)
	}
	allocCtx, allocCancel := chromedp.NewExecAllocator(context.Background(), b.allocatorOptions(dir, tmp)...)
	tabCtx, tabCancel := chromedp.NewContext(allocCtx,
		chromedp.WithLogf(b.log.printf("chromedp: ")),
		chromedp.WithErrorf(b.log.printf("chromedp error: ")),
	)
	ctx, cancel := context.WithTimeout(tabCtx, b.cfg.timeout)
	b.ctx = ctx
	t.Cleanup(func() {
		cancel()
		closeCtx, closeCancel := context.WithTimeout(tabCtx, closeTimeout)
		if err := chromedp.Cancel(closeCtx); err != nil && !errors.Is(err, context.Canceled) {
			b.log.printf("close: ")("%v", err)
		}
		closeCancel()
		tabCancel()
		allocCancel() // waits for the browser process to exit
		if err := removeAllRetry(dir, 5*time.Second); err != nil {
			t.Logf("browsertest: remove profile dir: %v", err)
		}
		if t.Failed() {
			b.log.dump(t)
		}
	})
	if err := chromedp.Do(ctx, b.viewport()); err != nil {
		t.Fatalf("browsertest: start %s: %v", b.cfg.execPath, err)
	}
}

// allocatorOptions returns chromedp's defaults plus Aloft's launch flags.
// Flags already among the defaults are repeated so that the list here is
// the whole contract.
func (b *Browser) allocatorOptions(dir, tmp string) []chromedp.ExecAllocatorOption {
	opts := append([]chromedp.ExecAllocatorOption{}, chromedp.DefaultExecAllocatorOptions[:]...)
	return append(opts,
		chromedp.ExecPath(b.cfg.execPath),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.WindowSize(int(b.cfg.width), int(b.cfg.height)),
		chromedp.UserDataDir(dir),
		chromedp.Env("TMPDIR="+tmp),
		chromedp.CombinedOutput(b.log.writer("chromium: ")),
	)
}

// viewport sets the configured viewport at device scale 1, and touch for Phone.
func (b *Browser) viewport() chromedp.Action[chromedp.Void] {
	opts := []chromedp.EmulateViewportOption{chromedp.EmulateScale(1), chromedp.EmulatePortrait}
	if b.cfg.mobile {
		opts = append(opts, chromedp.EmulateTouch)
	}
	return chromedp.EmulateViewport(b.cfg.width, b.cfg.height, opts...)
}

// removeAllRetry removes dir, trying again until limit: the browser's child
// processes can still write there for a moment after the browser exits.
func removeAllRetry(dir string, limit time.Duration) error {
	deadline := time.Now().Add(limit)
	for {
		err := os.RemoveAll(dir)
		if err == nil || time.Now().After(deadline) {
			return err
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// Ctx returns the tab's context for chromedp steps the helpers lack, for
// example chromedp.Do(b.Ctx(), chromedp.KeyEvent("\t")). It ends at the
// per-test timeout.
func (b *Browser) Ctx() context.Context { return b.ctx }

// T returns the test that owns the browser.
func (b *Browser) T() testing.TB { return b.t }

// fatalf fails the test with the step's error, naming the timeout when the
// budget ran out.
func (b *Browser) fatalf(err error, format string, args ...any) {
	b.t.Helper()
	if errors.Is(err, context.DeadlineExceeded) {
		err = fmt.Errorf("%w (per-test budget %v; see browsertest.Timeout)", err, b.cfg.timeout)
	}
	b.t.Fatalf("browsertest: "+format+": %v", append(args, err)...)
}

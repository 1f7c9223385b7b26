package main

import (
	"bytes"
	"context"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"aloft/web/browsertest"
)

// syncBuffer is a bytes.Buffer safe for a writer goroutine and a reader.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

var urlRe = regexp.MustCompile(`http://127\.0\.0\.1:\d+`)

// startDemo runs `aloft demo` on a free port, in-process, exactly as a new
// user would, and returns its URL. The server stops when the test ends.
func startDemo(t *testing.T, extra ...string) string {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	var out, errb syncBuffer
	done := make(chan int, 1)
	args := append([]string{"demo", "--addr", "127.0.0.1:0"}, extra...)
	go func() {
		done <- runCLI(ctx, args, cmdIO{Stdout: &out, Stderr: &errb, Getenv: func(string) string { return "" }})
	}()
	t.Cleanup(func() {
		cancel()
		select {
		case <-done:
		case <-time.After(20 * time.Second):
			t.Error("demo server did not shut down within 20 s")
		}
	})
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) {
		if u := urlRe.FindString(out.String()); u != "" {
			return u
		}
		select {
		case code := <-done:
			t.Fatalf("aloft demo exited %d: %s", code, errb.String())
		case <-time.After(50 * time.Millisecond):
		}
	}
	t.Fatalf("aloft demo printed no address: %s %s", out.String(), errb.String())
	return ""
}

func shot(t *testing.T, b *browsertest.Browser, name string) {
	dir := t.TempDir()
	if d := strings.TrimSpace(getenv("ALOFT_SCREENSHOTS")); d != "" {
		dir = d
	}
	b.Screenshot(filepath.Join(dir, name+".png"))
}

func TestE2E_DemoLoginAdmitFindOpen(t *testing.T) {
	base := startDemo(t)
	b := browsertest.New(t, browsertest.Phone())
	b.Open(base+"/login", "#username")
	if !strings.Contains(b.Text("[data-testid=demo-logins]"), "staff") {
		t.Error("demo login page does not list the demo logins")
	}
	b.NoHorizontalScroll()
	shot(t, b, "login")
	b.Fill("#username", "staff")
	b.Fill("#password", "demo-staff-2026")
	b.ClickAndWait("button[type=submit]", "[data-testid=patient-list]")
	b.NoHorizontalScroll()
	shot(t, b, "patients")

	b.Open(base+"/intake", "[data-testid=intake-form]")
	b.Fill("#species", "Cedar Waxwing (Bombycilla cedrorum)")
	b.SetValue("#sex", "unknown")
	b.SetValue("#age_class", "adult")
	b.Fill("#intake_mass_g", "32")
	b.Fill("#reason", "e2e window strike")
	b.Fill("#found_place", "Test car park")
	b.NoHorizontalScroll()
	shot(t, b, "intake")
	if code := b.ClickAndWait("[data-testid=admit-submit]", "[data-testid=case-number]"); code != 200 {
		t.Fatalf("admit: status %d", code)
	}
	caseNo := b.Text("[data-testid=case-number]")
	if caseNo == "" {
		t.Fatal("patient page shows no case number")
	}
	b.NoHorizontalScroll()
	shot(t, b, "patient")

	b.Open(base+"/patients?q=e2e+window", "[data-testid=patient-list]")
	if got := b.Text("[data-testid=patient-list]"); !strings.Contains(got, caseNo) {
		t.Fatalf("list search does not find %s: %q", caseNo, got)
	}
	b.ClickAndWait("[data-testid=patient-link]", "[data-testid=case-number]")
	if got := b.Text("[data-testid=case-number]"); got != caseNo {
		t.Errorf("opened %q from the list, want %q", got, caseNo)
	}
}

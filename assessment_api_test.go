package main

import (
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"aloft/records"
	"aloft/web"
)

// assessCSRFRe finds the login form's CSRF token.
var assessCSRFRe = regexp.MustCompile(`name="_csrf" value="([^"]+)"`)

// serveDemoAt seeds the demo centre into a file and serves it with a clock
// stopped at at, as `aloft serve --allow-demo` would; it returns the
// database path and the server's URL. The server stops when the test ends.
func serveDemoAt(t *testing.T, at time.Time) (db, base string) {
	t.Helper()
	db = filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != exitOK {
		t.Fatalf("demo --seed-only: %d %s", code, errs)
	}
	ctx, cancel := context.WithCancel(context.Background())
	store, err := records.Open(ctx, db, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	urls := make(chan string, 1)
	done := make(chan int, 1)
	var out, errb syncBuffer
	go func() {
		done <- serveStore(ctx, cmdIO{Stdout: &out, Stderr: &errb}, store, "127.0.0.1:0",
			web.Config{Demo: true, Now: func() time.Time { return at }}, func(u string) { urls <- u })
	}()
	t.Cleanup(func() {
		cancel()
		<-done
		store.Close()
	})
	select {
	case base = <-urls:
	case code := <-done:
		t.Fatalf("serve exited %d: %s", code, errb.String())
	case <-time.After(30 * time.Second):
		t.Fatal("the server did not start")
	}
	return db, base
}

// loginClient logs in through the login form and returns a client with the
// session cookie.
func loginClient(t *testing.T, base, user, password string) *http.Client {
	t.Helper()
	jar, _ := cookiejar.New(nil)
	hc := &http.Client{Jar: jar, Timeout: 30 * time.Second,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := hc.Get(base + "/login")
	if err != nil {
		t.Fatal(err)
	}
	page, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	m := assessCSRFRe.FindSubmatch(page)
	if m == nil {
		t.Fatal("the login page has no CSRF token")
	}
	resp, err = hc.PostForm(base+"/login", url.Values{"username": {user}, "password": {password}, "_csrf": {string(m[1])}})
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("login as %s: status %d", user, resp.StatusCode)
	}
	return hc
}

// TestAssessmentAPI_SameBytesAsCLI: for every demo patient, at the centre's
// site and at a named one, GET /api/v1/patients/{case}/assessment returns
// exactly the bytes `aloft assess --json` prints for the same case, site and
// instant.
func TestAssessmentAPI_SameBytesAsCLI(t *testing.T) {
	at := time.Now().UTC().Truncate(time.Second)
	db, base := serveDemoAt(t, at)
	hc := loginClient(t, base, "vet", "demo-vet-2026")
	code, out, errs := run(t, nil, "patients", "--json", "--db", db)
	if code != exitOK {
		t.Fatalf("patients: %d %s", code, errs)
	}
	var list []struct {
		Case string `json:"case_number"`
	}
	if err := json.Unmarshal([]byte(out), &list); err != nil || len(list) < 10 {
		t.Fatalf("patients --json: %v, %d rows", err, len(list))
	}
	sites := []struct {
		name  string
		query string
		flags []string
	}{
		{"Centre", "", nil},
		{"HighWarm", "?elevation_m=1500&temp_c=25", []string{"--elevation-m", "1500", "--temp-c", "25"}},
	}
	for _, p := range list {
		for _, s := range sites {
			t.Run(p.Case+"/"+s.name, func(t *testing.T) {
				resp, err := hc.Get(base + "/api/v1/patients/" + p.Case + "/assessment" + s.query)
				if err != nil {
					t.Fatal(err)
				}
				api, _ := io.ReadAll(resp.Body)
				resp.Body.Close()
				if resp.StatusCode != http.StatusOK || !strings.HasPrefix(resp.Header.Get("Content-Type"), "application/json") {
					t.Fatalf("API: status %d, %s: %.200s", resp.StatusCode, resp.Header.Get("Content-Type"), api)
				}
				args := append([]string{"assess", "--db", db, "--case", p.Case, "--at", at.Format(time.RFC3339), "--json"}, s.flags...)
				code, cli, errs := run(t, nil, args...)
				if code != exitOK {
					t.Fatalf("aloft %s: exit %d: %s", strings.Join(args, " "), code, errs)
				}
				if string(api) != cli {
					t.Errorf("the API's bytes differ from the command line's:\nAPI %.300s\nCLI %.300s", api, cli)
				}
			})
		}
	}
}

package main

import (
	"context"
	"database/sql"
	"fmt"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"aloft/records"
)

// Fault tests: the real aloft binary, run as a separate process on
// loopback, written to over its HTML forms by several clients at once.

// buildAloft builds the aloft command into a temporary folder.
func buildAloft(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "aloft")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// cleanEnv is the environment without ALOFT_ settings, which would change
// the flags of the commands under test.
func cleanEnv() []string {
	var env []string
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "ALOFT_") {
			env = append(env, kv)
		}
	}
	return env
}

// runAloft runs one aloft command to completion (within a minute) and
// returns its combined output.
func runAloft(t *testing.T, bin string, args ...string) string {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	out, err := aloftCmd(ctx, bin, args...).CombinedOutput()
	if err != nil {
		t.Fatalf("aloft %s: %v\n%s", strings.Join(args, " "), err, out)
	}
	return string(out)
}

// aloftCmd is one aloft command, in the clean environment, killed when ctx
// ends.
func aloftCmd(ctx context.Context, bin string, args ...string) *exec.Cmd {
	cmd := exec.CommandContext(ctx, bin, args...)
	cmd.Env = cleanEnv()
	return cmd
}

// aloftServer is `aloft serve` running as a child process.
type aloftServer struct {
	cmd  *exec.Cmd
	url  string
	out  *syncBuffer
	done chan struct{}
}

var servingRe = regexp.MustCompile(`url=(http://127\.0\.0\.1:\d+)`)

// startServer serves db on a free loopback port and waits until it
// answers. The process is killed when the test ends, if still running.
func startServer(t *testing.T, bin, db string) *aloftServer {
	t.Helper()
	s := &aloftServer{out: &syncBuffer{}, done: make(chan struct{})}
	s.cmd = exec.Command(bin, "serve", "--allow-demo", "--db", db, "--addr", "127.0.0.1:0")
	s.cmd.Env, s.cmd.Stdout, s.cmd.Stderr = cleanEnv(), s.out, s.out
	if err := s.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { _ = s.cmd.Wait(); close(s.done) }()
	t.Cleanup(func() { s.kill() })
	deadline := time.Now().Add(30 * time.Second)
	for time.Now().Before(deadline) {
		if m := servingRe.FindStringSubmatch(s.out.String()); m != nil {
			s.url = m[1]
			break
		}
		select {
		case <-s.done:
			t.Fatalf("aloft serve exited: %s", s.out.String())
		case <-time.After(20 * time.Millisecond):
		}
	}
	if s.url == "" {
		t.Fatalf("aloft serve printed no address: %s", s.out.String())
	}
	resp, err := (&http.Client{Timeout: 10 * time.Second}).Get(s.url + "/healthz")
	if err != nil || resp.StatusCode != http.StatusOK {
		t.Fatalf("GET /healthz: %v %v", resp, err)
	}
	resp.Body.Close()
	return s
}

// kill ends the server with SIGKILL: no shutdown, no checkpoint.
func (s *aloftServer) kill() {
	_ = s.cmd.Process.Signal(syscall.SIGKILL)
	<-s.done
}

// stop ends the server with SIGTERM, as an init system would, and waits
// for its graceful shutdown.
func (s *aloftServer) stop(t *testing.T) {
	t.Helper()
	_ = s.cmd.Process.Signal(syscall.SIGTERM)
	select {
	case <-s.done:
	case <-time.After(30 * time.Second):
		t.Errorf("aloft serve did not stop within 30 s of SIGTERM")
		s.kill()
	}
}

// formClient is one logged-in browser: cookies, the session's CSRF token,
// and no automatic redirects (a 303 is the acknowledgement).
type formClient struct {
	base string
	hc   *http.Client
	csrf string
}

var csrfRe = regexp.MustCompile(`name="_csrf" value="([^"]+)"`)

// login logs in through the login form, as a browser does.
func login(t *testing.T, base, user, password string) *formClient {
	t.Helper()
	jar, _ := cookiejar.New(nil)
	c := &formClient{base: base, hc: &http.Client{Jar: jar, Timeout: 15 * time.Second,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}}
	tok, err := c.formToken("/login")
	if err != nil {
		t.Fatal(err)
	}
	code, err := c.post(context.Background(), "/login", url.Values{"username": {user}, "password": {password}, "_csrf": {tok}, "next": {"/patients"}})
	if err != nil || code != http.StatusSeeOther {
		t.Fatalf("login as %s: status %d, %v", user, code, err)
	}
	if c.csrf, err = c.formToken("/intake"); err != nil {
		t.Fatal(err)
	}
	return c
}

// formToken reads the CSRF token of the form on page path.
func (c *formClient) formToken(path string) (string, error) {
	body, code, err := c.get(context.Background(), path)
	if err != nil || code != http.StatusOK {
		return "", fmt.Errorf("GET %s: status %d, %v", path, code, err)
	}
	m := csrfRe.FindStringSubmatch(body)
	if m == nil {
		return "", fmt.Errorf("GET %s: no _csrf field in the form", path)
	}
	return m[1], nil
}

func (c *formClient) get(ctx context.Context, path string) (string, int, error) {
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, c.base+path, nil)
	if err != nil {
		return "", 0, err
	}
	resp, err := c.hc.Do(req)
	if err != nil {
		return "", 0, err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	return string(b), resp.StatusCode, err
}

func (c *formClient) post(ctx context.Context, path string, form url.Values) (int, error) {
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, c.base+path, strings.NewReader(form.Encode()))
	if err != nil {
		return 0, err
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	resp, err := c.hc.Do(req)
	if err != nil {
		return 0, err
	}
	_, _ = io.Copy(io.Discard, resp.Body)
	resp.Body.Close()
	return resp.StatusCode, nil
}

// postIntake admits one mallard through the intake form, with reason as
// its unique mark. A 303 is the server's acknowledgement.
func (c *formClient) postIntake(ctx context.Context, reason string) (int, error) {
	return c.post(ctx, "/intake", url.Values{"species": {"Mallard (Anas platyrhynchos)"}, "age_class": {"adult"},
		"sex": {"unknown"}, "found_date": {time.Now().Format(records.DateLayout)}, "reason": {reason},
		"intake_mass_g": {"1000"}, "_csrf": {c.csrf}})
}

// intakeLoad is several clients admitting patients as fast as the server
// answers, keeping which admissions were acknowledged and when.
type intakeLoad struct {
	mu     sync.Mutex
	acked  map[string]time.Time // reason → when the 303 arrived
	tried  map[string]bool
	failed []string // statuses other than 303 while the server was meant to be up
	cancel context.CancelFunc
	wg     sync.WaitGroup
	down   chan struct{} // closed when the writers or the server are about to stop
	once   sync.Once
}

// startIntakes runs writers clients, each admitting up to perWriter
// patients marked "<prefix> <writer>-<n>".
func startIntakes(c *formClient, prefix string, writers, perWriter int) *intakeLoad {
	ctx, cancel := context.WithTimeout(context.Background(), 45*time.Second)
	l := &intakeLoad{acked: map[string]time.Time{}, tried: map[string]bool{}, cancel: cancel, down: make(chan struct{})}
	for w := 0; w < writers; w++ {
		l.wg.Add(1)
		go func() {
			defer l.wg.Done()
			for k := 0; k < perWriter && ctx.Err() == nil; k++ {
				reason := fmt.Sprintf("%s %d-%d", prefix, w, k)
				l.mu.Lock()
				l.tried[reason] = true
				l.mu.Unlock()
				code, err := c.postIntake(ctx, reason)
				l.mu.Lock()
				switch {
				case err == nil && code == http.StatusSeeOther:
					l.acked[reason] = time.Now()
				case !l.isDown():
					l.failed = append(l.failed, fmt.Sprintf("%s: status %d, %v", reason, code, err))
				}
				l.mu.Unlock()
				if err != nil {
					return
				}
			}
		}()
	}
	return l
}

// goingDown says that errors from now on are expected: the writers are
// stopping, or the server is about to be killed.
func (l *intakeLoad) goingDown() { l.once.Do(func() { close(l.down) }) }

func (l *intakeLoad) isDown() bool {
	select {
	case <-l.down:
		return true
	default:
		return false
	}
}

// waitAcked waits until n admissions are acknowledged (false after 30 s).
func (l *intakeLoad) waitAcked(n int) bool {
	for deadline := time.Now().Add(30 * time.Second); time.Now().Before(deadline); time.Sleep(10 * time.Millisecond) {
		l.mu.Lock()
		got := len(l.acked)
		l.mu.Unlock()
		if got >= n {
			return true
		}
	}
	return false
}

// ackedBefore lists the admissions acknowledged before t.
func (l *intakeLoad) ackedBefore(t time.Time) []string {
	l.mu.Lock()
	defer l.mu.Unlock()
	var out []string
	for r, at := range l.acked {
		if at.Before(t) {
			out = append(out, r)
		}
	}
	return out
}

// stop ends the writers and waits for them.
func (l *intakeLoad) stop() {
	l.goingDown()
	l.cancel()
	l.wg.Wait()
}

// patientsMarked counts the patients of each reason starting with prefix,
// read straight from the database file.
func patientsMarked(t *testing.T, db, prefix string) map[string]int {
	t.Helper()
	h, err := sql.Open("sqlite", "file:"+db+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer h.Close()
	rows, err := h.Query(`SELECT reason, count(*) FROM patients WHERE reason LIKE ? GROUP BY reason`, prefix+" %")
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	out := map[string]int{}
	for rows.Next() {
		var r string
		var n int
		if err := rows.Scan(&r, &n); err != nil {
			t.Fatal(err)
		}
		out[r] = n
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// checkWhole checks that no patient lacks its creation audit row and no
// creation audit row lacks its patient: nothing is half-written.
func checkWhole(t *testing.T, db string) {
	t.Helper()
	h, err := sql.Open("sqlite", "file:"+db+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer h.Close()
	for name, q := range map[string]string{
		"patients without their audit row": `SELECT count(*) FROM patients p WHERE NOT EXISTS (SELECT 1 FROM audit_log a
			WHERE a.entity = 'patient' AND a.entity_id = p.id AND a.action = 'create')`,
		"audit rows without their patient": `SELECT count(*) FROM audit_log a WHERE a.entity = 'patient' AND a.action = 'create'
			AND NOT EXISTS (SELECT 1 FROM patients p WHERE p.id = a.entity_id)`,
		"duplicate case numbers": `SELECT count(*) - count(DISTINCT case_number) FROM patients`,
	} {
		var n int
		if err := h.QueryRow(q).Scan(&n); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if n != 0 {
			t.Errorf("%d %s", n, name)
		}
	}
}

// TestCrashAndBackup_RealServer builds the aloft command once and runs the
// fault tests against it: a SIGKILL in the middle of concurrent writes,
// and a backup taken under write load.
func TestCrashAndBackup_RealServer(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the server: not in -short")
	}
	start := time.Now()
	bin := buildAloft(t)
	t.Logf("go build took %s", time.Since(start).Round(time.Millisecond))
	t.Run("SIGKILLKeepsAcknowledgedWrites", func(t *testing.T) { testCrashSIGKILL(t, bin) })
	t.Run("BackupUnderWriteLoad", func(t *testing.T) { testBackupUnderLoad(t, bin) })
}

// crashRounds is how many times the crash test kills the server, each
// time at a different moment of the writes.
const crashRounds = 3

// testCrashSIGKILL kills the server with SIGKILL while several clients
// post intakes, restarts it, and does so again (crashRounds times); then
// it checks that every admission the server acknowledged is there exactly
// once, that nothing is half-written, and that SQLite's integrity check
// passes after each kill.
func testCrashSIGKILL(t *testing.T, bin string) {
	db := filepath.Join(t.TempDir(), "crash.db")
	runAloft(t, bin, "demo", "--db", db, "--seed-only")
	acked, tried := map[string]bool{}, map[string]bool{}
	for round := 0; round < crashRounds; round++ {
		srv := startServer(t, bin, db)
		load := startIntakes(login(t, srv.url, "staff", "demo-staff-2026"), fmt.Sprintf("crash test r%d", round), 6, 400)
		if want := 15 + 20*round; !load.waitAcked(want) {
			t.Fatalf("round %d: fewer than %d intakes acknowledged in 30 s: %v", round, want, load.failed)
		}
		load.goingDown()
		srv.kill()
		load.stop()
		if len(load.failed) > 0 {
			t.Errorf("round %d: %d intakes failed while the server was up, e.g. %s", round, len(load.failed), load.failed[0])
		}
		if err := records.CheckIntegrity(context.Background(), db); err != nil {
			t.Fatalf("round %d, after SIGKILL: %v", round, err)
		}
		for _, r := range load.ackedBefore(time.Now()) {
			acked[r] = true
		}
		for r := range load.tried {
			tried[r] = true
		}
	}
	again := startServer(t, bin, db)
	c := login(t, again.url, "staff", "demo-staff-2026")
	if body, code, err := c.get(context.Background(), "/patients?q=crash+test"); err != nil || code != http.StatusOK || !strings.Contains(body, "crash test") {
		t.Errorf("restarted server's patient list: status %d, %v", code, err)
	}
	again.stop(t)
	present := patientsMarked(t, db, "crash test")
	t.Logf("%d kills; %d intakes sent, %d acknowledged, %d stored", crashRounds, len(tried), len(acked), len(present))
	for r := range acked {
		if present[r] != 1 {
			t.Errorf("acknowledged intake %q stored %d times, want 1", r, present[r])
		}
	}
	for r, n := range present {
		if !tried[r] || n != 1 {
			t.Errorf("stored intake %q (%d times) was never sent once", r, n)
		}
	}
	checkWhole(t, db)
	if err := records.CheckIntegrity(context.Background(), db); err != nil {
		t.Error(err)
	}
}

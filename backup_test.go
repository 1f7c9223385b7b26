package main

import (
	"context"
	"net/http"
	"net/url"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"aloft/records"
)

// testBackupUnderLoad runs `aloft backup` while several clients post
// intakes to a live server, then checks the backup: SQLite's integrity
// check passes, every admission acknowledged before the backup began is in
// it exactly once, nothing is half-written; and `aloft restore` of it gives
// a database a new server serves. (Run by TestCrashAndBackup_RealServer.)
func testBackupUnderLoad(t *testing.T, bin string) {
	dir := t.TempDir()
	db, bak, restored := filepath.Join(dir, "live.db"), filepath.Join(dir, "backup.db"), filepath.Join(dir, "restored.db")
	runAloft(t, bin, "demo", "--db", db, "--seed-only")
	srv := startServer(t, bin, db)
	load := startIntakes(login(t, srv.url, "staff", "demo-staff-2026"), "backup test", 4, 400)
	if !load.waitAcked(20) {
		t.Fatalf("fewer than 20 intakes acknowledged in 30 s: %v", load.failed)
	}
	began := time.Now()
	before := load.ackedBefore(began)
	out := runAloft(t, bin, "backup", "--db", db, "--to", bak)
	took := time.Since(began)
	n := len(load.ackedBefore(time.Now()))
	if !load.waitAcked(n + 10) {
		t.Errorf("writers stalled after the backup: %d acknowledged", n)
	}
	load.stop()
	t.Logf("backup took %s under load; %d intakes acknowledged before it began, %d in all; %s",
		took.Round(time.Millisecond), len(before), len(load.ackedBefore(time.Now())), strings.TrimSpace(out))
	if len(load.failed) > 0 {
		t.Errorf("%d intakes failed during the backup, e.g. %s", len(load.failed), load.failed[0])
	}
	if err := records.CheckIntegrity(context.Background(), bak); err != nil {
		t.Fatal(err)
	}
	present := patientsMarked(t, bak, "backup test")
	for _, r := range before {
		if present[r] != 1 {
			t.Errorf("intake %q, acknowledged before the backup began, is in it %d times, want 1", r, present[r])
		}
	}
	checkWhole(t, bak)
	srv.stop(t)

	runAloft(t, bin, "restore", "--from", bak, "--db", restored)
	again := startServer(t, bin, restored)
	c := login(t, again.url, "staff", "demo-staff-2026")
	q := url.Values{"q": {before[0]}}.Encode()
	body, code, err := c.get(context.Background(), "/patients?"+q)
	if err != nil || code != http.StatusOK || !strings.Contains(body, before[0]) {
		t.Errorf("restored server: GET /patients?%s: status %d, %v; want the intake %q listed", q, code, err, before[0])
	}
	again.stop(t)
}

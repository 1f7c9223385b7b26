package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func getenv(k string) string { return os.Getenv(k) }

// run runs the CLI with args and an environment, returning exit code, stdout, stderr.
func run(t *testing.T, env map[string]string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := runCLI(context.Background(), args, cmdIO{Stdout: &out, Stderr: &errb, Getenv: func(k string) string { return env[k] }})
	return code, out.String(), errb.String()
}

func TestCLI_UsageAndHelp(t *testing.T) {
	if code, _, errs := run(t, nil, "nonsense"); code != exitUsage || !strings.Contains(errs, "unknown command") {
		t.Errorf("unknown command: %d %q", code, errs)
	}
	for _, c := range commands() {
		code, out, errs := run(t, nil, c.name, "--help")
		if code != exitOK || !strings.Contains(out+errs, "usage: aloft "+c.name) {
			t.Errorf("%s --help: exit %d, stderr %q", c.name, code, errs)
		}
	}
	if code, _, _ := run(t, nil, "patients", "--bogus"); code != exitUsage {
		t.Errorf("bad flag: exit %d, want 2", code)
	}
}

func TestCLI_DemoSeedPatientsUserBackupRestore(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "demo.db")
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != 0 {
		t.Fatalf("demo --seed-only: %d %s", code, errs)
	}
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != exitUsage {
		t.Errorf("demo over an existing file: %d %s, want refusal", code, errs)
	}
	code, out, errs := run(t, nil, "patients", "--json", "--db", db)
	if code != 0 {
		t.Fatalf("patients: %d %s", code, errs)
	}
	var list []map[string]any
	if err := json.Unmarshal([]byte(out), &list); err != nil || len(list) < 10 {
		t.Fatalf("patients --json: %v, %d rows", err, len(list))
	}
	for _, k := range []string{"case_number", "species", "status", "admitted", "disposed"} {
		if _, ok := list[0][k]; !ok {
			t.Errorf("patients --json row lacks %q: %v", k, list[0])
		}
	}
	// The ALOFT_DB environment variable stands in for --db.
	if code, out, _ := run(t, map[string]string{"ALOFT_DB": db}, "patients"); code != 0 || !strings.Contains(out, "CASE") {
		t.Errorf("patients with ALOFT_DB: %d %q", code, out)
	}
	// A demo database is refused by serve.
	if code, _, errs := run(t, nil, "serve", "--db", db, "--addr", "127.0.0.1:0"); code != exitUsage || !strings.Contains(errs, "demo") {
		t.Errorf("serve on a demo database: %d %q, want refusal", code, errs)
	}
	env := map[string]string{"ALOFT_PASSWORD": "a new long password"}
	if code, _, errs := run(t, env, "user", "add", "--db", db, "--username", "newbie", "--name", "New Person", "--roles", "staff,vet"); code != 0 {
		t.Fatalf("user add: %d %s", code, errs)
	}
	if code, out, _ := run(t, nil, "user", "list", "--db", db); code != 0 || !strings.Contains(out, "newbie") {
		t.Errorf("user list: %d %q", code, out)
	}
	if code, _, _ := run(t, env, "user", "passwd", "--db", db, "--username", "newbie"); code != 0 {
		t.Errorf("user passwd failed")
	}
	if code, _, _ := run(t, nil, "user", "disable", "--db", db, "--username", "newbie"); code != 0 {
		t.Errorf("user disable failed")
	}
	bak := filepath.Join(dir, "b.db")
	if code, _, errs := run(t, nil, "backup", "--db", db, "--to", bak); code != 0 {
		t.Fatalf("backup: %d %s", code, errs)
	}
	dest := filepath.Join(dir, "restored.db")
	if code, _, errs := run(t, nil, "restore", "--from", bak, "--db", dest); code != 0 {
		t.Fatalf("restore: %d %s", code, errs)
	}
	code, out2, _ := run(t, nil, "patients", "--json", "--db", dest)
	if code != 0 || out2 != out {
		t.Errorf("restored database lists different patients")
	}
}

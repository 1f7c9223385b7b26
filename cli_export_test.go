package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
)

// exportDemo seeds the demo centre into a file and returns its path.
func exportDemo(t *testing.T) string {
	t.Helper()
	db := filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, nil, "demo", "--db", db, "--seed-only"); code != 0 {
		t.Fatalf("demo --seed-only: %d %s", code, errs)
	}
	return db
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(b, []byte("\uFEFF")))).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

func column(header []string, name string) int {
	for i, h := range header {
		if h == name {
			return i
		}
	}
	return -1
}

// The demo's years (its dates are relative to today, so it may span two):
// each year's listing and summary are exported and must agree, and the
// received count per species equals the sum of its dispositions (U.S. Fish &
// Wildlife Service, Form 3-202-4, as PRACTICE.md records it [published]).
func TestExport_DemoYearsReconcile(t *testing.T) {
	db := exportDemo(t)
	dir := t.TempDir()
	now := time.Now().UTC()
	disposed := map[string][]string{} // case number -> its listing row, when disposed
	var header []string
	for _, year := range []int{now.Year() - 1, now.Year()} {
		y := strconv.Itoa(year)
		listPath, sumPath := filepath.Join(dir, "cases-"+y+".csv"), filepath.Join(dir, "summary-"+y+".csv")
		if code, out, errs := run(t, nil, "export", "--db", db, "--year", y, "--kind", "cases", "--out", listPath); code != 0 ||
			!strings.Contains(out, "reconciled") {
			t.Fatalf("export cases %s: %d %q %s", y, code, out, errs)
		}
		if code, _, errs := run(t, nil, "export", "--db", db, "--year", y, "--kind", "summary", "--out", sumPath, "--bom"); code != 0 {
			t.Fatalf("export summary %s: %d %s", y, code, errs)
		}
		listing, summary := readCSV(t, listPath), readCSV(t, sumPath)
		total := summary[len(summary)-1]
		get := func(name string) int {
			n, err := strconv.Atoi(total[column(summary[0], name)])
			if err != nil {
				t.Fatalf("%s summary %s = %q", y, name, total[column(summary[0], name)])
			}
			return n
		}
		var sum int
		for _, d := range assess.Dispositions {
			sum += get(string(d))
		}
		if get("received")+get("held_over") != sum || sum != get("total") || sum != len(listing)-1 {
			t.Errorf("%s: received %d + held over %d, dispositions %d, total %d, listing %d rows: must agree",
				y, get("received"), get("held_over"), sum, get("total"), len(listing)-1)
		}
		if column(listing[0], "finder_name") != -1 {
			t.Errorf("%s: the listing has finders' names without --finders", y)
		}
		for _, r := range listing[1:] {
			if r[column(listing[0], "disposition")] != string(assess.DispInCare) {
				disposed[r[0]] = r
			}
		}
		header = listing[0]
	}
	counts := map[string]int{}
	for _, r := range disposed {
		counts[r[column(header, "disposition")]]++
		if r[column(header, "disposition")] == "released" && r[column(header, "disposition_lon")] == "-76.5125" {
			counts["released at the harbour's coordinates"]++
		}
	}
	// The demo's history-dispositions.json: the swan and a mallard released
	// (the swan with coordinates, its longitude a plain negative number), a
	// gull died.
	want := map[string]int{"released": 2, "died": 1, "released at the harbour's coordinates": 1}
	if !reflect.DeepEqual(counts, want) {
		t.Errorf("demo dispositions %v, want %v", counts, want)
	}
}

func TestExport_Patient(t *testing.T) {
	db := exportDemo(t)
	ctx := context.Background()
	store, err := records.Open(ctx, db, records.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer store.Close()
	list, err := store.Patients(ctx, records.PatientFilter{Query: "Cygnus"})
	if err != nil || len(list) != 1 {
		t.Fatalf("the demo's swan: %v, %v", list, err)
	}
	swan := list[0].CaseNumber
	out := filepath.Join(t.TempDir(), "swan.csv")
	if code, _, errs := run(t, nil, "export", "--db", db, "--case", swan, "--kind", "patient", "--format", "csv", "--out", out); code != 0 {
		t.Fatalf("export patient csv: %d %s", code, errs)
	}
	recs := readCSV(t, out)
	if recs[1][column(recs[0], "record")] != "intake" || recs[len(recs)-1][column(recs[0], "record")] != "disposition" {
		t.Errorf("patient CSV starts %q and ends %q, want intake … disposition", recs[1], recs[len(recs)-1])
	}
	// Every demo patient's case file, read back, assesses exactly as the
	// store's own case file does (derived: the same engine on the same
	// records).
	all, err := store.Patients(ctx, records.PatientFilter{})
	if err != nil {
		t.Fatal(err)
	}
	at := time.Now()
	for _, p := range all {
		jsonOut := filepath.Join(t.TempDir(), p.CaseNumber+".json")
		if code, _, errs := run(t, nil, "export", "--db", db, "--case", p.CaseNumber, "--kind", "patient", "--out", jsonOut); code != 0 {
			t.Fatalf("export %s json: %d %s", p.CaseNumber, code, errs)
		}
		b, err := os.ReadFile(jsonOut)
		if err != nil {
			t.Fatal(err)
		}
		back, err := assess.ReadCaseFile(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("%s: the exported case file does not read back: %v", p.CaseNumber, err)
		}
		if back.Patient.FinderName != "" || back.Patient.FinderContact != "" {
			t.Errorf("%s: the case file carries the finder's personal data without --finders", p.CaseNumber)
		}
		orig, err := store.CaseFile(ctx, p.CaseNumber)
		if err != nil {
			t.Fatal(err)
		}
		a1, err1 := orig.Evaluate(assess.DefaultThresholds(), nil, at)
		a2, err2 := back.Evaluate(assess.DefaultThresholds(), nil, at)
		if fmt.Sprint(err1) != fmt.Sprint(err2) {
			t.Errorf("%s: evaluating the original gave %v, the read-back %v", p.CaseNumber, err1, err2)
			continue
		}
		j1, _ := json.Marshal(a1)
		j2, _ := json.Marshal(a2)
		if !bytes.Equal(j1, j2) {
			t.Errorf("%s: the case file read back assesses differently:\n%s\n%s", p.CaseNumber, j1, j2)
		}
	}
}

func TestExport_Usage(t *testing.T) {
	db := exportDemo(t)
	out := filepath.Join(t.TempDir(), "x.csv")
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"ErrNoDB", []string{"--year", "2026", "--kind", "cases", "--out", out}, exitUsage},
		{"ErrNoOut", []string{"--db", db, "--year", "2026", "--kind", "cases"}, exitUsage},
		{"ErrNoYear", []string{"--db", db, "--kind", "summary", "--out", out}, exitUsage},
		{"ErrKind", []string{"--db", db, "--year", "2026", "--kind", "everything", "--out", out}, exitUsage},
		{"ErrNoCase", []string{"--db", db, "--kind", "patient", "--out", out}, exitUsage},
		{"ErrFormat", []string{"--db", db, "--case", "2026-0001", "--kind", "patient", "--format", "xml", "--out", out}, exitUsage},
		{"ErrMissingCase", []string{"--db", db, "--case", "1999-0001", "--kind", "patient", "--format", "csv", "--out", out}, exitFail},
		{"ErrMissingDB", []string{"--db", filepath.Join(t.TempDir(), "none.db"), "--year", "2026", "--kind", "cases", "--out", out}, exitFail},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if code, _, errs := run(t, nil, append([]string{"export"}, tc.args...)...); code != tc.want {
				t.Errorf("export %v: exit %d (%s), want %d", tc.args, code, errs, tc.want)
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("export %v left %s", tc.args, out)
			}
		})
	}
	if code, out, _ := run(t, nil, "export", "--db", db, "--year", "2026", "--kind", "summary", "--out", "-"); code != 0 ||
		!strings.HasPrefix(out, "species_scientific,") {
		t.Errorf("export to stdout: %d %q", code, out)
	}
}

package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"aloft/records"
	"aloft/reports"
)

// cmdExport writes the permit-reporting exports: a year's case listing or
// per-species summary (which must reconcile with each other, else nothing is
// written), or one patient's record as its case file (JSON) or as CSV.
func cmdExport(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("export", "export --db FILE --year YYYY --kind cases|summary --out FILE [--finders] [--bom]\n"+
		"       aloft export --db FILE --case CASE --kind patient [--format json|csv] --out FILE [--finders] [--bom]", cio)
	dbPath := fs.String("db", "", "database file")
	year := fs.Int("year", 0, "the reporting year (cases, summary)")
	caseNo := fs.String("case", "", "the patient's case number (patient)")
	kind := fs.String("kind", "", "what to export: cases (one row per patient), summary (per species), patient")
	format := fs.String("format", "json", "patient only: json (the case file) or csv (one row per record version)")
	out := fs.String("out", "", "file to write, replaced if it exists; - for standard output")
	finders := fs.Bool("finders", false, "include finders' names and contacts (personal data; left out by default)")
	bom := fs.Bool("bom", false, "start CSV with a UTF-8 byte-order mark, for spreadsheets")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if msg := checkExportFlags(*dbPath, *kind, *year, *caseNo, *format, *out); msg != "" {
		return usageErr(cio, "export", "%s", msg)
	}
	store, err := openExisting(ctx, *dbPath)
	if err != nil {
		return failErr(cio, "export", err)
	}
	defer store.Close()
	var buf bytes.Buffer
	opts, csvOpts := reports.ExportOptions{IncludeFinders: *finders}, reports.CSVOptions{BOM: *bom}
	var what string
	switch *kind {
	case "cases", "summary":
		what, err = exportYear(ctx, &buf, store, *year, *kind, opts, csvOpts)
	case "patient":
		what, err = exportPatient(ctx, &buf, store, *caseNo, *format, opts, csvOpts)
	}
	if err != nil {
		return failErr(cio, "export", err)
	}
	if err := writeOut(*out, buf.Bytes(), cio.Stdout); err != nil {
		return failErr(cio, "export", err)
	}
	if err := logExport(ctx, store, *kind, *format, *year, *caseNo, *finders); err != nil {
		return failErr(cio, "export", err)
	}
	if *out != "-" {
		fmt.Fprintf(cio.Stdout, "wrote %s to %s\n", what, *out)
	}
	return exitOK
}

// checkExportFlags returns a usage error, or "".
func checkExportFlags(db, kind string, year int, caseNo, format, out string) string {
	switch {
	case db == "":
		return "--db FILE is required"
	case out == "":
		return "--out FILE is required (- for standard output)"
	case kind == "cases" || kind == "summary":
		if year < 1900 || year > 9999 {
			return "--year YYYY is required with --kind " + kind
		}
		if caseNo != "" {
			return "--case goes with --kind patient"
		}
	case kind == "patient":
		if caseNo == "" {
			return "--case CASE is required with --kind patient"
		}
		if format != "json" && format != "csv" {
			return "--format is json or csv"
		}
	default:
		return "--kind is cases, summary or patient"
	}
	return ""
}

// exportYear writes the year's listing or summary after checking that the
// two reconcile.
func exportYear(ctx context.Context, w io.Writer, store *records.Store, year int, kind string,
	opts reports.ExportOptions, csvOpts reports.CSVOptions) (string, error) {
	listing, err := reports.CaseListing(ctx, store, year, opts)
	if err != nil {
		return "", err
	}
	sum, err := reports.SpeciesSummary(ctx, store, year)
	if err != nil {
		return "", err
	}
	if err := reports.Reconcile(listing, sum); err != nil {
		return "", fmt.Errorf("nothing written: %w", err)
	}
	if kind == "cases" {
		return fmt.Sprintf("%d cases of %d (reconciled with the summary)", len(listing), year),
			reports.WriteCaseListingCSV(w, listing, opts.IncludeFinders, csvOpts)
	}
	return fmt.Sprintf("the %d summary of %d species, %d received, %d held over (reconciled with the listing)",
			year, len(sum.Species), sum.Total.Received, sum.Total.HeldOver),
		reports.WriteSummaryCSV(w, sum, csvOpts)
}

// exportPatient writes one patient's case file or history CSV.
func exportPatient(ctx context.Context, w io.Writer, store *records.Store, caseNo, format string,
	opts reports.ExportOptions, csvOpts reports.CSVOptions) (string, error) {
	if format == "json" {
		err := reports.WritePatientCaseFile(ctx, w, store, caseNo, opts)
		if errors.Is(err, records.ErrNotFound) {
			err = fmt.Errorf("no patient with case number %q", caseNo)
		}
		return "the case file of " + caseNo, err
	}
	p, rows, err := reports.PatientHistory(ctx, store, caseNo, opts)
	if errors.Is(err, records.ErrNotFound) {
		return "", fmt.Errorf("no patient with case number %q", caseNo)
	}
	if err != nil {
		return "", err
	}
	return fmt.Sprintf("%d record versions of %s", len(rows), p.CaseNumber), reports.WritePatientCSV(w, p.CaseNumber, rows, csvOpts)
}

// writeOut writes b to path through a temporary file renamed into place, so
// a failed export never leaves half a file; "-" writes to stdout.
func writeOut(path string, b []byte, stdout io.Writer) error {
	if path == "-" {
		_, err := stdout.Write(b)
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), ".aloft-export-*")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name())
	if _, err := tmp.Write(b); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Chmod(tmp.Name(), 0o640); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// logExport writes the export's audit row (the command line acts as the
// system, user 0).
func logExport(ctx context.Context, store *records.Store, kind, format string, year int, caseNo string, finders bool) error {
	e := records.ExportRecord{Kind: kind, IncludeFinders: finders}
	var pid int64
	if kind == "patient" {
		p, err := store.PatientByCase(ctx, caseNo)
		if err != nil {
			return err
		}
		pid, e.CaseNumber, e.Kind = p.ID, p.CaseNumber, "patient-"+map[string]string{"json": "casefile", "csv": "csv"}[format]
	} else {
		e.Year = year
	}
	return store.LogExport(ctx, 0, pid, e)
}

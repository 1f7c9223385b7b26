package main

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"fmt"
	"time"

	"aloft/records"
	"aloft/reports"
)

// cmdReport writes a patient's pre-release report as a PDF, whatever the
// patient's status. From the command line the report is a working copy:
// it is not frozen and cannot be signed (generate it for review in the app
// for that). The release site is the centre's own elevation unless --site
// names one of the centre's release sites or --elevation-m gives another;
// --temp-c gives the air temperature there.
func cmdReport(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("report", "report --db FILE --case CASE --out FILE.pdf [--site NAME | --elevation-m M [--temp-c C]] [--page-size A4|Letter]", cio)
	dbPath := fs.String("db", "", "database file")
	caseNo := fs.String("case", "", "the patient's case number")
	out := fs.String("out", "", "PDF file to write, replaced if it exists; - for standard output")
	site := fs.String("site", "", "a named release site")
	elev := fs.Float64("elevation-m", 0, "elevation of the release site, m (default: the centre's)")
	temp := fs.Float64("temp-c", 0, "air temperature at the release site, °C (default: the standard atmosphere's)")
	size := fs.String("page-size", records.PageA4, "paper size: A4 or Letter (default: the centre's setting)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	if msg := checkReportFlags(*dbPath, *caseNo, *out, *size, set, fs.NArg()); msg != "" {
		return usageErr(cio, "report", "%s", msg)
	}
	store, err := openExisting(ctx, *dbPath)
	if err != nil {
		return failErr(cio, "report", err)
	}
	defer store.Close()
	if ctr, err := store.Centre(ctx); err == nil && ctr.PageSize != "" && !set["page-size"] {
		*size = ctr.PageSize
	}
	req, err := reportRequest(ctx, store, *caseNo, *site, set, *elev, *temp)
	if err != nil {
		return failErr(cio, "report", err)
	}
	in, err := reports.LoadReportInput(ctx, store, req)
	if err != nil {
		return failErr(cio, "report", err)
	}
	var buf bytes.Buffer
	if err := reports.Render(&buf, in, reports.Options{PageSize: *size}); err != nil {
		return failErr(cio, "report", err)
	}
	if err := writeOut(*out, buf.Bytes(), cio.Stdout); err != nil {
		return failErr(cio, "report", err)
	}
	if *out != "-" {
		fmt.Fprintf(cio.Stdout, "wrote the pre-release report of %s (%s; %d bytes, working copy, not frozen) to %s\n",
			req.Patient.CaseNumber, in.Assessment.Outcome.Label, buf.Len(), *out)
	}
	return exitOK
}

// checkReportFlags returns a usage error, or "".
func checkReportFlags(db, caseNo, out, size string, set map[string]bool, nargs int) string {
	switch {
	case nargs > 0:
		return "unexpected arguments: give everything as flags"
	case db == "":
		return "--db FILE is required"
	case caseNo == "":
		return "--case CASE is required"
	case out == "":
		return "--out FILE.pdf is required (- for standard output)"
	case set["site"] && set["elevation-m"]:
		return "give either --site or --elevation-m, not both"
	case size != records.PageA4 && size != records.PageLetter:
		return "--page-size must be A4 or Letter"
	}
	return ""
}

// reportRequest finds the patient and the release site: a named site
// (records' release sites), or the centre's own with the elevation and
// temperature given on the command line.
func reportRequest(ctx context.Context, store *records.Store, caseNo, siteName string, set map[string]bool, elev, temp float64) (reports.ReportRequest, error) {
	p, err := store.PatientByCase(ctx, caseNo)
	if errors.Is(err, records.ErrNotFound) {
		return reports.ReportRequest{}, fmt.Errorf("no patient with case number %q", caseNo)
	}
	if err != nil {
		return reports.ReportRequest{}, err
	}
	req := reports.ReportRequest{Patient: p, Now: time.Now(), Cautions: cautionsMD}
	var site records.ReportSite
	switch {
	case siteName != "":
		rs, err := store.ReleaseSiteByName(ctx, siteName)
		if errors.Is(err, records.ErrNotFound) {
			return req, fmt.Errorf("unknown site %q: name a release site the centre has set up, or give --elevation-m", siteName)
		}
		if err != nil {
			return req, err
		}
		site = records.ReportSite{Label: rs.Name, ElevationM: rs.ElevationM}
	case set["elevation-m"]:
		site = records.ReportSite{Label: "release site", ElevationM: elev}
	case set["temp-c"]:
		s, label, err := store.DefaultSite(ctx)
		if err != nil {
			return req, err
		}
		site = records.ReportSite{Label: label, ElevationM: s.ElevationM}
	default:
		return req, nil
	}
	if set["temp-c"] {
		site.TempC = &temp
	}
	req.Site = &site
	return req, nil
}

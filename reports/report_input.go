package reports

import (
	"context"
	"fmt"
	"time"

	"aloft/assess"
	"aloft/records"
)

// ReportRequest says which report to gather: whose, at which site, as of
// when, and as which version.
type ReportRequest struct {
	Patient records.Patient
	// Site is the release site; nil means the centre's own elevation in the
	// standard atmosphere (records.Store.DefaultSite).
	Site        *records.ReportSite
	Now         time.Time // the instant assessed
	Version     int       // the frozen version's number; 0 = a working copy
	GeneratedBy string    // display name; "" from the command line
	Cautions    string    // CAUTIONS.md
}

// LoadReportInput gathers a report's input from store: the centre, the
// assessment (through records.Store.Assess, the one path to the engine) and
// the patient's current records.
func LoadReportInput(ctx context.Context, store *records.Store, req ReportRequest) (ReportInput, error) {
	centre, err := store.Centre(ctx)
	if err != nil {
		return ReportInput{}, fmt.Errorf("reports: report input: %w", err)
	}
	var site *assess.Site
	label := ""
	if req.Site != nil {
		s := req.Site.Site()
		site, label = &s, req.Site.Label
	} else if _, label, err = store.DefaultSite(ctx); err != nil {
		return ReportInput{}, err
	}
	a, err := store.Assess(ctx, req.Patient, site, req.Now)
	if err != nil {
		return ReportInput{}, err
	}
	recs, err := store.CaseInputs(ctx, req.Patient)
	if err != nil {
		return ReportInput{}, err
	}
	if label == "" {
		label = "release site"
	}
	return ReportInput{Centre: centre, Patient: req.Patient, Assessment: a, Records: recs, SiteLabel: label,
		Cautions: req.Cautions, Version: req.Version, GeneratedAt: req.Now, GeneratedBy: req.GeneratedBy}, nil
}

// Site returns the release site the report was assessed at, as stored with
// a frozen version.
func (in ReportInput) Site() records.ReportSite {
	return records.ReportSite{Label: in.SiteLabel, ElevationM: in.Assessment.Site.ElevationM, TempC: in.Assessment.Site.TempC}
}

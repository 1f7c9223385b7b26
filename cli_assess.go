package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"
	"time"
	"unicode/utf8"

	"aloft/assess"
	"aloft/records"
)

const assessSynopsis = "assess (--db FILE --case CASE | --input FILE.json) [--site NAME | --elevation-m M] [--temp-c C] [--at TIME] [--json]"

// assessFlags are the flags of `aloft assess`.
type assessFlags struct {
	db, caseNumber, input, at string
	siteName                  string
	elevationM, tempC         optFloat
	json                      bool
}

func (f *assessFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&f.db, "db", "", "database `file` (with --case)")
	fs.StringVar(&f.caseNumber, "case", "", "case `number` in the database, e.g. 2025-0042")
	fs.StringVar(&f.input, "input", "", "case file `FILE.json` to assess instead (- for standard input)")
	fs.Var(&f.elevationM, "elevation-m", "release site elevation, `metres` (−500 to 5000; default: the case file's site, else the centre's elevation)")
	fs.StringVar(&f.siteName, "site", "", "a release site of the database by `name` (with --db; its elevation)")
	fs.Var(&f.tempC, "temp-c", "air temperature at the release site, `°C` (−40 to 50; with --elevation-m; default: the standard atmosphere's)")
	fs.StringVar(&f.at, "at", "", "assess as of this `time`, RFC 3339 (default: now); evidence older than a week before it is stale")
	fs.BoolVar(&f.json, "json", false, "print the assessment as one JSON object")
}

// cmdAssess prints a patient's readiness assessment: advice for the
// rehabilitator and the veterinarian, who decide.
func cmdAssess(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("assess", assessSynopsis, cio)
	var f assessFlags
	f.register(fs)
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if fs.NArg() > 0 {
		return usageErr(cio, "assess", "unexpected argument %q", fs.Arg(0))
	}
	if msg := f.check(); msg != "" {
		return usageErr(cio, "assess", "%s", msg)
	}
	now, err := f.when()
	if err != nil {
		return usageErr(cio, "assess", "%v", err)
	}
	site := f.site()
	if site != nil {
		if err := site.Validate(); err != nil {
			return usageErr(cio, "assess", "%s", flagErrors(fs, err))
		}
	}
	if f.siteName != "" {
		if site, err = namedSite(ctx, f.db, f.siteName, f.tempC.ptr()); err != nil {
			return usageErr(cio, "assess", "--site: %v", err)
		}
	}
	var (
		h caseHeader
		a assess.Assessment
	)
	if f.input != "" {
		h, a, err = assessInput(f.input, site, now)
	} else {
		h, a, err = assessStored(ctx, f.db, f.caseNumber, site, now)
	}
	if err != nil {
		return failErr(cio, "assess", err)
	}
	if f.json {
		err = assess.EncodeAssessment(cio.Stdout, a)
	} else {
		err = writeAssessText(cio.Stdout, h, a)
	}
	if err != nil {
		return failErr(cio, "assess", err)
	}
	return exitOK
}

// check returns a usage problem with the flags, or "".
func (f *assessFlags) check() string {
	switch {
	case f.input != "" && f.caseNumber != "":
		return "give either --input FILE.json or --db FILE --case CASE, not both"
	case f.input == "" && f.caseNumber == "":
		return "give --input FILE.json, or --db FILE --case CASE"
	case f.input == "" && f.db == "":
		return "--case needs --db FILE"
	case f.siteName != "" && f.elevationM.set:
		return "give either --site NAME or --elevation-m M, not both"
	case f.siteName != "" && f.input != "":
		return "--site needs --db FILE --case CASE: the sites are the database's"
	case f.tempC.set && !f.elevationM.set && f.siteName == "":
		return "--temp-c needs --elevation-m or --site (the temperature belongs to a release site)"
	}
	return ""
}

// when is the instant to assess as of: --at, else now.
func (f *assessFlags) when() (time.Time, error) {
	if f.at == "" {
		return time.Now(), nil
	}
	t, err := time.Parse(time.RFC3339, f.at)
	if err != nil {
		return t, fmt.Errorf("--at: expected a time like 2025-06-20T12:00:00Z (got %q)", f.at)
	}
	return t, nil
}

// site is the release site of the flags, or nil when none is given.
func (f *assessFlags) site() *assess.Site {
	if !f.elevationM.set {
		return nil
	}
	return &assess.Site{ElevationM: f.elevationM.v, TempC: f.tempC.ptr()}
}

// namedSite resolves a release site of the database by name, at air
// temperature tempC (nil: the standard atmosphere's).
func namedSite(ctx context.Context, db, name string, tempC *float64) (*assess.Site, error) {
	store, err := openExisting(ctx, db)
	if err != nil {
		return nil, err
	}
	defer store.Close()
	r, err := store.ReleaseSiteByName(ctx, name)
	if errors.Is(err, records.ErrNotFound) {
		return nil, fmt.Errorf("no release site named %q in %s", name, db)
	}
	if err != nil {
		return nil, err
	}
	st := r.Site(tempC)
	if err := st.Validate(); err != nil {
		return nil, err
	}
	return &st, nil
}

// caseHeader is the patient line of the text output.
type caseHeader struct{ caseNumber, sex, ageClass string }

// assessInput assesses a case file (path, or "-" for standard input) with
// the default thresholds at site, else the case file's own site, else sea
// level.
func assessInput(path string, site *assess.Site, now time.Time) (caseHeader, assess.Assessment, error) {
	var r io.Reader = os.Stdin
	if path != "-" {
		file, err := os.Open(path)
		if err != nil {
			return caseHeader{}, assess.Assessment{}, fmt.Errorf("cannot open the case file: %w", err)
		}
		defer file.Close()
		r = file
	}
	cf, err := assess.ReadCaseFile(r)
	if err != nil {
		return caseHeader{}, assess.Assessment{}, fmt.Errorf("%s: %w", path, err)
	}
	a, err := cf.Evaluate(assess.DefaultThresholds(), site, now)
	if err != nil {
		return caseHeader{}, assess.Assessment{}, fmt.Errorf("%s: %w", path, err)
	}
	if site == nil && cf.Site == nil {
		a.Notes = append(a.Notes, "site: the case file names no release site and none was given: assessed at sea level")
	}
	return caseHeader{cf.Patient.CaseNumber, string(cf.Patient.Sex), cf.Patient.AgeClass}, a, nil
}

// assessStored assesses a patient of the database by the store's one path
// to the engine (the centre's thresholds; site nil: the centre's elevation).
func assessStored(ctx context.Context, db, caseNumber string, site *assess.Site, now time.Time) (caseHeader, assess.Assessment, error) {
	store, err := openExisting(ctx, db)
	if err != nil {
		return caseHeader{}, assess.Assessment{}, err
	}
	defer store.Close()
	p, err := store.PatientByCase(ctx, caseNumber)
	if errors.Is(err, records.ErrNotFound) {
		return caseHeader{}, assess.Assessment{}, fmt.Errorf("no case %q in %s", caseNumber, db)
	}
	if err != nil {
		return caseHeader{}, assess.Assessment{}, err
	}
	a, err := store.Assess(ctx, p, site, now)
	if err != nil {
		return caseHeader{}, assess.Assessment{}, err
	}
	return caseHeader{p.CaseNumber, string(p.Sex), p.AgeClass}, a, nil
}

// statusWords is a criterion status as the text output shows it.
var statusWords = map[assess.Status]string{
	assess.StatusMet: "met", assess.StatusBorderline: "borderline",
	assess.StatusUnmet: "not met", assess.StatusNotAssessed: "not assessed",
}

// writeAssessText writes the readable assessment.
func writeAssessText(w io.Writer, h caseHeader, a assess.Assessment) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Case %s: %s (%s), %s, %s\n", h.caseNumber, a.Species.CommonName, a.Species.ScientificName,
		h.sex, h.ageClass)
	temp := "standard-atmosphere temperature"
	if a.Site.TempC != nil {
		temp = fmt.Sprintf("%g °C", *a.Site.TempC)
	}
	fmt.Fprintf(&b, "Release site %g m, %s, air %.4f kg/m³; assessed %s\n", a.Site.ElevationM, temp, a.Site.AirDensityKgM3,
		a.EvaluatedAt.Format("2006-01-02 15:04 MST"))
	fmt.Fprintf(&b, "\nOutcome: %s\n", a.Outcome.Label)
	for _, r := range a.Outcome.Reasons {
		fmt.Fprintf(&b, "  - %s: %s%s\n", r.Title, r.Text, staleWord(r.Stale))
	}
	if len(a.Outcome.Referrals) > 0 && a.Outcome.Level != assess.OutcomeRefer {
		b.WriteString("  For the veterinarian as well:\n")
		for _, r := range a.Outcome.Referrals {
			fmt.Fprintf(&b, "  - %s: %s\n", r.Title, r.Text)
		}
	}
	b.WriteString("\nCriteria\n")
	width := 0
	for _, c := range a.Criteria {
		width = max(width, utf8.RuneCountInString(c.Title))
	}
	for _, c := range a.Criteria {
		fmt.Fprintf(&b, "  %-14s %-*s  %s%s\n", "["+statusWords[c.Status]+"]", width, c.Title, c.Reason, staleWord(c.Stale))
	}
	writePhysicsText(&b, a)
	fmt.Fprintf(&b, "\nExercise: %s\n", a.Exercise.Text)
	b.WriteString("\nCautions\n")
	for _, c := range a.Cautions {
		fmt.Fprintf(&b, "  - %s\n", c.Text)
		if c.Source != "" {
			fmt.Fprintf(&b, "    (%s)\n", c.Source)
		}
	}
	for _, n := range a.Notes {
		fmt.Fprintf(&b, "  note: %s\n", n)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func writePhysicsText(b *strings.Builder, a assess.Assessment) {
	b.WriteString("\nFlight model at the release site\n")
	p := a.Physics
	if p == nil {
		b.WriteString("  not run (see the notes)\n")
		return
	}
	fmt.Fprintf(b, "  power margin %.2f (a healthy bird here: %.2f; at sea level %.2f)\n", p.PowerMargin, p.ExpectedMarginSite, p.ExpectedMargin)
	fmt.Fprintf(b, "  share of a healthy bird's spare power: %s\n", optional(p.ExcessPowerFraction, "%.2f"))
	fmt.Fprintf(b, "  minimum speed %.2f m/s, %.2f × the healthy reference's %.2f m/s\n", p.MinSpeedMS, p.MinSpeedRatio, p.ReferenceMinSpeedMS)
	fmt.Fprintf(b, "  takeoff index %.2f: %s\n", p.TakeoffIndex, p.TakeoffBandLabel)
	if p.StillAirRangeKm != nil {
		fmt.Fprintf(b, "  still-air range on its fat, a rough guide: %.0f km\n", *p.StillAirRangeKm)
	}
}

func staleWord(stale bool) string {
	if stale {
		return " (stale evidence)"
	}
	return ""
}

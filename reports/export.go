package reports

import (
	"context"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"aloft/assess"
	"aloft/records"
)

// ExportOptions choose what an export includes.
type ExportOptions struct {
	// IncludeFinders adds the finders' names and contacts, personal data
	// that is left out unless asked for explicitly.
	IncludeFinders bool
}

// CaseRow is one patient of a year's case listing: what a permit holder
// keeps per patient (PRACTICE.md, "Records a permit holder keeps").
type CaseRow struct {
	CaseNumber        string
	SpeciesCommon     string
	SpeciesScientific string
	DateAcquired      string // the admission date, YYYY-MM-DD (UTC, as the case year)
	FoundDate         string
	FoundPlace        string
	FoundLat          *float64 // decimal degrees, WGS 84
	FoundLon          *float64
	FinderName        string // only with ExportOptions.IncludeFinders
	FinderContact     string // only with ExportOptions.IncludeFinders
	Reason            string // reason for admission
	// Disposition is the patient's disposition on 31 December of the year;
	// in-care (the federal report's "pending") when it had none by then, in
	// which case the disposition fields below are empty.
	Disposition       assess.Disposition
	DispositionDate   string
	DispositionPlace  string
	DispositionLat    *float64
	DispositionLon    *float64
	Receiver          string // transferred: who received the bird
	DispositionReason string // died: cause; euthanised: reason; else a note
	HeldOver          bool   // admitted in an earlier year, in care on 1 January
}

// CaseListing lists the year's caseload (see records.Caseload), one row per
// patient by case number, held-over patients first.
func CaseListing(ctx context.Context, store *records.Store, year int, opts ExportOptions) ([]CaseRow, error) {
	cases, err := store.Caseload(ctx, year)
	if err != nil {
		return nil, err
	}
	rows := make([]CaseRow, 0, len(cases))
	for _, c := range cases {
		rows = append(rows, caseRow(c, year, opts))
	}
	return rows, nil
}

func caseRow(c records.YearCase, year int, opts ExportOptions) CaseRow {
	p := c.Patient
	r := CaseRow{CaseNumber: p.CaseNumber, SpeciesCommon: p.SpeciesCommon, SpeciesScientific: p.SpeciesScientific,
		DateAcquired: p.AdmittedAt.UTC().Format(records.DateLayout), FoundDate: p.FoundDate, FoundPlace: p.FoundPlace,
		FoundLat: p.FoundLat, FoundLon: p.FoundLon, Reason: p.Reason, Disposition: c.StatusAtYearEnd(year), HeldOver: c.HeldOver}
	if opts.IncludeFinders {
		r.FinderName, r.FinderContact = p.FinderName, p.FinderContact
	}
	if d := c.Disposition; d != nil && r.Disposition != assess.DispInCare {
		r.DispositionDate, r.DispositionPlace, r.DispositionLat, r.DispositionLon = d.Date, d.Place, d.Lat, d.Lon
		r.Receiver, r.DispositionReason = d.Receiver, d.Reason
	}
	return r
}

// SpeciesTotals counts one species of a year's caseload, or all of them.
// Received + HeldOver equals the sum of Dispositions.
type SpeciesTotals struct {
	SpeciesScientific string
	SpeciesCommon     string
	Received          int // admitted in the year
	HeldOver          int // admitted earlier, in care on 1 January
	// Dispositions counts patients by disposition at the year's end, over
	// every key of assess.Dispositions (in-care = pending).
	Dispositions map[assess.Disposition]int
}

// Disposed returns the sum of Dispositions, pending included.
func (t SpeciesTotals) Disposed() int {
	n := 0
	for _, v := range t.Dispositions {
		n += v
	}
	return n
}

func (t *SpeciesTotals) add(o SpeciesTotals) {
	t.Received += o.Received
	t.HeldOver += o.HeldOver
	for k, v := range o.Dispositions {
		t.Dispositions[k] += v
	}
}

func newTotals(sci, common string) SpeciesTotals {
	t := SpeciesTotals{SpeciesScientific: sci, SpeciesCommon: common, Dispositions: map[assess.Disposition]int{}}
	for _, d := range assess.Dispositions {
		t.Dispositions[d] = 0
	}
	return t
}

// Summary is the per-species summary of a year's caseload.
type Summary struct {
	Year     int
	Species  []SpeciesTotals // by scientific name
	Total    SpeciesTotals   // all species
	HeldOver []CaseRow       // the held-over patients, listed apart
}

// SpeciesSummary counts the year's caseload by species and disposition. The
// counts come from the database's own aggregation
// (records.DispositionCounts), not from CaseListing, so Reconcile compares
// two independent paths.
func SpeciesSummary(ctx context.Context, store *records.Store, year int) (Summary, error) {
	counts, err := store.DispositionCounts(ctx, year)
	if err != nil {
		return Summary{}, err
	}
	s := Summary{Year: year, Total: newTotals("", "all species")}
	for _, c := range counts {
		if n := len(s.Species); n == 0 || s.Species[n-1].SpeciesScientific != c.SpeciesScientific {
			s.Species = append(s.Species, newTotals(c.SpeciesScientific, c.SpeciesCommon))
		}
		t := &s.Species[len(s.Species)-1]
		t.Received += c.Received
		t.HeldOver += c.HeldOver
		t.Dispositions[c.Status] += c.Received + c.HeldOver
	}
	for _, t := range s.Species {
		s.Total.add(t)
	}
	listing, err := CaseListing(ctx, store, year, ExportOptions{})
	if err != nil {
		return Summary{}, err
	}
	for _, r := range listing {
		if r.HeldOver {
			s.HeldOver = append(s.HeldOver, r)
		}
	}
	return s, nil
}

// ErrNotReconciled is wrapped by Reconcile's error.
var ErrNotReconciled = errors.New("reports: listing and summary do not reconcile")

// Reconcile checks a year's case listing against its summary: per species,
// received plus held over equals the sum of the dispositions; the listing's
// rows, counted by species, held-over or not and disposition, give the same
// numbers; the totals are the sums of the species; and the summary's
// held-over patients are the listing's. It returns nil, or every mismatch
// joined, wrapping ErrNotReconciled.
func Reconcile(listing []CaseRow, s Summary) error {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	want := map[string]*SpeciesTotals{}
	var order []string
	for _, r := range listing {
		t, ok := want[r.SpeciesScientific]
		if !ok {
			nt := newTotals(r.SpeciesScientific, r.SpeciesCommon)
			t, want[r.SpeciesScientific] = &nt, &nt
			order = append(order, r.SpeciesScientific)
		}
		if r.HeldOver {
			t.HeldOver++
		} else {
			t.Received++
		}
		t.Dispositions[r.Disposition]++
	}
	total := newTotals("", "all species")
	seen := map[string]bool{}
	for _, t := range s.Species {
		seen[t.SpeciesScientific] = true
		if t.Received+t.HeldOver != t.Disposed() {
			bad("%s: received %d + held over %d ≠ %d disposed", t.SpeciesScientific, t.Received, t.HeldOver, t.Disposed())
		}
		total.add(t)
		l, ok := want[t.SpeciesScientific]
		if !ok {
			bad("%s: in the summary, not in the listing", t.SpeciesScientific)
			continue
		}
		compareTotals(t.SpeciesScientific, *l, t, bad)
	}
	for _, sp := range order {
		if !seen[sp] {
			bad("%s: in the listing, not in the summary", sp)
		}
	}
	compareTotals("all species", total, s.Total, bad)
	var heldL, heldS []string
	for _, r := range listing {
		if r.HeldOver {
			heldL = append(heldL, r.CaseNumber)
		}
	}
	for _, r := range s.HeldOver {
		heldS = append(heldS, r.CaseNumber)
	}
	if !slices.Equal(heldL, heldS) || len(heldS) != s.Total.HeldOver {
		bad("held over: listing %v, summary %v (counted %d)", heldL, heldS, s.Total.HeldOver)
	}
	if len(errs) > 0 {
		return fmt.Errorf("%w: %w", ErrNotReconciled, errors.Join(errs...))
	}
	return nil
}

func compareTotals(name string, want, got SpeciesTotals, bad func(string, ...any)) {
	if want.Received != got.Received || want.HeldOver != got.HeldOver {
		bad("%s: received/held over %d/%d in the listing, %d/%d in the summary", name, want.Received, want.HeldOver, got.Received, got.HeldOver)
	}
	for _, d := range assess.Dispositions {
		if want.Dispositions[d] != got.Dispositions[d] {
			bad("%s: %s %d in the listing, %d in the summary", name, d, want.Dispositions[d], got.Dispositions[d])
		}
	}
}

// CaseListingHeader returns the case listing's CSV columns; the finder
// columns only with includeFinders.
func CaseListingHeader(includeFinders bool) []string {
	h := []string{"case_number", "species_common", "species_scientific", "date_acquired", "found_date", "found_place",
		"found_lat", "found_lon"}
	if includeFinders {
		h = append(h, "finder_name", "finder_contact")
	}
	return append(h, "reason_for_admission", "disposition", "disposition_date", "disposition_place",
		"disposition_lat", "disposition_lon", "receiver", "disposition_reason", "held_over")
}

// WriteCaseListingCSV writes the listing, one row per patient, columns as
// CaseListingHeader. Coordinates are numbers; held_over is "yes" or "no".
func WriteCaseListingCSV(w io.Writer, rows []CaseRow, includeFinders bool, opts CSVOptions) error {
	out := make([][]Cell, 0, len(rows))
	for _, r := range rows {
		c := []Cell{Text(r.CaseNumber), Text(r.SpeciesCommon), Text(r.SpeciesScientific), Text(r.DateAcquired),
			Text(r.FoundDate), Text(r.FoundPlace), OptNum(r.FoundLat), OptNum(r.FoundLon)}
		if includeFinders {
			c = append(c, Text(r.FinderName), Text(r.FinderContact))
		}
		held := "no"
		if r.HeldOver {
			held = "yes"
		}
		out = append(out, append(c, Text(r.Reason), Text(string(r.Disposition)), Text(r.DispositionDate),
			Text(r.DispositionPlace), OptNum(r.DispositionLat), OptNum(r.DispositionLon), Text(r.Receiver),
			Text(r.DispositionReason), Text(held)))
	}
	return WriteCSV(w, opts, CaseListingHeader(includeFinders), out)
}

// SummaryHeader returns the summary's CSV columns: the species, received,
// held over, one column per disposition (assess.Dispositions, in-care
// meaning pending at the year's end), the total disposed, and the case
// numbers of the held-over patients separated by spaces.
func SummaryHeader() []string {
	h := []string{"species_scientific", "species_common", "received", "held_over"}
	for _, d := range assess.Dispositions {
		h = append(h, string(d))
	}
	return append(h, "total", "held_over_cases")
}

// WriteSummaryCSV writes one row per species, then a row for all species
// (species_scientific empty, species_common "all species").
func WriteSummaryCSV(w io.Writer, s Summary, opts CSVOptions) error {
	held := map[string][]string{}
	var all []string
	for _, r := range s.HeldOver {
		held[r.SpeciesScientific] = append(held[r.SpeciesScientific], r.CaseNumber)
		all = append(all, r.CaseNumber)
	}
	row := func(t SpeciesTotals, cases []string) []Cell {
		c := []Cell{Text(t.SpeciesScientific), Text(t.SpeciesCommon), Int(t.Received), Int(t.HeldOver)}
		for _, d := range assess.Dispositions {
			c = append(c, Int(t.Dispositions[d]))
		}
		return append(c, Int(t.Disposed()), Text(strings.Join(cases, " ")))
	}
	out := make([][]Cell, 0, len(s.Species)+1)
	for _, t := range s.Species {
		out = append(out, row(t, held[t.SpeciesScientific]))
	}
	out = append(out, row(s.Total, all))
	return WriteCSV(w, opts, SummaryHeader(), out)
}

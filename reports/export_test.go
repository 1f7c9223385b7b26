package reports_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
	"aloft/reports"
)

func fptr(v float64) *float64 { return &v }

// seeded builds a store over two years: 2025 admissions disposed in 2025,
// disposed in 2026 (held over into 2026) and still in care; 2026 admissions
// of every disposition kind, one disposed in 2027 (pending at the end of
// 2026). The clock ends on 2027-01-20.
func seeded(t *testing.T) *records.Store {
	t.Helper()
	ctx := context.Background()
	clock := recordstest.NewClock(time.Date(2025, 10, 1, 10, 0, 0, 0, time.UTC))
	s := recordstest.Open(t, clock)
	type pat struct {
		species string
		kind    assess.Disposition // "" stays in care
		date    string
	}
	admitAll := func(ps []pat) []records.Patient {
		var out []records.Patient
		for _, x := range ps {
			in := recordstest.Intake(x.species, "", 1000)
			in.FoundDate = clock.Now().Format(records.DateLayout)
			in.FoundPlace, in.Reason = "=HYPERLINK(\"http://x.invalid\",\"click\")", "-2 wing"
			in.FoundLat, in.FoundLon = fptr(42.44), fptr(-76.5)
			in.FinderName, in.FinderContact = "Invented Finder", "+1 555 0100"
			p, err := s.AdmitPatient(ctx, 0, in)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, p)
		}
		return out
	}
	y25 := []pat{
		{"Buteo jamaicensis", assess.DispReleased, "2025-11-20"},
		{"Buteo jamaicensis", assess.DispReleased, "2026-03-01"},
		{"Anas platyrhynchos", "", ""},
		{"Anas platyrhynchos", assess.DispDied, "2025-10-02"},
	}
	p25 := admitAll(y25)
	clock.Advance(200 * 24 * time.Hour) // 2026-04-19
	y26 := []pat{
		{"Buteo jamaicensis", assess.DispRenested, "2026-04-19"},
		{"Buteo jamaicensis", assess.DispTransferred, "2026-05-01"},
		{"Anas platyrhynchos", assess.DispEuthanised, "2026-04-20"},
		{"Anas platyrhynchos", assess.DispDeadOnArrival, "2026-04-19"},
		{"Anas platyrhynchos", assess.DispEscaped, "2026-06-01"},
		{"Cygnus olor", assess.DispDied, "2026-04-21"},
		{"Cygnus olor", assess.DispReleased, "2027-01-10"},
		{"Cygnus olor", "", ""},
	}
	p26 := admitAll(y26)
	clock.Advance(280 * 24 * time.Hour) // 2027-01-24
	for i, x := range append(y25, y26...) {
		if x.kind == "" {
			continue
		}
		p := append(p25, p26...)[i]
		_, err := s.Dispose(ctx, 0, p.ID, records.DispositionInput{Kind: x.kind, Date: x.date, Place: "@harbour",
			Lat: fptr(42.4), Lon: fptr(-76.5), Receiver: "+Swan unit", Reason: "cause", NoReportReason: "none needed"})
		if err != nil {
			t.Fatalf("dispose %s %s: %v", p.CaseNumber, x.kind, err)
		}
	}
	return s
}

// The received count per species must equal the sum of its dispositions:
// U.S. Fish & Wildlife Service, Migratory Bird Rehabilitation Annual Report,
// Form 3-202-4 (PRACTICE.md, "Records a permit holder keeps" [published]).
func TestCaseListingAndSummary_Reconcile(t *testing.T) {
	ctx := context.Background()
	s := seeded(t)
	for _, tc := range []struct {
		year                          int
		received, heldOver, pending   int
		released, renested, heldCases string
	}{
		// 2025: four admitted; one released and one died in 2025, two pending.
		{2025, 4, 0, 2, "1", "0", ""},
		// 2026: eight admitted plus two held over (one released in 2026, one still
		// in care); the swan released in 2027 is pending at the end of 2026.
		{2026, 8, 2, 3, "1", "1", "2025-0002 2025-0003"},
	} {
		listing, err := reports.CaseListing(ctx, s, tc.year, reports.ExportOptions{})
		if err != nil {
			t.Fatal(err)
		}
		sum, err := reports.SpeciesSummary(ctx, s, tc.year)
		if err != nil {
			t.Fatal(err)
		}
		if err := reports.Reconcile(listing, sum); err != nil {
			t.Errorf("%d: Reconcile: %v", tc.year, err)
		}
		tot := sum.Total
		if tot.Received != tc.received || tot.HeldOver != tc.heldOver || tot.Dispositions[assess.DispInCare] != tc.pending {
			t.Errorf("%d: received %d held over %d pending %d, want %d %d %d", tc.year, tot.Received, tot.HeldOver,
				tot.Dispositions[assess.DispInCare], tc.received, tc.heldOver, tc.pending)
		}
		if tot.Received+tot.HeldOver != tot.Disposed() || len(listing) != tot.Disposed() {
			t.Errorf("%d: received %d + held over %d, disposed %d, listing %d rows: must all agree", tc.year,
				tot.Received, tot.HeldOver, tot.Disposed(), len(listing))
		}
		var buf bytes.Buffer
		if err := reports.WriteSummaryCSV(&buf, sum, reports.CSVOptions{}); err != nil {
			t.Fatal(err)
		}
		recs, err := csv.NewReader(&buf).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		last := recs[len(recs)-1]
		col := func(name string) string {
			for i, h := range recs[0] {
				if h == name {
					return last[i]
				}
			}
			return "?"
		}
		if col("released") != tc.released || col("renested") != tc.renested || col("held_over_cases") != tc.heldCases {
			t.Errorf("%d: summary CSV total row %v, want released %s renested %s held over %q", tc.year, last,
				tc.released, tc.renested, tc.heldCases)
		}
	}
}

func TestReconcile_ErrMismatch(t *testing.T) {
	ctx := context.Background()
	s := seeded(t)
	listing, _ := reports.CaseListing(ctx, s, 2026, reports.ExportOptions{})
	sum, _ := reports.SpeciesSummary(ctx, s, 2026)
	cases := []struct {
		name string
		edit func(l []reports.CaseRow, s *reports.Summary) []reports.CaseRow
	}{
		{"ErrRowMissing", func(l []reports.CaseRow, s *reports.Summary) []reports.CaseRow { return l[1:] }},
		{"ErrDispositionChanged", func(l []reports.CaseRow, s *reports.Summary) []reports.CaseRow {
			l = append([]reports.CaseRow(nil), l...)
			l[len(l)-1].Disposition = assess.DispReleased
			return l
		}},
		{"ErrSummaryDoesNotAddUp", func(l []reports.CaseRow, s *reports.Summary) []reports.CaseRow {
			s.Species[0].Received++
			return l
		}},
		{"ErrHeldOverList", func(l []reports.CaseRow, s *reports.Summary) []reports.CaseRow {
			s.HeldOver = s.HeldOver[:1]
			return l
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sc := sum
			sc.Species = append([]reports.SpeciesTotals(nil), sum.Species...)
			for i := range sc.Species {
				m := map[assess.Disposition]int{}
				for k, v := range sum.Species[i].Dispositions {
					m[k] = v
				}
				sc.Species[i].Dispositions = m
			}
			l := tc.edit(listing, &sc)
			if err := reports.Reconcile(l, sc); !errors.Is(err, reports.ErrNotReconciled) {
				t.Errorf("Reconcile = %v, want ErrNotReconciled", err)
			}
		})
	}
}

func TestWriteCaseListingCSV(t *testing.T) {
	ctx := context.Background()
	s := seeded(t)
	for _, tc := range []struct {
		name    string
		finders bool
		bom     bool
	}{{"Default", false, false}, {"FindersAndBOM", true, true}} {
		t.Run(tc.name, func(t *testing.T) {
			rows, err := reports.CaseListing(ctx, s, 2026, reports.ExportOptions{IncludeFinders: tc.finders})
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := reports.WriteCaseListingCSV(&buf, rows, tc.finders, reports.CSVOptions{BOM: tc.bom}); err != nil {
				t.Fatal(err)
			}
			b := buf.Bytes()
			// The UTF-8 byte-order mark is EF BB BF (The Unicode Standard, §23.8).
			if got := bytes.HasPrefix(b, []byte{0xEF, 0xBB, 0xBF}); got != tc.bom {
				t.Errorf("starts with a BOM: %v, want %v", got, tc.bom)
			}
			if got := strings.Contains(string(b), "Invented Finder"); got != tc.finders {
				t.Errorf("finder's name present: %v, want %v", got, tc.finders)
			}
			recs, err := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(b, []byte{0xEF, 0xBB, 0xBF}))).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(recs) != len(rows)+1 {
				t.Fatalf("%d CSV records, want header + %d", len(recs), len(rows))
			}
			hdr := map[string]int{}
			for i, h := range recs[0] {
				hdr[h] = i
			}
			r := recs[len(recs)-2] // 2026-0007, the swan released in 2027
			want := map[string]string{"case_number": "2026-0007", "found_lon": "-76.5", "found_lat": "42.44",
				"found_place": `'=HYPERLINK("http://x.invalid","click")`, "reason_for_admission": "'-2 wing",
				"disposition": "in-care", "disposition_date": "", "disposition_lon": "", "held_over": "no"}
			if tc.finders {
				want["finder_contact"] = "'+1 555 0100"
			}
			for k, v := range want {
				if got := r[hdr[k]]; got != v {
					t.Errorf("%s = %q, want %q", k, got, v)
				}
			}
			done := recs[3] // after the two held-over rows: 2026-0001, renested
			if done[hdr["disposition_place"]] != "'@harbour" || done[hdr["disposition_lon"]] != "-76.5" {
				t.Errorf("disposed row: place %q lon %q, want '@harbour and -76.5", done[hdr["disposition_place"]], done[hdr["disposition_lon"]])
			}
		})
	}
}

// Formula injection: a cell starting with = + - @ (or tab, CR) is run as a
// formula by spreadsheets; prefixing an apostrophe makes it text (OWASP,
// "CSV Injection"). Numbers stay numbers. Fields are quoted as RFC 4180
// requires, checked by reading back with encoding/csv.
func TestWriteCSV_Neutralises(t *testing.T) {
	cases := []struct {
		name string
		cell reports.Cell
		want string
	}{
		{"Hyperlink", reports.Text(`=HYPERLINK("http://x.invalid","x")`), `'=HYPERLINK("http://x.invalid","x")`},
		{"Plus", reports.Text("+1"), "'+1"},
		{"MinusText", reports.Text("-2"), "'-2"},
		{"At", reports.Text("@x"), "'@x"},
		{"Tab", reports.Text("\tcmd"), "'\tcmd"},
		{"CR", reports.Text("\rcmd"), "'\ncmd"}, // a lone CR is kept as a line break
		{"Multiline", reports.Text("line 1\r\nline 2"), "line 1\nline 2"},
		{"Plain", reports.Text("harbour, north"), "harbour, north"},
		{"Empty", reports.Text(""), ""},
		{"NegativeLongitude", reports.Num(-76.5), "-76.5"},
		{"NegativeElevation", reports.Num(-28), "-28"},
		{"NilNumber", reports.OptNum(nil), ""},
		{"Count", reports.Int(-3), "-3"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			// A second column, so that an empty cell is not an empty line.
			rows := [][]reports.Cell{{tc.cell, reports.Text("end")}}
			if err := reports.WriteCSV(&buf, reports.CSVOptions{}, []string{"v", "w"}, rows); err != nil {
				t.Fatal(err)
			}
			recs, err := csv.NewReader(&buf).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			got := recs[1][0]
			if got != tc.want {
				t.Errorf("cell %v written %q, want %q", tc.cell, got, tc.want)
			}
		})
	}
}

func TestPatientHistory(t *testing.T) {
	ctx := context.Background()
	s := seeded(t)
	p, rows, err := reports.PatientHistory(ctx, s, "2026-0007", reports.ExportOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if p.CaseNumber != "2026-0007" || len(rows) != 2 || rows[0].Record != "intake" || rows[1].Record != "disposition" {
		t.Fatalf("history = %+v, want intake then disposition", rows)
	}
	if strings.Contains(rows[0].Summary, "Invented Finder") || !strings.Contains(rows[0].Summary, "found_lon=-76.5") {
		t.Errorf("intake summary %q: finder must be left out, coordinates kept", rows[0].Summary)
	}
	var buf bytes.Buffer
	if err := reports.WritePatientCSV(&buf, p.CaseNumber, rows, reports.CSVOptions{BOM: true}); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(buf.Bytes(), []byte("\uFEFF")))).ReadAll()
	if err != nil || len(recs) != 3 || strings.Join(recs[0], ",") != strings.Join(reports.PatientCSVHeader, ",") {
		t.Fatalf("patient CSV = %q, %v", recs, err)
	}
	if recs[2][1] != "disposition" || recs[2][5] != "2027-01-10" || !strings.Contains(recs[2][8], "kind=released") {
		t.Errorf("disposition row %q", recs[2])
	}
	if _, _, err := reports.PatientHistory(ctx, s, "1999-0001", reports.ExportOptions{}); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("missing case: %v, want ErrNotFound", err)
	}
}

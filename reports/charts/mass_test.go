package charts

import (
	"errors"
	"testing"
	"time"

	"aloft/assess"
)

// day0 is the first day of the test courses of care (test input, not data).
var day0 = time.Date(2026, 11, 2, 9, 0, 0, 0, time.UTC)

// weighins returns weigh-ins on the given days after day0 with the given
// masses, weighed before feeding except where fed says otherwise.
func weighins(days []int, masses []float64, fed map[int]assess.FedState) []assess.WeighIn {
	ws := make([]assess.WeighIn, len(days))
	for i, d := range days {
		f, ok := fed[i]
		if !ok {
			f = assess.FedBefore
		}
		ws[i] = assess.WeighIn{At: day0.AddDate(0, 0, d), MassG: masses[i], Fed: f}
	}
	return ws
}

func ptr[T any](v T) *T { return &v }

func TestMass(t *testing.T) {
	tests := []struct {
		name     string
		in       MassInput
		golden   string
		wantAlt  []string
		wantText []string
	}{{
		// A hawk admitted thin, gaining towards the range. The range is the
		// species table's for a female Red-tailed Hawk (assess/species_data.json,
		// 918–1530 g); the weigh-ins are test input.
		name: "female below range",
		in: MassInput{
			Weighins: weighins([]int{0, 1, 3, 6, 9, 13, 17, 21, 24, 28},
				[]float64{742, 731, 760, 795, 820, 861, 874, 902, 930, 951},
				map[int]assess.FedState{4: assess.FedAfter, 7: assess.FedUnknown}),
			RangeLoG: 918, RangeHiG: 1530, Sex: assess.SexFemale,
			Now: day0.AddDate(0, 0, 29),
		},
		golden: "mass_female.svg",
		wantAlt: []string{"Mass 951 g on 2026-11-30 (weighed before feeding)", "10 weigh-ins since 2026-11-02 (742 g)",
			"lowest 731 g on 2026-11-03", "Typical range for a female: 918–1530 g; the latest mass is within it"},
		wantText: []string{"Latest: 951 g on 30 Nov (weighed before feeding)", "Mass (g)", "Date (2026)", "16 Nov", "Typical range, female: 918–1530 g"},
	}, {
		// A small aerial feeder with a release guide (the species table gives
		// Common Swift 28.2–47 g and a release guide of 40 g).
		name: "swift with release guide",
		in: MassInput{
			Weighins: weighins([]int{0, 2, 4, 7}, []float64{31.4, 33.9, 36.2, 38.5}, nil),
			RangeLoG: 28.2, RangeHiG: 47, ReleaseMinG: ptr(40.0), Sex: assess.SexUnknown,
		},
		golden: "mass_swift.svg",
		wantAlt: []string{"Mass 38.5 g on 2026-11-09", "a bird of unknown sex: 28.2–47 g",
			"Release guide 40 g; the latest mass is 1.5 g below it"},
		wantText: []string{"Latest: 38.5 g on 9 Nov", "Release guide: 40 g", "sex unknown"},
	}, {
		name:     "single weigh-in, no range",
		in:       MassInput{Weighins: weighins([]int{0}, []float64{1210}, map[int]assess.FedState{0: assess.FedAfter})},
		golden:   "mass_single.svg",
		wantAlt:  []string{"Mass 1210 g on 2026-11-02 (weighed after feeding). No typical range"},
		wantText: []string{"Latest: 1210 g on 2 Nov (weighed after feeding)", "Mass, after feeding or not noted"},
	}}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := Mass(tc.in)
			if err != nil {
				t.Fatalf("Mass: %v", err)
			}
			data, doc := renderSVG(t, c)
			wantAlt(t, c, tc.wantAlt...)
			wantTexts(t, doc, tc.wantText...)
			golden(t, tc.golden, data)
		})
	}
}

func TestMass_ErrNoData(t *testing.T) {
	if _, err := Mass(MassInput{}); !errors.Is(err, ErrNoData) {
		t.Errorf("Mass(no weigh-ins) error %v, want ErrNoData", err)
	}
}

// TestMass_SpeciesRange draws the chart with the species reference's own
// range and checks the chart states it: the chart must show the table's
// numbers, not its own.
func TestMass_SpeciesRange(t *testing.T) {
	table, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := table.Find("Red-tailed Hawk")
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := sp.MassRangeG(assess.SexMale)
	c, err := Mass(MassInput{Weighins: weighins([]int{0}, []float64{1000}, nil), RangeLoG: lo, RangeHiG: hi, Sex: assess.SexMale})
	if err != nil {
		t.Fatal(err)
	}
	wantAlt(t, c, "Typical range for a male: "+grams(lo)+"–"+grams(hi)+" g")
}

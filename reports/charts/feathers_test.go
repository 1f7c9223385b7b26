package charts

import (
	"errors"
	"testing"

	"aloft/assess"
)

// statuses returns n intact feathers with the given exceptions (index 0 is
// feather number 1).
func statuses(n int, except map[int]assess.FeatherStatus) []assess.FeatherStatus {
	s := make([]assess.FeatherStatus, n)
	for i := range s {
		s[i] = assess.FeatherIntact
		if e, ok := except[i]; ok {
			s[i] = e
		}
	}
	return s
}

func TestFeathers(t *testing.T) {
	tests := []struct {
		name     string
		in       FeatherInput
		golden   string
		wantAlt  []string
		wantText []string
	}{{
		// A hawk's counts as the species table gives them for its family
		// (10 primaries, 14 secondaries, 12 rectrices); the damage is test input.
		name: "hawk with damage",
		in: FeatherInput{
			Map: assess.FeatherMap{
				LeftPrimaries:    statuses(10, map[int]assess.FeatherStatus{8: assess.FeatherBroken, 9: assess.FeatherMissing}),
				LeftSecondaries:  statuses(14, map[int]assess.FeatherStatus{2: assess.FeatherImped}),
				RightPrimaries:   statuses(10, map[int]assess.FeatherStatus{6: assess.FeatherStressBars}),
				RightSecondaries: statuses(14, map[int]assess.FeatherStatus{0: assess.FeatherFrayed}),
				TailLeft:         statuses(6, map[int]assess.FeatherStatus{0: assess.FeatherPin}),
				TailRight:        statuses(6, nil),
			},
			Primaries: 10, Secondaries: 14, Rectrices: 12,
		},
		golden: "feathers_hawk.svg",
		wantAlt: []string{
			"Left wing, 10 primaries and 14 secondaries: missing P10; broken P9; imped S3; the rest intact.",
			"Right wing, 10 primaries and 14 secondaries: frayed S1; stress bars P7; the rest intact.",
			"Tail, 12 rectrices: growing (pin or blood feather) left R1; the rest intact."},
		wantText: []string{"Left wing (seen from above)", "Right wing (seen from above)", "Tail (seen from above)",
			"Primaries", "Secondaries", "M", "B", "I", "F", "S", "G", "10", "14",
			"No letter: intact", "M: missing", "B: broken", "G: growing (pin or blood feather)",
			"I: imped", "F: frayed", "S: stress bars"},
	}, {
		// Many secondaries (an albatross-like count from the species table:
		// 11 primaries, 30 secondaries) put each wing on two rows; the tail
		// was not examined.
		name:   "long wing, tail not recorded",
		in:     FeatherInput{Primaries: 11, Secondaries: 30, Rectrices: 12},
		golden: "feathers_long.svg",
		wantAlt: []string{"Left wing, 11 primaries and 30 secondaries: not recorded P1",
			"Tail, 12 rectrices: not recorded left R1"},
		wantText: []string{"?: not recorded", "30"},
	}}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := Feathers(tc.in)
			if err != nil {
				t.Fatalf("Feathers: %v", err)
			}
			data, doc := renderSVG(t, c)
			wantAlt(t, c, tc.wantAlt...)
			wantTexts(t, doc, tc.wantText...)
			golden(t, tc.golden, data)
		})
	}
}

// TestFeathers_Letters checks that every state has its own letter, so
// colour is never the only carrier of a feather's state.
func TestFeathers_Letters(t *testing.T) {
	seen := map[string]assess.FeatherStatus{}
	for _, s := range append(assess.FeatherStatuses[1:len(assess.FeatherStatuses):len(assess.FeatherStatuses)], notRecorded) {
		l := lookOf(s, ScreenStyle()).letter
		if l == "" {
			t.Errorf("state %q has no letter", s)
		}
		if other, dup := seen[l]; dup {
			t.Errorf("states %q and %q share the letter %q", s, other, l)
		}
		seen[l] = s
	}
	if l := lookOf(assess.FeatherIntact, ScreenStyle()).letter; l != "" {
		t.Errorf("intact has letter %q, want none", l)
	}
}

func TestFeathers_ErrNoData(t *testing.T) {
	if _, err := Feathers(FeatherInput{}); !errors.Is(err, ErrNoData) {
		t.Errorf("Feathers(nothing) error %v, want ErrNoData", err)
	}
}

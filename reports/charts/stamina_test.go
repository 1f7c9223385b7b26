package charts

import (
	"errors"
	"testing"

	"aloft/assess"
)

// sessions returns flight-cage sessions on days after day0 (test input).
func sessions(days, passes, runs []int, recovery []*int) []assess.FlightSession {
	ss := make([]assess.FlightSession, len(days))
	for i, d := range days {
		ss[i] = assess.FlightSession{At: day0.AddDate(0, 0, d), Exercise: assess.ExerciseCage,
			Passes: passes[i], LongestRun: runs[i], RecoveryS: recovery[i]}
	}
	return ss
}

func TestStamina(t *testing.T) {
	tests := []struct {
		name     string
		in       StaminaInput
		golden   string
		wantAlt  []string
		wantText []string
	}{{
		name: "conditioning with target",
		in: StaminaInput{
			Sessions: sessions([]int{0, 2, 4, 7, 9, 11, 14}, []int{4, 6, 9, 12, 14, 18, 20}, []int{2, 3, 5, 6, 9, 10, 12},
				[]*int{ptr(240), ptr(210), nil, ptr(150), ptr(120), ptr(95), ptr(70)}),
			TargetPasses: ptr(10),
		},
		golden: "stamina_target.svg",
		wantAlt: []string{"7 flight sessions from 2026-11-02 to 2026-11-16", "Latest: 20 passes, longest unbroken run 12, breathing recovery 70 s",
			"Target 10 unbroken passes"},
		wantText: []string{"Latest (16 Nov): 20 passes, run 12, recovery 70 s", "Passes (lengths)", "Recovery (s)",
			"Target: 10 unbroken", "Date (2026)"},
	}, {
		name:     "one session, recovery not timed",
		in:       StaminaInput{Sessions: sessions([]int{3}, []int{1}, []int{1}, []*int{nil})},
		golden:   "stamina_single.svg",
		wantAlt:  []string{"1 flight session on 2026-11-05. Latest: 1 pass, longest unbroken run 1, breathing recovery not timed."},
		wantText: []string{"No recovery times recorded"},
	}}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := Stamina(tc.in)
			if err != nil {
				t.Fatalf("Stamina: %v", err)
			}
			data, doc := renderSVG(t, c)
			wantAlt(t, c, tc.wantAlt...)
			wantTexts(t, doc, tc.wantText...)
			golden(t, tc.golden, data)
		})
	}
}

func TestStamina_ErrNoData(t *testing.T) {
	if _, err := Stamina(StaminaInput{}); !errors.Is(err, ErrNoData) {
		t.Errorf("Stamina(no sessions) error %v, want ErrNoData", err)
	}
}

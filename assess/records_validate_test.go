package assess

import (
	"math"
	"strings"
	"testing"
	"time"
)

func recSpecies(t *testing.T, name string) *Species {
	t.Helper()
	tab, err := LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	sp, err := tab.Find(name)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// TestRecordValidate_Field checks that each rule names the form field.
func TestRecordValidate_Field(t *testing.T) {
	at := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	cases := []struct {
		name, field string
		err         error
	}{
		{"ErrMassNegative", "mass_g", WeighIn{At: at, MassG: -3, Fed: FedBefore}.Validate()},
		{"ErrFedUnknownWord", "fed", WeighIn{At: at, MassG: 30, Fed: "lunch"}.Validate()},
		// Kaiser 1993: 0–8; Helms & Drury 1960: 0–5 (PRACTICE.md "Scores").
		{"ErrFatAboveKaiser", "fat_score", ConditionScore{FatScore: ptr(9), FatScale: FatScaleKaiser}.Validate()},
		{"ErrFatAboveHelmsDrury", "fat_score", ConditionScore{FatScore: ptr(6), FatScale: FatScaleHelmsDrury}.Validate()},
		{"ErrFatNoScale", "fat_scale", ConditionScore{FatScore: ptr(2)}.Validate()},
		// Bairlein 1995: pectoral muscle 0–3.
		{"ErrMuscleAbove3", "muscle_score", ConditionScore{MuscleScore: ptr(4)}.Validate()},
		// Body condition 1–5 [common practice].
		{"ErrBodyCondition0", "body_condition", ConditionScore{BodyCondition: ptr(0)}.Validate()},
		{"ErrNoScore", "fat_score", ConditionScore{}.Validate()},
		{"ErrAreaNoMethod", "area_method", WingMeasurement{AreaCM2: ptr(100.0)}.Validate(nil)},
		{"ErrFeatherStatus", "lp3", WingMeasurement{Feathers: &FeatherMap{LeftPrimaries: []FeatherStatus{"intact", "intact", "bent"}}}.Validate(nil)},
		{"ErrPassesNegative", "passes", FlightSession{Exercise: ExerciseCage, Passes: -1, Highest: HeightFloor, Droop: DroopNone}.Validate()},
		{"ErrControlledAboveLandings", "landings_controlled", FlightSession{Exercise: ExerciseCage, Landings: 2, LandingsControlled: 3,
			Highest: HeightFloor, Droop: DroopNone}.Validate()},
		{"ErrRecoveryNegative", "recovery_s", FlightSession{Exercise: ExerciseCage, Highest: HeightFloor, Droop: DroopNone, RecoveryS: ptr(-5)}.Validate()},
		{"ErrGroupOfOne", "group_size", FlightSession{Exercise: ExerciseCage, Highest: HeightFloor, Droop: DroopNone, Group: true, GroupSize: 1}.Validate()},
		{"ErrWindNoDirection", "wind_dir", TakeoffTrial{Mode: LaunchStanding, Wind: WindStrong, Attempts: []AttemptResult{AttemptClimbed}}.Validate(TrialRules{})},
		{"ErrAttemptResult", "attempt_2", TakeoffTrial{Mode: LaunchStanding, Wind: WindCalm, Attempts: []AttemptResult{AttemptClimbed, "soared"}}.Validate(TrialRules{})},
		{"ErrMinutesNegative", "minutes_on_water", WaterproofTest{MinutesOnWater: -1, Result: WaterproofNo}.Validate()},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			es, ok := tc.err.(ValidationErrors)
			if !ok || es.Field(tc.field) == "" {
				t.Errorf("got %v, want a message on %s", tc.err, tc.field)
			}
		})
	}
}

// TestRecordValidate_FeatherCounts checks the map against the species'
// counts: a red-tailed hawk has 10 primaries, 13 secondaries, 12 rectrices
// (the species table, typical of its family).
func TestRecordValidate_FeatherCounts(t *testing.T) {
	sp := recSpecies(t, "Buteo jamaicensis")
	n := FeatherCountsOf(sp)
	if n != (FeatherCounts{10, 13, 6}) {
		t.Fatalf("counts %+v, want 10, 13, 6 per side", n)
	}
	m := FeatherMap{LeftPrimaries: make([]FeatherStatus, 9)}
	for i := range m.LeftPrimaries {
		m.LeftPrimaries[i] = FeatherIntact
	}
	err := WingMeasurement{Feathers: &m}.Validate(sp)
	if es, ok := err.(ValidationErrors); !ok || !strings.Contains(es.Field("lp"), "expected 10") {
		t.Errorf("9 primaries: got %v, want a count message on lp", err)
	}
}

// TestCheckSpan: more than 25 % off the reference needs confirmation
// [project default]; a span typed in centimetres is suggested as such.
func TestCheckSpan(t *testing.T) {
	sp := recSpecies(t, "Buteo jamaicensis") // reference span from the species table
	ref := sp.SpanMM
	cases := []struct {
		name    string
		mm      float64
		confirm bool
		want    string
	}{
		{"Reference", ref, false, ""},
		{"JustInside", ref * 1.24, false, ""},
		{"ErrLong", ref * 1.3, true, "longer"},
		{"ErrCentimetres", ref / 10, true, "centimetres"},
		{"ErrShort", ref * 0.6, true, "shorter"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := CheckSpan("span_mm", tc.mm, sp)
			if (got != nil) != tc.confirm {
				t.Fatalf("CheckSpan(%v) = %+v, want confirm %v", tc.mm, got, tc.confirm)
			}
			if got != nil && !strings.Contains(got.Message, tc.want) {
				t.Errorf("message %q, want %q", got.Message, tc.want)
			}
		})
	}
}

// TestTrialRules: safe modes from PRACTICE.md's Safety paragraph [common
// practice]: swifts never dropped, loons never tested on land; any drop
// capped at 1 m by default.
func TestTrialRules(t *testing.T) {
	swift := TrialRulesFor(recSpecies(t, "Apus apus"), DefaultDropCapM)
	if swift.Safe(TrialDrop) || !swift.Safe(LaunchHand) {
		t.Errorf("swift safe modes %v: want hand, never drop", swift.SafeModes)
	}
	loon := TrialRulesFor(recSpecies(t, "Gavia immer"), DefaultDropCapM)
	if loon.Safe(LaunchStanding) || loon.Safe(LaunchRunUpLand) || !loon.Safe(LaunchRunUpWater) {
		t.Errorf("loon safe modes %v: want run-up on water only", loon.SafeModes)
	}
	land := TakeoffTrial{Mode: LaunchRunUpLand, Wind: WindCalm, Attempts: []AttemptResult{AttemptFailed}}
	if es, _ := land.Validate(loon).(ValidationErrors); es.Field("mode_reason") == "" {
		t.Errorf("loon on land without a reason accepted")
	}
	land.ModeReason = "vet asked to see the legs push off"
	if err := land.Validate(loon); err != nil {
		t.Errorf("loon on land with a reason: %v", err)
	}
	hawk := TrialRulesFor(recSpecies(t, "Buteo jamaicensis"), DefaultDropCapM)
	drop := TakeoffTrial{Mode: TrialDrop, DropHeightM: ptr(1.5), Wind: WindCalm, Attempts: []AttemptResult{AttemptClimbed}}
	if es, _ := drop.Validate(hawk).(ValidationErrors); !strings.Contains(es.Field("drop_height_m"), "capped at 1 m") {
		t.Errorf("1.5 m drop: %v, want the cap message", es)
	}
	drop.DropHeightM = ptr(1.0)
	if err := drop.Validate(hawk); err != nil {
		t.Errorf("1 m drop for a hawk: %v", err)
	}
}

func TestPrereleaseDays(t *testing.T) {
	t0 := time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC)
	hs := []Housing{
		{From: t0.AddDate(0, 0, 10), EnclosureName: "Aviary", Kind: EnclosureOutdoorAviary, Prerelease: true},
		{From: t0, EnclosureName: "Cage", Kind: EnclosureIndoorCage},
		{From: t0.AddDate(0, 0, 4), EnclosureName: "Flight", Kind: EnclosureFlightCage, Prerelease: true},
	}
	// derived: day 4 to now (day 14) is pre-release housing: 10 days.
	if got := PrereleaseDays(hs, t0.AddDate(0, 0, 14)); math.Abs(got-10) > 1e-9 {
		t.Errorf("PrereleaseDays = %v, want 10", got)
	}
}

// TestEstimateAreaCM2: S_ref·(b/b_ref)² (derived); at the reference span it
// is the reference area.
func TestEstimateAreaCM2(t *testing.T) {
	sp := recSpecies(t, "Buteo jamaicensis")
	if got := EstimateAreaCM2(sp.SpanMM, sp); math.Abs(got-sp.AreaCM2) > 0.05 {
		t.Errorf("at the reference span: %v cm², want %v", got, sp.AreaCM2)
	}
	if got, want := EstimateAreaCM2(sp.SpanMM*0.9, sp), sp.AreaCM2*0.81; math.Abs(got-want) > 0.05 {
		t.Errorf("at 0.9 × span: %v cm², want %v", got, want)
	}
}

package assess

import (
	"encoding/json"
	"slices"
	"testing"
	"time"
)

// TestDefaultThresholds checks each default against where it comes from.
func TestDefaultThresholds(t *testing.T) {
	th := DefaultThresholds()
	tests := []struct {
		id    ThresholdID
		group Group
		want  float64
		prov  Provenance
		from  string // the source of want
	}{
		// PRACTICE.md "Defaults the centre can change" [common practice].
		{ThPasses, GroupRaptor, 10, ProvCommonPractice, "common practice: 10 passes, raptors"},
		{ThPasses, GroupOwl, 10, ProvCommonPractice, "common practice: 10 passes, owls"},
		{ThPasses, GroupSongbird, 6, ProvCommonPractice, "common practice: 6 passes, songbirds"},
		{ThPasses, GroupDove, 6, ProvCommonPractice, "common practice: 6 passes, doves"},
		{ThPasses, GroupCorvid, 6, ProvCommonPractice, "common practice: 6 passes, corvids"},
		{ThPassesScaleCap, "", 2, ProvCommonPractice, "common practice: at most 2 × the default"},
		{ThRecoveryS, "", 120, ProvCommonPractice, "common practice: within 120 s"},
		{ThLandingsMet, "", 0.8, ProvCommonPractice, "common practice: ≥ 80 % met"},
		{ThLandingsBorderline, "", 0.5, ProvCommonPractice, "common practice: 50–80 % borderline"},
		{ThMassTrendFall, "", 0.05, ProvCommonPractice, "common practice: not falling by more than 5 %"},
		{ThMassTrendWeighIns, "", 3, ProvCommonPractice, "common practice: the last three weigh-ins"},
		{ThMassTrendDays, "", 3, ProvCommonPractice, "common practice: spanning ≥ 3 days"},
		{ThMinSpeedMet, "", 1.10, ProvCommonPractice, "common practice: ≤ 1.10 × met"},
		{ThMinSpeedBorderline, "", 1.25, ProvCommonPractice, "common practice: ≤ 1.25 × borderline"},
		{ThStaleDays, "", 7, ProvCommonPractice, "common practice: 7 days"},
		{ThWaterproofDays, "", 3, ProvCommonPractice, "common practice: 3 consecutive days"},
		{ThOuterPrimaryFrom, "", 6, ProvCommonPractice, "common practice: P6 to the outermost"},
		{ThOuterPrimariesMax, "", 0, ProvCommonPractice, "common practice: 0 damaged"},
		{ThRectricesMax, "", 2, ProvCommonPractice, "common practice: ≤ 2 met"},
		{ThFatKaiserLow, "", 1, ProvCommonPractice, "common practice: 1–5 met"},
		{ThFatKaiserHigh, "", 5, ProvCommonPractice, "common practice: 1–5 met"},
		{ThMuscleMet, "", 3, ProvCommonPractice, "common practice: 3 met"},
		{ThMuscleBorderline, "", 2, ProvCommonPractice, "common practice: 2 borderline"},
		{ThDropCapM, "", 1, ProvCommonPractice, "common practice: cap 1 m"},
		// SCIENCE.md [project default].
		{ThExcessPowerMet, "", 0.7, ProvProjectDefault, "SCIENCE.md §5 via the issue: ≥ 0.7 met"},
		{ThExcessPowerBorder, "", 0.4, ProvProjectDefault, "0.4–0.7 borderline"},
		{ThMuscleFactorPrefix + "0", "", 0.45, ProvProjectDefault, "SCIENCE.md §5: score 0 → 0.45"},
		{ThMuscleFactorPrefix + "2", "", 0.85, ProvProjectDefault, "SCIENCE.md §5: score 2 → 0.85"},
		{ThFatFractionKaiser + "4", "", 0.09, ProvProjectDefault, "SCIENCE.md §7: 0–8 score 4 → 0.09"},
		{ThFatFractionHelmsPfx + "5", "", 0.30, ProvProjectDefault, "SCIENCE.md §7: 0–5 score 5 → 0.30"},
		// Published: Hand-Rearing Birds 2020 and Wildpro (PRACTICE.md "Time in pre-release housing").
		{ThPrereleaseDays, GroupSongbird, 14, ProvPublished, "songbirds at least 14 days outdoors"},
		{ThPrereleaseDays, GroupDove, 7, ProvPublished, "pigeons and doves at least 7 days"},
		{ThPrereleaseDays, GroupRail, 7, ProvPublished, "rails and coots 7–14 days (lower end)"},
		{ThPrereleaseDays, GroupOwl, 21, ProvPublished, "young owls at least 3 weeks"},
		{ThPrereleaseDays, GroupSeabird, 14, ProvPublished, "seabirds about 2 weeks"},
		// Published: Minimum Standards 2012 cage lengths, 16 ft = 4.9 m, 12 ft = 3.6 m, 8 ft = 2.4 m.
		{ThCageLengthM, GroupSongbird, 4.9, ProvPublished, "16×8×8 ft recommended pre-release"},
		{ThCageLengthM, GroupDove, 3.6, ProvPublished, "12×8×8 ft"},
		{ThCageLengthM, GroupRail, 2.4, ProvPublished, "8×4×8 ft"},
	}
	for _, tc := range tests {
		t.Run(string(tc.id)+"/"+string(tc.group), func(t *testing.T) {
			s, ok := th.Lookup(tc.id, tc.group)
			if !ok {
				t.Fatalf("no value, want %g (%s)", tc.want, tc.from)
			}
			if *s.Value != tc.want || *s.Default != tc.want || s.Provenance != tc.prov || s.Source == "" {
				t.Errorf("got %g (default %g) %s %q, want %g %s (%s)", *s.Value, *s.Default, s.Provenance, s.Source, tc.want, tc.prov, tc.from)
			}
		})
	}
	// PRACTICE.md: passes for other groups are not assessed until the centre sets a value.
	for _, g := range []Group{GroupSwift, GroupHeron, GroupDabblingDuck, GroupLoonGrebeAlcid} {
		if v, ok := th.Value(ThPasses, g); ok {
			t.Errorf("passes for %s = %g, want no default", g, v)
		}
	}
}

// TestDefaultThresholds_Complete: every threshold can be listed on a
// settings page: a unique id, a label, a provenance of DESIGN.md's
// vocabulary with a source, and a default within its own range.
func TestDefaultThresholds_Complete(t *testing.T) {
	th := DefaultThresholds()
	if err := th.Validate(); err != nil {
		t.Fatalf("defaults do not validate: %v", err)
	}
	seen := map[ThresholdID]bool{}
	for _, x := range th.All() {
		if seen[x.ID] {
			t.Errorf("%s listed twice", x.ID)
		}
		seen[x.ID] = true
		if x.Label == "" || x.Source == "" || !slices.Contains(knownProvenances, x.Provenance) {
			t.Errorf("%s: label %q, provenance %q, source %q", x.ID, x.Label, x.Provenance, x.Source)
		}
		settings := []Setting{x.Setting}
		if x.PerGroup {
			if len(x.Groups) != len(Groups) {
				t.Errorf("%s: %d group settings, want one per group (%d)", x.ID, len(x.Groups), len(Groups))
			}
			settings = nil
			for _, g := range x.Groups {
				settings = append(settings, g.Setting)
			}
		}
		for _, s := range settings {
			if s.Default != nil && !(*s.Default >= x.Min && *s.Default <= x.Max) {
				t.Errorf("%s: default %g outside %g–%g", x.ID, *s.Default, x.Min, x.Max)
			}
		}
	}
}

// TestDefaultThresholds_HelmsDruryDerived: the 0–5 fat limits are derived
// from SCIENCE.md §7's fat fractions: a 0–5 score is met exactly when its
// fat fraction lies within those of 0–8 scores 1 to 5.
func TestDefaultThresholds_HelmsDruryDerived(t *testing.T) {
	th := DefaultThresholds()
	lo, _ := FatFraction(int(th.must(ThFatKaiserLow)), FatScaleKaiser, nil)
	hi, _ := FatFraction(int(th.must(ThFatKaiserHigh)), FatScaleKaiser, nil)
	for s := 0; s <= FatScaleHelmsDrury.MaxScore(); s++ {
		phi, _ := FatFraction(s, FatScaleHelmsDrury, nil)
		got := s >= int(th.must(ThFatHelmsLow)) && s <= int(th.must(ThFatHelmsHigh))
		if want := phi >= lo && phi <= hi; got != want {
			t.Errorf("0–5 score %d (φ %.2f): met = %v, want %v (0–8 met range φ %.2f–%.2f)", s, phi, got, want, lo, hi)
		}
	}
}

// TestThresholds_Set: a centre setting changes one value, records who and
// when, and is refused when out of range or inconsistent.
func TestThresholds_Set(t *testing.T) {
	when := time.Date(2025, 7, 1, 9, 0, 0, 0, time.UTC)
	tests := []struct {
		name  string
		id    ThresholdID
		group Group
		value float64
		field string // "" = accepted
	}{
		{"Recovery", ThRecoveryS, "", 90, ""},
		{"PassesForHerons", ThPasses, GroupHeron, 8, ""},
		{"MuscleFactor", ThMuscleFactorPrefix + "1", "", 0.7, ""},
		{"OutOfRange", ThRecoveryS, "", 5, string(ThRecoveryS)},
		{"NotWhole", ThPasses, GroupRaptor, 7.5, string(ThPasses)},
		{"NaN", ThStaleDays, "", nan(), string(ThStaleDays)},
		{"Unknown", "wingspan-bonus", "", 1, "threshold"},
		{"GroupForPlain", ThRecoveryS, GroupRaptor, 90, string(ThRecoveryS)},
		{"NoGroupForPerGroup", ThPasses, "", 8, string(ThPasses)},
		{"UnknownGroup", ThPasses, "dragons", 8, string(ThPasses)},
		{"BorderlineAboveMet", ThLandingsBorderline, "", 0.9, string(ThLandingsBorderline)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			th := DefaultThresholds()
			before := th
			err := th.Set(tc.id, tc.group, tc.value, "centre admin", when)
			if tc.field != "" {
				if !hasField(err, tc.field) {
					t.Errorf("Set error %v, want one for %s", err, tc.field)
				}
				if string(mustJSON(t, th)) != string(mustJSON(t, DefaultThresholds())) {
					t.Errorf("a refused Set changed the thresholds")
				}
				return
			}
			if err != nil {
				t.Fatalf("Set: %v", err)
			}
			s, _ := th.Lookup(tc.id, tc.group)
			if *s.Value != tc.value || s.Provenance != ProvCentreSetting || s.SetBy != "centre admin" || !s.SetAt.Equal(when) {
				t.Errorf("after Set: %+v, want %g by centre admin as a centre setting", s, tc.value)
			}
			// Value semantics: the copy taken before Set still holds the default.
			if old, ok := before.Lookup(tc.id, tc.group); ok && old.Provenance == ProvCentreSetting {
				t.Errorf("Set changed a copy taken before it")
			}
		})
	}
}

// TestThresholds_Reset: Reset restores the default and its provenance.
func TestThresholds_Reset(t *testing.T) {
	th := DefaultThresholds()
	if err := th.Set(ThPasses, GroupOwl, 12, "centre admin", time.Now()); err != nil {
		t.Fatal(err)
	}
	if err := th.Reset(ThPasses, GroupOwl); err != nil {
		t.Fatal(err)
	}
	s, _ := th.Lookup(ThPasses, GroupOwl)
	if *s.Value != 10 || s.Provenance != ProvCommonPractice || s.SetBy != "" {
		t.Errorf("after Reset: %+v, want 10, common practice", s)
	}
	if err := th.Reset("no-such", ""); !hasField(err, "threshold") {
		t.Errorf("Reset of an unknown id: %v", err)
	}
}

// TestThresholds_ReachEvaluate: a centre's muscle factors and staleness
// reach the assessment, and params lists the values used with their
// provenance.
func TestThresholds_ReachEvaluate(t *testing.T) {
	cf := loadCase(t, "osprey-ready")
	base := assessCase(t, cf, Thresholds{})
	th := DefaultThresholds()
	if err := th.Set(ThMuscleFactorPrefix+"3", "", 0.8, "centre admin", scenarioNow); err != nil {
		t.Fatal(err)
	}
	if err := th.Set(ThStaleDays, "", 1, "centre admin", scenarioNow); err != nil {
		t.Fatal(err)
	}
	a := assessCase(t, cf, th)
	if !(a.Physics.PowerMargin < base.Physics.PowerMargin) {
		t.Errorf("margin %.3f with muscle factor 0.8, want below %.3f", a.Physics.PowerMargin, base.Physics.PowerMargin)
	}
	if c, _ := a.Criterion(CritMass); !c.Stale || a.Outcome.Level != OutcomeContinue {
		t.Errorf("mass stale %v, outcome %s; want stale after one day and continue", c.Stale, a.Outcome.Level)
	}
	i := slices.IndexFunc(a.Params.Thresholds, func(x AppliedThreshold) bool { return x.ID == ThStaleDays })
	if i < 0 || a.Params.Thresholds[i].Value != 1 || a.Params.Thresholds[i].Provenance.Kind != ProvCentreSetting {
		t.Errorf("params does not list the centre's staleness setting: %+v", a.Params.Thresholds)
	}
}

// TestThresholds_JSON: the list a settings page reads, in a fixed order.
func TestThresholds_JSON(t *testing.T) {
	var list []Threshold
	if err := json.Unmarshal(mustJSON(t, DefaultThresholds()), &list); err != nil {
		t.Fatal(err)
	}
	if len(list) != len(DefaultThresholds().All()) || list[0].ID != ThMassLowBand {
		t.Errorf("JSON lists %d thresholds starting %q", len(list), list[0].ID)
	}
}

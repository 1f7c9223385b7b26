package records_test

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// settingsMallard admits a mallard with a weigh-in and one flight session
// of 7 unbroken passes, and returns the store, an admin and the patient.
func settingsMallard(t *testing.T) (*records.Store, records.User, records.Patient) {
	t.Helper()
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	if err := s.SetCentre(ctx, 0, records.Centre{Name: "Test Centre", ElevationM: 50}); err != nil {
		t.Fatal(err)
	}
	admin := recordstest.AddUser(t, s, "ada", records.RoleAdmin)
	in := recordstest.Intake("Anas platyrhynchos", "Mallard", 1000)
	in.AdmittedAt = recordstest.Epoch
	p, err := s.AdmitPatient(ctx, admin.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	at := recordstest.Epoch.Add(2 * time.Hour)
	if _, err := s.AddWeighIn(ctx, admin.ID, p.ID, assess.WeighIn{At: at, MassG: 1000, Fed: assess.FedBefore}, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	length, rec := 10.0, 60
	if _, err := s.AddSession(ctx, admin.ID, p.ID, assess.FlightSession{At: at, Exercise: assess.ExerciseCage, EnclosureName: "Pool flight",
		EnclosureLengthM: &length, Passes: 8, LongestRun: 7, Highest: assess.HeightHighPerch, Landings: 8, LandingsControlled: 8,
		RecoveryS: &rec, Droop: assess.DroopNone}, records.AddOpts{}); err != nil {
		t.Fatal(err)
	}
	return s, admin, p
}

func settingsCriterion(t *testing.T, a assess.Assessment, id assess.CriterionID) assess.Criterion {
	t.Helper()
	c, ok := a.Criterion(id)
	if !ok {
		t.Fatalf("no criterion %s", id)
	}
	return c
}

// TestSettings_ThresholdChangesAssessment: PRACTICE.md sets no pass count
// for dabbling ducks ("other groups: not assessed until the centre sets a
// value" [common practice]); once the centre sets one, the stamina
// criterion is assessed against it, with provenance centre-setting, who and
// when, and an audit row. Resetting brings the default back, audited too.
func TestSettings_ThresholdChangesAssessment(t *testing.T) {
	ctx := context.Background()
	s, admin, p := settingsMallard(t)
	now := recordstest.Epoch.Add(24 * time.Hour)
	before, err := s.Assess(ctx, p, nil, now)
	if err != nil {
		t.Fatal(err)
	}
	if got := settingsCriterion(t, before, assess.CritStamina).Status; got != assess.StatusNotAssessed {
		t.Fatalf("stamina by default: got %s, want not-assessed (PRACTICE.md: no default for ducks)", got)
	}
	st, err := s.SetThreshold(ctx, admin.ID, assess.ThPasses, assess.GroupDabblingDuck, 6, "our pool flight")
	if err != nil {
		t.Fatal(err)
	}
	if st.SetBy != admin.DisplayName || st.Value != 6 || st.Note != "our pool flight" {
		t.Errorf("setting: got %+v", st)
	}
	th, err := s.Thresholds(ctx)
	if err != nil {
		t.Fatal(err)
	}
	set, ok := th.Lookup(assess.ThPasses, assess.GroupDabblingDuck)
	if !ok || *set.Value != 6 || set.Provenance != assess.ProvCentreSetting || set.SetBy != admin.DisplayName || set.SetAt == nil {
		t.Errorf("thresholds: got %+v, want 6 as a centre setting by %s", set, admin.DisplayName)
	}
	after, err := s.Assess(ctx, p, nil, now)
	if err != nil {
		t.Fatal(err)
	}
	c := settingsCriterion(t, after, assess.CritStamina)
	if c.Status != assess.StatusMet || c.Provenance.Kind != assess.ProvCentreSetting {
		t.Errorf("stamina after the setting: got %s (%s), want met as a centre setting", c.Status, c.Provenance.Kind)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{Entity: "threshold_setting"})
	if len(audit) != 1 || audit[0].Action != records.ActionCreate || audit[0].UserID != admin.ID || !strings.Contains(audit[0].After, `"value":6`) {
		t.Fatalf("audit after set: got %+v", audit)
	}
	if _, err := s.SetThreshold(ctx, admin.ID, assess.ThPasses, assess.GroupDabblingDuck, 8, ""); err != nil {
		t.Fatal(err)
	}
	if err := s.ResetThreshold(ctx, admin.ID, assess.ThPasses, assess.GroupDabblingDuck); err != nil {
		t.Fatal(err)
	}
	audit, _ = s.Audit(ctx, records.AuditFilter{Entity: "threshold_setting"})
	var actions []string
	for _, a := range audit {
		actions = append(actions, a.Action)
	}
	if strings.Join(actions, " ") != "remove update create" {
		t.Errorf("audit actions newest first: got %v, want remove update create", actions)
	}
	th, _ = s.Thresholds(ctx)
	if _, ok := th.Lookup(assess.ThPasses, assess.GroupDabblingDuck); ok {
		t.Error("after reset: dabbling ducks still have a pass count")
	}
	if list, _ := s.ThresholdSettings(ctx); len(list) != 0 {
		t.Errorf("after reset: %d settings stored, want 0", len(list))
	}
}

// TestSettings_SetThresholdRefuses: values outside a threshold's range,
// fractions for counts, crossing a paired limit, an unknown threshold or a
// group on a threshold that has none are validation errors naming the
// field, and nothing is stored or audited.
func TestSettings_SetThresholdRefuses(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, s, "ada", records.RoleAdmin)
	cases := []struct {
		name  string
		id    assess.ThresholdID
		group assess.Group
		value float64
		field string
	}{
		{"ErrAboveRange", assess.ThStaleDays, "", 400, "stale-days"},
		{"ErrFractionForCount", assess.ThRecoveryS, "", 90.5, "recovery"},
		// 1.10 met and 1.25 borderline are PRACTICE.md's defaults [common practice].
		{"ErrCrossesPair", assess.ThMinSpeedMet, "", 1.3, "min-speed-ratio-met"},
		{"ErrUnknown", "no-such-threshold", "", 1, "threshold"},
		{"ErrGroupOnSingle", assess.ThStaleDays, assess.GroupGull, 5, "stale-days"},
		{"ErrNoGroup", assess.ThPasses, "", 5, "passes"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := s.SetThreshold(ctx, admin.ID, tc.id, tc.group, tc.value, "")
			var ve *assess.ValidationError
			var ves assess.ValidationErrors
			switch {
			case errors.As(err, &ve):
			case errors.As(err, &ves) && len(ves) > 0:
				ve = ves[0]
			default:
				t.Fatalf("got %v, want a validation error", err)
			}
			if ve.Field != tc.field {
				t.Errorf("field: got %q, want %q", ve.Field, tc.field)
			}
		})
	}
	if list, _ := s.ThresholdSettings(ctx); len(list) != 0 {
		t.Errorf("%d settings stored, want 0", len(list))
	}
	if a, _ := s.Audit(ctx, records.AuditFilter{Entity: "threshold_setting"}); len(a) != 0 {
		t.Errorf("%d audit rows, want 0", len(a))
	}
}

// TestSettings_PairsApplyInAnyOrder: two paired limits moved together
// (borderline up, then met up past the old borderline) apply whatever order
// they are read in.
func TestSettings_PairsApplyInAnyOrder(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, s, "ada", records.RoleAdmin)
	if _, err := s.SetThreshold(ctx, admin.ID, assess.ThMinSpeedMet, "", 1.2, ""); err != nil {
		t.Fatal(err)
	}
	if _, err := s.SetThreshold(ctx, admin.ID, assess.ThMinSpeedBorderline, "", 1.6, ""); err != nil {
		t.Fatal(err)
	}
	if _, err := s.SetThreshold(ctx, admin.ID, assess.ThMinSpeedMet, "", 1.5, ""); err != nil {
		t.Fatal(err)
	}
	list, _ := s.ThresholdSettings(ctx)
	for _, order := range [][]records.ThresholdSetting{list, {list[1], list[0]}} {
		th, skipped := records.ApplyThresholdSettings(order)
		met, _ := th.Value(assess.ThMinSpeedMet, "")
		border, _ := th.Value(assess.ThMinSpeedBorderline, "")
		if len(skipped) != 0 || met != 1.5 || border != 1.6 {
			t.Errorf("order %v: got met %g, borderline %g, skipped %v", order, met, border, skipped)
		}
	}
	// Resetting the borderline limit would put it (1.25) below met (1.5).
	if err := s.ResetThreshold(ctx, admin.ID, assess.ThMinSpeedBorderline, ""); err == nil {
		t.Error("reset crossing a paired limit: got nil, want a validation error")
	}
}

// TestSettings_TablesAndStaleness: the flight model's tables (SCIENCE.md
// §5 muscle factor for score 2 is 0.85 [project default]) and the
// staleness limit (7 days, PRACTICE.md [common practice]) are thresholds
// like any other.
func TestSettings_TablesAndStaleness(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, s, "ada", records.RoleAdmin)
	th, _ := s.Thresholds(ctx)
	if v, _ := th.Value(assess.ThMuscleFactorPrefix+"2", ""); v != 0.85 {
		t.Errorf("muscle factor 2 by default: got %g, want 0.85", v)
	}
	if v, _ := th.Value(assess.ThStaleDays, ""); v != 7 {
		t.Errorf("staleness by default: got %g, want 7", v)
	}
	for id, v := range map[assess.ThresholdID]float64{assess.ThMuscleFactorPrefix + "2": 0.8, assess.ThStaleDays: 10,
		assess.ThFatFractionKaiser + "4": 0.1, assess.ThDropCapM: 0.5} {
		if _, err := s.SetThreshold(ctx, admin.ID, id, "", v, ""); err != nil {
			t.Fatalf("%s: %v", id, err)
		}
	}
	th, _ = s.Thresholds(ctx)
	for id, want := range map[assess.ThresholdID]float64{assess.ThMuscleFactorPrefix + "2": 0.8, assess.ThStaleDays: 10,
		assess.ThFatFractionKaiser + "4": 0.1, assess.ThDropCapM: 0.5} {
		if got, _ := th.Value(id, ""); got != want {
			t.Errorf("%s: got %g, want %g", id, got, want)
		}
	}
}

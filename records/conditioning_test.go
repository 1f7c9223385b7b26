package records_test

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

func condInt(n int) *int           { return &n }
func condFloat(x float64) *float64 { return &x }
func condAt(h int) time.Time       { return recordstest.Epoch.Add(time.Duration(h) * time.Hour) }

// admitHawk returns a store, a staff user and an admitted red-tailed hawk.
func condAdmitHawk(t *testing.T) (*records.Store, records.User, records.Patient) {
	t.Helper()
	s := recordstest.Open(t, nil)
	u := recordstest.AddUser(t, s, "ana", records.RoleStaff)
	p, err := s.AdmitPatient(context.Background(), u.ID, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100))
	if err != nil {
		t.Fatal(err)
	}
	return s, u, p
}

func condIntactMap(n assess.FeatherCounts) *assess.FeatherMap {
	m := &assess.FeatherMap{}
	for _, tr := range assess.FeatherTracts {
		fs := make([]assess.FeatherStatus, n.Count(tr.Prefix))
		for i := range fs {
			fs[i] = assess.FeatherIntact
		}
		*m.Tract(tr.Prefix) = fs
	}
	return m
}

// TestConditioning_EveryKindRoundTrips stores one record of each kind and
// reads it back through its typed list and FillConditioning.
func TestConditioning_EveryKindRoundTrips(t *testing.T) {
	ctx := context.Background()
	s, u, p := condAdmitHawk(t)
	feathers := condIntactMap(assess.FeatherCounts{Primaries: 10, Secondaries: 13, RectricesPerSide: 6})
	feathers.LeftPrimaries[7] = assess.FeatherImped
	add := []struct {
		kind records.Kind
		fn   func() (records.Entry, error)
	}{
		{records.KindWeighIn, func() (records.Entry, error) {
			return s.AddWeighIn(ctx, u.ID, p.ID, assess.WeighIn{At: condAt(1), MassG: 1105, Fed: assess.FedBefore}, records.AddOpts{})
		}},
		{records.KindCondition, func() (records.Entry, error) {
			return s.AddCondition(ctx, u.ID, p.ID, assess.ConditionScore{At: condAt(2), FatScore: condInt(3), FatScale: assess.FatScaleKaiser,
				MuscleScore: condInt(2), BodyCondition: condInt(3)}, records.AddOpts{})
		}},
		{records.KindWing, func() (records.Entry, error) {
			return s.AddWing(ctx, u.ID, p.ID, assess.WingMeasurement{At: condAt(3), SpanMM: condFloat(1190), AreaCM2: condFloat(2250),
				AreaMethod: assess.AreaTraced, ChordMM: condFloat(395), Feathers: feathers}, records.AddOpts{})
		}},
		{records.KindTrial, func() (records.Entry, error) {
			return s.AddTrial(ctx, u.ID, p.ID, assess.TakeoffTrial{At: condAt(4), Mode: assess.LaunchStanding, Surface: "grass",
				Wind: assess.WindLight, WindDir: assess.WindHead,
				Attempts: []assess.AttemptResult{assess.AttemptShort, assess.AttemptClimbed}}, records.AddOpts{})
		}},
		{records.KindSession, func() (records.Entry, error) {
			return s.AddSession(ctx, u.ID, p.ID, assess.FlightSession{At: condAt(5), Exercise: assess.ExerciseCage,
				EnclosureName: "Flight cage 1", EnclosureLengthM: condFloat(15), AirTempC: condFloat(18), DurationS: condInt(900), Passes: 12,
				LongestRun: 8, Highest: assess.HeightHighPerch, Landings: 10, LandingsControlled: 9, RecoveryS: condInt(75),
				Droop: assess.DroopNone}, records.AddOpts{})
		}},
		{records.KindWaterproof, func() (records.Entry, error) {
			return s.AddWaterproof(ctx, u.ID, p.ID, assess.WaterproofTest{At: condAt(6), MinutesOnWater: 20,
				Result: assess.WaterproofYes}, records.AddOpts{})
		}},
		{records.KindHousing, func() (records.Entry, error) {
			return s.AddHousing(ctx, u.ID, p.ID, assess.Housing{From: condAt(7), EnclosureName: "Flight cage 1",
				Kind: assess.EnclosureFlightCage, LengthM: 15, WidthM: 3, HeightM: 3.6, Prerelease: true}, records.AddOpts{})
		}},
	}
	for _, a := range add {
		e, err := a.fn()
		if err != nil || e.Kind != a.kind || e.Version != 1 || e.ByName != "Test ana" {
			t.Fatalf("add %s = %+v, %v", a.kind, e, err)
		}
	}
	var in assess.CaseInputs
	if err := s.FillConditioning(ctx, p.ID, &in); err != nil {
		t.Fatal(err)
	}
	counts := map[string]int{"weigh-ins": len(in.WeighIns), "conditions": len(in.Conditions), "wings": len(in.Wings),
		"trials": len(in.Trials), "sessions": len(in.Sessions), "waterproofing": len(in.Waterproofing), "housing": len(in.Housing)}
	for name, n := range counts {
		if n != 1 {
			t.Errorf("FillConditioning: %d %s, want 1", n, name)
		}
	}
	ws, _ := s.WeighIns(ctx, p.ID)
	if len(ws) != 1 || ws[0].MassG != 1105 || ws[0].Fed != assess.FedBefore || !ws[0].At.Equal(condAt(1)) {
		t.Errorf("WeighIns = %+v", ws)
	}
	wings, _ := s.Wings(ctx, p.ID)
	if len(wings) != 1 || wings[0].Feathers == nil || wings[0].Feathers.LeftPrimaries[7] != assess.FeatherImped || len(wings[0].Feathers.TailRight) != 6 {
		t.Errorf("Wings lost the feather map: %+v", wings)
	}
	trials, _ := s.Trials(ctx, p.ID)
	if len(trials) != 1 || len(trials[0].Attempts) != 2 || trials[0].Attempts[1] != assess.AttemptClimbed {
		t.Errorf("Trials = %+v", trials)
	}
	ss, _ := s.Sessions(ctx, p.ID)
	if len(ss) != 1 || ss[0].LongestRun != 8 || *ss[0].RecoveryS != 75 {
		t.Errorf("Sessions = %+v", ss)
	}
	cs, _ := s.Conditions(ctx, p.ID)
	wp, _ := s.Waterproofing(ctx, p.ID)
	hs, _ := s.HousingHistory(ctx, p.ID)
	if len(cs) != 1 || *cs[0].MuscleScore != 2 || len(wp) != 1 || len(hs) != 1 || !hs[0].Prerelease {
		t.Errorf("Conditions %+v, Waterproofing %+v, HousingHistory %+v", cs, wp, hs)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID})
	if len(audit) != 1+len(add) {
		t.Errorf("%d audit rows, want %d (intake and one per record)", len(audit), 1+len(add))
	}
}

// TestConditioning_RefusesInvalid checks that the store refuses what no
// species makes valid, naming the form field.
func TestConditioning_RefusesInvalid(t *testing.T) {
	ctx := context.Background()
	s, u, p := condAdmitHawk(t)
	at := condAt(1)
	cases := []struct {
		name, field string
		fn          func() (records.Entry, error)
	}{
		{"ErrMassZero", "mass_g", func() (records.Entry, error) {
			return s.AddWeighIn(ctx, u.ID, p.ID, assess.WeighIn{At: at, MassG: 0, Fed: assess.FedBefore}, records.AddOpts{})
		}},
		{"ErrNoTime", "at", func() (records.Entry, error) {
			return s.AddWeighIn(ctx, u.ID, p.ID, assess.WeighIn{MassG: 900, Fed: assess.FedBefore}, records.AddOpts{})
		}},
		{"ErrFatOffScale", "fat_score", func() (records.Entry, error) {
			return s.AddCondition(ctx, u.ID, p.ID, assess.ConditionScore{At: at, FatScore: condInt(6), FatScale: assess.FatScaleHelmsDrury}, records.AddOpts{})
		}},
		{"ErrChordLongerThanHalfSpan", "chord_mm", func() (records.Entry, error) {
			return s.AddWing(ctx, u.ID, p.ID, assess.WingMeasurement{At: at, SpanMM: condFloat(600), ChordMM: condFloat(400)}, records.AddOpts{})
		}},
		{"ErrNoAttempts", "attempts", func() (records.Entry, error) {
			return s.AddTrial(ctx, u.ID, p.ID, assess.TakeoffTrial{At: at, Mode: assess.LaunchStanding, Wind: assess.WindCalm}, records.AddOpts{})
		}},
		{"ErrRunLongerThanPasses", "longest_run", func() (records.Entry, error) {
			return s.AddSession(ctx, u.ID, p.ID, assess.FlightSession{At: at, Exercise: assess.ExerciseCage, Passes: 3, LongestRun: 5,
				Highest: assess.HeightFloor, Droop: assess.DroopNone}, records.AddOpts{})
		}},
		{"ErrWetButWaterproof", "result", func() (records.Entry, error) {
			return s.AddWaterproof(ctx, u.ID, p.ID, assess.WaterproofTest{At: at, MinutesOnWater: 5, WetToSkin: true, Result: assess.WaterproofYes}, records.AddOpts{})
		}},
		{"ErrHousingNoEnclosure", "enclosure", func() (records.Entry, error) {
			return s.AddHousing(ctx, u.ID, p.ID, assess.Housing{From: at, Kind: assess.EnclosurePool, LengthM: 1, WidthM: 1, HeightM: 1}, records.AddOpts{})
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tc.fn()
			var ve assess.ValidationErrors
			if !errors.As(err, &ve) || ve.Field(tc.field) == "" {
				t.Errorf("got %v, want a validation error on %s", err, tc.field)
			}
		})
	}
	all, _ := s.Entries(ctx, p.ID, records.EntryFilter{AllVersions: true})
	if len(all) != 0 {
		t.Errorf("%d entries stored from invalid input, want 0", len(all))
	}
}

// TestConditioning_CorrectAndRemove corrects a wing measurement (a new
// version, the old one kept) and removes a trial with a reason (kept in
// the history, gone from the current records).
func TestConditioning_CorrectAndRemove(t *testing.T) {
	ctx := context.Background()
	s, u, p := condAdmitHawk(t)
	w, err := s.AddWing(ctx, u.ID, p.ID, assess.WingMeasurement{At: condAt(1), SpanMM: condFloat(1120)}, records.AddOpts{})
	if err != nil {
		t.Fatal(err)
	}
	fixed := assess.WingMeasurement{At: condAt(1), SpanMM: condFloat(1210)}
	c, err := s.CorrectEntry(ctx, u.ID, w.Key, w.Version, fixed.At, fixed)
	if err != nil || c.Version != 2 || c.Key != w.Key {
		t.Fatalf("correct = %+v, %v", c, err)
	}
	wings, _ := s.Wings(ctx, p.ID)
	if len(wings) != 1 || *wings[0].SpanMM != 1210 {
		t.Errorf("current wings %+v, want the corrected 1210 mm only", wings)
	}
	vs, _ := s.EntryVersions(ctx, w.Key)
	if len(vs) != 2 || !vs[0].Superseded {
		t.Fatalf("versions %+v, want the original kept and superseded", vs)
	}
	var old assess.WingMeasurement
	if err := vs[0].Decode(&old); err != nil || *old.SpanMM != 1120 {
		t.Errorf("old version %+v, %v; want 1120 mm kept", old, err)
	}

	tr, err := s.AddTrial(ctx, u.ID, p.ID, assess.TakeoffTrial{At: condAt(2), Mode: assess.LaunchStanding, Wind: assess.WindCalm,
		Attempts: []assess.AttemptResult{assess.AttemptFailed}}, records.AddOpts{})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.RemoveEntry(ctx, u.ID, tr.Key, "recorded on the wrong patient"); err != nil {
		t.Fatal(err)
	}
	trials, _ := s.Trials(ctx, p.ID)
	hist, _ := s.Entries(ctx, p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindTrial}, AllVersions: true})
	if len(trials) != 0 || len(hist) != 1 || hist[0].RemovedReason != "recorded on the wrong patient" || hist[0].RemovedBy != "Test ana" {
		t.Errorf("after removal: current %+v, history %+v", trials, hist)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{PatientID: p.ID, Entity: string(records.KindTrial)})
	if len(audit) != 2 || audit[0].Action != records.ActionRemove {
		t.Errorf("trial audit %+v, want create and remove", audit)
	}
}

func TestConditioning_IdempotentAdd(t *testing.T) {
	ctx := context.Background()
	s, u, p := condAdmitHawk(t)
	w := assess.WeighIn{At: condAt(1), MassG: 1090, Fed: assess.FedBefore}
	first, err := s.AddWeighIn(ctx, u.ID, p.ID, w, records.AddOpts{IdempotencyKey: "form-1"})
	if err != nil {
		t.Fatal(err)
	}
	again, err := s.AddWeighIn(ctx, u.ID, p.ID, w, records.AddOpts{IdempotencyKey: "form-1"})
	if !errors.Is(err, records.ErrDuplicate) || again.ID != first.ID {
		t.Errorf("repeat = %+v, %v; want the first entry and ErrDuplicate", again, err)
	}
}

// TestEnclosures_AddUpdateList checks sizes in metres, names unique
// ignoring case, retired enclosures kept, and the audit rows.
func TestEnclosures_AddUpdateList(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	u := recordstest.AddUser(t, s, "rae", records.RoleRehabilitator)
	// 100×20×16 ft, Minimum Standards 2012 for the largest raptors (via
	// Hand-Rearing Birds 2020; PRACTICE.md): 1 ft = 0.3048 m exactly.
	in := records.EnclosureInput{Name: "Long flight", Kind: assess.EnclosureFlightCage, LengthM: 100 * 0.3048, WidthM: 20 * 0.3048, HeightM: 16 * 0.3048}
	e, err := s.AddEnclosure(ctx, u.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(e.LengthM-30.48) > 1e-9 || math.Abs(e.WidthM-6.096) > 1e-9 || math.Abs(e.HeightM-4.8768) > 1e-9 {
		t.Errorf("stored size %v×%v×%v m, want 30.48×6.096×4.8768", e.LengthM, e.WidthM, e.HeightM)
	}
	h := e.Housing(condAt(1))
	if !h.Prerelease || h.LengthM != e.LengthM || h.Kind != assess.EnclosureFlightCage {
		t.Errorf("housing from a flight cage = %+v", h)
	}
	dup := in
	dup.Name = "long FLIGHT"
	if _, err := s.AddEnclosure(ctx, u.ID, dup); !condFieldErr(err, "name") {
		t.Errorf("duplicate name: %v, want a validation error on name", err)
	}
	bad := in
	bad.Name, bad.HeightM = "Bad", 0
	if _, err := s.AddEnclosure(ctx, u.ID, bad); !condFieldErr(err, "height_m") {
		t.Errorf("zero height: %v, want a validation error on height_m", err)
	}
	in.Retired = true
	up, err := s.UpdateEnclosure(ctx, u.ID, e.ID, e.Version, in)
	if err != nil || up.Version != 2 || !up.Retired {
		t.Fatalf("update = %+v, %v", up, err)
	}
	if _, err := s.UpdateEnclosure(ctx, u.ID, e.ID, 1, in); !errors.Is(err, records.ErrConflict) {
		t.Errorf("stale update: %v, want ErrConflict", err)
	}
	active, _ := s.Enclosures(ctx, false)
	all, _ := s.Enclosures(ctx, true)
	if len(active) != 0 || len(all) != 1 {
		t.Errorf("%d active, %d in all; want 0 and 1 after retiring", len(active), len(all))
	}
	byName, err := s.EnclosureByName(ctx, "LONG flight")
	if err != nil || byName.ID != e.ID {
		t.Errorf("EnclosureByName = %+v, %v", byName, err)
	}
	audit, _ := s.Audit(ctx, records.AuditFilter{Entity: "enclosure", EntityID: e.ID})
	if len(audit) != 2 {
		t.Errorf("%d audit rows for an add and an update, want 2", len(audit))
	}
}

func condFieldErr(err error, field string) bool {
	var ve assess.ValidationErrors
	return errors.As(err, &ve) && ve.Field(field) != ""
}

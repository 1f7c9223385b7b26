package assess

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"testing"
	"time"
)

// The record validators under arbitrary input. Every record type is stored
// as its JSON (package records) and read back by the engine, so the
// properties are: Validate never panics; a refusal is ValidationErrors
// whose every entry names a field and says what is wrong; and a record
// Validate accepts survives the store's JSON round trip unchanged and still
// valid ("nothing valid is lost", DESIGN.md).

// fvNow is the clock the clinical validators are given.
var fvNow = time.Date(2026, 6, 15, 9, 0, 0, 0, time.UTC)

// fvKinds are the record types, each decoded from JSON and validated as
// the web layer and the store validate it; sp may be nil (a species not in
// the table).
var fvKinds = []struct {
	name     string
	validate func(data []byte, sp *Species) (rec any, err error, decodeErr error)
}{
	{"weigh-in", fvCheck(func(r WeighIn, _ *Species) error { return r.Validate() })},
	{"condition", fvCheck(func(r ConditionScore, _ *Species) error { return r.Validate() })},
	{"wing", fvCheck(func(r WingMeasurement, sp *Species) error { return r.Validate(sp) })},
	{"trial", fvCheck(func(r TakeoffTrial, sp *Species) error { return r.Validate(TrialRulesFor(sp, DefaultDropCapM)) })},
	{"session", fvCheck(func(r FlightSession, _ *Species) error { return r.Validate() })},
	{"waterproof", fvCheck(func(r WaterproofTest, _ *Species) error { return r.Validate() })},
	{"housing", fvCheck(func(r Housing, _ *Species) error { return r.Validate() })},
	{"exam", fvCheck(func(r Exam, _ *Species) error { return r.Validate(fvNow) })},
	{"diagnosis", fvCheck(func(r Diagnosis, _ *Species) error { return r.Validate(fvNow) })},
	{"treatment", fvCheck(func(r Treatment, _ *Species) error { return r.Validate(fvNow) })},
	{"medication", fvCheck(func(r Medication, _ *Species) error { return r.Validate(fvNow) })},
	{"lab", fvCheck(func(r LabResult, _ *Species) error { return r.Validate(fvNow) })},
	{"disease-test", fvCheck(func(r DiseaseTest, _ *Species) error { return r.Validate(fvNow) })},
	{"clearance", fvCheck(func(r Clearance, _ *Species) error { return r.ValidateChange() })},
}

// fvCheck decodes data into a T and validates it.
func fvCheck[T any](validate func(T, *Species) error) func([]byte, *Species) (any, error, error) {
	return func(data []byte, sp *Species) (any, error, error) {
		var r T
		if err := json.Unmarshal(data, &r); err != nil {
			return nil, nil, err
		}
		return r, validate(r, sp), nil
	}
}

// fvSpecies is the species table the fuzz targets pick from.
var fvSpecies = func() []*Species {
	t, err := LoadSpecies()
	if err != nil {
		panic(err)
	}
	return t.All()
}()

// fvPick returns species i of the table, or nil past its end.
func fvPick(i uint16) *Species {
	if int(i) < len(fvSpecies) {
		return fvSpecies[i]
	}
	return nil
}

// fvRefusal checks that err is a well-formed refusal: ValidationErrors (or
// one ValidationError) with a field and a message in each entry.
func fvRefusal(t *testing.T, what string, err error) {
	t.Helper()
	var es ValidationErrors
	var e1 *ValidationError
	switch {
	case errors.As(err, &es):
		if len(es) == 0 {
			t.Fatalf("%s: empty ValidationErrors", what)
		}
		for _, e := range es {
			if e == nil || e.Field == "" || e.Message == "" {
				t.Fatalf("%s: refusal %#v names no field or says nothing", what, e)
			}
		}
	case errors.As(err, &e1):
		if e1.Field == "" || e1.Message == "" {
			t.Fatalf("%s: refusal %#v names no field or says nothing", what, e1)
		}
	default:
		t.Fatalf("%s: error %v (%T), want ValidationErrors", what, err, err)
	}
}

// FuzzRecordValidate decodes arbitrary JSON as each record type (kind picks
// it) for a species of the table (or none), and checks the validator's
// contract and the store's round trip.
func FuzzRecordValidate(f *testing.F) {
	seeds := []struct {
		kind uint8
		sp   uint16
		data string
	}{
		{0, 0, `{"at":"2026-06-14T08:00:00Z","mass_g":1105,"fed":"before-feed","note":"calm"}`},
		{1, 0, `{"at":"2026-06-14T08:00:00Z","fat_score":2,"fat_scale":"0-8","muscle_score":2,"body_condition":3}`},
		{2, 1, `{"at":"2026-06-14T08:00:00Z","span_mm":1190,"area_cm2":2250,"area_method":"traced","chord_mm":395,"feathers":{"left_primaries":["intact","imped"]}}`},
		{3, 2, `{"at":"2026-06-14T08:00:00Z","mode":"standing","surface":"grass","wind":"light","wind_dir":"head","attempts":["short","climbed"]}`},
		{3, 9999, `{"at":"2026-06-14T08:00:00Z","mode":"drop","drop_height_m":0.8,"mode_reason":"grounded","wind":"calm","attempts":["failed"]}`},
		{4, 0, `{"at":"2026-06-14T08:00:00Z","exercise":"cage","enclosure_length_m":15,"passes":12,"longest_run":8,"highest":"high-perch","landings":10,"landings_controlled":9,"recovery_s":75,"droop":"none","group":true,"group_size":2,"group_cases":["2026-0001","2026-0002"]}`},
		{5, 0, `{"at":"2026-06-14T08:00:00Z","minutes_on_water":20,"wet_to_skin":false,"result":"waterproof"}`},
		{6, 0, `{"from":"2026-06-14T08:00:00Z","enclosure_name":"Flight cage 1","kind":"flight-cage","length_m":15,"width_m":3,"height_m":3.6,"prerelease":true}`},
		{7, 0, `{"at":"2026-06-15T08:30:00Z","findings":{"general":"quiet, alert"},"eye_left":"normal","eye_right":"abnormal","eyes_note":"hyphema","feet_legs":"normal","keel_score":2,"feathers":"not-examined","hydration":"mild"}`},
		{8, 0, `{"at":"2026-06-15T08:30:00Z","condition":"keel abrasion","status":"resolved","resolved_on":"2026-06-15"}`},
		{9, 0, `{"at":"2026-06-15T08:30:00Z","procedure":"wound dressed","notes":"<script>alert(1)</script>"}`},
		{10, 0, `{"at":"2026-06-15T08:30:00Z","drug":"meloxicam","dose":0.5,"dose_unit":"mg/kg","route":"PO","every_hours":24,"first_dose":"08:00","start":"2026-06-15","end":"2026-06-19"}`},
		{11, 0, `{"at":"2026-06-15T08:30:00Z","test":"packed cell volume","value":"38","unit":"%","ref_low":35,"ref_high":55}`},
		{12, 0, `{"at":"2026-06-15T08:30:00Z","test":"avian influenza A, PCR","sample":"oropharyngeal swab","result":"pending"}`},
		{13, 0, `{"item":"vision","state":"not-cleared","note":"re-check the left eye"}`},
		{4, 0, `{"passes":-1,"longest_run":1e400,"recovery_s":99999999999999999999}`},
		{10, 0, `{"at":"0001-01-01T00:00:00Z","dose":1e308,"every_hours":-2147483648,"start":"2026-02-30"}`},
	}
	for _, s := range seeds {
		f.Add(s.kind, s.sp, []byte(s.data))
	}
	f.Fuzz(func(t *testing.T, kind uint8, spIndex uint16, data []byte) {
		k := fvKinds[int(kind)%len(fvKinds)]
		sp := fvPick(spIndex)
		rec, verr, derr := k.validate(data, sp)
		if derr != nil {
			return // not this type's JSON: the store never holds it
		}
		if verr != nil {
			fvRefusal(t, k.name, verr)
			return
		}
		b1, err := json.Marshal(rec)
		if err != nil {
			t.Fatalf("%s: Validate accepted %s, but it cannot be stored: %v", k.name, data, err)
		}
		rec2, verr2, derr2 := k.validate(b1, sp)
		if derr2 != nil || verr2 != nil {
			t.Fatalf("%s: stored as %s, read back: decode %v, validate %v; want the same valid record", k.name, b1, derr2, verr2)
		}
		b2, err := json.Marshal(rec2)
		if err != nil || !bytes.Equal(b1, b2) {
			t.Fatalf("%s: round trip changed the record:\n%s\n%s (%v)", k.name, b1, b2, err)
		}
	})
}

// FuzzMassAndSpanChecks feeds any number to the species checks of a mass
// and a span (the "did you mean kilograms?" messages): they never panic,
// and a finding names its field and says what is wrong.
func FuzzMassAndSpanChecks(f *testing.F) {
	f.Add(1100.0, uint16(0), uint8(0))
	f.Add(1.1, uint16(3), uint8(1))
	f.Add(1100000.0, uint16(7), uint8(2))
	f.Add(math.NaN(), uint16(1), uint8(0))
	f.Add(math.Inf(-1), uint16(9999), uint8(1))
	f.Add(-0.0, uint16(2), uint8(3))
	f.Fuzz(func(t *testing.T, x float64, spIndex uint16, sex uint8) {
		sp := fvPick(spIndex)
		s := []Sex{SexFemale, SexMale, SexUnknown, "other"}[int(sex)%4]
		if sp != nil {
			if mc := CheckMass("mass_g", x, sp, s); mc != nil && (mc.Field == "" || mc.Message == "") {
				t.Fatalf("CheckMass(%g, %s, %s) = %#v: no field or message", x, sp.ScientificName, s, mc)
			}
		}
		if sc := CheckSpan("span_mm", x, sp); sc != nil && (sc.Field == "" || sc.Message == "") {
			t.Fatalf("CheckSpan(%g) = %#v: no field or message", x, sc)
		}
		// An absurd span may overflow to +Inf, which WingMeasurement.Validate
		// refuses; NaN or a negative area never comes out of a number.
		if a := EstimateAreaCM2(x, sp); !math.IsNaN(x) && (math.IsNaN(a) || a < 0) {
			t.Fatalf("EstimateAreaCM2(%g) = %g, want an area ≥ 0 (0: none)", x, a)
		}
	})
}

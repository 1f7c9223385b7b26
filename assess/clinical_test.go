package assess_test

import (
	"slices"
	"strings"
	"testing"
	"time"
	_ "time/tzdata" // the IANA time zone database, for the summer-time case

	"aloft/assess"
)

func medication(every int, first, start, end string) assess.Medication {
	return assess.Medication{At: time.Date(2026, 6, 1, 9, 0, 0, 0, time.UTC), Drug: "test drug", Dose: 1,
		DoseUnit: assess.DoseMg, Route: assess.RouteOral, EveryHours: every, FirstDose: first, Start: start, End: end,
		Prescriber: "Dr Test"}
}

func clockTimes(ts []time.Time) string {
	var ss []string
	for _, t := range ts {
		ss = append(ss, t.Format("15:04"))
	}
	return strings.Join(ss, " ")
}

// The intervals behind the usual prescription abbreviations: SID or q24h
// once a day, BID or q12h twice, TID or q8h three times, QID or q6h four
// times [common practice: veterinary prescription abbreviations].
func TestMedication_DosesOn_Abbreviations(t *testing.T) {
	day := time.Date(2026, 6, 16, 0, 0, 0, 0, time.UTC)
	cases := []struct {
		name  string
		every int
		want  int
	}{
		{"SID", 24, 1}, {"BID", 12, 2}, {"TID", 8, 3}, {"QID", 6, 4},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := medication(tc.every, "08:00", "2026-06-15", "2026-06-20")
			if got := len(m.DosesOn(day)); got != tc.want {
				t.Errorf("every %d h: got %d doses a day, want %d", tc.every, got, tc.want)
			}
		})
	}
}

func TestMedication_DosesOn(t *testing.T) {
	utc := func(d int) time.Time { return time.Date(2026, 6, d, 15, 30, 0, 0, time.UTC) }
	cases := []struct {
		name string
		m    assess.Medication
		day  time.Time
		want string
	}{
		// Derived from the rule in DosesOn's doc comment.
		{"FirstDayFromFirstDose", medication(8, "10:00", "2026-06-15", "2026-06-20"), utc(15), "10:00 18:00"},
		{"LaterDayAllDoses", medication(8, "10:00", "2026-06-15", "2026-06-20"), utc(16), "02:00 10:00 18:00"},
		{"LastDayInclusive", medication(24, "08:00", "2026-06-15", "2026-06-19"), utc(19), "08:00"},
		{"AfterEnd", medication(24, "08:00", "2026-06-15", "2026-06-19"), utc(20), ""},
		{"BeforeStart", medication(24, "08:00", "2026-06-15", "2026-06-19"), utc(14), ""},
		{"SingleDose", medication(0, "09:30", "2026-06-15", "2026-06-15"), utc(15), "09:30"},
		{"EveryTwoDaysOn", medication(48, "08:00", "2026-06-15", "2026-06-25"), utc(17), "08:00"},
		{"EveryTwoDaysOff", medication(48, "08:00", "2026-06-15", "2026-06-25"), utc(18), ""},
		{"Weekly", medication(168, "07:00", "2026-06-01", "2026-06-30"), utc(22), "07:00"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := clockTimes(tc.m.DosesOn(tc.day)); got != tc.want {
				t.Errorf("%d-hourly from %s %s to %s on %s: got %q, want %q", tc.m.EveryHours, tc.m.Start, tc.m.FirstDose,
					tc.m.End, tc.day.Format("2006-01-02"), got, tc.want)
			}
		})
	}
}

// A course of meloxicam every 24 h for 5 days is 5 doses (derived: one a day
// from the first day to the last, inclusive).
func TestMedication_CourseDoseCount(t *testing.T) {
	m := medication(24, "08:00", "2026-06-15", "2026-06-19")
	n := 0
	for d := 10; d <= 25; d++ {
		n += len(m.DosesOn(time.Date(2026, 6, d, 12, 0, 0, 0, time.UTC)))
	}
	if n != 5 {
		t.Errorf("got %d doses over the course, want 5", n)
	}
}

// Summer time in New York began on 8 March 2026 at 02:00 (IANA time zone
// database, America/New_York: second Sunday of March). A once-daily 08:00
// dose stays at 08:00 on the clock, 23 hours after the day before's.
func TestMedication_DosesOn_SummerTime(t *testing.T) {
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Fatal(err)
	}
	m := medication(24, "08:00", "2026-03-06", "2026-03-10")
	before := m.DosesOn(time.Date(2026, 3, 7, 12, 0, 0, 0, ny))
	on := m.DosesOn(time.Date(2026, 3, 8, 12, 0, 0, 0, ny))
	if len(before) != 1 || len(on) != 1 || on[0].Format("15:04") != "08:00" {
		t.Fatalf("doses %v and %v, want one at 08:00 each day", before, on)
	}
	if gap := on[0].Sub(before[0]); gap != 23*time.Hour {
		t.Errorf("interval across the change = %v, want 23h", gap)
	}
}

func TestValidInterval(t *testing.T) {
	for h := -1; h <= 400; h++ {
		want := h == 0 || (h > 0 && h <= 24 && 24%h == 0) || (h > 24 && h%24 == 0 && h <= 168)
		if got := assess.ValidInterval(h); got != want {
			t.Errorf("ValidInterval(%d) = %v, want %v", h, got, want)
		}
	}
}

func TestMedication_Validate(t *testing.T) {
	now := time.Date(2026, 6, 15, 12, 0, 0, 0, time.UTC)
	cases := []struct {
		name  string
		edit  func(*assess.Medication)
		field string
	}{
		{"OK", func(*assess.Medication) {}, ""},
		{"ErrDoseZero", func(m *assess.Medication) { m.Dose = 0 }, "dose"},
		{"ErrDoseNegative", func(m *assess.Medication) { m.Dose = -0.5 }, "dose"},
		{"ErrNoUnit", func(m *assess.Medication) { m.DoseUnit = "" }, "dose_unit"},
		{"ErrEndBeforeStart", func(m *assess.Medication) { m.End = "2026-06-10" }, "end"},
		{"ErrSingleDoseTwoDays", func(m *assess.Medication) { m.EveryHours = 0 }, "end"},
		{"ErrCourseTooLong", func(m *assess.Medication) { m.End = "2027-12-31" }, "end"},
		{"ErrStartNotADate", func(m *assess.Medication) { m.Start = "15/06/2026" }, "start"},
		{"ErrFirstDose", func(m *assess.Medication) { m.FirstDose = "8am" }, "first_dose"},
		{"ErrNoDrug", func(m *assess.Medication) { m.Drug = "" }, "drug"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := medication(24, "08:00", "2026-06-15", "2026-06-19")
			tc.edit(&m)
			err := m.Validate(now)
			if tc.field == "" {
				if err != nil {
					t.Errorf("got %v, want valid", err)
				}
				return
			}
			es, _ := err.(assess.ValidationErrors)
			if es.Field(tc.field) == "" {
				t.Errorf("got %v, want an error on %q", err, tc.field)
			}
		})
	}
}

func TestClinicalValidate(t *testing.T) {
	now := time.Date(2026, 6, 15, 12, 0, 0, 0, time.UTC)
	at := now.Add(-time.Hour)
	lo, hi := 35.0, 55.0
	cases := []struct {
		name  string
		rec   interface{ Validate(time.Time) error }
		field string
	}{
		{"ExamOK", assess.Exam{At: at, EyeLeft: assess.FindingNormal, EyeRight: assess.FindingNormal,
			FeetLegs: assess.FindingNotExamined, Feathers: assess.FindingNotExamined, Hydration: assess.HydrationNormal}, ""},
		{"ErrExamAbnormalEyeNoNote", assess.Exam{At: at, EyeLeft: assess.FindingAbnormal, EyeRight: assess.FindingNormal,
			FeetLegs: assess.FindingNormal, Feathers: assess.FindingNormal, Hydration: assess.HydrationNormal}, "eyes_note"},
		{"ErrExamKeel", assess.Exam{At: at, EyeLeft: assess.FindingNormal, EyeRight: assess.FindingNormal,
			FeetLegs: assess.FindingNormal, Feathers: assess.FindingNormal, Hydration: assess.HydrationNormal, KeelScore: new(4)}, "keel_score"},
		{"ErrExamFuture", assess.Exam{At: now.Add(time.Hour), Notes: "x", EyeLeft: assess.FindingNotExamined, EyeRight: assess.FindingNotExamined,
			FeetLegs: assess.FindingNotExamined, Feathers: assess.FindingNotExamined, Hydration: assess.HydrationNotAssessed}, "at"},
		{"ErrDiagnosisNoCondition", assess.Diagnosis{At: at, Status: assess.DiagnosisActive}, "condition"},
		{"ErrDiagnosisResolvedWhileActive", assess.Diagnosis{At: at, Condition: "x", Status: assess.DiagnosisActive, ResolvedOn: "2026-06-15"}, "resolved_on"},
		{"ErrDiagnosisResolvedBeforeDiagnosed", assess.Diagnosis{At: at, Condition: "x", Status: assess.DiagnosisResolved, ResolvedOn: "2026-06-01"}, "resolved_on"},
		{"LabOK", assess.LabResult{At: at, Test: "PCV", Value: "42", Unit: "%", RefLow: &lo, RefHigh: &hi}, ""},
		{"ErrLabNoValue", assess.LabResult{At: at, Test: "PCV"}, "value"},
		{"ErrLabRangeReversed", assess.LabResult{At: at, Test: "PCV", Value: "42", RefLow: &hi, RefHigh: &lo}, "ref_high"},
		{"DiseaseOK", assess.DiseaseTest{At: at, Test: "avian influenza A, PCR", Result: assess.ResultPending}, ""},
		{"ErrDiseasePendingWithDate", assess.DiseaseTest{At: at, Test: "AI", Result: assess.ResultPending, ResultOn: "2026-06-15"}, "result_on"},
		{"ErrDiseaseResultFuture", assess.DiseaseTest{At: at, Test: "AI", Result: assess.ResultNegative, ResultOn: "2026-06-20"}, "result_on"},
		{"ErrTreatmentNoProcedure", assess.Treatment{At: at}, "procedure"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.rec.Validate(now)
			if tc.field == "" {
				if err != nil {
					t.Errorf("got %v, want valid", err)
				}
				return
			}
			es, _ := err.(assess.ValidationErrors)
			if es.Field(tc.field) == "" {
				t.Errorf("got %v, want an error on %q", err, tc.field)
			}
		})
	}
}

func TestLabResult_RangeFlag(t *testing.T) {
	lo, hi := 35.0, 55.0 // an invented range: the check is the comparison
	cases := []struct{ value, want string }{{"30", "low"}, {"35", ""}, {"55", ""}, {"55,5", "high"}, {"trace", ""}}
	for _, tc := range cases {
		l := assess.LabResult{Value: tc.value, RefLow: &lo, RefHigh: &hi}
		if got := l.RangeFlag(); got != tc.want {
			t.Errorf("RangeFlag(%q in 35–55) = %q, want %q", tc.value, got, tc.want)
		}
	}
}

// Live-prey capture is a clearance item for raptors and owls only
// (PRACTICE.md, after Hand-Rearing Birds 2020, raptor and owl chapters); the
// groups come from the species reference table (AVONET taxonomy).
func TestClearanceItemsFor(t *testing.T) {
	table, err := assess.LoadSpecies()
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		species  string
		livePrey bool
	}{
		{"Falco peregrinus", true}, {"Pandion haliaetus", true}, {"Bubo virginianus", true},
		{"Turdus migratorius", false}, {"Apus apus", false}, {"Gavia immer", false}, {"Anas platyrhynchos", false},
	}
	for _, tc := range cases {
		t.Run(tc.species, func(t *testing.T) {
			sp, err := table.Find(tc.species)
			if err != nil {
				t.Fatal(err)
			}
			items := assess.ClearanceItemsFor(sp.Group)
			if got := slices.Contains(items, assess.ClearLivePrey); got != tc.livePrey {
				t.Errorf("%s (%s): live prey listed %v, want %v", tc.species, sp.Group, got, tc.livePrey)
			}
			if len(items) < len(assess.ClearanceItems)-1 {
				t.Errorf("%s: only %d items", tc.species, len(items))
			}
		})
	}
	if got := assess.ClearanceItemsFor(""); len(got) != len(assess.ClearanceItems) {
		t.Errorf("unknown group: %d items, want all %d", len(got), len(assess.ClearanceItems))
	}
}

func TestClearance_ValidateChange(t *testing.T) {
	cases := []struct {
		name  string
		c     assess.Clearance
		field string
	}{
		{"Cleared", assess.Clearance{Item: assess.ClearVision, State: assess.ClearanceCleared}, ""},
		{"ErrNotClearedNoNote", assess.Clearance{Item: assess.ClearVision, State: assess.ClearanceNotCleared}, "note"},
		{"ErrItem", assess.Clearance{Item: "wings", State: assess.ClearanceCleared}, "item"},
		{"ErrState", assess.Clearance{Item: assess.ClearVision, State: "maybe"}, "state"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			es, _ := tc.c.ValidateChange().(assess.ValidationErrors)
			if (tc.field == "") != (len(es) == 0) || (tc.field != "" && es.Field(tc.field) == "") {
				t.Errorf("got %v, want error on %q", es, tc.field)
			}
		})
	}
}

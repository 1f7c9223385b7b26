package demo

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"time"

	"aloft/assess"
	"aloft/records"
)

// history plans the patient's records, day by day, each checked as the
// form that enters it would check it.
func (h *scaleHist) history() error {
	intake := h.massNow
	t0 := h.admitted.Add(20 * time.Minute).Truncate(time.Minute)
	if err := h.weighIn(t0, 0, intake); err != nil || h.outcome == assess.DispDeadOnArrival {
		return err
	}
	if h.sp.Group != assess.GroupSwift && !h.young && h.rng.IntN(4) == 0 && (h.reason == "hit by car" || h.reason == "caught in netting" || h.reason == "power line collision") {
		p := h.sp.Primaries
		h.broken = []int{p - 1, p}
	}
	steps := []func() error{
		func() error { return h.condition(t0.Add(5 * time.Minute)) },
		func() error { return h.housing(t0.Add(10*time.Minute), h.prof.indoor) },
		func() error { return h.exam(t0.Add(30*time.Minute), false) },
		func() error { return h.wing(t0.Add(40*time.Minute), false) },
		func() error { return h.clinicalStart(t0.Add(50 * time.Minute)) },
	}
	for _, step := range steps {
		if err := step(); err != nil {
			return err
		}
	}
	for d := 1; d <= h.days; d++ {
		if err := h.day(d, intake); err != nil {
			return err
		}
	}
	slices.SortStableFunc(h.plan.recs, func(a, b scaleRec) int { return a.at.Compare(b.at) })
	return nil
}

// day plans the records of day d of the stay.
func (h *scaleHist) day(d int, intake float64) error {
	released := h.outcome == assess.DispReleased || h.outcome == assess.DispInCare
	moveOut := max(h.days*45/100, 3)
	flightFrom := max(h.days/2, moveOut)
	var errs []error
	if d <= 14 || d%2 == 0 {
		errs = append(errs, h.weighIn(h.dayAt(d, 8, h.rng.IntN(30)), d, intake))
	}
	if d%4 == 0 {
		errs = append(errs, h.condition(h.dayAt(d, 8, 40)))
	}
	if d == 1 {
		errs = append(errs, h.clinicalDay1())
	}
	if released && d == moveOut && h.days >= 7 {
		errs = append(errs, h.housing(h.dayAt(d, 12, 0), h.prof.outdoor))
	}
	if released && len(h.broken) > 0 && d == max(h.days/3, 2) {
		errs = append(errs, h.imp(h.dayAt(d, 13, 0)))
	}
	if released && h.days >= 7 && d >= flightFrom && d < h.days {
		q := float64(d-flightFrom+1) / float64(max(h.days-flightFrom, 1))
		if h.prof.flight != "" && (d-flightFrom)%2 == 0 {
			errs = append(errs, h.session(h.dayAt(d, 10, h.rng.IntN(50)), q))
		}
		if h.sp.Group.Aquatic() && d%2 == 1 {
			errs = append(errs, h.waterproof(h.dayAt(d, 11, 30), q))
		}
		if (h.days-d)%4 == 1 {
			errs = append(errs, h.trial(h.dayAt(d, 14, h.rng.IntN(40)), q))
		}
	}
	if h.outcome == assess.DispReleased && d == h.days-1 {
		errs = append(errs, h.exam(h.dayAt(d, 9, 30), true), h.clearAll(h.dayAt(d, 15, 0)))
	}
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// add appends a checked record to the plan, unless it falls after the
// disposition (or now).
func (h *scaleHist) add(kind records.Kind, at time.Time, by int64, v any, verr error) error {
	if !h.fits(at) {
		return nil
	}
	if verr != nil {
		return fmt.Errorf("%s at %s: %w", kind, at.Format(time.RFC3339), verr)
	}
	data, err := json.Marshal(v)
	if err != nil {
		return err
	}
	h.plan.recs = append(h.plan.recs, scaleRec{kind: kind, at: at, by: by, data: data})
	return nil
}

func (h *scaleHist) weighIn(at time.Time, d int, intake float64) error {
	m := intake
	if d > 0 {
		m = h.massOn(d, intake)
	}
	if !h.fits(at) {
		return nil
	}
	h.massNow = m
	w := assess.WeighIn{At: at, MassG: m, Fed: assess.FedBefore}
	if mc := assess.CheckMass("mass_g", m, h.sp, h.plan.intake.Sex); mc != nil && mc.NeedsConfirm {
		w.Note = massNote(h.young)
	}
	return h.add(records.KindWeighIn, at, h.carer(), w, w.Validate())
}

func (h *scaleHist) condition(at time.Time) error {
	ms := h.muscle()
	c := assess.ConditionScore{At: at, MuscleScore: &ms}
	if h.sp.Passerine || h.sp.Group == assess.GroupSwift {
		fat := min(ms+h.rng.IntN(2), 8)
		c.FatScore, c.FatScale = &fat, assess.FatScaleKaiser
	} else {
		bc := min(max(ms+2, 1), 5)
		c.BodyCondition = &bc
	}
	return h.add(records.KindCondition, at, h.carer(), c, c.Validate())
}

func (h *scaleHist) housing(at time.Time, name string) error {
	hs := h.env.enclosures[name].Housing(at)
	return h.add(records.KindHousing, at, h.carer(), hs, hs.Validate())
}

// wing measures the wing: span and area near the species' reference, the
// flattened chord, and the feather map (outer primaries still in pin on a
// young bird; broken ones after an injury, imped once mended).
func (h *scaleHist) wing(at time.Time, imped bool) error {
	if h.plan.intake.AgeClass == "nestling" {
		return nil
	}
	span := math.Round(h.sp.SpanMM * h.between(0.96, 1.03))
	area := assess.EstimateAreaCM2(span, h.sp)
	w := assess.WingMeasurement{At: at, SpanMM: &span, AreaCM2: &area, AreaMethod: assess.AreaEstimated}
	if h.rng.IntN(10) < 3 {
		area = round(area*h.between(0.95, 1.05), 1)
		w.AreaMethod = assess.AreaTraced
	}
	chord := math.Round(h.sp.WingChordMM * h.between(1.02, 1.06))
	w.ChordMM = &chord
	n := assess.FeatherCountsOf(h.sp)
	fm := &assess.FeatherMap{}
	for _, t := range assess.FeatherTracts {
		fs := make([]assess.FeatherStatus, n.Count(t.Prefix))
		for i := range fs {
			fs[i] = assess.FeatherIntact
		}
		*fm.Tract(t.Prefix) = fs
	}
	if h.young && len(fm.LeftPrimaries) >= 2 {
		for _, fs := range []*[]assess.FeatherStatus{&fm.LeftPrimaries, &fm.RightPrimaries} {
			(*fs)[len(*fs)-1], (*fs)[len(*fs)-2] = assess.FeatherPin, assess.FeatherPin
		}
	}
	for _, p := range h.broken {
		fm.LeftPrimaries[p-1] = assess.FeatherBroken
		if imped {
			fm.LeftPrimaries[p-1] = assess.FeatherImped
		}
	}
	w.Feathers = fm
	verr := w.Validate(h.sp)
	if sc := assess.CheckSpan("span_mm", span, h.sp); verr == nil && sc != nil {
		verr = &sc.ValidationError
	}
	return h.add(records.KindWing, at, h.carer(), w, verr)
}

// imp plans the imping of the broken primaries and the wing measured after.
func (h *scaleHist) imp(at time.Time) error {
	p := h.sp.Primaries
	t := assess.Treatment{At: at, Procedure: fmt.Sprintf("Imping of left P%d and P%d with matched moulted feathers", p-1, p),
		Notes: "Carbon-fibre inserts and epoxy; both vanes aligned."}
	if err := h.add(records.KindTreatment, at, h.vet(), t, t.Validate(h.env.now)); err != nil {
		return err
	}
	return h.wing(at.Add(2*time.Hour), true)
}

func (h *scaleHist) vet() int64 { return h.env.users["vet"].ID }

// trial plans a takeoff trial in the species' own launch mode (now and
// then its group's second safe mode, never a drop), better as q, the
// progress through conditioning from 0 to 1, grows.
func (h *scaleHist) trial(at time.Time, q float64) error {
	rules := assess.TrialRulesFor(h.sp, assess.DefaultDropCapM)
	mode := rules.SafeModes[0]
	if len(rules.SafeModes) > 1 && rules.SafeModes[1] != assess.TrialDrop && h.rng.IntN(4) == 0 {
		mode = rules.SafeModes[1]
	}
	t := assess.TakeoffTrial{At: at, Mode: mode, Surface: trialSurface(mode), Wind: assess.WindCalm}
	if h.rng.IntN(2) == 0 {
		t.Wind, t.WindDir = assess.WindLight, []assess.WindDirection{assess.WindHead, assess.WindCross}[h.rng.IntN(2)]
	}
	for range 3 + h.rng.IntN(3) {
		r := h.rng.Float64()
		switch {
		case r < 0.3+0.65*q:
			t.Attempts = append(t.Attempts, assess.AttemptClimbed)
		case r < 0.6+0.35*q:
			t.Attempts = append(t.Attempts, assess.AttemptLevel)
		case r < 0.9:
			t.Attempts = append(t.Attempts, assess.AttemptShort)
		default:
			t.Attempts = append(t.Attempts, assess.AttemptFailed)
		}
	}
	return h.add(records.KindTrial, at, h.carer(), t, t.Validate(rules))
}

func trialSurface(m assess.LaunchMode) string {
	switch m {
	case assess.LaunchWaterSpring, assess.LaunchRunUpWater:
		return "pool, open water"
	case assess.LaunchHand:
		return "from the open hand, padded floor below"
	case assess.LaunchWindOrHeight:
		return "raised platform facing the wind"
	}
	return "short grass"
}

// session plans a flight-cage session, better as q (0 to 1) grows.
func (h *scaleHist) session(at time.Time, q float64) error {
	e := h.env.enclosures[h.prof.flight]
	goal := 10
	if h.sp.MinPasses != nil {
		goal = *h.sp.MinPasses
	}
	passes := max(int(math.Round(2+q*float64(goal+3-2)))+h.rng.IntN(3)-1, 0)
	f := assess.FlightSession{At: at, Exercise: assess.ExerciseCage, EnclosureName: e.Name, EnclosureLengthM: &e.LengthM,
		Passes: passes, LongestRun: max(passes-h.rng.IntN(passes/3+1), 0), Droop: assess.DroopNone}
	temp := round(scaleTempC[at.Month()-1]+h.between(-3, 3), 1)
	dur := 300 + 60*h.rng.IntN(11)
	rec := max(int(150-120*q)+h.rng.IntN(20), 10)
	f.AirTempC, f.DurationS, f.RecoveryS = &temp, &dur, &rec
	f.Landings = max(passes/3, 1)
	f.LandingsControlled = f.Landings
	if q < 0.5 && h.rng.IntN(2) == 0 {
		f.LandingsControlled--
	}
	f.Highest = assess.HeightLowPerch
	switch {
	case q > 0.6:
		f.Highest = assess.HeightCeiling
	case q > 0.3:
		f.Highest = assess.HeightHighPerch
	}
	f.OpenMouth = q < 0.4 && h.rng.IntN(2) == 0
	f.TailBobbing = q < 0.25 && h.rng.IntN(3) == 0
	return h.add(records.KindSession, at, h.carer(), f, f.Validate())
}

// scaleTempC is the invented centre's usual afternoon temperature by month, °C.
var scaleTempC = [12]float64{4, 5, 8, 12, 16, 19, 22, 21, 18, 13, 8, 5}

// waterproof plans a waterproofing test, better as q (0 to 1) grows.
func (h *scaleHist) waterproof(at time.Time, q float64) error {
	w := assess.WaterproofTest{At: at, MinutesOnWater: float64(10 + 5*h.rng.IntN(11)), Result: assess.WaterproofYes}
	switch {
	case q < 0.3:
		w.Result, w.WetToSkin = assess.WaterproofNo, true
	case q < 0.6:
		w.Result = assess.WaterproofPartial
	}
	return h.add(records.KindWaterproof, at, h.carer(), w, w.Validate())
}

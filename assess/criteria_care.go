package assess

import (
	"fmt"
	"slices"
	"time"
)

// Care criteria: waterproofing, time in pre-release housing, enclosure
// size, and each clinical-clearance item.

// critWaterproofing: consecutive calendar days waterproof, ending with the
// latest test, for aquatic groups.
func (e *eval) critWaterproofing() Criterion {
	c := newCriterion(CritWaterproofing)
	need, b, _ := e.speciesOrGroup(ThWaterproofDays, e.sp.WaterproofDays, "waterproof_days")
	c.Provenance = b
	e.use(&c, ThWaterproofDays)
	c.Threshold = fmt.Sprintf("waterproof on %g consecutive days of pool access: met; fewer days or partly wet: borderline; wet to the skin: unmet", need)
	tests := e.in.Waterproofing
	if len(tests) == 0 {
		c.set(StatusNotAssessed, "No waterproofing test is recorded.")
		return c
	}
	last := tests[len(tests)-1]
	wet := map[bool]string{true: ", wet to the skin", false: ""}[last.WetToSkin]
	c.evidence("latest test", fmt.Sprintf("%s after %g min on the water%s", last.Result, last.MinutesOnWater, wet), last.At)
	c.asOf(last.At)
	days := waterproofRun(tests)
	c.evidence("consecutive days waterproof", fmt.Sprintf("%d", days), zeroTime)
	switch {
	case last.WetToSkin || last.Result == WaterproofNo:
		c.set(StatusUnmet, "The latest test found the bird not waterproof.")
	case last.Result == WaterproofPartial:
		c.set(StatusBorderline, "The latest test found the bird partly wet.")
	case float64(days) >= need:
		c.set(StatusMet, fmt.Sprintf("Waterproof on %d consecutive days.", days))
	default:
		c.set(StatusBorderline, fmt.Sprintf("Waterproof on %d consecutive days so far; %g needed.", days, need))
	}
	return c
}

// civilDay is a test's calendar date in its own time zone, as a UTC midnight.
func civilDay(t time.Time) time.Time {
	y, m, d := t.Date()
	return time.Date(y, m, d, 0, 0, 0, 0, time.UTC)
}

// waterproofRun counts the calendar days, back from the latest test's day,
// on which every test was waterproof, each the day before the next.
func waterproofRun(tests []WaterproofTest) int {
	ok := map[time.Time]bool{}
	var days []time.Time
	for _, t := range tests {
		d := civilDay(t.At)
		good := t.Result == WaterproofYes && !t.WetToSkin
		if prev, seen := ok[d]; seen {
			ok[d] = prev && good
			continue
		}
		ok[d] = good
		days = append(days, d)
	}
	slices.SortFunc(days, func(a, b time.Time) int { return a.Compare(b) })
	run := 0
	for i := len(days) - 1; i >= 0 && ok[days[i]]; i-- {
		if i < len(days)-1 && days[i+1].Sub(days[i]) != 24*time.Hour {
			break
		}
		run++
	}
	return run
}

// youngAgeClasses are the age classes the owls' pre-release time applies to
// ("young owls at least 3 weeks hunting live prey").
var youngAgeClasses = []string{"hatchling", "nestling", "fledgling", "juvenile"}

// prereleaseNeed returns the least days in pre-release housing for the
// patient, and false where none applies.
func (e *eval) prereleaseNeed() (float64, Basis, bool) {
	v, b, ok := e.speciesOrGroup(ThPrereleaseDays, e.sp.MinPrereleaseDays, "min_prerelease_days")
	if ok && e.g == GroupOwl && b.Kind != ProvCentreSetting && !slices.Contains(youngAgeClasses, e.in.AgeClass) {
		return 0, Basis{}, false
	}
	return v, b, ok
}

func (e *eval) prereleaseApplies() bool {
	_, _, ok := e.prereleaseNeed()
	return ok
}

// critPrerelease: the days spent so far in housing marked pre-release.
func (e *eval) critPrerelease() Criterion {
	c := newCriterion(CritPrerelease)
	need, b, _ := e.prereleaseNeed()
	c.Provenance = b
	e.use(&c, ThPrereleaseDays)
	c.Threshold = fmt.Sprintf("at least %g days in outdoor pre-release housing", need)
	hs := e.in.Housing
	if len(hs) == 0 {
		c.set(StatusNotAssessed, "No housing is recorded.")
		return c
	}
	var total time.Duration
	current := false
	for i, h := range hs {
		end := e.now
		if i+1 < len(hs) && hs[i+1].From.Before(end) {
			end = hs[i+1].From
		}
		if !h.Prerelease || !end.After(h.From) {
			continue
		}
		total += end.Sub(h.From)
		c.evidence("pre-release stay", fmt.Sprintf("%s (%s), %.1f days", h.EnclosureName, h.Kind, end.Sub(h.From).Hours()/24), h.From)
		if end.Equal(e.now) {
			current = true
		} else {
			c.AsOf = evalPtr(end)
		}
	}
	if current {
		c.AsOf = nil // the stay goes on: the evidence is current
	}
	days := total.Hours() / 24
	if days >= need {
		c.set(StatusMet, fmt.Sprintf("%.1f days in pre-release housing.", days))
	} else {
		c.set(StatusUnmet, fmt.Sprintf("%.1f days in pre-release housing so far; at least %g needed.", days, need))
	}
	return c
}

// enclosureMinimum returns the minimum enclosure for the species: its
// enclosure class (Minimum Standards 2012).
func (e *eval) enclosureMinimum() (EnclosureClass, bool) {
	return Enclosure(e.sp.EnclosureClass)
}

func (e *eval) enclosureApplies() bool {
	_, ok := e.enclosureMinimum()
	return ok
}

// critEnclosure: the latest pre-release enclosure (else the latest one)
// against the species' minimum size.
func (e *eval) critEnclosure() Criterion {
	c := newCriterion(CritEnclosure)
	least, _ := e.enclosureMinimum()
	c.Provenance = Basis{Kind: least.Provenance, Source: least.Citation}
	e.use(&c, ThEnclosureSlack)
	slack := e.th.must(ThEnclosureSlack)
	c.Threshold = fmt.Sprintf("at least %g × %g × %g m (%s ft, %s), less %s for rounding; long enough but too narrow or low: borderline",
		least.LengthM, least.WidthM, least.HeightM, least.Feet, least.Label, pctText(slack))
	h := latestBy(e.in.Housing, func(h *Housing) bool { return h.Prerelease && !h.From.After(e.now) })
	if h == nil {
		h = latestBy(e.in.Housing, func(h *Housing) bool { return !h.From.After(e.now) })
	}
	if h == nil {
		c.set(StatusNotAssessed, "No housing is recorded.")
		return c
	}
	c.evidence("enclosure", fmt.Sprintf("%s (%s): %g × %g × %g m", h.EnclosureName, h.Kind, h.LengthM, h.WidthM, h.HeightM), h.From)
	k := 1 - slack
	long := h.LengthM >= least.LengthM*k
	roomy := h.WidthM >= least.WidthM*k && h.HeightM >= least.HeightM*k
	switch {
	case long && roomy:
		c.set(StatusMet, fmt.Sprintf("%s meets the minimum size.", h.EnclosureName))
	case long:
		c.set(StatusBorderline, fmt.Sprintf("%s is long enough but narrower or lower than the minimum.", h.EnclosureName))
	default:
		c.set(StatusUnmet, fmt.Sprintf("%s is %g m long; the minimum is %g m.", h.EnclosureName, h.LengthM, least.LengthM))
	}
	return c
}

// clearanceBasis: the clearance items and who marks them.
var clearanceBasis = Basis{Kind: ProvPublished,
	Source: "Duerr, R.S. & Gage, L.J. (eds.) 2020. Hand-Rearing Birds, 2nd ed. Wiley (raptor and owl chapters); British Wildlife Rehabilitation Council, release principles"}

// critClearance: the latest state of one clearance item, marked by the
// veterinarian or the licensed rehabilitator.
func (e *eval) critClearance(item ClearanceItem) Criterion {
	c := newCriterion(ClearanceCriterion(item))
	c.Provenance = clearanceBasis
	c.Threshold = "cleared by the veterinarian or the licensed rehabilitator"
	cl := latestBy(e.in.Clearances, func(cl *Clearance) bool { return cl.Item == item })
	if cl == nil {
		c.set(StatusNotAssessed, "Not yet examined by the veterinarian or the licensed rehabilitator.")
		return c
	}
	who := cl.By
	if cl.Role != "" {
		who += " (" + cl.Role + ")"
	}
	text := string(cl.State) + " by " + who
	if cl.Note != "" {
		text += ": " + cl.Note
	}
	c.evidence("clearance", text, cl.At)
	c.asOf(cl.At)
	switch cl.State {
	case ClearanceCleared:
		c.set(StatusMet, "Cleared by "+who+".")
	case ClearanceNotCleared:
		c.set(StatusUnmet, "Not cleared by "+who+".")
		c.Refer = true
	default:
		c.set(StatusNotAssessed, "Marked not yet examined by "+who+".")
	}
	return c
}

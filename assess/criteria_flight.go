package assess

import (
	"fmt"
	"slices"
	"strings"
)

// Flight-model criteria: minimum speed from wing loading, power margin,
// and takeoff (trials decide; the takeoff index adds findings).

// noPhysics is the reason a model criterion is not assessed without Physics.
func (e *eval) noPhysics() string {
	if e.mass == nil {
		return "No weigh-in is recorded, so the flight model was not run."
	}
	return "The flight model could not use these records (see the notes)."
}

// critMinSpeed: V_min from wing loading against the healthy reference's at
// the same site (SCIENCE.md §2).
func (e *eval) critMinSpeed() Criterion {
	c := newCriterion(CritMinSpeed)
	e.use(&c, ThMinSpeedMet, ThMinSpeedBorderline)
	met, border := e.th.must(ThMinSpeedMet), e.th.must(ThMinSpeedBorderline)
	c.Threshold = fmt.Sprintf("minimum speed at most %.2f × the healthy reference's: met; at most %.2f ×: borderline; more: unmet", met, border)
	p := e.phys
	switch {
	case p == nil:
		c.set(StatusNotAssessed, e.noPhysics())
		return c
	case p.Inputs.SpanAssumed:
		c.set(StatusNotAssessed, "No wingspan is measured, so wing loading cannot be compared.")
		return c
	}
	area := fmt.Sprintf("%.0f cm² (traced)", p.Inputs.AreaCM2)
	if p.Inputs.AreaEstimated {
		area = fmt.Sprintf("%.0f cm² (estimated from the span)", p.Inputs.AreaCM2)
		c.finding("The wing area is estimated from the span: the ratio shows mass and span, not feather area lost.")
	}
	c.evidence("wing area", area, *p.Inputs.WingAt)
	c.evidence("wing loading", fmt.Sprintf("%.1f N/m²", p.WingLoadingNM2), zeroTime)
	c.evidence("minimum speed", fmt.Sprintf("%.2f m/s at the site", p.MinSpeedMS), zeroTime)
	c.evidence("healthy reference's minimum speed", fmt.Sprintf("%.2f m/s at the site", p.ReferenceMinSpeedMS), zeroTime)
	c.asOf(p.Inputs.MassAt, *p.Inputs.WingAt)
	r := p.MinSpeedRatio
	switch {
	case r <= met:
		c.set(StatusMet, fmt.Sprintf("Minimum speed is %.2f × the healthy reference's.", r))
	case r <= border:
		c.set(StatusBorderline, fmt.Sprintf("Minimum speed is %.2f × the healthy reference's: takeoff and landing are harder.", r))
	default:
		c.set(StatusUnmet, fmt.Sprintf("Minimum speed is %.2f × the healthy reference's: wing loading is well above a healthy bird's.", r))
	}
	return c
}

// critPowerMargin: the patient's margin and excess-power fraction at the
// site (SCIENCE.md §5).
func (e *eval) critPowerMargin() Criterion {
	c := newCriterion(CritPowerMargin)
	e.use(&c, ThExcessPowerMet, ThExcessPowerBorder)
	met, border := e.th.must(ThExcessPowerMet), e.th.must(ThExcessPowerBorder)
	c.Threshold = fmt.Sprintf("margin below 1: unmet; else share of a healthy bird's spare power at least %.2f: met, at least %.2f: borderline, less: unmet; at a site marginal for the species, read from the margin alone", met, border)
	p := e.phys
	lo, _ := e.sp.MassRangeG(e.in.Sex)
	switch {
	case p == nil:
		c.set(StatusNotAssessed, e.noPhysics())
		return c
	case e.mass.MassG < lo:
		c.set(StatusNotAssessed, "The mass is below the species' range: the model would credit a light bird with power it may not have.")
		return c
	case e.muscle == nil:
		c.set(StatusNotAssessed, "No pectoral muscle score is recorded, so available power is unknown.")
		return c
	}
	c.evidence("power margin", fmt.Sprintf("%.2f", p.PowerMargin), zeroTime)
	c.evidence("healthy margin at the site", fmt.Sprintf("%.2f (%.2f at sea level)", p.ExpectedMarginSite, p.ExpectedMargin), zeroTime)
	c.evidence("excess-power fraction", optionalNum(p.ExcessPowerFraction, "%.2f", "not defined: the site is marginal for the species"), zeroTime)
	c.evidence("climb rate at the minimum-power speed", fmt.Sprintf("%.2f m/s", p.ClimbRateMS), zeroTime)
	c.asOf(p.Inputs.MassAt, e.muscle.At)
	if p.Inputs.WingAt != nil {
		c.asOf(*p.Inputs.WingAt)
	}
	if e.fat != nil {
		c.asOf(e.fat.At)
	}
	m, f := p.PowerMargin, p.ExcessPowerFraction
	switch {
	case m < 1 && f == nil:
		c.set(StatusUnmet, fmt.Sprintf("By the model the bird cannot sustain level flight here (margin %.2f), and even a healthy bird would have almost none: choose a lower or cooler site.", m))
		c.Refer = true
	case m < 1:
		c.set(StatusUnmet, fmt.Sprintf("By the model the bird cannot sustain level flight here: margin %.2f is below 1.", m))
		c.Refer = true
	case f == nil:
		c.set(StatusBorderline, fmt.Sprintf("Margin %.2f, but the site leaves even a healthy bird almost no spare power: consider a lower or cooler site.", m))
	case *f >= met:
		c.set(StatusMet, fmt.Sprintf("The bird has %.0f %% of a healthy bird's spare power here.", *f*100))
	case *f >= border:
		c.set(StatusBorderline, fmt.Sprintf("The bird has %.0f %% of a healthy bird's spare power here.", *f*100))
	default:
		c.set(StatusUnmet, fmt.Sprintf("The bird has only %.0f %% of a healthy bird's spare power here.", *f*100))
	}
	return c
}

func optionalNum(x *float64, format, none string) string {
	if x == nil {
		return none
	}
	return fmt.Sprintf(format, *x)
}

// takeoffBasis: the normal launch mode decides (PRACTICE.md's launch table
// and its sources); the scoring of attempts is common practice.
var takeoffBasis = Basis{Kind: ProvCommonPractice,
	Source: "rehabilitation practice: the bird must rise from the ground in its usual launch (British Wildlife Rehabilitation Council, release principles; Wildlife International, release criteria); the scoring of attempts has no published number"}

// critTakeoff: the latest trial in the species' normal launch mode decides;
// trials in other modes are listed; the takeoff index adds findings and
// flags a failure with ample power as pointing to injury (SCIENCE.md §6).
func (e *eval) critTakeoff() Criterion {
	c := newCriterion(CritTakeoff)
	c.Provenance = takeoffBasis
	e.use(&c, ThDropCapM)
	normal := e.normalLaunch()
	c.Threshold = fmt.Sprintf("in a %s launch, every attempt climbs away: met; some fly or climb: borderline; none: unmet", normal)
	e.trialSafety(&c)
	var latest *TakeoffTrial
	for i := range e.in.Trials {
		t := &e.in.Trials[i]
		if t.Mode == normal {
			latest = t
		} else {
			c.evidence("trial, "+string(t.Mode)+" (does not count)", attemptsText(t.Attempts), t.At)
		}
	}
	if p := e.phys; p != nil {
		c.evidence("takeoff index", fmt.Sprintf("%.2f: %s", p.TakeoffIndex, p.TakeoffBandLabel), zeroTime)
		if normal == LaunchStanding && p.TakeoffBand == TakeoffShort {
			c.finding(fmt.Sprintf("By the model, power is short of a standing launch (takeoff index %.2f).", p.TakeoffIndex))
		}
	}
	if latest == nil {
		c.set(StatusNotAssessed, fmt.Sprintf("No trial in the species' usual launch (%s) is recorded.", normal))
		return c
	}
	c.evidence("trial, "+string(normal), attemptsText(latest.Attempts), latest.At)
	c.asOf(latest.At)
	climbed := countAttempts(latest.Attempts, AttemptClimbed)
	flew := climbed + countAttempts(latest.Attempts, AttemptLevel)
	n := len(latest.Attempts)
	switch {
	case n == 1 && climbed == 1:
		c.set(StatusMet, "Climbed away on its one attempt.")
	case n > 0 && climbed == n:
		c.set(StatusMet, fmt.Sprintf("Climbed away on all %d attempts.", n))
	case flew > 0:
		c.set(StatusBorderline, fmt.Sprintf("Climbed away on %d of %d attempts.", climbed, n))
	default:
		c.set(StatusUnmet, fmt.Sprintf("Did not get away on any of %s.", countNoun(n, "attempt")))
		if p := e.phys; p != nil && p.TakeoffBand == TakeoffPowered {
			c.Refer = true
			c.finding(fmt.Sprintf("The model gives ample power for this launch (takeoff index %.2f): the failure points to pain, an unhealed wing, weak muscle, damaged feathers or the legs.", p.TakeoffIndex))
		}
	}
	return c
}

// trialSafety adds findings and cautions for trials in modes not offered
// for the group without a reason, and drops above the cap.
func (e *eval) trialSafety(c *Criterion) {
	safe := e.g.SafeTrialModes()
	limit := e.th.must(ThDropCapM)
	for _, t := range e.in.Trials {
		day := t.At.Format("2006-01-02")
		if !slices.Contains(safe, t.Mode) && strings.TrimSpace(t.ModeReason) == "" {
			c.finding(fmt.Sprintf("The %s trial on %s is not among the trials offered for %s, and no reason is recorded.", t.Mode, day, strings.ToLower(e.g.Label())))
			e.caution("trial-mode", "A takeoff trial was run in a mode not offered for this group without a stated reason: some trials injure some birds (a loon on land risks keel and hock injuries; swifts are never dropped).", "")
		}
		if t.Mode == TrialDrop && (t.DropHeightM == nil || *t.DropHeightM > limit) {
			h := "an unrecorded height"
			if t.DropHeightM != nil {
				h = fmt.Sprintf("%.1f m", *t.DropHeightM)
			}
			c.finding(fmt.Sprintf("The drop test on %s was from %s; the cap is %g m.", day, h, limit))
			e.caution("drop-height", fmt.Sprintf("Keep drop tests under the centre's cap of %g m.", limit), "")
		}
	}
}

func countAttempts(as []AttemptResult, r AttemptResult) int {
	n := 0
	for _, a := range as {
		if a == r {
			n++
		}
	}
	return n
}

// attemptsText lists attempt results, e.g. "3 attempts: climbed, climbed, level".
func attemptsText(as []AttemptResult) string {
	parts := make([]string, len(as))
	for i, a := range as {
		parts[i] = string(a)
	}
	return fmt.Sprintf("%d attempts: %s", len(as), strings.Join(parts, ", "))
}

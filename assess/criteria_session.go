package assess

import (
	"fmt"
	"math"
)

// Flight-session criteria: stamina, breathing recovery, laboured breathing,
// wing droop, asymmetry, height and landings. Each reads the latest session
// that recorded what it needs; a session recorded for a group is read as
// such and says so.

// sessionBasis is the provenance of the "not seen" flight-quality rules.
var sessionBasis = Basis{Kind: ProvCommonPractice,
	Source: "rehabilitation practice: symmetry, no excessive panting, gaining height from the ground, landing control and no wing droop (case reports of raptor centres; no published number)"}

// groupRead reports whether s describes a group rather than this bird, and
// adds the finding saying so.
func groupRead(c *Criterion, s *FlightSession) bool {
	if !s.Group || s.PerBird {
		return false
	}
	c.finding(fmt.Sprintf("Read from a session recorded for a group of %d birds: the observations describe the group, not this bird.", s.GroupSize))
	return true
}

// speciesOrGroup returns a per-group threshold, with the species row's own
// value (field key of its sources) taking precedence unless the centre has
// set the group's value.
func (e *eval) speciesOrGroup(id ThresholdID, own *int, key string) (float64, Basis, bool) {
	s, ok := e.th.Lookup(id, e.g)
	if ok && s.Provenance == ProvCentreSetting {
		return *s.Value, Basis{Kind: s.Provenance, Source: s.Source}, true
	}
	if own != nil {
		b := Basis{Kind: s.Provenance, Source: s.Source}
		if src, found := e.sp.Sources[key]; found && src.Provenance != "" {
			b = Basis{Kind: src.Provenance, Source: src.Citation}
		} else if b.Kind == "" {
			b = Basis{Kind: ProvCommonPractice, Source: srcCommonPractice}
		}
		return float64(*own), b, true
	}
	if ok {
		return *s.Value, Basis{Kind: s.Provenance, Source: s.Source}, true
	}
	return 0, Basis{}, false
}

// standardLengthM is the flight-cage length the pass count is set for: the
// species' enclosure class, else the group's standard length; 0 = unknown.
func (e *eval) standardLengthM() float64 {
	if ec, ok := Enclosure(e.sp.EnclosureClass); ok {
		return ec.LengthM
	}
	v, _ := e.value(ThCageLengthM)
	return v
}

// critStamina: the longest unbroken run of passes in the latest session
// against the group's count, scaled up for a cage shorter than standard.
func (e *eval) critStamina() Criterion {
	c := newCriterion(CritStamina)
	base, b, ok := e.speciesOrGroup(ThPasses, e.sp.MinPasses, "min_passes")
	c.Provenance = b
	e.use(&c, ThPasses, ThPassesScaleCap, ThCageLengthM)
	if !ok {
		c.Provenance = Basis{Kind: ProvCommonPractice, Source: srcCommonPractice}
		c.Threshold = "no pass count is set for this group"
		c.set(StatusNotAssessed, fmt.Sprintf("No pass count is set for %s: the centre can set one.", lowerLabel(e.g)))
		return c
	}
	s := latestBy(e.in.Sessions, func(*FlightSession) bool { return true })
	if s == nil {
		c.Threshold = fmt.Sprintf("%g unbroken passes the length of a standard cage", base)
		c.set(StatusNotAssessed, "No flight session is recorded.")
		return c
	}
	need, scale := e.passesNeeded(base, s.EnclosureLengthM)
	c.Threshold = fmt.Sprintf("%d unbroken passes: met; as many passes with rests: borderline; fewer: unmet (%g for a standard cage%s)", need, base, scale)
	c.evidence("longest unbroken run", fmt.Sprintf("%d passes", s.LongestRun), s.At)
	c.evidence("passes in all", fmt.Sprintf("%d", s.Passes), s.At)
	if s.EnclosureLengthM != nil {
		c.evidence("flight length", fmt.Sprintf("%.1f m (%s, %s)", *s.EnclosureLengthM, s.EnclosureName, s.Exercise), s.At)
	} else {
		c.finding("The flight length was not recorded, so the pass count is not scaled to it.")
	}
	c.asOf(s.At)
	groupRead(&c, s)
	switch {
	case s.LongestRun >= need:
		c.set(StatusMet, fmt.Sprintf("%d unbroken passes; %d needed.", s.LongestRun, need))
	case s.Passes >= need:
		c.set(StatusBorderline, fmt.Sprintf("%d passes in all, but the longest unbroken run was %d; %d needed.", s.Passes, s.LongestRun, need))
	default:
		c.set(StatusUnmet, fmt.Sprintf("%d passes in all, longest unbroken run %d; %d needed.", s.Passes, s.LongestRun, need))
	}
	return c
}

// passesNeeded scales base by standard length / actual length when the
// flight is shorter than standard, at most by the cap, rounding up.
func (e *eval) passesNeeded(base float64, lengthM *float64) (int, string) {
	std := e.standardLengthM()
	if std <= 0 || lengthM == nil || *lengthM >= std {
		return int(math.Ceil(base - 1e-9)), ""
	}
	f := math.Min(e.th.must(ThPassesScaleCap), std / *lengthM)
	return int(math.Ceil(base*f - 1e-9)), fmt.Sprintf(", × %.2f for a %.1f m flight against the standard %.1f m", f, *lengthM, std)
}

// lowerLabel is the group's label for use inside a sentence.
func lowerLabel(g Group) string {
	l := g.Label()
	if l == "" {
		return string(g)
	}
	return string(l[0]|0x20) + l[1:]
}

// critRecovery: breathing back to resting within the threshold after the
// latest session that timed it.
func (e *eval) critRecovery() Criterion {
	c := newCriterion(CritRecovery)
	e.use(&c, ThRecoveryS)
	limit := int(e.th.must(ThRecoveryS))
	c.Threshold = fmt.Sprintf("breathing back to resting within %d s of the end of a session", limit)
	s := latestBy(e.in.Sessions, func(s *FlightSession) bool { return s.RecoveryS != nil })
	if s == nil {
		c.set(StatusNotAssessed, "No breathing recovery time is recorded.")
		return c
	}
	c.evidence("recovery", fmt.Sprintf("%d s", *s.RecoveryS), s.At)
	c.asOf(s.At)
	groupRead(&c, s)
	if *s.RecoveryS <= limit {
		c.set(StatusMet, fmt.Sprintf("Breathing was back to resting in %d s.", *s.RecoveryS))
	} else {
		c.set(StatusUnmet, fmt.Sprintf("Breathing took %d s to settle; within %d s is expected.", *s.RecoveryS, limit))
	}
	return c
}

// critBreathing: open-mouth breathing or tail bobbing in the latest
// session, read with its air temperature (birds also pant to cool).
func (e *eval) critBreathing() Criterion {
	c := newCriterion(CritBreathing)
	c.Provenance = sessionBasis
	e.use(&c, ThHeatC)
	heat := e.th.must(ThHeatC)
	c.Threshold = fmt.Sprintf("no open-mouth breathing or tail bobbing; seen at %g °C or warmer, or without a temperature: borderline", heat)
	s := latestBy(e.in.Sessions, func(*FlightSession) bool { return true })
	if s == nil {
		c.set(StatusNotAssessed, "No flight session is recorded.")
		return c
	}
	temp := "air temperature not recorded"
	if s.AirTempC != nil {
		temp = fmt.Sprintf("%g °C", *s.AirTempC)
	}
	signs := breathingSigns(s)
	c.evidence("after exercise", joinOr(signs, "no open-mouth breathing, no tail bobbing")+"; "+temp, s.At)
	c.asOf(s.At)
	groupRead(&c, s)
	switch {
	case len(signs) == 0:
		c.set(StatusMet, "No open-mouth breathing or tail bobbing was seen.")
	case s.AirTempC == nil:
		c.set(StatusBorderline, "Laboured breathing was seen, but without the air temperature effort cannot be told from cooling.")
	case *s.AirTempC >= heat:
		c.set(StatusBorderline, fmt.Sprintf("Laboured breathing was seen at %g °C: it may be cooling rather than effort; watch again in cooler air.", *s.AirTempC))
	default:
		c.set(StatusUnmet, fmt.Sprintf("Laboured breathing was seen at %g °C, too cool to be for cooling.", *s.AirTempC))
	}
	return c
}

func breathingSigns(s *FlightSession) []string {
	var out []string
	if s.OpenMouth {
		out = append(out, "open-mouth breathing")
	}
	if s.TailBobbing {
		out = append(out, "tail bobbing")
	}
	return out
}

// critWingDroop: a wing held low in the latest session that recorded it.
// In a bird observed on its own a droop points to injury.
func (e *eval) critWingDroop() Criterion {
	c := newCriterion(CritWingDroop)
	c.Provenance = sessionBasis
	c.Threshold = "no wing droop in or after flight"
	s := latestBy(e.in.Sessions, func(s *FlightSession) bool { return s.Droop != "" })
	if s == nil {
		c.set(StatusNotAssessed, "Wing carriage is not recorded.")
		return c
	}
	c.evidence("wing droop", string(s.Droop), s.At)
	c.asOf(s.At)
	group := groupRead(&c, s)
	switch {
	case s.Droop == DroopNone:
		c.set(StatusMet, "Both wings were carried level.")
	case group:
		c.set(StatusBorderline, fmt.Sprintf("A %s wing droop was seen in the group; which bird is not recorded.", s.Droop))
	default:
		c.set(StatusUnmet, fmt.Sprintf("The %s wing droops: this points to injury or pain.", s.Droop))
		c.Refer = true
	}
	return c
}

// critAsymmetry: uneven wingbeats in the latest session.
func (e *eval) critAsymmetry() Criterion {
	c := newCriterion(CritAsymmetry)
	c.Provenance = sessionBasis
	c.Threshold = "no asymmetry of the wingbeats in flight"
	s := latestBy(e.in.Sessions, func(*FlightSession) bool { return true })
	if s == nil {
		c.set(StatusNotAssessed, "No flight session is recorded.")
		return c
	}
	c.evidence("asymmetry", map[bool]string{true: "seen", false: "not seen"}[s.Asymmetry], s.At)
	c.asOf(s.At)
	group := groupRead(&c, s)
	switch {
	case !s.Asymmetry:
		c.set(StatusMet, "The wingbeats were even.")
	case group:
		c.set(StatusBorderline, "Uneven wingbeats were seen in the group; which bird is not recorded.")
	default:
		c.set(StatusUnmet, "The wingbeats were uneven: this points to injury or pain.")
		c.Refer = true
	}
	return c
}

// critHeight: the highest point reached from the ground in the latest
// session that recorded it.
func (e *eval) critHeight() Criterion {
	c := newCriterion(CritHeight)
	c.Provenance = Basis{Kind: ProvCommonPractice,
		Source: "rehabilitation practice: reaches and lands on the highest perch from the ground; raptors and owls must gain height from the ground (British Wildlife Rehabilitation Council, release principles)"}
	c.Threshold = "reaches the high perch or the ceiling: met; a low perch: borderline; stays low: unmet"
	s := latestBy(e.in.Sessions, func(s *FlightSession) bool { return s.Highest != "" })
	if s == nil {
		c.set(StatusNotAssessed, "The height reached is not recorded.")
		return c
	}
	c.evidence("highest point", string(s.Highest), s.At)
	c.asOf(s.At)
	groupRead(&c, s)
	switch s.Highest {
	case HeightHighPerch, HeightCeiling:
		c.set(StatusMet, "Rose from the ground to the top of the enclosure.")
	case HeightLowPerch:
		c.set(StatusBorderline, "Rose only to a low perch.")
	default:
		c.set(StatusUnmet, "Did not rise off the floor to a perch.")
	}
	return c
}

// critLandings: the share of controlled landings in the latest session
// that counted them.
func (e *eval) critLandings() Criterion {
	c := newCriterion(CritLandings)
	e.use(&c, ThLandingsMet, ThLandingsBorderline)
	met, border := e.th.must(ThLandingsMet), e.th.must(ThLandingsBorderline)
	c.Threshold = fmt.Sprintf("controlled landings at least %s: met; at least %s: borderline; fewer: unmet", pctText(met), pctText(border))
	s := latestBy(e.in.Sessions, func(s *FlightSession) bool { return s.Landings > 0 })
	if s == nil {
		c.set(StatusNotAssessed, "No landings are counted.")
		return c
	}
	share := float64(s.LandingsControlled) / float64(s.Landings)
	c.evidence("controlled landings", fmt.Sprintf("%d of %d", s.LandingsControlled, s.Landings), s.At)
	c.asOf(s.At)
	groupRead(&c, s)
	text := fmt.Sprintf("%d of %d landings were controlled.", s.LandingsControlled, s.Landings)
	switch {
	case share >= met:
		c.set(StatusMet, text)
	case share >= border:
		c.set(StatusBorderline, text)
	default:
		c.set(StatusUnmet, text)
	}
	return c
}

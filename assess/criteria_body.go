package assess

import (
	"fmt"
	"strings"
)

// Body condition and feathers: mass and its trend, fat, pectoral muscle,
// outer primaries and tail.

// rangeOwner names whom a mass range is for: "a female Osprey", "a Song
// Thrush of either sex".
func rangeOwner(s Sex, common string) string {
	switch s {
	case SexFemale, SexMale:
		return "a " + string(s) + " " + common
	}
	return "a " + common + " of either sex"
}

// massBasis is the provenance of the species' mass range for the sex, from
// the species row's sources; a range without one is the species mean ± 25 %
// (the species table's project default).
func (e *eval) massBasis() Basis {
	key := "mass_range_g." + string(e.in.Sex)
	if e.in.Sex != SexFemale && e.in.Sex != SexMale {
		key = "mass_range_g.unknown"
	}
	for _, k := range []string{key, "mass_range_g"} {
		if s, ok := e.sp.Sources[k]; ok && s.Provenance != "" {
			src := s.Citation
			if s.Note != "" {
				src += " (" + s.Note + ")"
			}
			return Basis{Kind: s.Provenance, Source: src}
		}
	}
	return Basis{Kind: ProvProjectDefault, Source: "the species' mean adult mass ± 25 %, the species table's default where no range is published"}
}

// critMass: the latest mass (before feeding where possible) against the
// species' range for the sex and any release guide.
func (e *eval) critMass() Criterion {
	c := newCriterion(CritMass)
	c.Provenance = e.massBasis()
	e.use(&c, ThMassLowBand)
	lo, hi := e.sp.MassRangeG(e.in.Sex)
	band := e.th.must(ThMassLowBand)
	who := rangeOwner(e.in.Sex, e.sp.CommonName)
	c.Threshold = fmt.Sprintf("within %s–%s g, the range for %s; up to %s below it: borderline", fmtG(lo), fmtG(hi), who, pctText(band))
	guide := e.sp.ReleaseMinMassG
	if guide != nil {
		c.Threshold += fmt.Sprintf("; release guide: not below %s g", fmtG(*guide))
	}
	switch {
	case lo <= 0 || hi <= 0:
		c.set(StatusNotAssessed, "The species reference has no mass range for this sex.")
		return c
	case e.mass == nil:
		c.set(StatusNotAssessed, "No weigh-in is recorded.")
		return c
	}
	m := e.mass.MassG
	c.evidence("mass", fmt.Sprintf("%s g (%s)", fmtG(m), e.mass.Fed), e.mass.At)
	c.evidence("range", fmt.Sprintf("%s–%s g for %s", fmtG(lo), fmtG(hi), who), zeroTime)
	if guide != nil {
		c.evidence("release guide", fmt.Sprintf("not below %s g: %s", fmtG(*guide), e.sp.ReleaseGuide), zeroTime)
	}
	c.asOf(e.mass.At)
	if e.mass.Fed != FedBefore {
		c.finding("Weighed after feeding or with the feed state unknown: crop contents may add mass.")
	}
	switch {
	case m < lo*(1-band):
		c.set(StatusUnmet, fmt.Sprintf("%s g is more than %s below the %s g lower end of the range.", fmtG(m), pctText(band), fmtG(lo)))
	case m < lo:
		c.set(StatusBorderline, fmt.Sprintf("%s g is just below the %s g lower end of the range.", fmtG(m), fmtG(lo)))
	case guide != nil && m < *guide:
		c.set(StatusBorderline, fmt.Sprintf("%s g is within the range but below the release guide's %s g.", fmtG(m), fmtG(*guide)))
	case m > hi:
		c.set(StatusBorderline, fmt.Sprintf("%s g is above the %s g upper end of the range: check the fat score and the crop.", fmtG(m), fmtG(hi)))
	default:
		c.set(StatusMet, fmt.Sprintf("%s g is within the range.", fmtG(m)))
	}
	return c
}

// critMassTrend: the change over the latest weigh-ins, when they span
// enough days. Before-feed weigh-ins are read when there are enough of them.
func (e *eval) critMassTrend() Criterion {
	c := newCriterion(CritMassTrend)
	e.use(&c, ThMassTrendFall, ThMassTrendWeighIns, ThMassTrendDays)
	n := int(e.th.must(ThMassTrendWeighIns))
	days := e.th.must(ThMassTrendDays)
	fall := e.th.must(ThMassTrendFall)
	c.Threshold = fmt.Sprintf("over the last %d weigh-ins spanning at least %g days, not falling by more than %s", n, days, pctText(fall))
	ws := e.in.WeighIns
	var before []WeighIn
	for _, w := range ws {
		if w.Fed == FedBefore {
			before = append(before, w)
		}
	}
	if len(before) >= n {
		ws = before
	}
	if len(ws) < n {
		c.set(StatusNotAssessed, fmt.Sprintf("%s recorded; %d are needed for a trend.", countNoun(len(ws), "weigh-in"), n))
		return c
	}
	last := ws[len(ws)-n:]
	for _, w := range last {
		c.evidence("weigh-in", fmt.Sprintf("%s g (%s)", fmtG(w.MassG), w.Fed), w.At)
	}
	c.asOf(last[n-1].At)
	span := last[n-1].At.Sub(last[0].At).Hours() / 24
	if span < days {
		c.set(StatusNotAssessed, fmt.Sprintf("The last %d weigh-ins span %.1f days; at least %g are needed.", n, span, days))
		return c
	}
	change := (last[n-1].MassG - last[0].MassG) / last[0].MassG
	if change < -fall {
		c.set(StatusUnmet, fmt.Sprintf("Mass fell %s over %.1f days.", pctText(-change), span))
	} else {
		c.set(StatusMet, fmt.Sprintf("Mass changed %+.1f %% over %.1f days.", change*100, span))
	}
	return c
}

// critFat: the latest fat score on its scale.
func (e *eval) critFat() Criterion {
	c := newCriterion(CritFat)
	lowID, highID := ThFatKaiserLow, ThFatKaiserHigh
	if e.fat != nil && e.fat.FatScale == FatScaleHelmsDrury {
		lowID, highID = ThFatHelmsLow, ThFatHelmsHigh
	}
	e.use(&c, lowID, highID)
	low, high := int(e.th.must(lowID)), int(e.th.must(highID))
	c.Threshold = fmt.Sprintf("fat score %d–%d: met; lower or higher: borderline (higher is met for a migrant)", low, high)
	if e.fat == nil {
		c.set(StatusNotAssessed, "No fat score is recorded.")
		return c
	}
	s := *e.fat.FatScore
	c.evidence("fat score", fmt.Sprintf("%d on the %s scale", s, e.fat.FatScale), e.fat.At)
	c.asOf(e.fat.At)
	switch {
	case s < low:
		c.set(StatusBorderline, fmt.Sprintf("Fat score %d: little or no reserve for the first days after release.", s))
	case s > high && e.sp.Migrant:
		c.set(StatusMet, fmt.Sprintf("Fat score %d is heavy, read as a migrant's fuel load.", s))
		c.finding("The species migrates: outside its migration season, read this fat load as borderline.")
	case s > high:
		c.set(StatusBorderline, fmt.Sprintf("Fat score %d is a heavy load for a species that does not migrate.", s))
	default:
		c.set(StatusMet, fmt.Sprintf("Fat score %d is within %d–%d.", s, low, high))
	}
	return c
}

// critMuscle: the latest pectoral muscle score (0–3).
func (e *eval) critMuscle() Criterion {
	c := newCriterion(CritMuscle)
	e.use(&c, ThMuscleMet, ThMuscleBorderline)
	met, border := int(e.th.must(ThMuscleMet)), int(e.th.must(ThMuscleBorderline))
	c.Threshold = fmt.Sprintf("pectoral muscle score %d or more: met; %d: borderline; lower: unmet", met, border)
	if e.muscle == nil {
		c.set(StatusNotAssessed, "No pectoral muscle score is recorded.")
		return c
	}
	s := *e.muscle.MuscleScore
	c.evidence("pectoral muscle score", fmt.Sprintf("%d of 3", s), e.muscle.At)
	c.asOf(e.muscle.At)
	switch {
	case s >= met:
		c.set(StatusMet, fmt.Sprintf("Muscle score %d: well-muscled over the keel.", s))
	case s >= border:
		c.set(StatusBorderline, fmt.Sprintf("Muscle score %d: muscle not yet fully rounded.", s))
	default:
		c.set(StatusUnmet, fmt.Sprintf("Muscle score %d: the keel is prominent.", s))
	}
	return c
}

// damagedFeathers lists the damaged feathers of fs from index from
// (0-based) on, named prefix+number, and the imped ones separately.
func damagedFeathers(side, prefix string, fs []FeatherStatus, from int) (damaged, imped []string) {
	for i := from; i < len(fs); i++ {
		name := fmt.Sprintf("%s %s%d", side, prefix, i+1)
		switch {
		case fs[i].Damaged():
			damaged = append(damaged, name+" "+string(fs[i]))
		case fs[i] == FeatherImped:
			imped = append(imped, name)
		}
	}
	return damaged, imped
}

// critOuterPrimaries: damaged outer primaries (P6 to the outermost by
// default) on either wing of the latest feather examination.
func (e *eval) critOuterPrimaries() Criterion {
	c := newCriterion(CritOuterPrimary)
	e.use(&c, ThOuterPrimaryFrom, ThOuterPrimariesMax)
	from, most := int(e.th.must(ThOuterPrimaryFrom)), int(e.th.must(ThOuterPrimariesMax))
	c.Threshold = fmt.Sprintf("at most %d damaged or missing primaries from P%d to the outermost, either wing", most, from)
	if e.feathers == nil || len(e.feathers.Feathers.LeftPrimaries)+len(e.feathers.Feathers.RightPrimaries) == 0 {
		c.set(StatusNotAssessed, "The primaries have not been examined.")
		return c
	}
	f := e.feathers.Feathers
	dl, il := damagedFeathers("left", "P", f.LeftPrimaries, from-1)
	dr, ir := damagedFeathers("right", "P", f.RightPrimaries, from-1)
	damaged := append(dl, dr...)
	c.evidence("outer primaries", joinOr(damaged, "none damaged"), e.feathers.At)
	c.asOf(e.feathers.At)
	if imped := append(il, ir...); len(imped) > 0 {
		c.finding("Imped: " + strings.Join(imped, ", ") + " (counted as flight surfaces).")
	}
	if len(damaged) > most {
		c.set(StatusUnmet, fmt.Sprintf("%s damaged or missing: %s.", damageCount(len(damaged), "outer primary", "outer primaries"), strings.Join(damaged, ", ")))
	} else {
		c.set(StatusMet, damageCount(len(damaged), "outer primary", "outer primaries")+" damaged or missing.")
	}
	return c
}

// critTail: damaged or missing rectrices of the latest examination.
func (e *eval) critTail() Criterion {
	c := newCriterion(CritTail)
	e.use(&c, ThRectricesMax)
	most := int(e.th.must(ThRectricesMax))
	c.Threshold = fmt.Sprintf("at most %d damaged or missing tail feathers: met; more: borderline", most)
	if e.feathers == nil || len(e.feathers.Feathers.TailLeft)+len(e.feathers.Feathers.TailRight) == 0 {
		c.set(StatusNotAssessed, "The tail feathers have not been examined.")
		return c
	}
	f := e.feathers.Feathers
	dl, _ := damagedFeathers("left", "R", f.TailLeft, 0)
	dr, _ := damagedFeathers("right", "R", f.TailRight, 0)
	damaged := append(dl, dr...)
	c.evidence("tail", joinOr(damaged, "none damaged"), e.feathers.At)
	c.asOf(e.feathers.At)
	if len(damaged) > most {
		c.set(StatusBorderline, fmt.Sprintf("%s damaged or missing: %s.", damageCount(len(damaged), "tail feather", "tail feathers"), strings.Join(damaged, ", ")))
	} else {
		c.set(StatusMet, damageCount(len(damaged), "tail feather", "tail feathers")+" damaged or missing.")
	}
	return c
}

// joinOr joins xs, or returns none for an empty list.
func joinOr(xs []string, none string) string {
	if len(xs) == 0 {
		return none
	}
	return strings.Join(xs, ", ")
}

// pctText formats a fraction as a percentage, e.g. 0.05 → "5 %".
func pctText(f float64) string { return fmt.Sprintf("%g %%", roundTo(f*100, 1)) }

// countNoun writes n and the noun, adding "s" unless n is 1: "1 weigh-in", "3 weigh-ins".
func countNoun(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// damageCount words a count of damaged feathers, e.g. "No outer primary is",
// "2 outer primaries are".
func damageCount(n int, one, many string) string {
	switch n {
	case 0:
		return "No " + one + " is"
	case 1:
		return "1 " + one + " is"
	}
	return fmt.Sprintf("%d %s are", n, many)
}

package main

import (
	"cmp"
	"fmt"
	"io"
	"maps"
	"math"
	"slices"
	"strings"

	"aloft/assess"
	"aloft/assess/internal/speciesgen/wingfit"
)

// Measurement filters (issue 4): keep a span-and-area row only when its mass
// is within this factor of AVONET's and its aspect ratio within the range.
const (
	maxMassFactor = 1.5
	minAR, maxAR  = 3.0, 20.0
	// rangeFraction is the default half-width of a mass range [project default].
	rangeFraction = 0.25
	// maxSexMidpointOff is how far the mean of the female and male means may
	// lie from AVONET's pooled mean before the generator refuses them.
	maxSexMidpointOff = 0.25
)

// candidate is one measured span and area (or a sexed mass) for a species.
type candidate struct {
	dataset    string // "alerstam2007" or "birdwingdata"
	sourceName string // the name in the dataset (original study's for BirdWingData)
	iocName    string
	sex        string
	massG      float64
	spanM      float64
	areaM2     float64
	defSpan    string
	defArea    string
	study      string // BirdWingData ref, or the Alerstam table's source column
}

func (c candidate) cite() string {
	if c.dataset == "alerstam2007" {
		return "alerstam2007"
	}
	return bwdCitation(c.study)
}

func (c candidate) note() string {
	sex := ""
	if c.sex == "F" || c.sex == "M" {
		sex = ", sex " + c.sex
	}
	return fmt.Sprintf("row %q%s, %s g, %s", c.sourceName, sex, trim(c.massG), c.defSpan)
}

func trim(v float64) string {
	return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.4f", v), "0"), ".")
}

// goodDefinition: span tip to tip and area with the body strip (A-II), or
// BirdWingData's uncertain reading of the same (A?-II?).
func goodDefinition(c candidate) bool {
	return (c.defSpan == "A-II" || c.defSpan == "A?-II?") && (c.defArea == "A-II" || c.defArea == "A?-II?")
}

// spanOnly reports a row with a span tip to tip but no area, whose mass is
// within a factor of 1.5 of AVONET's.
func spanOnly(c candidate, a *avonetRow) bool {
	f := c.massG / a.MassG
	return (c.defSpan == "A-II" || c.defSpan == "A?-II?") && c.spanM > 0 && c.areaM2 == 0 &&
		f >= 1/maxMassFactor && f <= maxMassFactor
}

// usable applies the filters: all three values, mass within a factor
// of 1.5 of AVONET, aspect ratio 3–20.
func usable(c candidate, a *avonetRow) bool {
	if c.massG <= 0 || c.spanM <= 0 || c.areaM2 <= 0 {
		return false
	}
	f := c.massG / a.MassG
	ar := c.spanM * c.spanM / c.areaM2
	return f >= 1/maxMassFactor && f <= maxMassFactor && ar >= minAR && ar <= maxAR
}

// best picks the measurement to use: A-II before A?-II?, the Alerstam file
// before BirdWingData, unsexed before sexed rows, then the mass nearest
// AVONET's, then by study name.
func best(cs []candidate, a *avonetRow) (candidate, bool) {
	if len(cs) == 0 {
		return candidate{}, false
	}
	rank := func(c candidate) (int, int, int, float64) {
		tier := 0
		if c.defSpan != "A-II" || c.defArea != "A-II" {
			tier = 1
		}
		ds := 0
		if c.dataset != "alerstam2007" {
			ds = 1
		}
		sexed := 0
		if c.sex == "F" || c.sex == "M" {
			sexed = 1
		}
		return tier, ds, sexed, math.Abs(math.Log(c.massG / a.MassG))
	}
	cs = slices.Clone(cs)
	slices.SortFunc(cs, func(x, y candidate) int {
		t1, d1, s1, m1 := rank(x)
		t2, d2, s2, m2 := rank(y)
		return cmp.Or(cmp.Compare(t1, t2), cmp.Compare(d1, d2), cmp.Compare(s1, s2),
			cmp.Compare(m1, m2), cmp.Compare(x.study, y.study), cmp.Compare(x.sourceName, y.sourceName))
	})
	return cs[0], true
}

// sexMeans returns female and male means from the one BirdWingData study
// that gives both sexes and whose midpoint is nearest AVONET's pooled mass,
// among those within maxSexMidpointOff of it.
func sexMeans(j *joined) (f, m float64, study string, rows []candidate) {
	byStudy := map[string][]candidate{}
	for _, c := range j.sexRows {
		byStudy[c.study] = append(byStudy[c.study], c)
	}
	bestOff := math.Inf(1)
	for _, st := range slices.Sorted(maps.Keys(byStudy)) {
		var fs, ms []float64
		for _, c := range byStudy[st] {
			if c.sex == "F" {
				fs = append(fs, c.massG)
			} else {
				ms = append(ms, c.massG)
			}
		}
		if len(fs) == 0 || len(ms) == 0 {
			continue
		}
		mf, mm := mean(fs), mean(ms)
		mid := (mf + mm) / 2
		if math.Abs(mid/j.av.MassG-1) > maxSexMidpointOff {
			continue
		}
		if off := math.Abs(math.Log(mid / j.av.MassG)); off < bestOff {
			bestOff, f, m, study, rows = off, mf, mm, st, byStudy[st]
		}
	}
	return f, m, study, rows
}

func mean(xs []float64) float64 {
	s := 0.0
	for _, x := range xs {
		s += x
	}
	return s / float64(len(xs))
}

// massCaution notes when the wing datasets' rows (at least two, within a
// factor of 2 of AVONET's mass) have a median more than 20 % from AVONET's:
// the mean may not suit the population, and the mass criterion should be
// read with care.
func massCaution(j *joined) string {
	var ms []float64
	for _, m := range j.allMasses {
		if f := m / j.av.MassG; f >= 0.5 && f <= 2 { // beyond: transcription errors, not populations
			ms = append(ms, m)
		}
	}
	if len(ms) < 2 {
		return ""
	}
	slices.Sort(ms)
	med := ms[len(ms)/2]
	if len(ms)%2 == 0 {
		med = (ms[len(ms)/2-1] + ms[len(ms)/2]) / 2
	}
	if math.Abs(med/j.av.MassG-1) <= 0.2 {
		return ""
	}
	return fmt.Sprintf(". Caution: the %d rows of Alerstam et al. 2007 and BirdWingData studies for this species have a median of %s g (%s–%s g)",
		len(ms), trim(med), trim(ms[0]), trim(ms[len(ms)-1]))
}

func massRanges(m assess.MassesG) assess.MassRanges {
	rng := func(v float64) assess.RangeG {
		return assess.RangeG{Min: round(v*(1-rangeFraction), 1), Max: round(v*(1+rangeFraction), 1)}
	}
	f, ml := rng(m.Pooled), rng(m.Pooled)
	if m.Female != nil {
		f, ml = rng(*m.Female), rng(*m.Male)
	}
	return assess.MassRanges{Female: f, Male: ml,
		Unknown: assess.RangeG{Min: min(f.Min, ml.Min), Max: max(f.Max, ml.Max)}}
}

// estimate fills span and area of unmeasured species from the regression
// and logs the leave-one-out errors on the measured ones.
func estimate(bs []*built, log io.Writer) error {
	pts := make([]wingfit.Point, len(bs))
	for i, b := range bs {
		pts[i] = wingfit.Point{Name: b.sp.ScientificName, Group: string(b.sp.Group), Order: b.sp.Order,
			MassG: b.sp.MassG.Pooled, ChordMM: b.sp.WingChordMM, Measured: b.measured != nil}
		if b.measured != nil {
			pts[i].SpanMM, pts[i].AreaCM2 = b.sp.SpanMM, b.sp.AreaCM2
		}
	}
	model, err := wingfit.Fit(pts)
	if err != nil {
		return err
	}
	for i, b := range bs {
		if b.measured != nil {
			continue
		}
		e := model.Estimate(pts[i])
		b.sp.SpanAreaEstimated = true
		b.src["span_area_estimated"] = "wingfit"
		if b.spanRow != nil {
			// Measured span: scale the estimated area by geometric similarity,
			// S = S_est·(b/b_est)² (SCIENCE.md §2).
			b.sp.AreaCM2 = round(e.AreaCM2*math.Pow(b.sp.SpanMM/e.SpanMM, 2), 1)
			b.src["area_cm2"] = wingfitKey(e) + "|area scaled to the measured span by (b/b_est)², geometric similarity"
			continue
		}
		b.sp.SpanMM, b.sp.AreaCM2 = round(e.SpanMM, 0), round(e.AreaCM2, 1)
		b.src["span_mm"], b.src["area_cm2"] = wingfitKey(e), wingfitKey(e)
	}
	h, err := wingfit.LeaveOneOut(pts)
	if err != nil {
		return err
	}
	fmt.Fprintf(log, "hold-out (leave one out) over %d measured species: median |error| span %.1f %%, area %.1f %%\n",
		h.N, 100*h.MedianSpan, 100*h.MedianArea)
	for _, k := range model.Pools() {
		c, _ := model.Span(k)
		fmt.Fprintf(log, "  pool %-28s n=%3d  %s\n", k, c.N, coefNote("span", c))
	}
	return nil
}

// wingfitKey returns the citation key of the pool behind an estimate,
// adding a citation that states its fitted equations on first use.
func wingfitKey(e wingfit.Estimate) string {
	key := "wingfit:" + e.Span.Pool
	if e.OffsetN > 0 {
		key += fmt.Sprintf("+offset(%+.4f,%+.4f)", e.SpanOffset, e.AreaOffset)
	}
	if _, ok := citations[key]; !ok {
		c := citations["wingfit"]
		c.Citation += ". " + coefNote("span", e.Span) + "; " + coefNote("area", e.Area)
		if e.OffsetN > 0 {
			c.Citation += fmt.Sprintf("; plus the group's shrunk mean residual from %d measured species: %+.4f (ln span), %+.4f (ln area)",
				e.OffsetN, e.SpanOffset, e.AreaOffset)
		}
		citations[key] = c
	}
	return key
}

func coefNote(what string, c wingfit.Coef) string {
	return fmt.Sprintf("pool %s (n=%d): ln %s = %.4f + %.4f·ln(mass g) + %.4f·ln(chord mm)",
		c.Pool, c.N, what, c.B0, c.BMass, c.BChord)
}

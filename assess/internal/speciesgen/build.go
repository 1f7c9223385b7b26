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

// inputs are the datasets and the hand-kept lists.
type inputs struct {
	avonet   map[string]*avonetRow
	avTable  *table
	alerstam []alerstamRow
	alTable  *table
	bwd      []bwdRow
	sel      []selected
	sexMass  map[string]sexMass
	res      *resolver
	// inAlerstam: species with a row in the Alerstam et al. 2007 file, whose
	// copies among BirdWingData's rows are skipped.
	inAlerstam map[string]bool
}

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

// joined is what the datasets hold for one selected species.
type joined struct {
	av         *avonetRow
	sel        selected
	candidates []candidate // span-and-area rows that pass the filters
	spanOnly   []candidate // rows with a span but no area that pass the mass filter
	sexRows    []candidate // BirdWingData rows with a sex
	iocExact   string      // IOC English name where the IOC name is the BirdLife name
	iocSame    string      // IOC English name of a synonym of the same taxon
	iocSameSci string
	alRows     [][]string // Alerstam rows joined to the species
	allMasses  []float64  // every row's mass (0 = none), both datasets
}

// join attaches every dataset row to the selected species it names.
func join(in *inputs) (map[string]*joined, error) {
	js := map[string]*joined{}
	for _, s := range in.sel {
		a, ok := in.avonet[s.Name]
		if !ok {
			return nil, fmt.Errorf("selection: %q is not an AVONET (BirdLife) species", s.Name)
		}
		if _, dup := js[s.Name]; dup {
			return nil, fmt.Errorf("selection: %q listed twice", s.Name)
		}
		if a.MassG <= 0 || a.ChordMM <= 0 {
			return nil, fmt.Errorf("selection: %q lacks AVONET mass or wing length", s.Name)
		}
		js[s.Name] = &joined{av: a, sel: s}
	}
	if err := joinAlerstam(in, js); err != nil {
		return nil, err
	}
	return js, joinBirdWing(in, js)
}

func joinAlerstam(in *inputs, js map[string]*joined) error {
	for _, r := range in.alerstam {
		sp, rel, ok := in.res.resolve("alerstam2007", r.Species)
		if !ok {
			return fmt.Errorf("alerstam2007: %q joins no AVONET species: add a synonym", r.Species)
		}
		j := js[sp]
		if j == nil || rel == relExclude {
			continue
		}
		j.alRows = append(j.alRows, r.raw)
		j.allMasses = append(j.allMasses, r.MassG)
		c := candidate{dataset: "alerstam2007", sourceName: r.Species, massG: r.MassG, spanM: r.SpanM,
			areaM2: r.AreaM2, defSpan: "A-II", defArea: "A-II", study: "Alerstam et al. 2007, Table S1"}
		if usable(c, j.av) {
			j.candidates = append(j.candidates, c)
		}
	}
	return nil
}

func joinBirdWing(in *inputs, js map[string]*joined) error {
	var bad []string
	for _, b := range in.bwd {
		sp, _, excluded, other := in.res.resolveBWD(b)
		if other != "" && js[sp] != nil && js[other] != nil {
			bad = append(bad, fmt.Sprintf("birdwingdata row %q / %q (%s) joins both %s and %s: add a synonym",
				b.Original, b.IOC, b.Ref, sp, other))
			continue
		}
		j := js[sp]
		if excluded || j == nil {
			continue
		}
		iocSp, iocRel, _ := in.res.resolve("birdwingdata", b.IOC)
		switch {
		case b.English == "" || iocSp != sp:
		case iocRel == relExact && j.iocExact == "":
			j.iocExact = b.English
		case iocRel == relSame && j.iocSame == "":
			j.iocSame, j.iocSameSci = b.English, b.IOC
		}
		if b.Ref == "Alerstam 2007" && in.inAlerstam[sp] {
			continue // the same values as the Alerstam et al. 2007 file, used from there
		}
		j.allMasses = append(j.allMasses, b.MassG)
		c := candidate{dataset: "birdwingdata", sourceName: b.Original, iocName: b.IOC, sex: b.Sex,
			massG: b.MassG, spanM: b.SpanM, areaM2: b.AreaM2, defSpan: b.DefSpan, defArea: b.DefArea, study: b.Ref}
		if (b.Sex == "F" || b.Sex == "M") && b.MassG > 0 {
			j.sexRows = append(j.sexRows, c)
		}
		switch {
		case goodDefinition(c) && usable(c, j.av):
			j.candidates = append(j.candidates, c)
		case spanOnly(c, j.av):
			j.spanOnly = append(j.spanOnly, c)
		}
	}
	if len(bad) > 0 {
		return fmt.Errorf("%s", strings.Join(bad, "\n"))
	}
	return nil
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

// built is one finished species with what it used.
type built struct {
	sp       assess.Species
	src      map[string]string
	measured *candidate // the span-and-area row used
	spanRow  *candidate // the span-only row used, area estimated
	sexRows  []candidate
	alRows   [][]string
}

// buildAll assembles every selected species, then estimates the missing
// spans and areas and reports the hold-out errors to log.
func buildAll(in *inputs, log io.Writer) ([]*built, error) {
	js, err := join(in)
	if err != nil {
		return nil, err
	}
	var out []*built
	for _, s := range in.sel {
		b, err := buildOne(js[s.Name], in, log)
		if err != nil {
			return nil, err
		}
		out = append(out, b)
	}
	if err := estimate(out, log); err != nil {
		return nil, err
	}
	order := map[assess.Group]int{}
	for i, g := range assess.Groups {
		order[g] = i
	}
	seq := func(b *built) int { return js[b.sp.ScientificName].av.Seq }
	slices.SortStableFunc(out, func(x, y *built) int {
		return cmp.Or(cmp.Compare(order[x.sp.Group], order[y.sp.Group]), cmp.Compare(seq(x), seq(y)))
	})
	return out, checkNames(out)
}

func buildOne(j *joined, in *inputs, log io.Writer) (*built, error) {
	a := j.av
	grp, err := groupOf(a)
	if err != nil {
		return nil, err
	}
	b := &built{src: map[string]string{}, alRows: j.alRows}
	s := &b.sp
	s.ScientificName, s.Family, s.Order, s.Group = a.Name, a.Family, a.Order, grp
	b.src["scientific_name"] = "birdlife"
	b.src["family"], b.src["order"] = "avonet", "avonet"
	b.src["group"] = "group-rule"
	if err := setNames(b, j, log); err != nil {
		return nil, err
	}
	s.Passerine = a.Order == "Passeriformes"
	b.src["passerine"] = "avonet-passerine"
	s.Migration, s.Migrant = a.Migration, a.Migration >= 2
	b.src["migration"] = "avonet-migration"
	b.src["migrant"] = "avonet-migrant"
	if err := setMasses(b, j, in); err != nil {
		return nil, err
	}
	s.WingChordMM = a.ChordMM
	b.src["wing_chord_mm"] = "avonet-chord"
	if c, ok := best(j.candidates, a); ok {
		b.measured = &c
		s.SpanMM, s.AreaCM2 = round(c.spanM*1000, 0), round(c.areaM2*1e4, 1)
		b.src["span_mm"] = c.cite() + "|" + c.note()
		b.src["area_cm2"], b.src["span_area_estimated"] = c.cite()+"|see span_mm", c.cite()+"|see span_mm"
	} else if c, ok := best(j.spanOnly, a); ok {
		b.spanRow = &c
		s.SpanMM = round(c.spanM*1000, 0)
		b.src["span_mm"] = c.cite() + "|" + c.note()
	}
	return b, setPractice(b, grp, a)
}

func setNames(b *built, j *joined, log io.Writer) error {
	s := &b.sp
	switch {
	case j.sel.Override:
		s.CommonName = j.sel.CommonName
		b.src["common_name"] = "name-memory|chosen over the IOC name, whose taxon is only part of BirdLife's"
	case j.iocExact != "":
		s.CommonName = j.iocExact
		b.src["common_name"] = "ioc-bwd"
	case j.iocSame != "":
		s.CommonName = j.iocSame
		b.src["common_name"] = "ioc-bwd|IOC name of " + j.iocSameSci + ", the same taxon"
	case j.sel.CommonName != "":
		s.CommonName = j.sel.CommonName
		b.src["common_name"] = "name-memory"
	default:
		return fmt.Errorf("%s: no English name: add one to selection.csv", s.ScientificName)
	}
	if !j.sel.Override && j.sel.CommonName != "" && s.CommonName != j.sel.CommonName {
		fmt.Fprintf(log, "note: %s: selection.csv name %q unused, IOC gives %q\n", s.ScientificName, j.sel.CommonName, s.CommonName)
	}
	if len(j.sel.OtherNames) > 0 {
		s.OtherNames = j.sel.OtherNames
		b.src["other_names"] = "name-memory|names in common use in North America or Britain"
	}
	return nil
}

func setMasses(b *built, j *joined, in *inputs) error {
	s, a := &b.sp, j.av
	s.MassG.Pooled = a.MassG
	b.src["mass_g.pooled"] = "avonet-mass|Mass.Source " + a.MassSource + massCaution(j)
	if f, m, study, rows := sexMeans(j); study != "" {
		s.MassG.Female, s.MassG.Male = ptr(round(f, 1)), ptr(round(m, 1))
		b.sexRows = rows
		b.src["mass_g.female"] = bwdCitation(study) + "|mean of its female rows"
		b.src["mass_g.male"] = bwdCitation(study) + "|mean of its male rows"
	} else if sm, ok := in.sexMass[a.Name]; ok {
		s.MassG.Female, s.MassG.Male = ptr(sm.FemaleG), ptr(sm.MaleG)
		b.src["mass_g.female"], b.src["mass_g.male"] = "mass-memory", "mass-memory"
	}
	if s.MassG.Female != nil {
		mid := (*s.MassG.Female + *s.MassG.Male) / 2
		if math.Abs(mid/a.MassG-1) > maxSexMidpointOff {
			return fmt.Errorf("%s: female %g g and male %g g average %g g, far from AVONET's %g g",
				a.Name, *s.MassG.Female, *s.MassG.Male, mid, a.MassG)
		}
	}
	s.MassRanges = massRanges(s.MassG)
	b.src["mass_range_g"] = "range-default"
	return nil
}

// massCaution notes when the wing datasets' rows (at least two) have a
// median mass more than 20 % from AVONET's: the mean may not suit the
// population, and the mass criterion should be read with care.
func massCaution(j *joined) string {
	var ms []float64
	for _, m := range j.allMasses {
		if m > 0 {
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

func setPractice(b *built, grp assess.Group, a *avonetRow) error {
	s := &b.sp
	s.LaunchMode = grp.NormalLaunchMode()
	b.src["launch_mode"] = launchCitation[grp]
	s.FlightStyle = flyingStyle(grp, a)
	b.src["flight_style"] = "style-memory"
	f, err := featherCounts(a)
	if err != nil {
		return err
	}
	s.Primaries, s.Secondaries, s.Rectrices = f[0], f[1], f[2]
	b.src["primaries"], b.src["secondaries"], b.src["rectrices"] = "feathers-memory", "feathers-memory", "feathers-memory"
	if id, cite := enclosure(grp, a); id != "" {
		s.EnclosureClass = id
		b.src["enclosure_class"] = cite
	}
	s.MinPasses = minPasses(grp)
	b.src["min_passes"] = "passes-common"
	if s.MinPasses == nil {
		b.src["min_passes"] = "passes-common|no default for this group: not assessed until the centre sets a value"
	}
	if d, note := prerelease(grp, a); d != nil {
		s.MinPrereleaseDays = d
		b.src["min_prerelease_days"] = "prerelease-hrb|" + note
	}
	if grp.Aquatic() {
		s.WaterproofDays = intp(3)
		b.src["waterproof_days"] = "waterproof-memory"
	}
	setReleaseGuide(b, grp)
	b.src["expected_margin"] = "margin-default"
	b.src["flight_muscle_fraction"] = "muscle-unknown"
	return nil
}

func setReleaseGuide(b *built, grp assess.Group) {
	s := &b.sp
	switch {
	case s.ScientificName == "Apus apus":
		s.ReleaseMinMassG = ptr(40)
		s.ReleaseGuide = "release mass not below about 40 g, though a small bird may be fine at 35 g"
		b.src["release_min_mass_g"] = "swift-guide|not below about 40 g; a small bird may be fine at 35 g"
		b.src["release_guide"] = "swift-guide"
	case grp == assess.GroupRaptor && s.Migrant:
		s.ReleaseGuide = "a migratory raptor is released at least 2–3 weeks before the earliest migration dates"
		b.src["release_guide"] = "prerelease-hrb"
	case grp == assess.GroupOwl:
		s.ReleaseGuide = "young owls: at least 3 weeks in pre-release housing hunting live prey"
		b.src["release_guide"] = "prerelease-hrb"
	}
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

// checkNames refuses a name used by two species (after folding case,
// hyphens and spaces as assess does).
func checkNames(bs []*built) error {
	seen := map[string]string{}
	for _, b := range bs {
		names := append([]string{b.sp.ScientificName, b.sp.CommonName}, b.sp.OtherNames...)
		for _, n := range names {
			k := strings.Join(strings.Fields(strings.ToLower(strings.NewReplacer("-", " ", "_", " ").Replace(n))), " ")
			if prev, ok := seen[k]; ok && prev != b.sp.ScientificName {
				return fmt.Errorf("name %q used by %s and %s", n, prev, b.sp.ScientificName)
			}
			seen[k] = b.sp.ScientificName
		}
	}
	return nil
}

func ptr(v float64) *float64 { return &v }

func round(v float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(v*p) / p
}

package main

import (
	"cmp"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"aloft/assess"
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

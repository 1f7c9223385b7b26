package assess

import "fmt"

// The defaults of the assessment's thresholds and where each comes from.

// Sources of the defaults, in words for people.
const (
	srcCommonPractice = "rehabilitation practice: a rule of thumb of the trade with no published number"
	srcProjectDefault = "Aloft's own default, to be reviewed by the centre"
	srcPrerelease     = "Duerr & Gage (eds.) 2020, Hand-Rearing Birds, 2nd ed. (species chapters); Wildpro, UK Wildlife: First Aid and Care, release technique pages"
	srcMinStandards   = "Miller, E.A. (ed.) 2012. Minimum Standards for Wildlife Rehabilitation, 4th ed. NWRA & IWRC, via Duerr & Gage (eds.) 2020"
	srcFlightModel    = "Aloft's flight-model default (SCIENCE.md §5, §7), centre-editable"
)

// DefaultThresholds returns every threshold at its default: the rules of
// thumb of rehabilitation practice ("common-practice": no published number
// sets a pass mark for passes, height or breathing recovery), published
// minimum times and enclosure sizes, and this project's own defaults, each
// labelled so. Every call builds a fresh value.
func DefaultThresholds() Thresholds {
	cp, pd := ProvCommonPractice, ProvProjectDefault
	list := []Threshold{
		num(ThMassLowBand, "Below the species' mass range by at most this share: borderline, not unmet", "fraction", 0, 0.5, false,
			0.05, pd, srcProjectDefault),
		num(ThMassTrendFall, "Mass trend: the largest fall over the last weigh-ins that still counts as steady", "fraction", 0, 0.5, false,
			0.05, cp, srcCommonPractice),
		num(ThMassTrendWeighIns, "Mass trend: number of latest weigh-ins read", "", 2, 20, true, 3, cp, srcCommonPractice),
		num(ThMassTrendDays, "Mass trend: the weigh-ins read must span at least", "days", 1, 60, true, 3, cp, srcCommonPractice),
		num(ThFatKaiserLow, "Fat score (0–8 scale, Kaiser 1993): lowest score met", "", 0, 8, true, 1, cp, srcCommonPractice),
		num(ThFatKaiserHigh, "Fat score (0–8 scale): highest score met (above: borderline unless a migrant)", "", 0, 8, true, 5, cp, srcCommonPractice),
		num(ThFatHelmsLow, "Fat score (0–5 scale, Helms & Drury 1960): lowest score met", "", 0, 5, true, 1, ProvDerived,
			"derived: the 0–5 scores whose fat fraction (SCIENCE.md §7) lies within that of 0–8 scores 1 to 5"),
		num(ThFatHelmsHigh, "Fat score (0–5 scale): highest score met (above: borderline unless a migrant)", "", 0, 5, true, 3, ProvDerived,
			"derived: the 0–5 scores whose fat fraction (SCIENCE.md §7) lies within that of 0–8 scores 1 to 5"),
		num(ThMuscleMet, "Pectoral muscle score (0–3): met at or above", "", 0, 3, true, 3, cp, srcCommonPractice),
		num(ThMuscleBorderline, "Pectoral muscle score (0–3): borderline at or above (below: unmet)", "", 0, 3, true, 2, cp, srcCommonPractice),
		num(ThOuterPrimaryFrom, "Outer primaries: counted from this primary (P1 innermost) to the outermost", "", 1, 12, true, 6, cp, srcCommonPractice),
		num(ThOuterPrimariesMax, "Outer primaries damaged or missing, either wing, at most", "", 0, 10, true, 0, cp, srcCommonPractice),
		num(ThRectricesMax, "Tail feathers damaged or missing, at most (more: borderline)", "", 0, 24, true, 2, cp, srcCommonPractice),
		num(ThMinSpeedMet, "Minimum speed from wing loading over the healthy reference's: met at or below", "×", 1, 3, false, 1.10, cp, srcCommonPractice),
		num(ThMinSpeedBorderline, "Minimum speed over the reference's: borderline at or below (above: unmet)", "×", 1, 3, false, 1.25, cp, srcCommonPractice),
		num(ThExcessPowerMet, "Share of a healthy bird's spare power: met at or above", "fraction", 0, 1.5, false, 0.7, pd, srcProjectDefault),
		num(ThExcessPowerBorder, "Share of a healthy bird's spare power: borderline at or above (below: unmet)", "fraction", 0, 1.5, false, 0.4, pd, srcProjectDefault),
		num(ThDropCapM, "Drop test: highest drop", "m", 0, 5, false, 1, cp, srcCommonPractice),
		perGroup(ThPasses, "Unbroken passes the length of the flight cage", "", 1, 100, true, cp, srcCommonPractice,
			map[Group]float64{GroupRaptor: 10, GroupOwl: 10, GroupSongbird: 6, GroupDove: 6, GroupCorvid: 6}),
		num(ThPassesScaleCap, "Passes in a cage shorter than standard: the count grows with standard/actual length, at most this many times", "×", 1, 5, false,
			2, cp, srcCommonPractice),
		perGroup(ThCageLengthM, "Standard flight-cage length for the group, where the species has no enclosure class", "m", 1, 100, false,
			ProvPublished, srcMinStandards,
			map[Group]float64{GroupSongbird: 4.9, GroupDove: 3.6, GroupHeron: 5, GroupRail: 2.4}),
		num(ThRecoveryS, "Breathing back to resting after a session, within", "s", 10, 1800, true, 120, cp, srcCommonPractice),
		num(ThHeatC, "Air temperature at or above which open-mouth breathing may be cooling rather than effort", "°C", 10, 45, false,
			25, pd, srcProjectDefault),
		num(ThLandingsMet, "Controlled landings: met at or above", "fraction", 0, 1, false, 0.8, cp, srcCommonPractice),
		num(ThLandingsBorderline, "Controlled landings: borderline at or above (below: unmet)", "fraction", 0, 1, false, 0.5, cp, srcCommonPractice),
		num(ThWaterproofDays, "Consecutive days waterproof on continuous pool access (loons, grebes, auks, seabirds, waterfowl; the groups from memory)", "days",
			1, 30, true, 3, cp, srcCommonPractice),
		perGroup(ThPrereleaseDays, "Least time in outdoor pre-release housing (owls: young owls hunting live prey)", "days", 1, 90, true,
			ProvPublished, srcPrerelease,
			map[Group]float64{GroupSongbird: 14, GroupDove: 7, GroupRail: 7, GroupOwl: 21, GroupSeabird: 14, GroupLoonGrebeAlcid: 14}),
		num(ThEnclosureSlack, "Enclosure size: slack for the rounding of the source's feet to metres", "fraction", 0, 0.2, false, 0.02, ProvDerived,
			"derived: the minimum sizes are feet converted to metres and rounded to 0.1 m"),
		num(ThStaleDays, "Evidence older than this is stale and cannot support the top outcome", "days", 1, 90, true, 7, cp, srcCommonPractice),
	}
	return Thresholds{list: append(list, modelTables()...)}
}

// modelTables are the flight model's muscle-factor and fat-fraction tables
// (SCIENCE.md §5, §7), one threshold per score, so the centre can change
// any entry.
func modelTables() []Threshold {
	pd := ProvProjectDefault
	var list []Threshold
	for i, q := range defaultMuscleFactors {
		list = append(list, num(ThMuscleFactorPrefix+ThresholdID(fmt.Sprint(i)),
			fmt.Sprintf("Flight-muscle factor for pectoral muscle score %d (share of a healthy bird's sustained power)", i),
			"fraction", 0.01, 2, false, q, pd, srcFlightModel))
	}
	for i, f := range defaultFatKaiser {
		list = append(list, num(ThFatFractionKaiser+ThresholdID(fmt.Sprint(i)),
			fmt.Sprintf("Fat fraction for fat score %d on the 0–8 scale", i), "fraction", 0, maxFatFraction, false, f, pd, srcFlightModel))
	}
	for i, f := range defaultFatHelmsDrury {
		list = append(list, num(ThFatFractionHelmsPfx+ThresholdID(fmt.Sprint(i)),
			fmt.Sprintf("Fat fraction for fat score %d on the 0–5 scale", i), "fraction", 0, maxFatFraction, false, f, pd, srcFlightModel))
	}
	return list
}

// num makes a threshold with one setting.
func num(id ThresholdID, label, unit string, lo, hi float64, integer bool, def float64, p Provenance, src string) Threshold {
	return Threshold{ID: id, Label: label, Unit: unit, Min: lo, Max: hi, Integer: integer,
		Setting: Setting{Default: &def, Value: evalPtr(def), Provenance: p, Source: src}}
}

// perGroup makes a group-dependent threshold: a setting for every group,
// unset (nil) where defaults has no value.
func perGroup(id ThresholdID, label, unit string, lo, hi float64, integer bool, p Provenance, src string, defaults map[Group]float64) Threshold {
	t := Threshold{ID: id, Label: label, Unit: unit, Min: lo, Max: hi, Integer: integer, PerGroup: true,
		Setting: Setting{Provenance: p, Source: src}}
	for _, g := range Groups {
		s := Setting{Provenance: p, Source: src}
		if v, ok := defaults[g]; ok {
			s.Default, s.Value = evalPtr(v), evalPtr(v)
		} else {
			s.Provenance, s.Source = "", "no default: not assessed until the centre sets a value"
		}
		t.Groups = append(t.Groups, GroupSetting{Group: g, Setting: s})
	}
	return t
}

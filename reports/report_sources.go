package reports

import (
	"fmt"
	"slices"
	"strings"

	"aloft/assess"
)

// clearance is the clinical-clearance section: each item that applies to
// the species' group, its state in words, who set it and when.
func (r *report) clearance() error {
	d, a := r.doc, r.in.Assessment
	d.section("Clinical clearance", 60)
	d.body("Items cleared by the veterinarian or the licensed rehabilitator. A good flight result is not enough: " +
		"healed injuries, sound vision, feet and legs, self-feeding, wariness of people and disease status are cleared by them.")
	var rows [][]cell
	for _, item := range assess.ClearanceItemsFor(a.Species.Group) {
		title := assess.CriterionTitle(assess.ClearanceCriterion(item))
		rec, ok := latestClearance(r.in.Records.Clearances, item)
		state := assess.ClearanceNotExamined
		if ok {
			state = rec.State
		}
		st := cell{badge: &badgeSpec{clearanceWord(state), clearanceTone(state)}}
		who, when := "—", "—"
		if ok && rec.By != "" {
			who = rec.By + " (" + roleWords(rec.Role) + ")"
			when = r.dateTime(rec.At)
		}
		rows = append(rows, []cell{txt(strings.TrimPrefix(title, "Cleared: ")), st, txt(who), txt(when), txt(rec.Note)})
	}
	d.table([]column{{"Item", 0.26, "L"}, {"State", 0.16, "L"}, {"By", 0.20, "L"}, {"When", 0.17, "L"}, {"Note", 0.21, "L"}},
		rows, sizeSmall)
	return nil
}

// latestClearance returns the latest record of item.
func latestClearance(cs []assess.Clearance, item assess.ClearanceItem) (assess.Clearance, bool) {
	var out assess.Clearance
	found := false
	for _, c := range cs {
		if c.Item == item && (!found || !c.At.Before(out.At)) {
			out, found = c, true
		}
	}
	return out, found
}

func clearanceWord(s assess.ClearanceState) string {
	switch s {
	case assess.ClearanceCleared:
		return "CLEARED"
	case assess.ClearanceNotCleared:
		return "NOT CLEARED"
	}
	return "NOT EXAMINED"
}

func clearanceTone(s assess.ClearanceState) tone {
	switch s {
	case assess.ClearanceCleared:
		return toneGreen
	case assess.ClearanceNotCleared:
		return toneRed
	}
	return toneGrey
}

func roleWords(role string) string {
	switch role {
	case "vet":
		return "veterinarian"
	case "rehabilitator":
		return "licensed rehabilitator"
	}
	return role
}

// siteAndParams is the section of the release site and the flight model's
// parameter set, each constant with its source.
func (r *report) siteAndParams() error {
	d, a := r.doc, r.in.Assessment
	d.section("Release site and parameter set", 60)
	temp := "not given: the standard atmosphere's " + fixed(15-0.0065*a.Site.ElevationM, 1, "°C") + " for the elevation"
	if a.Site.TempC != nil {
		temp = asRecorded(*a.Site.TempC, "°C") + " (measured or forecast)"
	}
	d.facts([][2]string{
		{"Release site", r.in.SiteLabel},
		{"Elevation", fixed(a.Site.ElevationM, 0, "m above sea level")},
		{"Air temperature", temp},
		{"Air density", fixed(a.Site.AirDensityKgM3, 4, "kg/m³") + " (International Standard Atmosphere)"},
	})
	p := a.Params.Flight
	d.subsection("Parameter set “" + p.Name + "”")
	var rows [][]cell
	for _, c := range paramSources(p) {
		rows = append(rows, []cell{txt(c.name), txt(c.symbol), txt(c.value), txt(c.source), txt(provenanceWords(c.basis))})
	}
	d.table([]column{{"Constant", 0.25, "L"}, {"Symbol", 0.10, "L"}, {"Value", 0.10, "R"}, {"Source", 0.40, "L"}, {"Basis", 0.15, "L"}},
		rows, sizeSmall)
	return nil
}

// constantSource is one constant of the model with its source.
type constantSource struct {
	name, symbol, value, source string
	basis                       assess.Provenance
}

// paramSources lists the constants of parameter set p with their sources
// (SCIENCE.md §2–3).
func paramSources(p assess.Params) []constantSource {
	kSrc := "Pennycuick, Åkesson & Hedenström 2013, J. R. Soc. Interface 10:20130419: 1.2 the long-standing value, 0.9 its revision"
	return []constantSource{
		{"Induced power factor", "k", asRecorded(p.K, ""), kSrc, assess.ProvPublished},
		{"Body drag coefficient", "C_Db", asRecorded(p.CDb, ""), "Pennycuick, Klaassen, Kvist & Lindström 1996, J. Exp. Biol. 199:2757 " +
			"measured about 0.08 on live birds in a wind tunnel; 0.1 is the value adopted since", assess.ProvFromMemory},
		{"Profile power constant", "C_pro", asRecorded(p.CPro, ""), "Pennycuick 2008, Modelling the Flying Bird. Academic Press", assess.ProvFromMemory},
		{"Flight-muscle efficiency", "η", asRecorded(p.Eta, ""), "conventional value; measured 0.13–0.23 by Ward et al. 2001, J. Exp. Biol. 204:3311",
			assess.ProvPublished},
		{"Respiration and circulation factor", "R", asRecorded(p.R, ""), "Pennycuick 2008, Modelling the Flying Bird. Academic Press", assess.ProvFromMemory},
		{"Highest lift coefficient", "C_L,max", "1.6", "Aloft default: about the highest lift coefficient measured on gliding birds' wings",
			assess.ProvFromMemory},
		{"Gravitational acceleration", "g", "9.81 m/s²", "standard value", assess.ProvPublished},
	}
}

// formulaSource is one formula of the flight model with its source.
type formulaSource struct {
	quantity, formula, source string
	basis                     assess.Provenance
}

// modelFormulas lists every formula the flight model uses, with its source
// and basis (SCIENCE.md).
var modelFormulas = []formulaSource{
	{"Air density at the site", "T = 288.15 − 0.0065·H K (or the measured temperature); p = 101325·(T_isa/288.15)^5.255876 Pa; ρ = p/(287.05287·T)",
		"International Standard Atmosphere (ICAO; U.S. Standard Atmosphere 1976)", assess.ProvPublished},
	{"Shape", "AR = b²/S; Q = m·g/S; disc area S_d = π·b²/4", "definitions", assess.ProvDerived},
	{"Wing area when not traced", "S = S_ref·(b/b_ref)²", "geometric similarity with the species reference", assess.ProvDerived},
	{"Body frontal area", "S_b = 0.00813·m^0.666", "Pennycuick, Obrecht & Fuller 1988, J. Exp. Biol. 135:253 (the coefficient from memory)",
		assess.ProvFromMemory},
	{"Minimum speed from wing loading", "V_min = √(2·m·g/(ρ·S·C_L,max))", "Aloft default; an index of lost wing area, not a stall speed",
		assess.ProvProjectDefault},
	{"Induced power", "v_h = √(W/(2ρS_d)); v_i = √(−V²/2 + √(V⁴/4 + v_h⁴)); P_ind = k·W·v_i",
		"actuator-disc (momentum) model, Pennycuick 1968, 1975, 2008; exact form derived", assess.ProvDerived},
	{"Parasite power", "P_par = ½·ρ·V³·S_b·C_Db", "Pennycuick, Obrecht & Fuller 1988", assess.ProvPublished},
	{"Absolute minimum power", "P_am = a/V* + c·V*³, a = 2k(mg)²/(πρb²), c = ½ρS_bC_Db, V* = (a/(3c))^¼", "Pennycuick 2008; closed form derived",
		assess.ProvDerived},
	{"Profile power", "P_pro = (C_pro/AR_intact)·P_am", "Pennycuick 2008, Modelling the Flying Bird", assess.ProvFromMemory},
	{"Chemical power", "P_chem = R·(P_mech/η + P_met); P_met = 6.25·m^0.724 W (passerines), 3.79·m^0.723 W (others)",
		"Lasiewski & Dawson 1967, Condor 69:13 (basal metabolic rate)", assess.ProvPublished},
	{"Characteristic speeds", "V_mp minimises P_mech(V); V_mr minimises P_chem(V)/V; both to 10⁻⁴ m/s", "Pennycuick 2008; numerical minimum",
		assess.ProvDerived},
	{"Effective lift:drag ratio", "N = m·g·V_mr/(η·P_chem(V_mr))", "the convention of Pennycuick's range equation", assess.ProvFromMemory},
	{"Wingbeat frequency", "f = m^(3/8)·g^(1/2)·b^(−23/24)·S^(−1/3)·ρ^(−3/8)",
		"Pennycuick 1996, J. Exp. Biol. 199:1613; Pennycuick 2001, J. Exp. Biol. 204:3283", assess.ProvPublished},
	{"Healthy power margin", "M_ref = 1.8·m_ref^(−1/6), within 1.1–4.0, unless the species table gives one",
		"Aloft default fitted to Hedenström & Alerstam 1992, J. Exp. Biol. 164:19", assess.ProvProjectDefault},
	{"Available power and margins", "P_av = M_ref·P_mech,ref(V_mp)·q·min(1, m_lean/m_lean,ref); M = P_av/P_mech(V_mp); E = (M − 1)/(M_ref,site − 1)",
		"Aloft default; the muscle factors q and fat fractions are centre settings (see the thresholds)", assess.ProvProjectDefault},
	{"Climb rate", "V_z = (P_av − P_mech(V_mp))/(m·g)", "Hedenström & Alerstam 1992, J. Exp. Biol. 164:19", assess.ProvPublished},
	{"Takeoff", "P_burst = 1.94·P_av; P_hover = max(k, 1)·W·v_h + P_pro; T = P_burst/P_hover; bands at 0.9 and 1.2",
		"Pennycuick 1968, J. Exp. Biol. 49:527 (sprint over continuous power, from memory); Rayner 1979, J. Exp. Biol. 80:17; bands Aloft default",
		assess.ProvFromMemory},
	{"Flight-muscle lift", "about 57 ± 14 N per kg of flight muscle", "Marden & Allen 2002, cited in Schilder & Marden 2004, J. Exp. Biol. 207:767",
		assess.ProvPublished},
	{"Fat fraction from the fat score", "per-score tables (centre settings)", "Aloft default; fat scores explain less than half the variation in true fat " +
		"(Krementz & Pendleton 1990, Condor 92:500)", assess.ProvProjectDefault},
	{"Still-air range (migrants)", "Y = (e·η·N/g)·ln(1/(1−φ)), e = 3.9·10⁷ J/kg", "Breguet form; the energy density of fat from memory",
		assess.ProvFromMemory},
}

// sources is the section listing the source and basis of every formula,
// every threshold applied and the species reference values.
func (r *report) sources() error {
	d, a := r.doc, r.in.Assessment
	d.section("Sources", 80)
	d.body("Where each formula, constant and threshold comes from. “Published” values were read in the cited work; “derived” ones " +
		"follow from them by algebra; “common practice” is a rule of thumb of the trade with no published number; “Aloft default” " +
		"is this project's modelling choice; “centre setting” was set by the centre; “from memory” was not checked against its source.")
	d.subsection("Flight model")
	var rows [][]cell
	for _, f := range modelFormulas {
		rows = append(rows, []cell{txt(f.quantity), txt(f.formula), txt(f.source), txt(provenanceWords(f.basis))})
	}
	d.table([]column{{"Quantity", 0.18, "L"}, {"Formula", 0.34, "L"}, {"Source", 0.34, "L"}, {"Basis", 0.14, "L"}}, rows, 7.5)
	d.subsection("Thresholds applied")
	d.note("Each threshold's value for this species' group as the assessment used it. The sources are listed after the table.")
	rows = rows[:0]
	var refs []string
	for _, t := range thresholdRows(a.Params.Thresholds) {
		i := slices.Index(refs, t.source)
		if i < 0 {
			refs = append(refs, t.source)
			i = len(refs) - 1
		}
		rows = append(rows, []cell{txt(t.label), txt(t.value), txt(provenanceWords(t.basis)), txt(sourceRef(i))})
	}
	d.table([]column{{"Threshold", 0.50, "L"}, {"Value", 0.22, "R"}, {"Basis", 0.18, "L"}, {"Source", 0.10, "L"}}, rows, 7.5)
	rows = rows[:0]
	for i, src := range refs {
		rows = append(rows, []cell{txt(sourceRef(i)), txt(src)})
	}
	d.table([]column{{"Source", 0.10, "L"}, {"Of the thresholds above", 0.90, "L"}}, rows, 7.5)
	d.subsection("Species reference: " + a.Species.CommonName + " (" + a.Species.ScientificName + ")")
	rows = rows[:0]
	for _, k := range speciesSourceLabels {
		s, ok := a.Species.Sources[k.key]
		if !ok {
			continue
		}
		src := s.Citation
		if s.Note != "" {
			src += " (" + s.Note + ")"
		}
		rows = append(rows, []cell{txt(k.label), txt(provenanceWords(s.Provenance)), txt(src)})
	}
	d.table([]column{{"Value", 0.18, "L"}, {"Basis", 0.14, "L"}, {"Source", 0.68, "L"}}, rows, 7.5)
	return nil
}

// sourceRef names the i-th source of the thresholds table.
func sourceRef(i int) string { return "T" + itoa(i+1) }

// thresholdRow is one row of the thresholds table.
type thresholdRow struct {
	label, value, source string
	basis                assess.Provenance
}

// scoreTables are the thresholds that are one value per score: printed as
// one row per table when every score shares the same basis.
var scoreTables = []struct {
	prefix assess.ThresholdID
	label  string
}{
	{assess.ThMuscleFactorPrefix, "Flight-muscle factor for pectoral muscle scores 0, 1, 2, 3 (share of a healthy bird's sustained power)"},
	{assess.ThFatFractionKaiser, "Fat fraction for fat scores 0 to 8 on the 0–8 scale"},
	{assess.ThFatFractionHelmsPfx, "Fat fraction for fat scores 0 to 5 on the 0–5 scale"},
}

// thresholdRows turns the applied thresholds into table rows, each score
// table in one row.
func thresholdRows(ts []assess.AppliedThreshold) []thresholdRow {
	var out []thresholdRow
	done := map[assess.ThresholdID]bool{}
	for _, t := range ts {
		if done[t.ID] {
			continue
		}
		if row, ids, ok := scoreTableRow(ts, t); ok {
			out = append(out, row)
			for _, id := range ids {
				done[id] = true
			}
			continue
		}
		out = append(out, thresholdRow{label: t.Label, value: thresholdValue(t), source: t.Provenance.Source, basis: t.Provenance.Kind})
	}
	return out
}

// scoreTableRow gathers the score table t belongs to into one row, when
// all its scores share t's basis and source.
func scoreTableRow(ts []assess.AppliedThreshold, t assess.AppliedThreshold) (thresholdRow, []assess.ThresholdID, bool) {
	for _, st := range scoreTables {
		if !strings.HasPrefix(string(t.ID), string(st.prefix)) {
			continue
		}
		var vals []string
		var ids []assess.ThresholdID
		for _, u := range ts {
			if !strings.HasPrefix(string(u.ID), string(st.prefix)) {
				continue
			}
			if u.Provenance != t.Provenance {
				return thresholdRow{}, nil, false
			}
			vals = append(vals, asRecorded(u.Value, ""))
			ids = append(ids, u.ID)
		}
		return thresholdRow{label: st.label, value: strings.Join(vals, ", "), source: t.Provenance.Source, basis: t.Provenance.Kind}, ids, true
	}
	return thresholdRow{}, nil, false
}

// thresholdValue formats a threshold's value with its unit.
func thresholdValue(t assess.AppliedThreshold) string {
	switch t.Unit {
	case "":
		return asRecorded(t.Value, "")
	case "fraction":
		return asRecorded(t.Value, "") + " (" + asRecorded(roundTo(t.Value*100, 2), "%") + ")"
	case "×":
		return fmt.Sprintf("%s ×", asRecorded(t.Value, ""))
	}
	return asRecorded(t.Value, t.Unit)
}

func roundTo(x float64, digits int) float64 {
	p := 1.0
	for range digits {
		p *= 10
	}
	if x < 0 {
		return -float64(int64(-x*p+0.5)) / p
	}
	return float64(int64(x*p+0.5)) / p
}

// speciesSourceLabels names, in order, the species' values the
// assessment reads.
var speciesSourceLabels = []struct{ key, label string }{
	{"mass_g.female", "Mean mass, female"}, {"mass_g.male", "Mean mass, male"}, {"mass_g.pooled", "Mean mass, sexes pooled"},
	{"mass_range_g", "Mass range"}, {"span_mm", "Wingspan"}, {"area_cm2", "Wing area"},
	{"span_area_estimated", "Span and area estimated"}, {"expected_margin", "Healthy power margin"},
	{"flight_muscle_fraction", "Flight-muscle fraction"}, {"passerine", "Passerine"}, {"migrant", "Migrant"},
	{"group", "Species group"}, {"launch_mode", "Usual launch"}, {"primaries", "Primaries"}, {"secondaries", "Secondaries"},
	{"rectrices", "Tail feathers"}, {"min_passes", "Unbroken passes wanted"}, {"min_prerelease_days", "Days in pre-release housing"},
	{"waterproof_days", "Days waterproof"}, {"release_min_mass_g", "Lowest release mass"}, {"release_guide", "Release guide"},
	{"enclosure_class", "Enclosure class"},
}

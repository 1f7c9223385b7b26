package reports

import (
	"fmt"
	"strings"

	"aloft/assess"
)

// summary is page 1: title, the patient, the advisory outcome with its main
// reasons, and the key figures.
func (r *report) summary() error {
	d, in, a := r.doc, r.in, r.in.Assessment
	d.font("B", 17)
	d.colour(colNavy)
	d.pdf.SetX(marginSide)
	d.pdf.CellFormat(d.contentW(), 8, "Pre-release flight assessment", "", 1, "L", false, 0, "")
	d.para("Advisory report for the licensed rehabilitator and the veterinarian, who decide. "+
		"It brings together the records, the flight model's estimate and the criteria the centre applies.", "", 9, 4, colGrey)
	d.para(r.stampWords(), "I", sizeSmall, lineSmall, colGrey)
	d.space(2.5)

	p := in.Patient
	sp := a.Species
	d.facts([][2]string{
		{"Centre", in.Centre.Name},
		{"Case number", p.CaseNumber},
		{"Species", fmt.Sprintf("%s (%s)", speciesName(p), p.SpeciesScientific)},
		{"Species group", fmt.Sprintf("%s; usual launch: %s", sp.GroupLabel, sp.NormalLaunch)},
		{"Age class", p.AgeClass},
		{"Sex", sexWords(p.Sex)},
		{"Admitted", d.date(p.AdmittedAt)},
		{"Found", strings.TrimSuffix(p.FoundDate+", "+p.FoundPlace, ", ")},
		{"Reason for admission", p.Reason},
		{"Status", dispositionWords(p)},
		{"Assessed", d.dateTime(a.EvaluatedAt)},
		{"Times are in", d.zoneWords(a.EvaluatedAt)},
	})
	d.facts([][2]string{{"Release site", in.SiteLabel + ": " + siteWords(a.Site)}})
	r.outcomeBox()
	r.reasons()
	r.keyFigures()
	return nil
}

// stampWords says which version this is, when it was made and by whom.
func (r *report) stampWords() string {
	in := r.in
	who := ""
	if in.GeneratedBy != "" {
		who = " by " + in.GeneratedBy
	}
	if in.Version == 0 {
		return "Working copy generated " + r.dateTime(in.GeneratedAt) + who +
			": not frozen, so it cannot be signed off. Generate the report for review in Aloft to freeze a version."
	}
	return fmt.Sprintf("Version %d, frozen for review %s%s. Its SHA-256 hash, which the sign-offs name, is on the sign-off sheet.",
		in.Version, r.dateTime(in.GeneratedAt), who)
}

// outcomeMeaning explains each outcome level in a sentence.
func outcomeMeaning(l assess.OutcomeLevel) string {
	switch l {
	case assess.OutcomeReady:
		return "Every core criterion is met on current evidence. Whether and when to release is for the licensed rehabilitator and the veterinarian to decide."
	case assess.OutcomeContinue:
		return "Some criteria are not yet met, borderline or rest on old evidence: continue conditioning and assess again."
	case assess.OutcomeRefer:
		return "A finding points to injury, illness or an item not cleared: the veterinarian should examine the bird."
	}
	return "Core criteria lack evidence: record what is missing before anyone can weigh a release."
}

// outcomeBox draws the advisory outcome: a tinted band with the level in
// words, never colour alone.
func (r *report) outcomeBox() {
	d, o := r.doc, r.in.Assessment.Outcome
	t := outcomeTone(o.Level)
	d.font("", sizeBody)
	lines := d.pdf.SplitText(outcomeMeaning(o.Level), d.contentW()-14)
	h := 14 + float64(len(lines))*lineBody
	d.need(h + 3)
	y := d.y()
	d.fill(t.fill)
	d.pdf.Rect(marginSide, y, d.contentW(), h, "F")
	d.fill(t.ink)
	d.pdf.Rect(marginSide, y, 2.5, h, "F")
	d.font("B", 7.5)
	d.colour(t.ink)
	d.pdf.Text(marginSide+7, y+5, "ADVISORY OUTCOME")
	d.font("B", 15)
	d.pdf.Text(marginSide+7, y+11.5, o.Label)
	d.font("", sizeBody)
	d.colour(colText)
	for i, s := range lines {
		d.pdf.Text(marginSide+7, y+16+float64(i)*lineBody, s)
	}
	d.pdf.SetY(y + h + 3)
}

// reasons lists the criteria that decided the outcome, the referrals when
// they are not already the reasons, and what was not assessed.
func (r *report) reasons() {
	d, o := r.doc, r.in.Assessment.Outcome
	d.subsection("Main reasons")
	r.reasonTable(o.Reasons)
	if o.Level != assess.OutcomeRefer && len(o.Referrals) > 0 {
		d.subsection("Also for the veterinarian")
		r.reasonTable(o.Referrals)
	}
	if o.Level != assess.OutcomeInsufficient && len(o.NotAssessed) > 0 {
		var titles []string
		for _, id := range o.NotAssessed {
			if c, ok := r.in.Assessment.Criterion(id); ok {
				titles = append(titles, c.Title)
			}
		}
		d.note("Not assessed (no evidence yet, and not needed for this outcome): " + strings.Join(titles, "; ") + ".")
	}
}

func (r *report) reasonTable(rs []assess.OutcomeReason) {
	if len(rs) == 0 {
		r.note("None listed.")
		return
	}
	var rows [][]cell
	for _, g := range groupClearances(rs) {
		x := g[0]
		st := cell{badge: &badgeSpec{statusWord(x.Status), statusTone(x.Status)}}
		if x.Stale {
			st.lines = append(st.lines, line{text: "stale evidence", size: 7, grey: true})
		}
		title, reason := x.Title, cell{lines: []line{{text: x.Text}}}
		if len(g) > 1 {
			title, reason = fmt.Sprintf("Clinical clearance, %d items", len(g)), clearanceReasons(g)
		}
		rows = append(rows, []cell{st, {lines: []line{{text: title, style: "B"}}}, reason})
	}
	r.table([]column{{"Status", 0.16, "L"}, {"Criterion", 0.32, "L"}, {"Reason", 0.52, "L"}}, rows, 8.5)
}

// groupClearances groups the reasons: clearance items of the same status
// and staleness together, every other reason alone, in their order.
func groupClearances(rs []assess.OutcomeReason) [][]assess.OutcomeReason {
	var out [][]assess.OutcomeReason
	at := map[string]int{}
	for _, x := range rs {
		if !strings.HasPrefix(string(x.Criterion), string(assess.CritClearancePrefix)) {
			out = append(out, []assess.OutcomeReason{x})
			continue
		}
		key := fmt.Sprint(x.Status, x.Stale)
		if i, ok := at[key]; ok {
			out[i] = append(out[i], x)
			continue
		}
		at[key] = len(out)
		out = append(out, []assess.OutcomeReason{x})
	}
	return out
}

// clearanceReasons words a group of clearance reasons: the items sharing
// each reason, then the reason.
func clearanceReasons(g []assess.OutcomeReason) cell {
	var texts []string
	items := map[string][]string{}
	for _, x := range g {
		if _, ok := items[x.Text]; !ok {
			texts = append(texts, x.Text)
		}
		item := strings.TrimPrefix(x.Title, "Cleared: ")
		items[x.Text] = append(items[x.Text], item)
	}
	var c cell
	for _, t := range texts {
		list := strings.Join(items[t], ", ")
		c.lines = append(c.lines, line{text: strings.ToUpper(list[:1]) + list[1:] + ": " + t})
	}
	return c
}

// keyFigures is the table of the flight model's headline numbers beside
// the healthy reference's at the same site.
func (r *report) keyFigures() {
	d, a := r.doc, r.in.Assessment
	const title = "Key figures at the release site"
	ph := a.Physics
	if ph == nil {
		d.subsection(title)
		d.body("The flight model was not run for this patient: " + strings.Join(physicsNotes(a), " ") +
			" The criteria that rest on it are not assessed.")
		return
	}
	ref := ph.ReferenceBird
	refSpeed := func(v float64) string {
		if ref.MinPowerSpeed() <= 0 {
			return "—"
		}
		return Speed(v)
	}
	in := ph.Inputs
	rows := [][]cell{
		{txt("Mass the model read"), txt(fmt.Sprintf("%s (%s, %s)", asRecorded(in.MassG, "g"), fedWords(in.MassFed), d.date(in.MassAt))),
			txt(fmt.Sprintf("%s (%s mean)", sig3(a.Species.ReferenceMassG, "g"), sexWords(a.Species.Sex)))},
		{txt("Minimum-power speed V_mp"), txt(Speed(ph.MinPowerSpeedMS)), txt(refSpeed(ref.MinPowerSpeed()))},
		{txt("Maximum-range speed V_mr"), txt(Speed(ph.MaxRangeSpeedMS)), txt(refSpeed(ref.MaxRangeSpeed()))},
		{txt("Minimum speed from wing loading V_min"), txt(fmt.Sprintf("%s (%s × the reference's)", Speed(ph.MinSpeedMS), fixed(ph.MinSpeedRatio, 2, ""))),
			txt(Speed(ph.ReferenceMinSpeedMS))},
		{txt("Power margin M (available over minimum power)"), txt(fixed(ph.PowerMargin, 2, "×")),
			txt(fixed(ph.ExpectedMarginSite, 2, "×") + " (" + fixed(ph.ExpectedMargin, 2, "×") + " at sea level)")},
		{txt("Share of a healthy bird's spare power E"), txt(excessWords(ph.ExcessPowerFraction)), txt("1.00 by definition")},
		{txt("Takeoff index T (burst over hovering power)"), txt(fixed(ph.TakeoffIndex, 2, "") + ": " + ph.TakeoffBandLabel), txt("—")},
	}
	d.keptTable(title, []column{{"Figure", 0.40, "L"}, {"This bird", 0.36, "L"}, {"Healthy bird, same site", 0.24, "L"}}, rows, 8.5)
	d.note("Model estimates for an average healthy bird of the species, scaled to this bird's records; every formula is sourced under “Sources”.")
}

// excessWords formats the excess-power fraction E.
func excessWords(e *float64) string {
	if e == nil {
		return "not defined: the site leaves even a healthy bird almost no reserve"
	}
	return fixed(*e, 2, "") + " (" + fixed(*e*100, 0, "%") + ")"
}

// windowWords formats the speed window.
func windowWords(r assess.FlightResult) string {
	w := r.SpeedWindowMS
	if w == nil {
		return "none: by this model the bird cannot sustain level flight here"
	}
	s := fixed(w[0], 1, "") + "–" + fixed(w[1], 1, "m/s")
	if r.Window.SlowUnresolved {
		s += " (low end is V_min: the model cannot resolve slow flight)"
	}
	return s
}

// physicsNotes are the assessment's notes about the flight model.
func physicsNotes(a assess.Assessment) []string {
	var out []string
	for _, n := range a.Notes {
		if s, ok := strings.CutPrefix(n, "physics: "); ok {
			out = append(out, strings.ToUpper(s[:1])+s[1:]+".")
		}
	}
	if len(out) == 0 {
		out = append(out, "the records do not support it.")
	}
	return out
}

package reports

import (
	"errors"
	"fmt"
	"strings"

	"aloft/assess"
	"aloft/reports/charts"
	"aloft/reports/fonts"
	"aloft/reports/pdfcanvas"
)

// physics is the flight-model section: what the model read, what it
// computed for the bird and its healthy reference at the site, and the
// power curve.
func (r *report) physics() error {
	d, a := r.doc, r.in.Assessment
	d.section("Flight model at the release site", 90)
	d.body("The power-curve model of bird flight (actuator-disc induced power, body drag, profile power; " +
		"Pennycuick 1968, 1975, 2008) estimates the power this bird needs at each airspeed and the power it can sustain, " +
		"beside a healthy adult of its species and sex at the same site. It describes an average bird: moult, damaged or imped " +
		"feathers, injury and lost fitness can put a patient far from it.")
	ph := a.Physics
	if ph == nil {
		d.body("Not run: " + joinSentences(physicsNotes(a)))
		return nil
	}
	d.subsection("What the model read")
	d.table([]column{{"Input", 0.34, "L"}, {"Value", 0.66, "L"}}, r.modelInputs(ph), sizeSmall+0.5)
	label := r.in.SiteLabel + ", " + fixed(a.Site.ElevationM, 0, "m")
	if a.Site.TempC != nil {
		label += ", " + asRecorded(*a.Site.TempC, "°C")
	}
	ch, err := charts.Power(charts.PowerInput{Result: ph.FlightResult, SiteLabel: label})
	if err != nil && !errors.Is(err, charts.ErrNoData) {
		return fmt.Errorf("reports: power chart: %w", err)
	}
	if err == nil {
		if err := r.figure(ch, 125); err != nil {
			return err
		}
	}
	d.subsection("What it computed")
	d.table([]column{{"Quantity", 0.50, "L"}, {"Symbol", 0.16, "L"}, {"Value", 0.34, "L"}}, modelResults(ph), sizeSmall+0.5)
	if len(ph.Notes) > 0 {
		d.subsection("Notes from the model")
		d.bullets(readableNotes(ph.Notes), sizeSmall, lineSmall)
	}
	return nil
}

// modelInputs lists the records and reference values the model read.
func (r *report) modelInputs(ph *assess.Physics) [][]cell {
	in := ph.Inputs
	span := asRecorded(in.SpanMM, "mm") + " measured " + r.datePtr(in.WingAt)
	if in.SpanAssumed {
		span = asRecorded(in.SpanMM, "mm") + ": none measured, the species' reference span stands in"
	}
	area := sig3(in.AreaCM2, "cm²") + " traced"
	if in.AreaEstimated {
		area = sig3(in.AreaCM2, "cm²") + " estimated from the span and the species reference (area lost with damaged feathers does not show)"
	}
	fat := "not scored: a fat fraction of " + fixed(ph.FatFraction*100, 0, "%") + " assumed"
	if in.FatScore != nil {
		fat = fmt.Sprintf("%d on the %s scale: fat fraction %s", *in.FatScore, in.FatScale, fixed(ph.FatFraction*100, 0, "%"))
	}
	muscle := "not scored: healthy flight muscle assumed"
	if in.MuscleScore != nil {
		muscle = fmt.Sprintf("%d of 3", *in.MuscleScore)
	}
	return [][]cell{
		{txt("Mass"), txt(fmt.Sprintf("%s, %s, %s", asRecorded(in.MassG, "g"), fedWords(in.MassFed), r.dateTime(in.MassAt)))},
		{txt("Wingspan"), txt(span)},
		{txt("Wing area"), txt(area)},
		{txt("Fat score"), txt(fat)},
		{txt("Pectoral muscle score"), txt(muscle)},
		{txt("Healthy reference"), txt(fmt.Sprintf("%s, span %s, area %s", sig3(in.ReferenceMassG, "g"),
			sig3(in.ReferenceSpanMM, "mm"), sig3(in.ReferenceAreaCM2, "cm²")))},
		{txt("Air density at the site"), txt(fixed(ph.AirDensityKgM3, 4, "kg/m³"))},
		{txt("Parameter set"), txt(paramsWords(ph.Params))},
	}
}

// modelResults lists the model's figures with symbols and units.
func modelResults(ph *assess.Physics) [][]cell {
	row := func(q, sym, v string) []cell { return []cell{txt(q), txt(sym), txt(v)} }
	rows := [][]cell{
		row("Aspect ratio (span² over area)", "AR", fixed(ph.AspectRatio, 2, "")),
		row("Wing loading", "Q", sig3(ph.WingLoadingNM2, "N/m²")),
		row("Disc loading", "", sig3(ph.DiscLoadingNM2, "N/m²")),
		row("Minimum speed from wing loading", "V_min", Speed(ph.MinSpeedMS)),
		row("Same for the healthy reference", "", Speed(ph.ReferenceMinSpeedMS)),
		row("Minimum-power speed", "V_mp", Speed(ph.MinPowerSpeedMS)),
		row("Maximum-range speed (fuel)", "V_mr", Speed(ph.MaxRangeSpeedMS)),
		row("Maximum-range speed (mechanical)", "V_mr,mech", Speed(ph.MaxRangeSpeedMechMS)),
		row("Absolute minimum power", "P_am", sig3(ph.AbsoluteMinPowerW, "W")),
		row("Profile power", "P_pro", sig3(ph.ProfilePowerW, "W")),
		row("Mechanical power at V_mp", "P_mech", sig3(ph.MinPowerMechW, "W")),
		row("Chemical power at V_mp", "P_chem", sig3(ph.MinPowerChemW, "W")),
		row("Hovering power (standing takeoff, lower bound)", "P_hover", sig3(ph.HoverPowerW, "W")),
		row("Available sustained power", "P_av", sig3(ph.AvailablePowerW, "W")),
		row("Power margin", "M", fixed(ph.PowerMargin, 2, "×")),
		row("Healthy margin at sea level", "M_ref", fixed(ph.ExpectedMargin, 2, "×")),
		row("Healthy margin at this site", "M_ref,site", fixed(ph.ExpectedMarginSite, 2, "×")),
		row("Margin over the healthy margin", "M/M_ref,site", fixed(ph.MarginRatio, 2, "×")),
		row("Share of a healthy bird's spare power", "E", excessWords(ph.ExcessPowerFraction)),
		row("Climb rate at V_mp", "V_z", fixed(ph.ClimbRateMS, 2, "m/s")),
		row("Sustainable speed window", "", windowWords(ph.FlightResult)),
		row("Takeoff index (burst over hovering power)", "T", fixed(ph.TakeoffIndex, 2, "")+": "+ph.TakeoffBandLabel),
		row("Wingbeat frequency in cruising flight", "f", fixed(ph.WingbeatHz, 1, "Hz")),
		row("Effective lift:drag ratio", "N", fixed(ph.EffectiveLiftDrag, 1, "")),
		row("Fat fraction", "φ", fixed(ph.FatFraction*100, 0, "%")+yesNo(ph.FatAssumed, " (assumed)", "")),
	}
	if ph.StillAirRangeKm != nil {
		rows = append(rows, row("Still-air range on the current fat (rough guide, migrants)", "Y", fixed(*ph.StillAirRangeKm, 0, "km")))
	}
	if ph.MardenLiftRatio != nil {
		rows = append(rows, row("Flight-muscle lift over weight (Marden's cross-check)", "", fixed(*ph.MardenLiftRatio, 2, "×")))
	}
	return rows
}

// paramsWords names a parameter set and its constants.
func paramsWords(p assess.Params) string {
	return fmt.Sprintf("%s: k %s, C_Db %s, C_pro %s, η %s, R %s", p.Name, asRecorded(p.K, ""), asRecorded(p.CDb, ""),
		asRecorded(p.CPro, ""), asRecorded(p.Eta, ""), asRecorded(p.R, ""))
}

// figure draws a numbered chart across the content width, height mm high,
// with its title and text alternative as the caption. The chart and its
// caption stay on one page.
func (r *report) figure(ch *charts.Chart, height float64) error {
	d := r.doc
	r.figures++
	caption := fmt.Sprintf("Figure %d. %s.", r.figures, ch.Title())
	d.font("", 7.5)
	capLines := d.pdf.SplitText(ch.Alt(), d.contentW())
	d.need(height + 8 + float64(len(capLines))*3.3)
	y := d.y() + 1
	c := pdfcanvas.New(d.pdf, marginSide, y, d.contentW(), height, pdfcanvas.Family(fonts.Sans))
	w, h := c.Size()
	err := ch.Draw(c, w, h, charts.PrintStyle())
	c.Close()
	if err != nil {
		return fmt.Errorf("reports: %w", err)
	}
	d.pdf.SetY(y + height + 1.5)
	d.para(caption, "B", 8, 3.6, colText)
	d.para(ch.Alt(), "", 7.5, 3.3, colGrey)
	d.space(3)
	return nil
}

func joinSentences(ss []string) string {
	out := ""
	for i, s := range ss {
		if i > 0 {
			out += " "
		}
		out += s
	}
	return out
}

// readableNotes turns the engine's notes ("physics: …", "marden_lift_ratio:
// …") into sentences for print.
func readableNotes(notes []string) []string {
	out := make([]string, 0, len(notes))
	for _, n := range notes {
		head, rest, ok := strings.Cut(n, ": ")
		if ok && !strings.Contains(head, " ") {
			head = strings.ReplaceAll(head, "_", " ")
			if head == "physics" {
				head = "flight model"
			}
			n = head + ": " + rest
		}
		out = append(out, strings.ToUpper(n[:1])+n[1:])
	}
	return out
}

package reports

import (
	"errors"
	"fmt"
	"strings"

	"aloft/assess"
	"aloft/reports/charts"
)

// records is the section of the patient's records: mass, condition scores,
// wings and feathers, takeoff trials, flight sessions, waterproofing and
// housing, with the mass, feather and stamina charts.
func (r *report) records() error {
	d := r.doc
	d.section("Records", 110)
	steps := []func() error{r.mass, r.conditions, r.wings, r.trials, r.sessions, r.waterproofing, r.housing}
	for _, step := range steps {
		if err := step(); err != nil {
			return err
		}
	}
	return nil
}

// optionalChart draws a chart built by build, or says what is missing when
// there is nothing to draw.
func (r *report) optionalChart(ch *charts.Chart, err error, height float64, none string) error {
	if errors.Is(err, charts.ErrNoData) {
		r.note(none)
		return nil
	}
	if err != nil {
		return fmt.Errorf("reports: %w", err)
	}
	return r.figure(ch, height)
}

func (r *report) mass() error {
	d, in, sp := r.doc, r.in.Records, r.in.Assessment.Species
	d.subsection("Mass")
	ws := make([]assess.WeighIn, len(in.WeighIns))
	for i, w := range in.WeighIns {
		w.At = w.At.In(d.loc)
		ws[i] = w
	}
	ch, err := charts.Mass(charts.MassInput{Weighins: ws, RangeLoG: sp.MassRangeForG.Min, RangeHiG: sp.MassRangeForG.Max,
		ReleaseMinG: sp.ReleaseMinMassG, Sex: sp.Sex, Now: r.in.Assessment.EvaluatedAt.In(d.loc)})
	if err := r.optionalChart(ch, err, 70, "No weigh-ins are recorded."); err != nil {
		return err
	}
	if len(ws) == 0 {
		return nil
	}
	var rows [][]cell
	for _, w := range in.WeighIns {
		rows = append(rows, []cell{txt(r.dateTime(w.At)), txt(asRecorded(w.MassG, "g")), txt(fedWords(w.Fed)), txt(w.Note)})
	}
	d.table([]column{{"Weighed", 0.26, "L"}, {"Mass", 0.14, "R"}, {"Crop", 0.20, "L"}, {"Note", 0.40, "L"}}, rows, sizeSmall)
	return nil
}

func (r *report) conditions() error {
	d, in := r.doc, r.in.Records
	if len(in.Conditions) == 0 {
		return nil
	}
	d.subsection("Condition scores")
	var rows [][]cell
	for _, c := range in.Conditions {
		fat := "—"
		if c.FatScore != nil {
			fat = fmt.Sprintf("%d (%s scale)", *c.FatScore, c.FatScale)
		}
		rows = append(rows, []cell{txt(r.dateTime(c.At)), txt(fat), txt(optInt(c.MuscleScore, "of 3")), txt(optInt(c.BodyCondition, "of 5"))})
	}
	d.table([]column{{"Scored", 0.26, "L"}, {"Fat score", 0.26, "L"}, {"Pectoral muscle", 0.24, "L"}, {"Body condition", 0.24, "L"}},
		rows, sizeSmall)
	return nil
}

func (r *report) wings() error {
	d, in := r.doc, r.in.Records
	if len(in.Wings) == 0 {
		return nil
	}
	d.subsection("Wings and flight feathers")
	var rows [][]cell
	var latest *assess.WingMeasurement
	for i, w := range in.Wings {
		area := optFloat(w.AreaCM2, "cm²")
		if w.AreaCM2 != nil && w.AreaMethod != "" {
			area += " (" + string(w.AreaMethod) + ")"
		}
		rows = append(rows, []cell{txt(r.dateTime(w.At)), txt(optFloat(w.SpanMM, "mm")), txt(area),
			txt(optFloat(w.ChordMM, "mm")), txt(featherWords(w.Feathers)), txt(w.Note)})
		if w.Feathers != nil {
			latest = &in.Wings[i]
		}
	}
	d.table([]column{{"Measured", 0.20, "L"}, {"Span", 0.10, "R"}, {"Wing area", 0.17, "L"}, {"Flat chord", 0.11, "R"},
		{"Flight feathers", 0.24, "L"}, {"Note", 0.18, "L"}}, rows, sizeSmall)
	if latest == nil {
		return nil
	}
	sp := r.in.Assessment.Species
	ch, err := charts.Feathers(charts.FeatherInput{Map: *latest.Feathers, Primaries: sp.Primaries, Secondaries: sp.Secondaries, Rectrices: sp.Rectrices})
	h := 80.0
	if err == nil {
		cw, chh := ch.Size()
		h = min(95, max(55, d.contentW()*float64(chh)/float64(cw)*0.8))
	}
	return r.optionalChart(ch, err, h, "No feather map is recorded.")
}

// featherWords counts the flight feathers that are not intact.
func featherWords(m *assess.FeatherMap) string {
	if m == nil {
		return "not examined"
	}
	n := map[assess.FeatherStatus]int{}
	for _, tract := range [][]assess.FeatherStatus{m.LeftPrimaries, m.RightPrimaries, m.LeftSecondaries, m.RightSecondaries, m.TailLeft, m.TailRight} {
		for _, s := range tract {
			if s != assess.FeatherIntact && s != "" {
				n[s]++
			}
		}
	}
	if len(n) == 0 {
		return "all intact"
	}
	var parts []string
	for _, s := range []assess.FeatherStatus{assess.FeatherMissing, assess.FeatherBroken, assess.FeatherPin, assess.FeatherImped,
		assess.FeatherFrayed, assess.FeatherStressBars} {
		if n[s] > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", n[s], s))
		}
	}
	return strings.Join(parts, ", ")
}

func (r *report) trials() error {
	d, in := r.doc, r.in.Records
	d.subsection("Takeoff trials")
	if len(in.Trials) == 0 {
		d.note("No takeoff trials are recorded.")
		return nil
	}
	var rows [][]cell
	for _, t := range in.Trials {
		mode := cell{lines: []line{{text: string(t.Mode)}}}
		if t.ModeReason != "" {
			mode.lines = append(mode.lines, line{text: "reason: " + t.ModeReason, grey: true})
		}
		rows = append(rows, []cell{txt(r.dateTime(t.At)), mode, txt(trialConditions(t)), txt(attemptWords(t.Attempts)), txt(t.Notes)})
	}
	d.table([]column{{"Tried", 0.19, "L"}, {"Launch", 0.15, "L"}, {"Conditions", 0.25, "L"}, {"Attempts", 0.21, "L"}, {"Notes", 0.20, "L"}},
		rows, sizeSmall)
	return nil
}

// trialConditions describes a trial's surface, run-up, drop and wind.
func trialConditions(t assess.TakeoffTrial) string {
	var parts []string
	if t.Surface != "" {
		parts = append(parts, t.Surface)
	}
	if t.RunUpM != nil {
		parts = append(parts, "run-up "+asRecorded(*t.RunUpM, "m"))
	}
	if t.DropHeightM != nil {
		parts = append(parts, "drop "+asRecorded(*t.DropHeightM, "m"))
	}
	if t.Wind != "" {
		w := string(t.Wind) + " wind"
		if t.WindDir != "" {
			w += ", " + string(t.WindDir)
		}
		parts = append(parts, w)
	}
	if len(parts) == 0 {
		return "—"
	}
	return strings.Join(parts, "; ")
}

// attemptWords counts a trial's attempts by result.
func attemptWords(as []assess.AttemptResult) string {
	if len(as) == 0 {
		return "—"
	}
	n := map[assess.AttemptResult]int{}
	for _, a := range as {
		n[a]++
	}
	var parts []string
	for _, k := range []assess.AttemptResult{assess.AttemptClimbed, assess.AttemptLevel, assess.AttemptShort, assess.AttemptFailed} {
		if n[k] > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", n[k], attemptLabel(k)))
		}
	}
	return fmt.Sprintf("%d: %s", len(as), strings.Join(parts, ", "))
}

func attemptLabel(a assess.AttemptResult) string {
	switch a {
	case assess.AttemptClimbed:
		return "climbed away"
	case assess.AttemptLevel:
		return "flew level"
	case assess.AttemptShort:
		return "landed short"
	case assess.AttemptFailed:
		return "failed to lift"
	}
	return string(a)
}

func (r *report) sessions() error {
	d, in, a := r.doc, r.in.Records, r.in.Assessment
	d.subsection("Flight sessions")
	d.note("Exercise: " + a.Exercise.Text + ".")
	ss := make([]assess.FlightSession, len(in.Sessions))
	for i, s := range in.Sessions {
		s.At = s.At.In(d.loc)
		ss[i] = s
	}
	ch, err := charts.Stamina(charts.StaminaInput{Sessions: ss, TargetPasses: r.targetPasses()})
	if err := r.optionalChart(ch, err, 92, "No flight sessions are recorded."); err != nil {
		return err
	}
	if len(ss) == 0 {
		return nil
	}
	var rows [][]cell
	for _, s := range in.Sessions {
		rows = append(rows, []cell{txt(r.dateTime(s.At)), txt(sessionPlace(s)), txt(sessionFlight(s)), txt(sessionSigns(s)), txt(s.Notes)})
	}
	d.table([]column{{"Flown", 0.17, "L"}, {"Exercise and place", 0.21, "L"}, {"Flight", 0.24, "L"}, {"Breathing and wings", 0.22, "L"},
		{"Notes", 0.16, "L"}}, rows, 7.5)
	return nil
}

// targetPasses is the unbroken passes the centre's threshold asks of the
// group, else the species' default; nil without either.
func (r *report) targetPasses() *int {
	for _, t := range r.in.Assessment.Params.Thresholds {
		if t.ID == assess.ThPasses {
			n := int(t.Value)
			return &n
		}
	}
	return r.in.Assessment.Species.MinPasses
}

func sessionPlace(s assess.FlightSession) string {
	p := string(s.Exercise)
	if s.EnclosureName != "" {
		p += ", " + s.EnclosureName
	}
	if s.EnclosureLengthM != nil {
		p += " (" + asRecorded(*s.EnclosureLengthM, "m") + ")"
	}
	if s.AirTempC != nil {
		p += "; air " + asRecorded(*s.AirTempC, "°C")
	}
	if s.DurationS != nil {
		p += "; " + itoa(*s.DurationS/60) + " min"
	}
	if s.Group {
		p += fmt.Sprintf("; group of %d", s.GroupSize)
	}
	return p
}

func sessionFlight(s assess.FlightSession) string {
	f := fmt.Sprintf("%d passes, longest unbroken run %d", s.Passes, s.LongestRun)
	if s.Highest != "" {
		f += "; highest: " + strings.ReplaceAll(string(s.Highest), "-", " ")
	}
	if s.Landings > 0 {
		f += fmt.Sprintf("; %d of %d landings controlled", s.LandingsControlled, s.Landings)
	}
	if s.WingbeatHz != nil {
		f += "; wingbeat " + asRecorded(*s.WingbeatHz, "Hz")
	}
	return f
}

func sessionSigns(s assess.FlightSession) string {
	var parts []string
	if s.RecoveryS != nil {
		parts = append(parts, "recovered in "+itoa(*s.RecoveryS)+" s")
	}
	parts = append(parts, yesNo(s.OpenMouth, "open-mouth breathing", "no open-mouth breathing"),
		yesNo(s.TailBobbing, "tail bobbing", "no tail bobbing"))
	switch s.Droop {
	case assess.DroopLeft, assess.DroopRight:
		parts = append(parts, string(s.Droop)+" wing droops")
	default:
		parts = append(parts, "no droop")
	}
	parts = append(parts, yesNo(s.Asymmetry, "uneven wingbeats", "even wingbeats"))
	return strings.Join(parts, "; ")
}

func (r *report) waterproofing() error {
	d, in := r.doc, r.in.Records
	if len(in.Waterproofing) == 0 {
		return nil
	}
	d.subsection("Waterproofing")
	var rows [][]cell
	for _, w := range in.Waterproofing {
		rows = append(rows, []cell{txt(r.dateTime(w.At)), txt(asRecorded(w.MinutesOnWater, "min")),
			txt(yesNo(w.WetToSkin, "yes", "no")), txt(strings.ReplaceAll(string(w.Result), "-", " "))})
	}
	d.table([]column{{"Tested", 0.30, "L"}, {"On the water", 0.20, "R"}, {"Wet to the skin", 0.20, "L"}, {"Result", 0.30, "L"}}, rows, sizeSmall)
	return nil
}

func (r *report) housing() error {
	d, in := r.doc, r.in.Records
	if len(in.Housing) == 0 {
		return nil
	}
	d.subsection("Housing")
	var rows [][]cell
	for _, h := range in.Housing {
		size := fmt.Sprintf("%s × %s × %s", asRecorded(h.LengthM, ""), asRecorded(h.WidthM, ""), asRecorded(h.HeightM, "m"))
		rows = append(rows, []cell{txt(r.dateTime(h.From)), txt(h.EnclosureName), txt(strings.ReplaceAll(string(h.Kind), "-", " ")),
			txt(size), txt(yesNo(h.Prerelease, "pre-release", "—"))})
	}
	d.table([]column{{"From", 0.22, "L"}, {"Enclosure", 0.26, "L"}, {"Kind", 0.16, "L"}, {"Length × width × height", 0.22, "L"},
		{"Counts as", 0.14, "L"}}, rows, sizeSmall)
	return nil
}

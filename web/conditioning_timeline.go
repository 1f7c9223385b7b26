package web

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// conditioningSections renders the conditioning blocks of the patient page:
// a summary with the buttons to each form, and the timeline of records.
func (s *Server) conditioningSections() []patientSection {
	return []patientSection{s.condSummarySection, s.condTimelineSection}
}

func (s *Server) condCtxFor(c echo.Context, p records.Patient) *condCtx {
	cx := &condCtx{c: c, patient: p}
	if sp, err := s.findSpecies(c.Request().Context(), p.SpeciesScientific); err == nil {
		cx.species = sp
	}
	return cx
}

func condCanEdit(c echo.Context) bool {
	ls := session(c)
	return ls != nil && ls.User.HasAny(condRecorderRoles...)
}

func (s *Server) condSummarySection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	cx := s.condCtxFor(c, p)
	var in assess.CaseInputs
	if err := s.store.FillConditioning(c.Request().Context(), p.ID, &in); err != nil {
		return views.Section{}, false, err
	}
	sum := views.CondSummary{Patient: p, InCare: p.InCare(), CanEdit: condCanEdit(c), Facts: s.condFacts(cx, in)}
	aquatic := cx.species == nil || cx.species.Group.Aquatic()
	for _, ck := range condKinds() {
		if ck.kind == records.KindWaterproof && !aquatic && len(in.Waterproofing) == 0 {
			continue
		}
		sum.Links = append(sum.Links, views.CondLink{Href: condNewURL(p, ck), Label: ck.button, TestID: "add-" + string(ck.kind)})
	}
	return views.Section{ID: "conditioning", Title: "Conditioning", Body: views.CondSummaryBody(sum)}, true, nil
}

// condFacts are the latest of each kind of record, in a line each.
func (s *Server) condFacts(cx *condCtx, in assess.CaseInputs) []views.RefRow {
	var rows []views.RefRow
	add := func(label, value, note string) {
		rows = append(rows, views.RefRow{Label: label, Value: value, Source: note})
	}
	if n := len(in.WeighIns); n > 0 {
		w := in.WeighIns[n-1]
		add("Latest mass", condWeighInText(w), condDate(w.At)+condMassTrend(in.WeighIns))
	}
	if n := len(in.Conditions); n > 0 {
		add("Condition", condConditionText(in.Conditions[n-1]), condDate(in.Conditions[n-1].At))
	}
	if n := len(in.Wings); n > 0 {
		w := in.Wings[n-1]
		add("Wings", condWingText(w), condDate(w.At))
	}
	if n := len(in.Trials); n > 0 {
		add("Latest takeoff trial", condTrialText(in.Trials[n-1]), condDate(in.Trials[n-1].At))
	}
	if n := len(in.Sessions); n > 0 {
		add("Latest flight session", condSessionText(in.Sessions[n-1]), condDate(in.Sessions[n-1].At))
	}
	if n := len(in.Waterproofing); n > 0 {
		add("Waterproofing", condWaterproofText(in.Waterproofing[n-1]), condDate(in.Waterproofing[n-1].At))
	}
	if n := len(in.Housing); n > 0 {
		h := in.Housing[n-1]
		add("Housed in", condHousingText(h), "since "+condDate(h.From))
		days := assess.PrereleaseDays(in.Housing, s.now())
		note := ""
		if cx.species != nil && cx.species.MinPrereleaseDays != nil {
			note = fmt.Sprintf("at least %d days advised for this species", *cx.species.MinPrereleaseDays)
		}
		add("Pre-release housing", fmt.Sprintf("%.1f days", days), note)
	}
	return rows
}

// condMassTrend describes the change over the last three weigh-ins.
func condMassTrend(ws []assess.WeighIn) string {
	if len(ws) < 2 {
		return ""
	}
	first := ws[max(0, len(ws)-3)]
	last := ws[len(ws)-1]
	if first.MassG <= 0 {
		return ""
	}
	pct := (last.MassG/first.MassG - 1) * 100
	return fmt.Sprintf(" · %+.1f %% since %s", pct, condDate(first.At))
}

// timelineShown is how many records an unfiltered timeline shows at first.
const timelineShown = 12

func (s *Server) condTimelineSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	cx := s.condCtxFor(c, p)
	filter := records.Kind(c.QueryParam("kind"))
	kinds := records.ConditioningKinds
	if slices.Contains(kinds, filter) {
		kinds = []records.Kind{filter}
	} else {
		filter = ""
	}
	es, err := s.store.Entries(c.Request().Context(), p.ID, records.EntryFilter{Kinds: kinds, AllVersions: true, Newest: true})
	if err != nil {
		return views.Section{}, false, err
	}
	t := views.Timeline{Patient: p, Filter: filter, CanEdit: condCanEdit(c)}
	base := "/patients/" + p.CaseNumber
	t.Filters = append(t.Filters, views.TimelineFilter{Href: base + "#conditioning-history", Label: "All", Current: filter == ""})
	for _, ck := range condKinds() {
		t.Filters = append(t.Filters, views.TimelineFilter{Href: base + "?kind=" + string(ck.kind) + "#conditioning-history",
			Label: ck.plural, Current: filter == ck.kind})
	}
	groups := condGroupVersions(es)
	// A long stay makes a long history: unfiltered, the newest records are
	// shown and the rest are one tap away.
	if filter == "" && c.QueryParam("all") != "1" && len(groups) > timelineShown {
		t.Hidden = len(groups) - timelineShown
		t.AllHref = base + "?all=1#conditioning-history"
		groups = groups[:timelineShown]
	}
	for _, versions := range groups {
		t.Items = append(t.Items, s.timelineItem(cx, versions))
	}
	return views.Section{ID: "conditioning-history", Title: "Conditioning records", Body: views.TimelineBody(t)}, true, nil
}

// condGroupVersions groups entries (newest first) by record, each record's
// versions oldest first, records in the order of their newest version.
func condGroupVersions(es []records.Entry) [][]records.Entry {
	byKey := map[int64][]records.Entry{}
	var order []int64
	for _, e := range es {
		if _, seen := byKey[e.Key]; !seen {
			order = append(order, e.Key)
		}
		byKey[e.Key] = append(byKey[e.Key], e)
	}
	out := make([][]records.Entry, 0, len(order))
	for _, k := range order {
		vs := byKey[k]
		slices.SortFunc(vs, func(a, b records.Entry) int { return a.Version - b.Version })
		out = append(out, vs)
	}
	// The timeline is ordered by when the current version says the
	// observation happened.
	slices.SortStableFunc(out, func(a, b []records.Entry) int {
		return b[len(b)-1].At.Compare(a[len(a)-1].At)
	})
	return out
}

// timelineItem renders one record from its versions, oldest first.
func (s *Server) timelineItem(cx *condCtx, versions []records.Entry) views.TimelineItem {
	first, cur := versions[0], versions[len(versions)-1]
	ck, _ := condKindOf(cur.Kind)
	it := views.TimelineItem{Key: cur.Key, Kind: cur.Kind, KindLabel: ck.title, At: cur.At, By: first.ByName,
		CorrectURL: condRecordURL(cx.patient, cur.Key, "correct"), RemoveURL: condRecordURL(cx.patient, cur.Key, "remove")}
	it.Summary, it.Details, it.Caution, it.Flag = s.condDescribe(cx, cur)
	if len(versions) > 1 {
		it.CorrectedBy, it.CorrectedAt = cur.ByName, cur.CreatedAt
		for _, v := range versions {
			sum, _, _, _ := s.condDescribe(cx, v)
			it.Versions = append(it.Versions, views.TimelineVersion{Version: v.Version, At: v.At, By: v.ByName,
				CreatedAt: v.CreatedAt, Summary: sum, Current: v.ID == cur.ID})
		}
	}
	if cur.RemovedAt != nil {
		it.Removed = true
		it.RemovedNote = fmt.Sprintf("Removed %s by %s: %s", condWhen(*cur.RemovedAt), cur.RemovedBy, cur.RemovedReason)
	}
	return it
}

// condDescribe turns one stored record into a line of text, details, a
// caution and a flag.
func (s *Server) condDescribe(cx *condCtx, e records.Entry) (summary string, details []string, caution, flag string) {
	bad := func(err error) (string, []string, string, string) {
		s.log.Error("conditioning record unreadable", "entry", e.ID, "err", err)
		return "(this record could not be read)", nil, "", ""
	}
	switch e.Kind {
	case records.KindWeighIn:
		var w assess.WeighIn
		if err := e.Decode(&w); err != nil {
			return bad(err)
		}
		if cx.species != nil {
			if mc := assess.CheckMass("mass_g", w.MassG, cx.species, cx.patient.Sex); mc != nil {
				lo, hi := cx.species.MassRangeG(cx.patient.Sex)
				flag = fmt.Sprintf("Outside the species' usual range (%s to %s g).", condNum(lo), condNum(hi))
			}
		}
		return condWeighInText(w), condNonEmpty(w.Note), "", flag
	case records.KindCondition:
		var c assess.ConditionScore
		if err := e.Decode(&c); err != nil {
			return bad(err)
		}
		return condConditionText(c), nil, "", ""
	case records.KindWing:
		var w assess.WingMeasurement
		if err := e.Decode(&w); err != nil {
			return bad(err)
		}
		details = condFeatherDetails(w.Feathers)
		if w.Note != "" {
			details = append(details, w.Note)
		}
		if w.SpanMM != nil && assess.CheckSpan("span_mm", *w.SpanMM, cx.species) != nil {
			flag = fmt.Sprintf("Span far from the species' reference (%s mm).", condNum(cx.species.SpanMM))
		}
		return condWingText(w), details, "", flag
	case records.KindTrial:
		var t assess.TakeoffTrial
		if err := e.Decode(&t); err != nil {
			return bad(err)
		}
		if t.Mode == assess.TrialDrop {
			caution = fmt.Sprintf("Drop test from %s m: a fall can injure a bird that cannot fly.", condOptNum(t.DropHeightM))
		}
		switch rules := assess.TrialRulesFor(cx.species, 0); {
		case !rules.Safe(t.Mode):
			details = append(details, "Not a mode suited to "+strings.ToLower(rules.GroupLabel)+"; reason given: "+t.ModeReason)
		case t.ModeReason != "":
			details = append(details, "Reason for the mode: "+t.ModeReason)
		}
		details = append(details, condNonEmpty(t.Notes)...)
		return condTrialText(t), details, caution, ""
	case records.KindSession:
		var x assess.FlightSession
		if err := e.Decode(&x); err != nil {
			return bad(err)
		}
		return condSessionText(x), condSessionDetails(x), "", ""
	case records.KindWaterproof:
		var w assess.WaterproofTest
		if err := e.Decode(&w); err != nil {
			return bad(err)
		}
		return condWaterproofText(w), nil, "", ""
	case records.KindHousing:
		var h assess.Housing
		if err := e.Decode(&h); err != nil {
			return bad(err)
		}
		return "Moved to " + condHousingText(h), nil, "", ""
	}
	return string(e.Kind), nil, "", ""
}

func condNonEmpty(s string) []string {
	if strings.TrimSpace(s) == "" {
		return nil
	}
	return []string{s}
}

func condDate(t time.Time) string { return t.Local().Format("2006-01-02") }

func condWhen(t time.Time) string { return t.Local().Format("2006-01-02 15:04") }

func condWeighInText(w assess.WeighIn) string {
	return fmt.Sprintf("%s g, %s", condNum(w.MassG), views.FedLabel(w.Fed))
}

func condConditionText(c assess.ConditionScore) string {
	var parts []string
	if c.FatScore != nil {
		parts = append(parts, fmt.Sprintf("fat %d on the %s scale", *c.FatScore, c.FatScale))
	}
	if c.MuscleScore != nil {
		parts = append(parts, fmt.Sprintf("pectoral muscle %d of 3", *c.MuscleScore))
	}
	if c.BodyCondition != nil {
		parts = append(parts, fmt.Sprintf("body condition %d of 5", *c.BodyCondition))
	}
	return strings.Join(parts, " · ")
}

func condWingText(w assess.WingMeasurement) string {
	var parts []string
	if w.SpanMM != nil {
		parts = append(parts, "span "+condNum(*w.SpanMM)+" mm")
	}
	if w.AreaCM2 != nil {
		parts = append(parts, fmt.Sprintf("area %s cm² (%s)", condNum(*w.AreaCM2), w.AreaMethod))
	}
	if w.ChordMM != nil {
		parts = append(parts, "flattened chord "+condNum(*w.ChordMM)+" mm")
	}
	switch {
	case w.Feathers == nil:
		parts = append(parts, "feathers not examined")
	case len(condFeatherDetails(w.Feathers)) == 0:
		parts = append(parts, "flight feathers all intact")
	default:
		parts = append(parts, fmt.Sprintf("%d flight feathers not intact", condFeathersNotIntact(w.Feathers)))
	}
	return strings.Join(parts, " · ")
}

func condFeathersNotIntact(m *assess.FeatherMap) int {
	n := 0
	for _, t := range assess.FeatherTracts {
		for _, f := range *m.Tract(t.Prefix) {
			if f != assess.FeatherIntact {
				n++
			}
		}
	}
	return n
}

// condFeatherDetails lists the feathers that are not intact, per tract:
// "Left primaries: P8 imped, P9 imped".
func condFeatherDetails(m *assess.FeatherMap) []string {
	if m == nil {
		return nil
	}
	var out []string
	for _, t := range assess.FeatherTracts {
		var bad []string
		for i, f := range *m.Tract(t.Prefix) {
			if f != assess.FeatherIntact {
				bad = append(bad, fmt.Sprintf("%s%d %s", t.Short, i+1, views.FeatherLabel(f)))
			}
		}
		if len(bad) > 0 {
			out = append(out, t.Label+": "+strings.Join(bad, ", "))
		}
	}
	return out
}

func condTrialText(t assess.TakeoffTrial) string {
	parts := []string{views.ModeLabel(t.Mode)}
	if t.Surface != "" {
		parts[0] += " from " + t.Surface
	}
	if t.RunUpM != nil {
		parts = append(parts, "run-up "+condNum(*t.RunUpM)+" m")
	}
	if t.DropHeightM != nil {
		parts = append(parts, "drop "+condNum(*t.DropHeightM)+" m")
	}
	wind := string(t.Wind)
	if t.WindDir != assess.WindNone {
		wind += " " + string(t.WindDir) + " wind"
	} else if t.Wind != assess.WindCalm {
		wind += " wind"
	}
	parts = append(parts, wind)
	var res []string
	climbed := 0
	for _, a := range t.Attempts {
		res = append(res, views.AttemptLabel(a))
		if a == assess.AttemptClimbed {
			climbed++
		}
	}
	parts = append(parts, fmt.Sprintf("%d of %d attempts climbed away (%s)", climbed, len(t.Attempts), strings.Join(res, ", ")))
	return strings.Join(parts, " · ")
}

func condSessionText(x assess.FlightSession) string {
	parts := []string{views.ExerciseLabel(x.Exercise)}
	if x.EnclosureName != "" {
		parts[0] += " in " + x.EnclosureName
	}
	if x.EnclosureLengthM != nil {
		parts[0] += fmt.Sprintf(" (%s m)", condNum(*x.EnclosureLengthM))
	}
	parts = append(parts, fmt.Sprintf("%d passes, longest unbroken run %d", x.Passes, x.LongestRun),
		"reached the "+views.HeightLabel(x.Highest))
	if x.Landings > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d landings controlled", x.LandingsControlled, x.Landings))
	}
	if x.RecoveryS != nil {
		parts = append(parts, fmt.Sprintf("breathing back to resting in %d s", *x.RecoveryS))
	}
	if x.AirTempC != nil {
		parts = append(parts, condNum(*x.AirTempC)+" °C")
	}
	if x.DurationS != nil {
		parts = append(parts, condNum(math.Round(float64(*x.DurationS)/6)/10)+" min")
	}
	return strings.Join(parts, " · ")
}

func condSessionDetails(x assess.FlightSession) []string {
	var seen []string
	if x.OpenMouth {
		seen = append(seen, "open-mouth breathing")
	}
	if x.TailBobbing {
		seen = append(seen, "tail bobbing")
	}
	if x.Droop == assess.DroopLeft || x.Droop == assess.DroopRight {
		seen = append(seen, "wing droop, "+views.DroopLabel(x.Droop))
	}
	if x.Asymmetry {
		seen = append(seen, "asymmetry in flight")
	}
	var out []string
	if len(seen) > 0 {
		out = append(out, "Seen: "+strings.Join(seen, ", "))
	} else {
		out = append(out, "No open-mouth breathing, tail bobbing, wing droop or asymmetry seen")
	}
	if x.WingbeatHz != nil {
		out = append(out, "Wingbeat "+condNum(*x.WingbeatHz)+" Hz (from slow-motion video)")
	}
	if x.Group {
		out = append(out, "Recorded for a group of "+strconv.Itoa(x.GroupSize)+" birds")
	}
	return append(out, condNonEmpty(x.Notes)...)
}

func condWaterproofText(w assess.WaterproofTest) string {
	wet := "not wet to the skin"
	if w.WetToSkin {
		wet = "wet to the skin"
	}
	return fmt.Sprintf("%s min on water · %s · %s", condNum(w.MinutesOnWater), wet, views.WaterproofLabel(w.Result))
}

func condHousingText(h assess.Housing) string {
	s := fmt.Sprintf("%s (%s, %s)", h.EnclosureName, views.EnclosureKindLabel(h.Kind), views.EnclosureSize(h.LengthM, h.WidthM, h.HeightM))
	if h.Prerelease {
		s += " · pre-release housing"
	}
	return s
}

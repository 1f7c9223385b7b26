package assess

import (
	"errors"
	"fmt"
	"slices"
	"time"
)

// eval is the working state of one Evaluate call.
type eval struct {
	in    CaseInputs // records sorted by time, oldest first
	sp    *Species
	g     Group
	th    Thresholds
	site  Site
	rho   float64
	now   time.Time
	stale time.Duration

	mass     *WeighIn         // the weigh-in the mass criterion and the model read
	fat      *ConditionScore  // latest with a fat score
	muscle   *ConditionScore  // latest with a muscle score
	wing     *WingMeasurement // latest with a span
	feathers *WingMeasurement // latest with a feather map

	phys     *Physics
	cautions []Caution
	notes    []string
}

// Evaluate assesses a patient's readiness for release from its records in,
// the species reference sp (its values for the patient's sex are used), the
// thresholds th (the zero value: DefaultThresholds()), the release site and
// the instant now (evidence older than the staleness threshold before now is
// stale). It is pure and deterministic.
//
// Criteria that do not apply to the species' group are left out; a criterion
// without evidence is not assessed, never met. The outcome is
//
//   - insufficient when any core criterion (mass, pectoral muscle, takeoff,
//     stamina, each clinical-clearance item) is not assessed; else
//   - refer when a clearance item is not cleared, the patient's power
//     margin is below 1, or wing droop, asymmetry or a failed takeoff is
//     flagged as pointing to injury; else
//   - continue when any criterion is unmet or borderline, or a core
//     criterion rests on stale evidence; else
//   - ready.
//
// Invalid records, species, thresholds or site give ValidationErrors naming
// the field (records as "inputs.weigh_ins[2].mass_g"). Records the flight
// model cannot use (no mass, an implausible shape) leave Physics nil and its
// criteria not assessed, with a note.
func Evaluate(in CaseInputs, sp *Species, th Thresholds, site Site, now time.Time) (Assessment, error) {
	if sp == nil {
		return Assessment{}, &ValidationError{Field: "species", Message: "a species reference is required"}
	}
	th = th.orDefault()
	var errs ValidationErrors
	errs.add(checkSpeciesRow("species", sp))
	errs.add(checkInputs("inputs", in))
	errs.add(th.Validate())
	errs.add(site.Validate())
	if len(errs) > 0 {
		return Assessment{}, errs
	}
	e := newEval(in, sp, th, site, now)
	e.physics()
	a := Assessment{
		Criteria: e.criteria(), Physics: e.phys, EvaluatedAt: now,
		Params:   AssessmentParams{Flight: defaultParams(), Thresholds: e.appliedThresholds()},
		Species:  e.speciesUsed(),
		Site:     SiteUsed{ElevationM: site.ElevationM, TempC: site.TempC, AirDensityKgM3: e.rho},
		Exercise: e.exercise(),
	}
	for i := range a.Criteria {
		c := &a.Criteria[i]
		c.Stale = c.AsOf != nil && now.Sub(*c.AsOf) > e.stale
	}
	a.Outcome = decide(a.Criteria)
	a.Cautions = append(e.cautions, Caution{ID: "advisory",
		Text: "Advice only: the licensed rehabilitator and the veterinarian decide, and local law and the permit's conditions come first."})
	a.Notes = e.notes
	if a.Notes == nil {
		a.Notes = []string{}
	}
	return a, nil
}

// newEval sorts copies of the records and picks the latest of each kind.
func newEval(in CaseInputs, sp *Species, th Thresholds, site Site, now time.Time) *eval {
	e := &eval{in: sortedInputs(in), sp: sp, g: sp.Group, th: th, site: site, now: now,
		stale: time.Duration(th.must(ThStaleDays)) * 24 * time.Hour}
	e.rho, _ = site.Density()
	e.mass = e.pickMass()
	for i := range e.in.Conditions {
		c := &e.in.Conditions[i]
		if c.FatScore != nil {
			e.fat = c
		}
		if c.MuscleScore != nil {
			e.muscle = c
		}
	}
	for i := range e.in.Wings {
		w := &e.in.Wings[i]
		if w.SpanMM != nil {
			e.wing = w
		}
		if w.Feathers != nil {
			e.feathers = w
		}
	}
	return e
}

// sortedInputs returns in with every record list copied and stably sorted
// by time, oldest first.
func sortedInputs(in CaseInputs) CaseInputs {
	in.WeighIns = sortedBy(in.WeighIns, func(r WeighIn) time.Time { return r.At })
	in.Conditions = sortedBy(in.Conditions, func(r ConditionScore) time.Time { return r.At })
	in.Wings = sortedBy(in.Wings, func(r WingMeasurement) time.Time { return r.At })
	in.Trials = sortedBy(in.Trials, func(r TakeoffTrial) time.Time { return r.At })
	in.Sessions = sortedBy(in.Sessions, func(r FlightSession) time.Time { return r.At })
	in.Waterproofing = sortedBy(in.Waterproofing, func(r WaterproofTest) time.Time { return r.At })
	in.Housing = sortedBy(in.Housing, func(r Housing) time.Time { return r.From })
	in.Clearances = sortedBy(in.Clearances, func(r Clearance) time.Time { return r.At })
	return in
}

func sortedBy[T any](xs []T, at func(T) time.Time) []T {
	out := slices.Clone(xs)
	slices.SortStableFunc(out, func(a, b T) int { return at(a).Compare(at(b)) })
	return out
}

// pickMass returns the weigh-in to read: the latest before-feed weigh-in
// that is not stale (crop contents skew a mass; PRACTICE.md, after
// Hand-Rearing Birds 2020), otherwise the latest weigh-in of any kind; nil
// without one.
func (e *eval) pickMass() *WeighIn {
	var latest, before *WeighIn
	for i := range e.in.WeighIns {
		w := &e.in.WeighIns[i]
		latest = w
		if w.Fed == FedBefore && e.now.Sub(w.At) <= e.stale {
			before = w
		}
	}
	if before != nil {
		return before
	}
	return latest
}

// normalLaunch is the species' usual launch mode: its own, else its group's.
func (e *eval) normalLaunch() LaunchMode {
	if e.sp.LaunchMode.Valid() {
		return e.sp.LaunchMode
	}
	return e.g.NormalLaunchMode()
}

// basis returns the provenance of threshold id for the species' group.
func (e *eval) basis(id ThresholdID) Basis {
	s, _ := e.th.Lookup(id, e.g)
	return Basis{Kind: s.Provenance, Source: s.Source}
}

// use records the thresholds c applies; the first gives its provenance when
// c has none yet.
func (e *eval) use(c *Criterion, ids ...ThresholdID) {
	c.Thresholds = append(c.Thresholds, ids...)
	if c.Provenance.Kind == "" && len(ids) > 0 {
		c.Provenance = e.basis(ids[0])
	}
}

// value returns threshold id for the species' group.
func (e *eval) value(id ThresholdID) (float64, bool) { return e.th.Value(id, e.g) }

// caution adds a case caution once.
func (e *eval) caution(id, text, source string) {
	if !slices.ContainsFunc(e.cautions, func(c Caution) bool { return c.ID == id }) {
		e.cautions = append(e.cautions, Caution{ID: id, Text: text, Source: source})
	}
}

func (e *eval) note(s string) { e.notes = append(e.notes, s) }

// criteria builds every criterion that applies to the species' group, in
// assessment order.
func (e *eval) criteria() []Criterion {
	g := e.g
	steps := []struct {
		applies bool
		build   func() Criterion
	}{
		{true, e.critMass},
		{true, e.critMassTrend},
		{true, e.critFat},
		{true, e.critMuscle},
		{g.needsWholeFlight(), e.critOuterPrimaries},
		{g.needsWholeFlight(), e.critTail},
		{true, e.critMinSpeed},
		{true, e.critPowerMargin},
		{true, e.critTakeoff},
		{true, e.critStamina},
		{true, e.critRecovery},
		{true, e.critBreathing},
		{true, e.critWingDroop},
		{true, e.critAsymmetry},
		{g.perches(), e.critHeight},
		{g.perches(), e.critLandings},
		{g.Aquatic(), e.critWaterproofing},
		{e.prereleaseApplies(), e.critPrerelease},
		{e.enclosureApplies(), e.critEnclosure},
	}
	var out []Criterion
	for _, s := range steps {
		if s.applies {
			out = append(out, s.build())
		}
	}
	for _, item := range ClearanceItemsFor(g) {
		out = append(out, e.critClearance(item))
	}
	return out
}

// decide applies the outcome rule of Evaluate to the criteria.
func decide(cs []Criterion) Outcome {
	o := Outcome{Reasons: []OutcomeReason{}, Referrals: []OutcomeReason{}, NotAssessed: []CriterionID{}}
	reason := func(c Criterion) OutcomeReason {
		return OutcomeReason{Criterion: c.ID, Title: c.Title, Status: c.Status, Stale: c.Stale, Text: c.Reason}
	}
	var insufficient, cont, ready []OutcomeReason
	for _, c := range cs {
		switch {
		case c.Status == StatusNotAssessed:
			o.NotAssessed = append(o.NotAssessed, c.ID)
			if c.Core {
				insufficient = append(insufficient, reason(c))
			}
		case c.Refer:
			o.Referrals = append(o.Referrals, reason(c))
		case c.Status == StatusUnmet || c.Status == StatusBorderline || c.Core && c.Stale:
			cont = append(cont, reason(c))
		case c.Core:
			ready = append(ready, reason(c))
		}
	}
	switch {
	case len(insufficient) > 0:
		o.Level, o.Reasons = OutcomeInsufficient, insufficient
	case len(o.Referrals) > 0:
		o.Level, o.Reasons = OutcomeRefer, o.Referrals
	case len(cont) > 0:
		o.Level, o.Reasons = OutcomeContinue, cont
	default:
		o.Level, o.Reasons = OutcomeReady, ready
	}
	o.Label = OutcomeLabel(o.Level)
	return o
}

// appliedThresholds lists, in the thresholds' own order, every threshold
// with a value for the species' group.
func (e *eval) appliedThresholds() []AppliedThreshold {
	out := []AppliedThreshold{}
	for _, th := range e.th.list {
		s, ok := e.th.Lookup(th.ID, e.g)
		if !ok {
			continue
		}
		out = append(out, AppliedThreshold{ID: th.ID, Label: th.Label, Value: *s.Value, Unit: th.Unit,
			Provenance: Basis{Kind: s.Provenance, Source: s.Source}})
	}
	return out
}

func (e *eval) speciesUsed() SpeciesUsed {
	lo, hi := e.sp.MassRangeG(e.in.Sex)
	return SpeciesUsed{Species: *e.sp, Sex: e.in.Sex, ReferenceMassG: e.sp.Reference(e.in.Sex).MassKg * 1000,
		MassRangeForG: RangeG{Min: lo, Max: hi}, GroupLabel: e.g.Label(), NormalLaunch: e.normalLaunch()}
}

// exercise summarises the sessions and adds the cage-only caution for
// raptors (Holz et al. 2006).
func (e *eval) exercise() ExerciseSummary {
	var x ExerciseSummary
	for _, s := range e.in.Sessions {
		x.Sessions++
		switch s.Exercise {
		case ExerciseCage:
			x.Cage++
		case ExerciseCreance:
			x.Creance++
		case ExerciseFreeFlight:
			x.FreeFlight++
		}
		if x.First == nil {
			x.First = evalPtr(s.At)
		}
		x.Last = evalPtr(s.At)
	}
	x.CageOnly = x.Sessions > 0 && x.Cage == x.Sessions
	x.Text = "no flight sessions recorded"
	if x.Sessions > 0 {
		x.Text = fmt.Sprintf("%s: %d in a cage, %d on a creance, %d in free flight", countNoun(x.Sessions, "session"), x.Cage, x.Creance, x.FreeFlight)
	}
	if x.CageOnly && e.g == GroupRaptor {
		e.caution("cage-only-raptor",
			"This raptor has been exercised only in a cage: all 9 cage-exercised peregrine falcons lost weight after release, and cage flight suffices for some species but not others. Consider creance or free-flight work before release.",
			"Holz, P.H., Naisbitt, R. & Mansell, P. 2006. J. Avian Med. Surg. 20(1):15; Greene, D.M., Engelmann, M. & Steck, T.R. 2004. J. Raptor Res. 38(2):125–132")
	}
	return x
}

// errNoMass is why the model cannot run without a weigh-in.
var errNoMass = errors.New("no weigh-in is recorded")

// latestBy returns the latest element of xs (sorted oldest first) for which
// ok holds, or nil.
func latestBy[T any](xs []T, ok func(*T) bool) *T {
	for i := len(xs) - 1; i >= 0; i-- {
		if ok(&xs[i]) {
			return &xs[i]
		}
	}
	return nil
}

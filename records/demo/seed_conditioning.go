package demo

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"time"

	"aloft/assess"
	"aloft/records"
)

// conditioningSeeders stores the conditioning records of the demo
// (testdata/demo/history-conditioning.json). Each record's data is the
// assess type as JSON without its time (the event's day and hour give it);
// a wing's feather map lists only the feathers that are not intact;
// housing and sessions name an enclosure, which an "enclosure" event
// creates first. A "conditioning-correction" or "conditioning-removal"
// event changes the patient's latest record of a kind. Every record passes the checks a form applies,
// with the species: an implausible mass or span needs a note.
func conditioningSeeders() map[string]eventSeeder {
	return map[string]eventSeeder{
		string(records.KindWeighIn):    seedCond(condWeighIn),
		string(records.KindCondition):  seedCond(condScore),
		string(records.KindWing):       seedCond(condWing),
		string(records.KindTrial):      seedCond(condTrial),
		string(records.KindSession):    seedCond(condSession),
		string(records.KindWaterproof): seedCond(condWaterproof),
		string(records.KindHousing):    seedCond(condHousing),
		"enclosure":                    seedEnclosure,
		"conditioning-correction":      seedCorrection,
		"conditioning-removal":         seedRemoval,
	}
}

// condSeed is what one conditioning event needs to build its record.
type condSeed struct {
	ctx     context.Context
	sd      *Seeded
	p       records.Patient
	species *assess.Species
	at      time.Time
}

// condBuilder turns an event's data into a checked record.
type condBuilder func(cs condSeed, data json.RawMessage) (any, error)

func condDecode(data json.RawMessage, v any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	return dec.Decode(v)
}

// condEventAt is an event's instant: not before the admission, not after now.
func condEventAt(sd *Seeded, p records.Patient, ev Event) time.Time {
	at := sd.At(p.AdmittedAt, ev)
	if earliest := p.AdmittedAt.Add(20 * time.Minute); at.Before(earliest) {
		at = earliest
	}
	if latest := sd.Now.Add(-time.Minute); at.After(latest) {
		at = latest
	}
	return at.In(time.Local).Truncate(time.Minute)
}

func newCondSeed(ctx context.Context, sd *Seeded, p records.Patient, ev Event) (condSeed, error) {
	sp, err := sd.Species.Find(p.SpeciesScientific)
	return condSeed{ctx: ctx, sd: sd, p: p, species: sp, at: condEventAt(sd, p, ev)}, err
}

func seedCond(build condBuilder) eventSeeder {
	return func(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
		cs, err := newCondSeed(ctx, sd, p, ev)
		if err != nil {
			return err
		}
		rec, err := build(cs, ev.Data)
		if err != nil {
			return err
		}
		_, err = sd.Store.AddEntry(ctx, sd.UserID(ev.By), records.NewEntry{PatientID: p.ID, Kind: records.Kind(ev.Kind), At: cs.at, Data: rec})
		return err
	}
}

func condWeighIn(cs condSeed, data json.RawMessage) (any, error) {
	var w assess.WeighIn
	if err := condDecode(data, &w); err != nil {
		return nil, err
	}
	w.At = cs.at
	if err := w.Validate(); err != nil {
		return nil, err
	}
	if mc := assess.CheckMass("mass_g", w.MassG, cs.species, cs.p.Sex); mc != nil && mc.NeedsConfirm && w.Note == "" {
		return nil, &mc.ValidationError
	}
	return w, nil
}

func condScore(cs condSeed, data json.RawMessage) (any, error) {
	var c assess.ConditionScore
	if err := condDecode(data, &c); err != nil {
		return nil, err
	}
	c.At = cs.at
	return c, c.Validate()
}

// seedWing is a wing measurement as the demo file gives it: the feather map
// as the feathers that are not intact, by form field name ("lp8": "imped").
type seedWing struct {
	SpanMM           *float64                        `json:"span_mm"`
	AreaCM2          *float64                        `json:"area_cm2"`
	AreaMethod       assess.AreaMethod               `json:"area_method"`
	ChordMM          *float64                        `json:"chord_mm"`
	Note             string                          `json:"note"`
	FeathersExamined bool                            `json:"feathers_examined"`
	NotIntact        map[string]assess.FeatherStatus `json:"not_intact"`
}

func condWing(cs condSeed, data json.RawMessage) (any, error) {
	var sw seedWing
	if err := condDecode(data, &sw); err != nil {
		return nil, err
	}
	w := assess.WingMeasurement{At: cs.at, SpanMM: sw.SpanMM, AreaCM2: sw.AreaCM2, AreaMethod: sw.AreaMethod, ChordMM: sw.ChordMM, Note: sw.Note}
	if w.AreaCM2 == nil && w.AreaMethod == assess.AreaEstimated && w.SpanMM != nil {
		a := assess.EstimateAreaCM2(*w.SpanMM, cs.species)
		w.AreaCM2 = &a
	}
	if sw.FeathersExamined {
		w.Feathers = condSeedFeathers(assess.FeatherCountsOf(cs.species), sw.NotIntact)
	}
	used := 0
	for _, t := range assess.FeatherTracts {
		for i := range assess.FeatherCountsOf(cs.species).Count(t.Prefix) {
			if _, ok := sw.NotIntact[fmt.Sprintf("%s%d", t.Prefix, i+1)]; ok {
				used++
			}
		}
	}
	if used != len(sw.NotIntact) {
		return nil, fmt.Errorf("demo: wing: a feather in %v is not one of the species' feathers", sw.NotIntact)
	}
	if err := w.Validate(cs.species); err != nil {
		return nil, err
	}
	if w.SpanMM != nil && w.Note == "" {
		if sc := assess.CheckSpan("span_mm", *w.SpanMM, cs.species); sc != nil {
			return nil, &sc.ValidationError
		}
	}
	return w, nil
}

func condSeedFeathers(n assess.FeatherCounts, notIntact map[string]assess.FeatherStatus) *assess.FeatherMap {
	m := &assess.FeatherMap{}
	for _, t := range assess.FeatherTracts {
		fs := make([]assess.FeatherStatus, n.Count(t.Prefix))
		for i := range fs {
			fs[i] = assess.FeatherIntact
			if st, ok := notIntact[fmt.Sprintf("%s%d", t.Prefix, i+1)]; ok {
				fs[i] = st
			}
		}
		*m.Tract(t.Prefix) = fs
	}
	return m
}

func condTrial(cs condSeed, data json.RawMessage) (any, error) {
	var t assess.TakeoffTrial
	if err := condDecode(data, &t); err != nil {
		return nil, err
	}
	t.At = cs.at
	return t, t.Validate(assess.TrialRulesFor(cs.species, assess.DefaultDropCapM))
}

func condSession(cs condSeed, data json.RawMessage) (any, error) {
	var x assess.FlightSession
	if err := condDecode(data, &x); err != nil {
		return nil, err
	}
	x.At = cs.at
	if x.EnclosureName != "" {
		e, err := cs.sd.Store.EnclosureByName(cs.ctx, x.EnclosureName)
		if err != nil {
			return nil, fmt.Errorf("demo: session in %q: %w", x.EnclosureName, err)
		}
		if x.EnclosureLengthM == nil {
			l := e.LengthM
			x.EnclosureLengthM = &l
		}
	}
	return x, x.Validate()
}

func condWaterproof(cs condSeed, data json.RawMessage) (any, error) {
	var w assess.WaterproofTest
	if err := condDecode(data, &w); err != nil {
		return nil, err
	}
	w.At = cs.at
	return w, w.Validate()
}

func condHousing(cs condSeed, data json.RawMessage) (any, error) {
	var in struct {
		EnclosureName string `json:"enclosure_name"`
	}
	if err := condDecode(data, &in); err != nil {
		return nil, err
	}
	e, err := cs.sd.Store.EnclosureByName(cs.ctx, in.EnclosureName)
	if err != nil {
		return nil, fmt.Errorf("demo: housing in %q: %w", in.EnclosureName, err)
	}
	h := e.Housing(cs.at)
	return h, h.Validate()
}

// seedEnclosure adds one of the centre's enclosures (once: a name already
// there is left alone). Sizes are in metres.
func seedEnclosure(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var in struct {
		Name    string               `json:"name"`
		Kind    assess.EnclosureKind `json:"kind"`
		LengthM float64              `json:"length_m"`
		WidthM  float64              `json:"width_m"`
		HeightM float64              `json:"height_m"`
		Notes   string               `json:"notes"`
	}
	if err := condDecode(ev.Data, &in); err != nil {
		return err
	}
	if _, err := sd.Store.EnclosureByName(ctx, in.Name); err == nil {
		return nil
	}
	_, err := sd.Store.AddEnclosure(ctx, sd.UserID(ev.By), records.EnclosureInput{Name: in.Name, Kind: in.Kind,
		LengthM: in.LengthM, WidthM: in.WidthM, HeightM: in.HeightM, Notes: in.Notes})
	return err
}

// latestOf returns the patient's latest current record of a kind.
func latestOf(ctx context.Context, sd *Seeded, p records.Patient, kind records.Kind) (records.Entry, error) {
	es, err := sd.Store.Entries(ctx, p.ID, records.EntryFilter{Kinds: []records.Kind{kind}, Newest: true, Limit: 1})
	if err != nil {
		return records.Entry{}, err
	}
	if len(es) == 0 {
		return records.Entry{}, fmt.Errorf("demo: no %s to change: %w", kind, records.ErrNotFound)
	}
	return es[0], nil
}

var condBuilders = map[records.Kind]condBuilder{
	records.KindWeighIn: condWeighIn, records.KindCondition: condScore, records.KindWing: condWing,
	records.KindTrial: condTrial, records.KindSession: condSession, records.KindWaterproof: condWaterproof,
	records.KindHousing: condHousing,
}

// seedCorrection corrects the patient's latest record of a kind: data is
// {"target": kind, "data": the whole corrected record}; the record keeps
// the time it was observed.
func seedCorrection(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var in struct {
		Target records.Kind    `json:"target"`
		Data   json.RawMessage `json:"data"`
	}
	if err := condDecode(ev.Data, &in); err != nil {
		return err
	}
	build, ok := condBuilders[in.Target]
	if !ok || !slices.Contains(records.ConditioningKinds, in.Target) {
		return errors.New("demo: correction of an unknown kind " + string(in.Target))
	}
	cur, err := latestOf(ctx, sd, p, in.Target)
	if err != nil {
		return err
	}
	cs, err := newCondSeed(ctx, sd, p, ev)
	if err != nil {
		return err
	}
	cs.at = cur.At
	rec, err := build(cs, in.Data)
	if err != nil {
		return err
	}
	_, err = sd.Store.CorrectEntry(ctx, sd.UserID(ev.By), cur.Key, cur.Version, cur.At, rec)
	return err
}

// seedRemoval removes the patient's latest record of a kind, with a reason:
// {"target": kind, "reason": "…"}.
func seedRemoval(ctx context.Context, sd *Seeded, p records.Patient, ev Event) error {
	var in struct {
		Target records.Kind `json:"target"`
		Reason string       `json:"reason"`
	}
	if err := condDecode(ev.Data, &in); err != nil {
		return err
	}
	cur, err := latestOf(ctx, sd, p, in.Target)
	if err != nil {
		return err
	}
	return sd.Store.RemoveEntry(ctx, sd.UserID(ev.By), cur.Key, in.Reason)
}

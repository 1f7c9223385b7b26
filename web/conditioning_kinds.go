package web

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// One condKind per record type: defaults, options, parsing and the values
// a correction starts from.

func weighInKind() condKind {
	return condKind{kind: records.KindWeighIn, path: "weigh-ins", title: "Weigh-in", plural: "Weigh-ins", button: "Weigh",
		blank: func(s *Server, cx *condCtx, f *views.CondForm) { f.Values["fed"] = string(assess.FedBefore) },
		options: func(s *Server, cx *condCtx, f *views.CondForm) error {
			f.SpeciesNote = condMassNote(cx)
			return nil
		},
		parse: func(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
			p := &condParser{f: f}
			w := assess.WeighIn{At: p.at(s, cx), MassG: p.float("mass_g"), Fed: assess.FedState(f.V("fed")), Note: p.text("note")}
			p.merge(w.Validate())
			if cx.species != nil && p.ok("mass_g") {
				if mc := assess.CheckMass("mass_g", w.MassG, cx.species, cx.patient.Sex); mc != nil && mc.NeedsConfirm {
					p.confirm(&mc.ValidationError, "mass_g", "confirm_mass", w.Note)
				}
			}
			return w, w.At, p.errs
		},
		values: func(e records.Entry) (map[string]string, error) {
			var w assess.WeighIn
			err := e.Decode(&w)
			return map[string]string{"at": condAtValue(w.At), "mass_g": condNum(w.MassG), "fed": string(w.Fed), "note": w.Note}, err
		},
	}
}

// condMassNote states the species' usual range for the patient's sex.
func condMassNote(cx *condCtx) string {
	if cx.species == nil {
		return ""
	}
	lo, hi := cx.species.MassRangeG(cx.patient.Sex)
	if lo <= 0 {
		return ""
	}
	who := cx.species.CommonName
	if cx.patient.Sex == assess.SexFemale || cx.patient.Sex == assess.SexMale {
		who = string(cx.patient.Sex) + " " + who
	}
	return fmt.Sprintf("Usual adult range of a %s: %s to %s g.", who, condNum(lo), condNum(hi))
}

func conditionKind() condKind {
	return condKind{kind: records.KindCondition, path: "conditions", title: "Condition score", plural: "Condition", button: "Score condition",
		blank: func(s *Server, cx *condCtx, f *views.CondForm) { f.Values["fat_scale"] = string(assess.FatScaleKaiser) },
		parse: func(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
			p := &condParser{f: f}
			c := assess.ConditionScore{At: p.at(s, cx), FatScore: p.optInt("fat_score"), MuscleScore: p.optInt("muscle_score"),
				BodyCondition: p.optInt("body_condition")}
			if c.FatScore != nil {
				c.FatScale = assess.FatScale(f.V("fat_scale"))
			}
			p.merge(c.Validate())
			return c, c.At, p.errs
		},
		values: func(e records.Entry) (map[string]string, error) {
			var c assess.ConditionScore
			err := e.Decode(&c)
			scale := string(c.FatScale)
			if scale == "" {
				scale = string(assess.FatScaleKaiser)
			}
			return map[string]string{"at": condAtValue(c.At), "fat_score": condOptInt(c.FatScore), "fat_scale": scale,
				"muscle_score": condOptInt(c.MuscleScore), "body_condition": condOptInt(c.BodyCondition)}, err
		},
	}
}

func wingKind() condKind {
	return condKind{kind: records.KindWing, path: "wings", title: "Wing measurement", plural: "Wings", button: "Measure wings",
		blank: func(s *Server, cx *condCtx, f *views.CondForm) { f.Values["feathers_examined"] = "1" },
		options: func(s *Server, cx *condCtx, f *views.CondForm) error {
			if sp := cx.species; sp != nil && sp.SpanMM > 0 {
				f.SpeciesNote = fmt.Sprintf("Reference span of a %s: %s mm; wing area %s cm².", sp.CommonName, condNum(sp.SpanMM), condNum(sp.AreaCM2))
			}
			f.Feathers = condFeatherViews(f, condFeatherCounts(cx.species))
			return nil
		},
		parse: parseWing,
		values: func(e records.Entry) (map[string]string, error) {
			var w assess.WingMeasurement
			err := e.Decode(&w)
			v := map[string]string{"at": condAtValue(w.At), "span_mm": condOptNum(w.SpanMM), "area_cm2": condOptNum(w.AreaCM2),
				"area_method": string(w.AreaMethod), "chord_mm": condOptNum(w.ChordMM), "note": w.Note, "feathers_examined": condOnOff(w.Feathers != nil)}
			if w.Feathers != nil {
				for _, t := range assess.FeatherTracts {
					for i, st := range *w.Feathers.Tract(t.Prefix) {
						v[fmt.Sprintf("%s%d", t.Prefix, i+1)] = string(st)
					}
				}
			}
			return v, err
		},
	}
}

func parseWing(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
	p := &condParser{f: f}
	w := assess.WingMeasurement{At: p.at(s, cx), SpanMM: p.optFloat("span_mm"), AreaCM2: p.optFloat("area_cm2"),
		AreaMethod: assess.AreaMethod(f.V("area_method")), ChordMM: p.optFloat("chord_mm"), Note: p.text("note")}
	switch {
	case w.AreaCM2 == nil && w.AreaMethod == assess.AreaEstimated && w.SpanMM != nil && cx.species != nil:
		if a := assess.EstimateAreaCM2(*w.SpanMM, cx.species); a > 0 {
			w.AreaCM2 = &a
		}
	case w.AreaCM2 == nil && w.AreaMethod == assess.AreaEstimated && p.ok("area_cm2"):
		p.fail(&assess.ValidationError{Field: "area_method", Message: "to estimate the area, enter the span (the species reference scales with it)"})
	case w.AreaCM2 == nil:
		w.AreaMethod = ""
	}
	if f.On("feathers_examined") {
		w.Feathers = condParseFeathers(f, condFeatherCounts(cx.species))
	}
	p.merge(w.Validate(cx.species))
	if w.SpanMM != nil && p.ok("span_mm") {
		if sc := assess.CheckSpan("span_mm", *w.SpanMM, cx.species); sc != nil {
			p.confirm(&sc.ValidationError, "span_mm", "confirm_span", w.Note)
		}
	}
	return w, w.At, p.errs
}

func trialKind() condKind {
	return condKind{kind: records.KindTrial, path: "trials", title: "Takeoff trial", plural: "Trials", button: "Takeoff trial",
		blank: func(s *Server, cx *condCtx, f *views.CondForm) {
			r := assess.TrialRulesFor(cx.species, s.dropCapM(cx.c))
			if len(r.SafeModes) > 0 {
				f.Values["mode"] = string(r.SafeModes[0])
			}
			f.Values["wind"] = string(assess.WindCalm)
		},
		options: func(s *Server, cx *condCtx, f *views.CondForm) error {
			r := assess.TrialRulesFor(cx.species, s.dropCapM(cx.c))
			safe := r.SafeModes
			if safe == nil {
				safe = assess.TrialModes
			}
			f.SafeModes, f.OtherModes = condModeOptions(safe), condModeOptions(r.OtherModes())
			f.GroupLabel, f.DropCapM = strings.ToLower(r.GroupLabel), r.DropCapM
			if f.GroupLabel == "" {
				f.GroupLabel = "this species"
			}
			f.Attempts = 6
			for i := 6; i < 20; i++ {
				if f.V(fmt.Sprintf("attempt_%d", i+1)) != "" {
					f.Attempts = i + 1
				}
			}
			return nil
		},
		parse: parseTrial,
		values: func(e records.Entry) (map[string]string, error) {
			var t assess.TakeoffTrial
			err := e.Decode(&t)
			v := map[string]string{"at": condAtValue(t.At), "mode": string(t.Mode), "mode_reason": t.ModeReason, "surface": t.Surface,
				"run_up_m": condOptNum(t.RunUpM), "drop_height_m": condOptNum(t.DropHeightM), "wind": string(t.Wind),
				"wind_dir": string(t.WindDir), "notes": t.Notes}
			for i, a := range t.Attempts {
				v[fmt.Sprintf("attempt_%d", i+1)] = string(a)
			}
			return v, err
		},
	}
}

func condModeOptions(ms []assess.LaunchMode) []views.CondOption {
	out := make([]views.CondOption, 0, len(ms))
	for _, m := range ms {
		out = append(out, views.CondOption{Value: string(m), Label: views.ModeLabel(m)})
	}
	return out
}

// condMaxAttempts is the most attempt rows a trial form posts.
const condMaxAttempts = 20

func parseTrial(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
	p := &condParser{f: f}
	t := assess.TakeoffTrial{At: p.at(s, cx), Mode: assess.LaunchMode(f.V("mode")), ModeReason: p.text("mode_reason"),
		Surface: p.text("surface"), RunUpM: p.optFloat("run_up_m"), DropHeightM: p.optFloat("drop_height_m"),
		Wind: assess.WindStrength(f.V("wind")), WindDir: assess.WindDirection(f.V("wind_dir")), Notes: p.text("notes")}
	if t.Wind == assess.WindCalm {
		t.WindDir = assess.WindNone
	}
	last := 0
	for i := 1; i <= condMaxAttempts; i++ {
		if f.V("attempt_"+strconv.Itoa(i)) != "" {
			last = i
		}
	}
	for i := 1; i <= last; i++ {
		name := "attempt_" + strconv.Itoa(i)
		v := f.V(name)
		if v == "" {
			p.fail(&assess.ValidationError{Field: name, Message: "choose this attempt's result, or record the attempts in order from the first"})
		}
		t.Attempts = append(t.Attempts, assess.AttemptResult(v))
	}
	p.merge(t.Validate(assess.TrialRulesFor(cx.species, s.dropCapM(cx.c))))
	return t, t.At, p.errs
}

func sessionKind() condKind {
	return condKind{kind: records.KindSession, path: "flight-sessions", title: "Flight session", plural: "Sessions", button: "Flight session",
		blank: func(s *Server, cx *condCtx, f *views.CondForm) {
			f.Values["exercise"], f.Values["droop"] = string(assess.ExerciseCage), string(assess.DroopNone)
			if hs, err := s.store.HousingHistory(cx.c.Request().Context(), cx.patient.ID); err == nil && len(hs) > 0 {
				if last := hs[len(hs)-1]; last.Kind == assess.EnclosureFlightCage {
					f.Values["enclosure"] = last.EnclosureName
				}
			}
		},
		options: func(s *Server, cx *condCtx, f *views.CondForm) error {
			opts, err := s.condEnclosureOptions(cx, f.V("enclosure"), "none, or not listed")
			f.Enclosures = opts
			return err
		},
		parse: parseSession,
		values: func(e records.Entry) (map[string]string, error) {
			var x assess.FlightSession
			err := e.Decode(&x)
			v := map[string]string{"at": condAtValue(x.At), "exercise": string(x.Exercise), "enclosure": x.EnclosureName,
				"length_m": condOptNum(x.EnclosureLengthM), "air_temp_c": condOptNum(x.AirTempC), "passes": strconv.Itoa(x.Passes),
				"longest_run": strconv.Itoa(x.LongestRun), "highest": string(x.Highest), "landings": strconv.Itoa(x.Landings),
				"landings_controlled": strconv.Itoa(x.LandingsControlled), "recovery_s": condOptInt(x.RecoveryS),
				"open_mouth": condOnOff(x.OpenMouth), "tail_bobbing": condOnOff(x.TailBobbing), "droop": string(x.Droop),
				"asymmetry": condOnOff(x.Asymmetry), "wingbeat_hz": condOptNum(x.WingbeatHz), "group": condOnOff(x.Group),
				"notes": x.Notes}
			if x.DurationS != nil {
				v["duration_min"] = condNum(float64(*x.DurationS) / 60)
			}
			if x.Group {
				v["group_size"] = strconv.Itoa(x.GroupSize)
			}
			return v, err
		},
	}
}

func parseSession(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
	p := &condParser{f: f}
	x := assess.FlightSession{At: p.at(s, cx), Exercise: assess.Exercise(f.V("exercise")), EnclosureLengthM: p.optFloat("length_m"),
		AirTempC: p.optFloat("air_temp_c"), Passes: p.count("passes", true), LongestRun: p.count("longest_run", false),
		Highest: assess.HeightReached(f.V("highest")), Landings: p.count("landings", false),
		LandingsControlled: p.count("landings_controlled", false), RecoveryS: p.optInt("recovery_s"),
		OpenMouth: f.On("open_mouth"), TailBobbing: f.On("tail_bobbing"), Droop: assess.Droop(f.V("droop")),
		Asymmetry: f.On("asymmetry"), WingbeatHz: p.optFloat("wingbeat_hz"), Group: f.On("group"), Notes: p.text("notes")}
	if d := p.optFloat("duration_min"); d != nil {
		sec := condSeconds(*d)
		x.DurationS = &sec
	}
	if x.Group {
		x.GroupSize = p.count("group_size", true)
	}
	if name := p.text("enclosure"); name != "" {
		e, err := s.store.EnclosureByName(cx.c.Request().Context(), name)
		switch {
		case err == nil:
			x.EnclosureName = e.Name
			if x.EnclosureLengthM == nil {
				l := e.LengthM
				x.EnclosureLengthM = &l
			}
		case errors.Is(err, records.ErrNotFound):
			p.fail(&assess.ValidationError{Field: "enclosure", Value: name, Message: "this enclosure is not in the centre's list: choose one, or none"})
		default:
			p.fail(&assess.ValidationError{Field: "enclosure", Value: name, Message: "the enclosures could not be read: try again"})
		}
	}
	p.merge(x.Validate())
	return x, x.At, p.errs
}

// condEnclosureOptions lists the centre's enclosures for a select, by name,
// with keep (a name a stored record uses) kept even if retired or renamed;
// none labels the empty choice ("" for no empty choice).
func (s *Server) condEnclosureOptions(cx *condCtx, keep, none string) ([]views.CondOption, error) {
	list, err := s.store.Enclosures(cx.c.Request().Context(), false)
	if err != nil {
		return nil, err
	}
	var out []views.CondOption
	if none != "" {
		out = append(out, views.CondOption{Value: "", Label: none})
	}
	found := keep == ""
	for _, e := range list {
		found = found || strings.EqualFold(e.Name, keep)
		out = append(out, views.CondOption{Value: e.Name, Label: fmt.Sprintf("%s (%s, %s m long)", e.Name,
			views.EnclosureKindLabel(e.Kind), condNum(e.LengthM))})
	}
	if !found {
		out = append(out, views.CondOption{Value: keep, Label: keep + " (no longer listed)"})
	}
	return out, nil
}

func waterproofKind() condKind {
	return condKind{kind: records.KindWaterproof, path: "waterproofing", title: "Waterproofing test", plural: "Waterproofing", button: "Waterproofing test",
		parse: func(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
			p := &condParser{f: f}
			w := assess.WaterproofTest{At: p.at(s, cx), MinutesOnWater: p.float("minutes_on_water"), WetToSkin: f.On("wet_to_skin"),
				Result: assess.WaterproofResult(f.V("result"))}
			p.merge(w.Validate())
			return w, w.At, p.errs
		},
		values: func(e records.Entry) (map[string]string, error) {
			var w assess.WaterproofTest
			err := e.Decode(&w)
			return map[string]string{"at": condAtValue(w.At), "minutes_on_water": condNum(w.MinutesOnWater),
				"wet_to_skin": condOnOff(w.WetToSkin), "result": string(w.Result)}, err
		},
	}
}

func housingKind() condKind {
	return condKind{kind: records.KindHousing, path: "housing", title: "Move to an enclosure", plural: "Housing", button: "Move enclosure",
		options: func(s *Server, cx *condCtx, f *views.CondForm) error {
			opts, err := s.condEnclosureOptions(cx, f.V("enclosure"), "")
			if len(opts) > 0 {
				opts = append([]views.CondOption{{Value: "", Label: "choose the enclosure"}}, opts...)
			}
			f.Enclosures = opts
			return err
		},
		parse: func(s *Server, cx *condCtx, f *views.CondForm) (any, time.Time, assess.ValidationErrors) {
			p := &condParser{f: f}
			at := p.at(s, cx)
			name := p.text("enclosure")
			if name == "" {
				p.fail(&assess.ValidationError{Field: "enclosure", Message: "choose the enclosure the bird moved into"})
				return assess.Housing{}, at, p.errs
			}
			e, err := s.store.EnclosureByName(cx.c.Request().Context(), name)
			if err != nil {
				p.fail(&assess.ValidationError{Field: "enclosure", Value: name, Message: "this enclosure is not in the centre's list: choose one"})
				return assess.Housing{}, at, p.errs
			}
			h := e.Housing(at)
			p.merge(h.Validate())
			return h, at, p.errs
		},
		values: func(e records.Entry) (map[string]string, error) {
			var h assess.Housing
			err := e.Decode(&h)
			return map[string]string{"at": condAtValue(h.From), "enclosure": h.EnclosureName}, err
		},
	}
}

package web

import (
	"net/http"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// The plain-form fallback of the cage-side page, for phones without
// JavaScript: the same fields, posted as a form, stored by the same code
// as the JSON API (saveCageSession), with the page's idempotency key so a
// form sent twice stores one session.

func (s *Server) handleCagePost(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	return s.cagePost(c, []records.Patient{p})
}

func (s *Server) handleCageGroupPost(c echo.Context) error {
	ps, err := s.groupPatients(c, caseSplit([]string{c.FormValue("group_cases")}))
	if ve := asValidation(err); ve != nil {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "This group cannot be flown together: "+ve[0].Message+". Nothing was saved.")
	}
	if err != nil {
		return err
	}
	return s.cagePost(c, ps)
}

// cagePost stores the posted form for ps (one bird or a group) and
// redirects to a fresh page that says what was saved; bad input shows the
// form again with what was typed and a message per field (422).
func (s *Server) cagePost(c echo.Context, ps []records.Patient) error {
	pg := cageFrame(c, ps)
	f, birds := cageFormFrom(c, pg.Birds)
	pg.Form, pg.Birds = f, birds
	in, errs := cageInputFrom(f, birds, len(ps) > 1)
	if len(errs) == 0 {
		res, err := s.saveCageSession(c, ps[0], in)
		if errs = asValidation(err); errs == nil && err != nil {
			return err
		}
		if errs == nil {
			sep := "?"
			if strings.Contains(pg.PostURL, "?") {
				sep = "&"
			}
			return c.Redirect(http.StatusSeeOther, pg.PostURL+sep+"saved="+cageNum(float64(len(res.Entries))))
		}
	}
	pg.Errors = errs
	return s.renderCage(c, http.StatusUnprocessableEntity, pg)
}

// cageFormFrom reads the posted form as typed, with each bird's
// observations for a group.
func cageFormFrom(c echo.Context, birds []views.CageBird) (views.CageForm, []views.CageBird) {
	v := func(name string) string { return c.FormValue(name) }
	on := func(name string) bool { return v(name) == "1" || v(name) == "on" }
	f := views.CageForm{Key: v("idempotency_key"), At: v("at"), Exercise: v("exercise"), Enclosure: v("enclosure"),
		LengthM: v("length_m"), AirTempC: v("air_temp_c"), Passes: v("passes"), LongestRun: v("longest_run"),
		Landings: v("landings"), LandingsControlled: v("landings_controlled"), RecoveryS: v("recovery_s"),
		Highest: v("highest"), Droop: v("droop"), Notes: v("notes"),
		OpenMouth: on("open_mouth"), TailBobbing: on("tail_bobbing"), Asymmetry: on("asymmetry")}
	out := make([]views.CageBird, len(birds))
	for i, b := range birds {
		bf := func(field string) string { return views.CageBirdField(b.Case, field) }
		b.Obs = views.CageBirdObs{OpenMouth: on(bf("open_mouth")), TailBobbing: on(bf("tail_bobbing")),
			Asymmetry: on(bf("asymmetry")), Droop: v(bf("droop")), Notes: v(bf("notes"))}
		out[i] = b
	}
	return f, out
}

// cageInputFrom converts the typed form into a session, collecting every
// number that does not parse as a field error. Empty counts are 0.
func cageInputFrom(f views.CageForm, birds []views.CageBird, group bool) (cageInput, assess.ValidationErrors) {
	var errs assess.ValidationErrors
	in := cageInput{IdempotencyKey: f.Key}
	rec := assess.FlightSession{Exercise: assess.Exercise(f.Exercise), EnclosureName: strings.TrimSpace(f.Enclosure),
		Highest: assess.HeightReached(f.Highest), Droop: assess.Droop(f.Droop), OpenMouth: f.OpenMouth,
		TailBobbing: f.TailBobbing, Asymmetry: f.Asymmetry, Notes: strings.TrimSpace(f.Notes)}
	if rec.Droop == "" {
		rec.Droop = assess.DroopNone
	}
	if t, err := time.Parse(time.RFC3339, strings.TrimSpace(f.At)); err == nil {
		rec.At = t
	}
	ints := []struct {
		field, raw string
		dst        *int
	}{{"passes", f.Passes, &rec.Passes}, {"longest_run", f.LongestRun, &rec.LongestRun},
		{"landings", f.Landings, &rec.Landings}, {"landings_controlled", f.LandingsControlled, &rec.LandingsControlled}}
	for _, n := range ints {
		var verr *assess.ValidationError
		if *n.dst, verr = parseIntField(n.field, n.raw, true); verr != nil {
			errs = append(errs, verr)
		}
	}
	var verr *assess.ValidationError
	if rec.RecoveryS, verr = parseOptInt("recovery_s", f.RecoveryS); verr != nil {
		errs = append(errs, verr)
	}
	if rec.AirTempC, verr = parseOptFloat("air_temp_c", f.AirTempC); verr != nil {
		errs = append(errs, verr)
	}
	if rec.EnclosureLengthM, verr = parseOptFloat("length_m", f.LengthM); verr != nil {
		errs = append(errs, verr)
	}
	if group {
		in.Birds = map[string]cageBirdObs{}
		for _, b := range birds {
			rec.GroupCases = append(rec.GroupCases, b.Case)
			in.Birds[b.Case] = cageBirdObs{OpenMouth: b.Obs.OpenMouth, TailBobbing: b.Obs.TailBobbing,
				Asymmetry: b.Obs.Asymmetry, Droop: assess.Droop(b.Obs.Droop), Notes: b.Obs.Notes}
		}
	}
	in.Session = rec
	return in, errs
}

package web

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
)

// The JSON API of the cage-side page:
//
//	POST /api/v1/patients/:case/flight-sessions  store a session (cageInput):
//	     201 created, 200 the stored entry when the idempotency key was used,
//	     401 logged out, 403 bad CSRF token, 404 no such patient,
//	     422 field errors ({"error", "fields": {field: message}})
//	GET  /api/v1/patients/:case/flight-sessions  the patient's current sessions
//	GET  /api/v1/csrf                            the login's CSRF token
//
// A group session is posted to any one of its birds' paths, with the
// session's group_cases naming every bird (that one included); one entry is
// stored per bird, under the idempotency key plus ":" and the bird's case.

// maxCageBody caps the JSON body, bytes [project default: a session with
// 50 per-bird notes is far smaller].
const maxCageBody = 256 << 10

// cageFutureSlack is how far ahead of the server's clock a session may be
// dated: phones' clocks drift [project default].
const cageFutureSlack = 10 * time.Minute

// cageInput is one cage-side session as a page sends it.
type cageInput struct {
	// IdempotencyKey is made once per draft on the phone (a UUID); sending
	// the draft again returns what the first send stored.
	IdempotencyKey string               `json:"idempotency_key"`
	Session        assess.FlightSession `json:"session"`
	// Birds are the optional per-bird observations of a group session, by
	// case number.
	Birds map[string]cageBirdObs `json:"birds,omitempty"`
}

// cageBirdObs is what was seen of one bird of a group. It is added to what
// was seen of the group (a sign seen in the group stays on every bird's
// record) and marks that bird's record PerBird.
type cageBirdObs struct {
	OpenMouth   bool         `json:"open_mouth"`
	TailBobbing bool         `json:"tail_bobbing"`
	Droop       assess.Droop `json:"droop"`
	Asymmetry   bool         `json:"asymmetry"`
	Notes       string       `json:"notes"`
}

func (o cageBirdObs) empty() bool {
	return !o.OpenMouth && !o.TailBobbing && !o.Asymmetry && (o.Droop == "" || o.Droop == assess.DroopNone) &&
		strings.TrimSpace(o.Notes) == ""
}

// apply returns rec with o added: flags seen on the bird are set, a droop
// seen on it replaces "none", its note follows the group's.
func (o cageBirdObs) apply(rec assess.FlightSession) assess.FlightSession {
	rec.PerBird = true
	rec.OpenMouth = rec.OpenMouth || o.OpenMouth
	rec.TailBobbing = rec.TailBobbing || o.TailBobbing
	rec.Asymmetry = rec.Asymmetry || o.Asymmetry
	if o.Droop != "" && o.Droop != assess.DroopNone {
		rec.Droop = o.Droop
	}
	if n := strings.TrimSpace(o.Notes); n != "" {
		if strings.TrimSpace(rec.Notes) != "" {
			rec.Notes = strings.TrimSpace(rec.Notes) + "\n"
		}
		rec.Notes += "This bird: " + n
	}
	return rec
}

// cageResult is what one save stored or found stored.
type cageResult struct {
	Entries []records.Entry // one per bird, the path's patient first
	Created int             // how many were new (0: all sent before)
}

// cageTarget is one bird a session is stored for, with its record.
type cageTarget struct {
	p   records.Patient
	rec assess.FlightSession
	key string
}

// saveCageSession checks in for patient p (the first of a group) and
// stores one flight-session entry per bird. Bad input is returned as
// assess.ValidationErrors; nothing is stored then.
func (s *Server) saveCageSession(c echo.Context, p records.Patient, in cageInput) (cageResult, error) {
	targets, err := s.cageTargets(c, p, in)
	if err != nil {
		return cageResult{}, err
	}
	ctx := c.Request().Context()
	var res cageResult
	for _, t := range targets {
		e, err := s.store.AddSession(ctx, currentUser(c).ID, t.p.ID, t.rec, records.AddOpts{IdempotencyKey: t.key})
		switch {
		case errors.Is(err, records.ErrDuplicate):
			if e.PatientID != t.p.ID || e.Kind != records.KindSession {
				return res, assess.ValidationErrors{{Field: "idempotency_key", Value: t.key,
					Message: "this key was already used for another record: start a new session"}}
			}
		case err != nil:
			return res, err
		default:
			res.Created++
		}
		res.Entries = append(res.Entries, e)
	}
	return res, nil
}

// cageTargets validates in and returns the record of each bird covered.
func (s *Server) cageTargets(c echo.Context, p records.Patient, in cageInput) ([]cageTarget, error) {
	var errs assess.ValidationErrors
	key := strings.TrimSpace(in.IdempotencyKey)
	if !uuidRe.MatchString(key) {
		errs = append(errs, &assess.ValidationError{Field: "idempotency_key", Value: key,
			Message: "the session has no valid key (8 to 64 letters, digits or dashes): reload the page"})
	}
	rec := in.Session
	now := s.now()
	if rec.At.IsZero() {
		rec.At = now
	}
	rec.At = rec.At.UTC()
	switch {
	case rec.At.After(now.Add(cageFutureSlack)):
		errs = append(errs, &assess.ValidationError{Field: "at", Value: rec.At.Format(time.RFC3339),
			Message: "the session is dated in the future: check the phone's clock"})
	case rec.At.Before(p.AdmittedAt.Add(-24 * time.Hour)):
		errs = append(errs, &assess.ValidationError{Field: "at", Value: rec.At.Format(time.RFC3339),
			Message: "the session is dated before the bird's admission: check the phone's clock"})
	}
	if !p.InCare() {
		errs = append(errs, &assess.ValidationError{Field: "case", Value: p.CaseNumber,
			Message: fmt.Sprintf("%s is no longer in care (%s): sessions are logged for birds in care", p.CaseNumber, p.Status)})
	}
	ps := []records.Patient{p}
	cases := caseSplit(rec.GroupCases)
	group := rec.Group || len(cases) > 0
	if group {
		if !containsFold(cases, p.CaseNumber) {
			errs = append(errs, &assess.ValidationError{Field: "group_cases", Value: strings.Join(cases, ","),
				Message: fmt.Sprintf("the group's case numbers must include %s, the patient it is sent for", p.CaseNumber)})
		} else {
			all, err := s.groupPatients(c, cases)
			if ve := asValidation(err); ve != nil {
				errs = append(errs, ve...)
			} else if err != nil {
				return nil, err
			}
			for _, q := range all {
				if q.ID != p.ID {
					ps = append(ps, q)
				}
			}
		}
	}
	rec.Group, rec.GroupSize, rec.GroupCases, rec.PerBird = false, 0, nil, false
	if group {
		rec.Group, rec.GroupSize = true, len(ps)
		for _, q := range ps {
			rec.GroupCases = append(rec.GroupCases, q.CaseNumber)
		}
	}
	errs = append(errs, checkBirdObs(in.Birds, ps, group)...)
	if err := rec.Validate(); err != nil {
		errs = append(errs, asValidation(err)...)
	}
	if len(errs) > 0 {
		return nil, errs
	}
	out := make([]cageTarget, 0, len(ps))
	for _, q := range ps {
		t := cageTarget{p: q, rec: rec, key: key}
		if group {
			t.key = key + ":" + q.CaseNumber
		}
		if o, ok := in.Birds[q.CaseNumber]; ok && !o.empty() {
			t.rec = o.apply(rec)
		}
		out = append(out, t)
	}
	return out, nil
}

// checkBirdObs checks per-bird observations: only for a group, only for its
// birds, a known droop, a note of at most 2000 characters.
func checkBirdObs(birds map[string]cageBirdObs, ps []records.Patient, group bool) assess.ValidationErrors {
	var errs assess.ValidationErrors
	for cn, o := range birds {
		known := false
		for _, p := range ps {
			known = known || p.CaseNumber == cn
		}
		switch {
		case !group && !o.empty():
			errs = append(errs, &assess.ValidationError{Field: "birds", Value: cn, Message: "per-bird observations belong to a group session"})
		case group && !known:
			errs = append(errs, &assess.ValidationError{Field: "birds", Value: cn, Message: fmt.Sprintf("%s is not one of the group's birds", cn)})
		}
		if o.Droop != "" && !o.Droop.Valid() {
			errs = append(errs, &assess.ValidationError{Field: "bird_" + cn + "_droop", Value: string(o.Droop), Message: "choose the wing droop: none, left or right"})
		}
		if utf8.RuneCountInString(o.Notes) > 2000 {
			errs = append(errs, &assess.ValidationError{Field: "bird_" + cn + "_notes", Value: "…", Message: "keep the note under 2000 characters"})
		}
	}
	return errs
}

func containsFold(list []string, s string) bool {
	for _, v := range list {
		if strings.EqualFold(v, s) {
			return true
		}
	}
	return false
}

// cageResponse is the API's answer to a stored (or already stored) session.
type cageResponse struct {
	Entry     records.Entry   `json:"entry"`   // the path patient's
	Entries   []records.Entry `json:"entries"` // one per bird covered
	Duplicate bool            `json:"duplicate"`
}

// cageFieldError is one field error of a 422 answer.
type cageFieldError struct {
	Field   string `json:"field"`
	Value   string `json:"value"`
	Message string `json:"message"`
}

// cageErrorBody is the 422 answer: a sentence, and a message per field.
type cageErrorBody struct {
	Error  string            `json:"error"`
	Fields map[string]string `json:"fields"`
	Errors []cageFieldError  `json:"errors"`
}

func cageInvalid(c echo.Context, ve assess.ValidationErrors) error {
	body := cageErrorBody{Error: "Nothing was saved: correct the fields marked.", Fields: map[string]string{}}
	for _, e := range ve {
		if _, ok := body.Fields[e.Field]; !ok {
			body.Fields[e.Field] = e.Message
		}
		body.Errors = append(body.Errors, cageFieldError{Field: e.Field, Value: e.Value, Message: e.Message})
	}
	return c.JSON(http.StatusUnprocessableEntity, body)
}

// jsonFieldNames maps the session's JSON names to the page's field names
// where they differ, so a type error lands beside the right field.
var jsonFieldNames = map[string]string{"enclosure_name": "enclosure", "enclosure_length_m": "length_m"}

// decodeCageInput reads the JSON body strictly: unknown fields and wrong
// types are field errors.
func decodeCageInput(c echo.Context) (cageInput, assess.ValidationErrors) {
	var in cageInput
	dec := json.NewDecoder(http.MaxBytesReader(c.Response(), c.Request().Body, maxCageBody))
	dec.DisallowUnknownFields()
	err := dec.Decode(&in)
	if err == nil {
		if dec.Decode(&struct{}{}) != io.EOF {
			err = errors.New("more than one JSON value")
		}
	}
	if err == nil {
		return in, nil
	}
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) {
		name := te.Field[strings.LastIndex(te.Field, ".")+1:]
		if n, ok := jsonFieldNames[name]; ok {
			name = n
		}
		return in, assess.ValidationErrors{{Field: name, Value: te.Value, Message: fmt.Sprintf("expected a %s here", te.Type)}}
	}
	return in, assess.ValidationErrors{{Field: "body", Message: "the request is not a session in JSON: " + err.Error()}}
}

func (s *Server) handleAddFlightSession(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	in, ve := decodeCageInput(c)
	if ve != nil {
		return cageInvalid(c, ve)
	}
	res, err := s.saveCageSession(c, p, in)
	if ve := asValidation(err); ve != nil {
		return cageInvalid(c, ve)
	}
	if err != nil {
		return err
	}
	status := http.StatusCreated
	if res.Created == 0 {
		status = http.StatusOK
	}
	return c.JSON(status, cageResponse{Entry: res.Entries[0], Entries: res.Entries, Duplicate: res.Created == 0})
}

// handleListFlightSessions lists a patient's current flight sessions,
// oldest first, as entries (who, when, version, and the session as data).
func (s *Server) handleListFlightSessions(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	es, err := s.store.Entries(c.Request().Context(), p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindSession}})
	if err != nil {
		return err
	}
	if es == nil {
		es = []records.Entry{}
	}
	c.Response().Header().Set("Cache-Control", "no-store")
	return c.JSON(http.StatusOK, es)
}

// handleCSRFToken returns the login's CSRF token, for a page whose token
// went stale when its login ended and another began.
func (s *Server) handleCSRFToken(c echo.Context) error {
	c.Response().Header().Set("Cache-Control", "no-store")
	return c.JSON(http.StatusOK, map[string]string{"csrf_token": session(c).CSRFToken})
}

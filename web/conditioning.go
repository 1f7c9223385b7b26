package web

import (
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// Conditioning records: one form per kind of record under the patient, a
// correction and a removal route shared by every kind, the patient page's
// conditioning block and timeline, and the centre's enclosures.

// condKind describes one kind of conditioning record to the web layer.
type condKind struct {
	kind   records.Kind
	path   string // URL segment: /patients/:case/<path>/new
	title  string // the form's title, "Weigh-in"
	plural string // the filter's label
	button string // the patient page's button
	// blank fills a new form's defaults.
	blank func(s *Server, cx *condCtx, f *views.CondForm)
	// parse reads the typed form into a record, its instant and the field
	// errors; it may set f.Confirm.
	parse func(s *Server, cx *condCtx, f *views.CondForm) (data any, at time.Time, errs assess.ValidationErrors)
	// values turns a stored record back into form values (corrections).
	values func(e records.Entry) (map[string]string, error)
	// options fills the form's selects.
	options func(s *Server, cx *condCtx, f *views.CondForm) error
}

// condKinds lists the kinds in page order.
func condKinds() []condKind {
	return []condKind{weighInKind(), conditionKind(), wingKind(), trialKind(), sessionKind(), waterproofKind(), housingKind()}
}

func condKindOf(k records.Kind) (condKind, bool) {
	for _, ck := range condKinds() {
		if ck.kind == k {
			return ck, true
		}
	}
	return condKind{}, false
}

// condCtx is what every conditioning handler knows about its patient.
type condCtx struct {
	c       echo.Context
	patient records.Patient
	species *assess.Species // nil when the patient's species is not in the table
}

// condRecorderRoles may add, correct and remove conditioning records.
var condRecorderRoles = []records.Role{records.RoleStaff, records.RoleRehabilitator, records.RoleVet}

// conditioningRoutes adds the conditioning-record routes.
func (s *Server) conditioningRoutes(g *echo.Group) {
	// Roles are checked per route: a group with middleware would also
	// catch every unknown path.
	rec := requireRole(condRecorderRoles...)
	for _, ck := range condKinds() {
		g.GET("/patients/:case/"+ck.path+"/new", func(c echo.Context) error { return s.handleCondNew(c, ck) }, rec)
		g.POST("/patients/:case/"+ck.path, func(c echo.Context) error { return s.handleCondAdd(c, ck) }, rec)
	}
	g.GET("/patients/:case/records/:key/correct", s.handleCondCorrectForm, rec)
	g.POST("/patients/:case/records/:key/correct", s.handleCondCorrect, rec)
	g.GET("/patients/:case/records/:key/remove", s.handleCondRemoveForm, rec)
	g.POST("/patients/:case/records/:key/remove", s.handleCondRemove, rec)
	g.GET("/enclosures", s.handleEnclosures)
	ed := requireRole(records.RoleAdmin, records.RoleRehabilitator)
	g.POST("/enclosures", s.handleAddEnclosure, ed)
	g.GET("/enclosures/:id/edit", s.handleEditEnclosureForm, ed)
	g.POST("/enclosures/:id", s.handleEditEnclosure, ed)
}

// condContext loads the patient of the path and its species.
func (s *Server) condContext(c echo.Context) (*condCtx, error) {
	p, err := s.patientFromPath(c)
	if err != nil {
		return nil, err
	}
	cx := &condCtx{c: c, patient: p}
	if sp, err := s.findSpecies(c.Request().Context(), p.SpeciesScientific); err == nil {
		cx.species = sp
	}
	return cx, nil
}

func condNewURL(p records.Patient, ck condKind) string {
	return "/patients/" + p.CaseNumber + "/" + ck.path + "/new"
}

func condRecordURL(p records.Patient, key int64, action string) string {
	return fmt.Sprintf("/patients/%s/records/%d/%s", p.CaseNumber, key, action)
}

// condDone is where a saved form goes: the patient's timeline.
func condDone(c echo.Context, p records.Patient) error {
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#conditioning-history")
}

// newCondForm starts a form of kind ck for the patient.
func newCondForm(cx *condCtx, ck condKind) views.CondForm {
	return views.CondForm{Kind: ck.kind, Title: ck.title, Patient: cx.patient, Values: map[string]string{}, Confirm: map[string]bool{},
		Action: "/patients/" + cx.patient.CaseNumber + "/" + ck.path}
}

// condRender fills the form's options and renders it with status.
func (s *Server) condRender(cx *condCtx, ck condKind, f views.CondForm, status int) error {
	if ck.options != nil {
		if err := ck.options(s, cx, &f); err != nil {
			return err
		}
	}
	title := ck.title + " · " + cx.patient.CaseNumber
	if f.Correcting() {
		title = "Correct " + strings.ToLower(ck.title) + " · " + cx.patient.CaseNumber
	}
	return render(cx.c, status, views.CondFormPage(s.meta(cx.c, title), f))
}

// condFormValues copies every posted value into f.Values.
func condFormValues(c echo.Context, f *views.CondForm) error {
	fv, err := c.FormParams()
	if err != nil {
		return err
	}
	for k, v := range fv {
		if k != "_csrf" && len(v) > 0 {
			f.Values[k] = v[0]
		}
	}
	return nil
}

func (s *Server) handleCondNew(c echo.Context, ck condKind) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	f := newCondForm(cx, ck)
	f.Values["at"] = s.now().Local().Format(condTimeLayout)
	f.Values["idem"] = records.NewToken()
	if ck.blank != nil {
		ck.blank(s, cx, &f)
	}
	return s.condRender(cx, ck, f, http.StatusOK)
}

func (s *Server) handleCondAdd(c echo.Context, ck condKind) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	f := newCondForm(cx, ck)
	if err := condFormValues(c, &f); err != nil {
		return err
	}
	data, at, errs := ck.parse(s, cx, &f)
	if len(errs) == 0 {
		_, err := s.store.AddEntry(c.Request().Context(), currentUser(c).ID, records.NewEntry{PatientID: cx.patient.ID, Kind: ck.kind,
			At: at, Data: data, IdempotencyKey: f.V("idem")})
		switch {
		case err == nil, errors.Is(err, records.ErrDuplicate):
			return condDone(c, cx.patient)
		case asValidation(err) != nil:
			errs = asValidation(err)
		default:
			return err
		}
	}
	f.Errors = errs
	return s.condRender(cx, ck, f, http.StatusUnprocessableEntity)
}

// condEntry loads the record :key of the patient, refusing another
// patient's record and kinds that are not conditioning records.
func (s *Server) condEntry(cx *condCtx) (records.Entry, condKind, error) {
	key, err := strconv.ParseInt(cx.c.Param("key"), 10, 64)
	if err != nil {
		return records.Entry{}, condKind{}, echo.NewHTTPError(http.StatusNotFound, "There is no such record.")
	}
	e, err := s.store.Entry(cx.c.Request().Context(), key)
	if errors.Is(err, records.ErrNotFound) || (err == nil && e.PatientID != cx.patient.ID) {
		return e, condKind{}, echo.NewHTTPError(http.StatusNotFound, "There is no such record for this patient.")
	}
	if err != nil {
		return e, condKind{}, err
	}
	ck, ok := condKindOf(e.Kind)
	if !ok {
		return e, ck, echo.NewHTTPError(http.StatusNotFound, "This record is not a conditioning record.")
	}
	if e.RemovedAt != nil {
		return e, ck, echo.NewHTTPError(http.StatusConflict, "This record was removed; it stays in the history and can no longer be changed.")
	}
	return e, ck, nil
}

func condCorrectForm(cx *condCtx, ck condKind, e records.Entry) views.CondForm {
	f := newCondForm(cx, ck)
	f.Action, f.Key, f.Version = condRecordURL(cx.patient, e.Key, "correct"), e.Key, e.Version
	return f
}

func (s *Server) handleCondCorrectForm(c echo.Context) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	e, ck, err := s.condEntry(cx)
	if err != nil {
		return err
	}
	f := condCorrectForm(cx, ck, e)
	if f.Values, err = ck.values(e); err != nil {
		return err
	}
	return s.condRender(cx, ck, f, http.StatusOK)
}

func (s *Server) handleCondCorrect(c echo.Context) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	e, ck, err := s.condEntry(cx)
	if err != nil {
		return err
	}
	f := condCorrectForm(cx, ck, e)
	if err := condFormValues(c, &f); err != nil {
		return err
	}
	f.Version, _ = strconv.Atoi(f.V("version"))
	data, at, errs := ck.parse(s, cx, &f)
	if len(errs) == 0 {
		_, err := s.store.CorrectEntry(c.Request().Context(), currentUser(c).ID, e.Key, f.Version, at, data)
		switch {
		case err == nil:
			return condDone(c, cx.patient)
		case errors.Is(err, records.ErrConflict):
			f.Conflict = "Someone changed this record since you opened it, so your correction was not saved. What you typed is below; open the record again from the patient page to see the latest version."
			return s.condRender(cx, ck, f, http.StatusConflict)
		case asValidation(err) != nil:
			errs = asValidation(err)
		default:
			return err
		}
	}
	f.Errors = errs
	return s.condRender(cx, ck, f, http.StatusUnprocessableEntity)
}

func (s *Server) condRemoveForm(cx *condCtx, e records.Entry) views.CondRemoveForm {
	return views.CondRemoveForm{Patient: cx.patient, Item: s.timelineItem(cx, []records.Entry{e}),
		Action: condRecordURL(cx.patient, e.Key, "remove")}
}

func (s *Server) handleCondRemoveForm(c echo.Context) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	e, _, err := s.condEntry(cx)
	if err != nil {
		return err
	}
	return render(c, http.StatusOK, views.CondRemovePage(s.meta(c, "Remove a record"), s.condRemoveForm(cx, e)))
}

func (s *Server) handleCondRemove(c echo.Context) error {
	cx, err := s.condContext(c)
	if err != nil {
		return err
	}
	e, _, err := s.condEntry(cx)
	if err != nil {
		return err
	}
	reason := c.FormValue("reason")
	err = s.store.RemoveEntry(c.Request().Context(), currentUser(c).ID, e.Key, reason)
	if ve := asValidation(err); ve != nil {
		f := s.condRemoveForm(cx, e)
		f.Reason, f.Errors = reason, ve
		return render(c, http.StatusUnprocessableEntity, views.CondRemovePage(s.meta(c, "Remove a record"), f))
	}
	if errors.Is(err, records.ErrConflict) {
		return echo.NewHTTPError(http.StatusConflict, "This record was already removed or corrected meanwhile; nothing was changed.")
	}
	if err != nil {
		return err
	}
	return condDone(c, cx.patient)
}

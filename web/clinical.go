package web

import (
	"errors"
	"net/http"
	"slices"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/records"
	"aloft/web/views"
)

// clinicalRoutes adds the clinical-record routes: a form for each record
// kind, its correction and removal, and clinical clearance, which only a vet
// or the licensed rehabilitator may set (checked here and again by the
// store).
func (s *Server) clinicalRoutes(g *echo.Group) {
	g.GET("/patients/:case/clinical/:kind/new", s.handleClinicalNew)
	g.POST("/patients/:case/clinical/:kind", s.handleClinicalAdd)
	g.GET("/patients/:case/clinical/:kind/:key", s.handleClinicalEdit)
	g.POST("/patients/:case/clinical/:kind/:key", s.handleClinicalCorrect)
	g.POST("/patients/:case/clinical/:kind/:key/remove", s.handleClinicalRemove)
	clear := requireRole(records.ClearanceRoles...)
	g.GET("/patients/:case/clearance", s.handleClearanceForm, clear)
	g.POST("/patients/:case/clearance", s.handleSetClearance, clear)
}

// clinicalSections renders the clinical blocks of the patient page: the
// clearance panel, then the clinical record.
func (s *Server) clinicalSections() []patientSection {
	return []patientSection{s.clearanceSection, s.clinicalRecordSection}
}

// clinicalExtras renders blocks above the patient list (today's medications).
func (s *Server) clinicalExtras() []pageExtra { return []pageExtra{s.medsDueExtra} }

func (s *Server) medsDueExtra(c echo.Context) (views.Section, bool, error) {
	day := s.now().In(s.clinicalLoc())
	rows, err := s.store.MedicationsDue(c.Request().Context(), day)
	if err != nil {
		return views.Section{}, false, err
	}
	return views.Section{ID: "meds-due", Title: "Medications due today",
		Body: views.MedsDueBody(views.MedsDue{Day: day, Rows: rows})}, true, nil
}

func (s *Server) clinicalRecordSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	ctx := c.Request().Context()
	sec := views.ClinicalSection{Case: p.CaseNumber, Today: s.now().In(s.clinicalLoc()),
		Cautions: s.cautionsAbout("avian influenza")}
	var err error
	if sec.Diagnoses, err = s.store.Diagnoses(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	if sec.Medications, err = s.store.Medications(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	if sec.Exams, err = s.store.Exams(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	if sec.Treatments, err = s.store.Treatments(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	if sec.Labs, err = s.store.LabResults(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	if sec.DiseaseTests, err = s.store.DiseaseTests(ctx, p.ID); err != nil {
		return views.Section{}, false, err
	}
	return views.Section{ID: "clinical", Title: "Clinical record", Body: views.ClinicalBody(sec)}, true, nil
}

// cautionsAbout returns the sections of CAUTIONS.md whose heading contains
// topic (case-insensitive), to show beside the records they bear on.
func (s *Server) cautionsAbout(topic string) []views.CautionSection {
	var out []views.CautionSection
	for _, sec := range views.ParseCautions(s.cfg.Cautions) {
		if strings.Contains(strings.ToLower(sec.Heading), strings.ToLower(topic)) {
			out = append(out, sec)
		}
	}
	return out
}

// clinicalKindParam reads the :kind path parameter: one of
// records.ClinicalKinds, else 404.
func clinicalKindParam(c echo.Context) (records.Kind, error) {
	k := records.Kind(c.Param("kind"))
	if !slices.Contains(records.ClinicalKinds, k) {
		return "", echo.NewHTTPError(http.StatusNotFound, "There is no such kind of clinical record.")
	}
	return k, nil
}

// clinicalEntryParam loads the record named by :key, which must be a current
// record of kind belonging to patient p.
func (s *Server) clinicalEntryParam(c echo.Context, p records.Patient, kind records.Kind) (records.Entry, error) {
	key, err := strconv.ParseInt(c.Param("key"), 10, 64)
	notFound := echo.NewHTTPError(http.StatusNotFound, "There is no such record for this patient.")
	if err != nil {
		return records.Entry{}, notFound
	}
	e, err := s.store.Entry(c.Request().Context(), key)
	if errors.Is(err, records.ErrNotFound) || (err == nil && (e.PatientID != p.ID || e.Kind != kind)) {
		return records.Entry{}, notFound
	}
	if err == nil && e.RemovedAt != nil {
		return records.Entry{}, echo.NewHTTPError(http.StatusGone, "This record was removed; it stays in the history.")
	}
	return e, err
}

// clinicalForm starts the form of kind for patient p, with the cautions that
// bear on it.
func (s *Server) clinicalForm(p records.Patient, kind records.Kind, values map[string]string) views.ClinicalForm {
	f := views.ClinicalForm{Patient: p, Kind: kind, Values: values}
	if kind == records.KindDiseaseTest {
		f.Cautions = s.cautionsAbout("avian influenza")
	}
	return f
}

func (s *Server) renderClinicalForm(c echo.Context, status int, f views.ClinicalForm) error {
	title := "New " + strings.ToLower(views.ClinicalKindTitle(f.Kind))
	if f.Key != 0 {
		title = "Correct " + strings.ToLower(views.ClinicalKindTitle(f.Kind))
	}
	return render(c, status, views.ClinicalFormPage(s.meta(c, title+" · "+f.Patient.CaseNumber), f))
}

func (s *Server) handleClinicalNew(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	kind, err := clinicalKindParam(c)
	if err != nil {
		return err
	}
	return s.renderClinicalForm(c, http.StatusOK, s.clinicalForm(p, kind, s.clinicalDefaults(kind, currentUser(c))))
}

func (s *Server) handleClinicalAdd(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	kind, err := clinicalKindParam(c)
	if err != nil {
		return err
	}
	f := s.clinicalForm(p, kind, clinFormValues(c))
	rec, errs := s.parseClinical(kind, f.Values)
	if len(errs) == 0 {
		_, err = s.store.AddClinical(c.Request().Context(), currentUser(c).ID, p.ID, rec)
		errs = asValidation(err)
	}
	if len(errs) > 0 {
		f.Errors = errs
		return s.renderClinicalForm(c, http.StatusUnprocessableEntity, f)
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#clinical")
}

func (s *Server) handleClinicalEdit(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	kind, err := clinicalKindParam(c)
	if err != nil {
		return err
	}
	e, err := s.clinicalEntryParam(c, p, kind)
	if err != nil {
		return err
	}
	values, err := s.clinicalValues(e)
	if err != nil {
		return err
	}
	f, err := s.correctionForm(c, p, e, values)
	if err != nil {
		return err
	}
	return s.renderClinicalForm(c, http.StatusOK, f)
}

// correctionForm is the form correcting entry e, with its versions.
func (s *Server) correctionForm(c echo.Context, p records.Patient, e records.Entry, values map[string]string) (views.ClinicalForm, error) {
	f := s.clinicalForm(p, e.Kind, values)
	f.Key, f.Version = e.Key, e.Version
	vs, err := s.store.EntryVersions(c.Request().Context(), e.Key)
	f.Versions = vs
	return f, err
}

func (s *Server) handleClinicalCorrect(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	kind, err := clinicalKindParam(c)
	if err != nil {
		return err
	}
	e, err := s.clinicalEntryParam(c, p, kind)
	if err != nil {
		return err
	}
	f, err := s.correctionForm(c, p, e, clinFormValues(c))
	if err != nil {
		return err
	}
	version, verr := parseIntField("version", f.V("version"), false)
	rec, errs := s.parseClinical(kind, f.Values)
	if verr != nil {
		errs = append(errs, verr)
	}
	if len(errs) == 0 {
		_, err = s.store.CorrectClinical(c.Request().Context(), currentUser(c).ID, e.Key, version, rec)
		errs = asValidation(err)
	}
	switch {
	case errors.Is(err, records.ErrConflict):
		f.Version = e.Version
		f.Problem = "Someone changed this record since you opened it. Your changes are below and were not saved; the versions list shows the latest. Save again to replace it."
		return s.renderClinicalForm(c, http.StatusConflict, f)
	case len(errs) > 0:
		f.Version, f.Errors = version, errs
		return s.renderClinicalForm(c, http.StatusUnprocessableEntity, f)
	case err != nil:
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#clinical")
}

func (s *Server) handleClinicalRemove(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	kind, err := clinicalKindParam(c)
	if err != nil {
		return err
	}
	e, err := s.clinicalEntryParam(c, p, kind)
	if err != nil {
		return err
	}
	reason := strings.TrimSpace(c.FormValue("reason"))
	err = s.store.RemoveClinical(c.Request().Context(), currentUser(c).ID, e.Key, reason)
	if ve := asValidation(err); ve != nil {
		values, verr := s.clinicalValues(e)
		if verr != nil {
			return verr
		}
		values["reason"] = reason
		f, ferr := s.correctionForm(c, p, e, values)
		if ferr != nil {
			return ferr
		}
		f.Errors = ve
		return s.renderClinicalForm(c, http.StatusUnprocessableEntity, f)
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#clinical")
}

// clinFormValues returns the posted form's single values by name, the CSRF
// token left out.
func clinFormValues(c echo.Context) map[string]string {
	out := map[string]string{}
	form, _ := c.FormParams()
	for k, vs := range form {
		if k != csrfField && len(vs) > 0 {
			out[k] = vs[0]
		}
	}
	return out
}

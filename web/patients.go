package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

func (s *Server) handlePatients(c echo.Context) error {
	pg := views.PatientsPage{Query: c.QueryParam("q"), Status: c.QueryParam("status")}
	list, err := s.store.Patients(c.Request().Context(), records.PatientFilter{Query: pg.Query, Status: pg.Status})
	if err != nil {
		return err
	}
	pg.Patients = list
	for _, x := range s.patientsExtras {
		sec, ok, err := x(c)
		if err != nil {
			return err
		}
		if ok {
			pg.Extra = append(pg.Extra, sec)
		}
	}
	return render(c, http.StatusOK, views.PatientsList(s.meta(c, "Patients"), pg))
}

func (s *Server) speciesOptions(ctx context.Context) []views.SpeciesOption {
	all := s.speciesTable(ctx).All()
	out := make([]views.SpeciesOption, 0, len(all))
	for _, sp := range all {
		out = append(out, views.SpeciesOption{Value: sp.CommonName + " (" + sp.ScientificName + ")", Label: sp.ScientificName})
	}
	return out
}

func (s *Server) handleIntakeForm(c echo.Context) error {
	f := views.IntakeForm{AgeClass: "unknown", Sex: "unknown", FoundDate: s.now().Format(records.DateLayout),
		SpeciesOptions: s.speciesOptions(c.Request().Context())}
	return render(c, http.StatusOK, views.IntakePage(s.meta(c, "Admit a patient"), f))
}

// findSpecies resolves what was typed in a species field: a datalist entry
// "Common (Scientific)", a common name or a scientific name.
func (s *Server) findSpecies(ctx context.Context, typed string) (*assess.Species, error) {
	t := strings.TrimSpace(typed)
	if i := strings.LastIndex(t, "("); i > 0 && strings.HasSuffix(t, ")") {
		t = strings.TrimSpace(t[i+1 : len(t)-1])
	}
	return s.speciesTable(ctx).Find(t)
}

// speciesFinder is the species reference as the centre uses it.
type speciesFinder interface {
	Find(name string) (*assess.Species, error)
	All() []*assess.Species
}

// speciesTable returns the centre's species reference: the shipped table with
// the centre's overrides and added species; the shipped table alone if the
// overrides cannot be read (logged).
func (s *Server) speciesTable(ctx context.Context) speciesFinder {
	t, err := s.store.SpeciesTable(ctx)
	if err == nil {
		return t
	}
	s.log.Error("species overrides unavailable; using the shipped table", "err", err)
	if s.species != nil {
		return s.species
	}
	return emptySpecies{}
}

type emptySpecies struct{}

func (emptySpecies) Find(string) (*assess.Species, error) { return nil, assess.ErrUnknownSpecies }
func (emptySpecies) All() []*assess.Species               { return nil }

func intakeFormFrom(c echo.Context) views.IntakeForm {
	return views.IntakeForm{
		Species: c.FormValue("species"), AgeClass: c.FormValue("age_class"), Sex: c.FormValue("sex"),
		FoundDate: c.FormValue("found_date"), FoundPlace: c.FormValue("found_place"), FoundLat: c.FormValue("found_lat"),
		FoundLon: c.FormValue("found_lon"), FinderName: c.FormValue("finder_name"), FinderContact: c.FormValue("finder_contact"),
		Reason: c.FormValue("reason"), IntakeCondition: c.FormValue("intake_condition"), IntakeMassG: c.FormValue("intake_mass_g"),
		MassNote: c.FormValue("mass_note"), ConfirmMass: c.FormValue("confirm_mass") == "1",
	}
}

// intakeInput converts the form into a store input, collecting every field
// error at once.
func (s *Server) intakeInput(ctx context.Context, f *views.IntakeForm) (records.PatientInput, assess.ValidationErrors) {
	var errs assess.ValidationErrors
	in := records.PatientInput{AgeClass: f.AgeClass, Sex: assess.Sex(f.Sex), FoundDate: strings.TrimSpace(f.FoundDate),
		FoundPlace: f.FoundPlace, FinderName: f.FinderName, FinderContact: f.FinderContact, Reason: strings.TrimSpace(f.Reason),
		IntakeCondition: f.IntakeCondition, MassNote: strings.TrimSpace(f.MassNote)}
	sp, err := s.findSpecies(ctx, f.Species)
	switch {
	case strings.TrimSpace(f.Species) == "":
		errs = append(errs, &assess.ValidationError{Field: "species", Message: "choose the species (type a common or scientific name and pick from the list)"})
	case err != nil:
		errs = append(errs, &assess.ValidationError{Field: "species", Value: f.Species,
			Message: "this species is not in the reference table: pick a name from the list (common or scientific)"})
	default:
		in.SpeciesScientific, in.SpeciesCommon = sp.ScientificName, sp.CommonName
	}
	var verr *assess.ValidationError
	if in.FoundLat, verr = parseOptFloat("found_lat", f.FoundLat); verr != nil {
		errs = append(errs, verr)
	}
	if in.FoundLon, verr = parseOptFloat("found_lon", f.FoundLon); verr != nil {
		errs = append(errs, verr)
	}
	if in.IntakeMassG, verr = parseFloatField("intake_mass_g", f.IntakeMassG, false); verr != nil {
		errs = append(errs, verr)
	}
	if err := in.Validate(s.now()); err != nil {
		for _, e := range asValidation(err) {
			if errs.Field(e.Field) == "" && !(e.Field == "species" && in.SpeciesScientific == "") {
				errs = append(errs, e)
			}
		}
	}
	if sp != nil && errs.Field("intake_mass_g") == "" && in.IntakeMassG > 0 {
		if e := assess.CheckMass("intake_mass_g", in.IntakeMassG, sp, in.Sex); e != nil && e.NeedsConfirm {
			f.NeedsConfirm = true
			if !f.ConfirmMass || in.MassNote == "" {
				errs = append(errs, &e.ValidationError)
				if f.ConfirmMass {
					errs = append(errs, &assess.ValidationError{Field: "mass_note", Message: "say why this mass is right"})
				}
			}
		}
	}
	return in, errs
}

func (s *Server) handleIntake(c echo.Context) error {
	f := intakeFormFrom(c)
	in, errs := s.intakeInput(c.Request().Context(), &f)
	if len(errs) > 0 {
		f.Errors, f.SpeciesOptions = errs, s.speciesOptions(c.Request().Context())
		return render(c, http.StatusUnprocessableEntity, views.IntakePage(s.meta(c, "Admit a patient"), f))
	}
	p, err := s.store.AdmitPatient(c.Request().Context(), currentUser(c).ID, in)
	if ve := asValidation(err); ve != nil {
		f.Errors, f.SpeciesOptions = ve, s.speciesOptions(c.Request().Context())
		return render(c, http.StatusUnprocessableEntity, views.IntakePage(s.meta(c, "Admit a patient"), f))
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber)
}

// patientFromPath loads the patient named by the :case path parameter.
func (s *Server) patientFromPath(c echo.Context) (records.Patient, error) {
	p, err := s.store.PatientByCase(c.Request().Context(), c.Param("case"))
	if errors.Is(err, records.ErrNotFound) {
		return p, echo.NewHTTPError(http.StatusNotFound, fmt.Sprintf("There is no patient with case number %q.", c.Param("case")))
	}
	return p, err
}

func (s *Server) handlePatient(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	audit, err := s.store.Audit(c.Request().Context(), records.AuditFilter{PatientID: p.ID, Limit: 200})
	if err != nil {
		return err
	}
	pg := views.PatientPage{Patient: p, Audit: audit}
	if sp, err := s.findSpecies(c.Request().Context(), p.SpeciesScientific); err == nil {
		pg.Species = speciesRef(sp, p.Sex)
	}
	for _, sec := range s.patientSections {
		got, ok, err := sec(c, p)
		if err != nil {
			return err
		}
		if ok {
			pg.Sections = append(pg.Sections, got)
		}
	}
	return render(c, http.StatusOK, views.PatientView(s.meta(c, p.CaseNumber+" "+p.SpeciesCommon), pg))
}

// handleRedactFinder erases the finder's personal data (admin only).
func (s *Server) handleRedactFinder(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	if c.FormValue("confirm") != "1" {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "Tick the confirmation box to erase the finder's data; nothing was changed.")
	}
	if err := s.store.RedactFinder(c.Request().Context(), currentUser(c), p.ID); err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber)
}

// patientSection renders one feature's block of the patient page; ok false
// leaves it out.
type patientSection func(c echo.Context, p records.Patient) (views.Section, bool, error)

// pageExtra renders one feature's block above the patient list.
type pageExtra func(c echo.Context) (views.Section, bool, error)

var _ = time.Second

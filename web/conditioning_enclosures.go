package web

import (
	"errors"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// condMetresPerFoot converts feet to metres (the international foot, exact).
const condMetresPerFoot = 0.3048

func condCanEditEnclosures(c echo.Context) bool {
	ls := session(c)
	return ls != nil && ls.User.HasAny(records.RoleAdmin, records.RoleRehabilitator)
}

func (s *Server) condEnclosuresView(c echo.Context, f views.EnclosureForm) (views.EnclosuresView, error) {
	list, err := s.store.Enclosures(c.Request().Context(), true)
	if f.Unit == "" {
		f.Unit = "m"
	}
	return views.EnclosuresView{List: list, CanEdit: condCanEditEnclosures(c), Form: f, Classes: assess.EnclosureClasses()}, err
}

func (s *Server) handleEnclosures(c echo.Context) error {
	v, err := s.condEnclosuresView(c, views.EnclosureForm{Kind: string(assess.EnclosureFlightCage)})
	if err != nil {
		return err
	}
	if c.QueryParam("saved") != "" {
		v.Notice = "Saved " + c.QueryParam("saved") + "."
	}
	return render(c, http.StatusOK, views.EnclosuresPage(s.meta(c, "Enclosures"), v))
}

func condEnclosureFormFrom(c echo.Context) views.EnclosureForm {
	return views.EnclosureForm{Name: c.FormValue("name"), Kind: c.FormValue("kind"), Length: c.FormValue("length"),
		Width: c.FormValue("width"), Height: c.FormValue("height"), Unit: c.FormValue("unit"), Notes: c.FormValue("notes"),
		Retired: c.FormValue("retired") == "1"}
}

// enclosureInput converts the typed sizes to metres and checks the input.
func condEnclosureInput(f views.EnclosureForm) (records.EnclosureInput, assess.ValidationErrors) {
	var errs assess.ValidationErrors
	factor := 1.0
	switch f.Unit {
	case "m", "":
	case "ft":
		factor = condMetresPerFoot
	default:
		errs = append(errs, &assess.ValidationError{Field: "unit", Value: f.Unit, Message: "choose metres or feet"})
	}
	in := records.EnclosureInput{Name: strings.TrimSpace(f.Name), Kind: assess.EnclosureKind(f.Kind), Notes: f.Notes, Retired: f.Retired}
	for _, d := range []struct {
		field, raw string
		dst        *float64
	}{{"length_m", f.Length, &in.LengthM}, {"width_m", f.Width, &in.WidthM}, {"height_m", f.Height, &in.HeightM}} {
		v, e := parseFloatField(d.field, d.raw, false)
		if e != nil {
			errs = append(errs, e)
			continue
		}
		*d.dst = v * factor
	}
	if err := in.Validate(); err != nil {
		for _, e := range asValidation(err) {
			if errs.Field(e.Field) == "" {
				errs = append(errs, e)
			}
		}
	}
	return in, errs
}

func (s *Server) handleAddEnclosure(c echo.Context) error {
	f := condEnclosureFormFrom(c)
	in, errs := condEnclosureInput(f)
	if len(errs) == 0 {
		e, err := s.store.AddEnclosure(c.Request().Context(), currentUser(c).ID, in)
		if err == nil {
			return c.Redirect(http.StatusSeeOther, "/enclosures?saved="+url.QueryEscape(e.Name))
		}
		if errs = asValidation(err); errs == nil {
			return err
		}
	}
	f.Errors = errs
	v, err := s.condEnclosuresView(c, f)
	if err != nil {
		return err
	}
	return render(c, http.StatusUnprocessableEntity, views.EnclosuresPage(s.meta(c, "Enclosures"), v))
}

func (s *Server) condEnclosureFromPath(c echo.Context) (records.Enclosure, error) {
	id, err := strconv.ParseInt(c.Param("id"), 10, 64)
	if err != nil {
		return records.Enclosure{}, echo.NewHTTPError(http.StatusNotFound, "There is no such enclosure.")
	}
	e, err := s.store.Enclosure(c.Request().Context(), id)
	if errors.Is(err, records.ErrNotFound) {
		return e, echo.NewHTTPError(http.StatusNotFound, "There is no such enclosure.")
	}
	return e, err
}

func (s *Server) handleEditEnclosureForm(c echo.Context) error {
	e, err := s.condEnclosureFromPath(c)
	if err != nil {
		return err
	}
	f := views.EnclosureForm{ID: e.ID, Version: e.Version, Name: e.Name, Kind: string(e.Kind), Unit: "m",
		Length: condNum(e.LengthM), Width: condNum(e.WidthM), Height: condNum(e.HeightM), Notes: e.Notes, Retired: e.Retired}
	return render(c, http.StatusOK, views.EnclosureEditPage(s.meta(c, "Edit "+e.Name), f))
}

func (s *Server) handleEditEnclosure(c echo.Context) error {
	e, err := s.condEnclosureFromPath(c)
	if err != nil {
		return err
	}
	f := condEnclosureFormFrom(c)
	f.ID, f.Version = e.ID, e.Version
	if v, err := strconv.Atoi(c.FormValue("version")); err == nil {
		f.Version = v
	}
	in, errs := condEnclosureInput(f)
	if len(errs) == 0 {
		_, err := s.store.UpdateEnclosure(c.Request().Context(), currentUser(c).ID, e.ID, f.Version, in)
		switch {
		case err == nil:
			return c.Redirect(http.StatusSeeOther, "/enclosures?saved="+url.QueryEscape(in.Name))
		case errors.Is(err, records.ErrConflict):
			errs = assess.ValidationErrors{{Field: "name", Message: "someone changed this enclosure meanwhile: open it again from the list"}}
		default:
			if errs = asValidation(err); errs == nil {
				return err
			}
		}
	}
	f.Errors = errs
	return render(c, http.StatusUnprocessableEntity, views.EnclosureEditPage(s.meta(c, "Edit "+e.Name), f))
}

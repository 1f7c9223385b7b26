package web

import (
	"context"
	"net/http"
	"slices"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// clearanceSection renders the clinical clearance panel of the patient page.
func (s *Server) clearanceSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	panel, err := s.clearancePanel(c, p)
	if err != nil {
		return views.Section{}, false, err
	}
	return views.Section{ID: "clearance", Title: "Clinical clearance", Body: views.ClearanceBody(panel)}, true, nil
}

// clearanceGroup is the species group of p, or "" when the species is not
// in the table (then every item is shown).
func (s *Server) clearanceGroup(ctx context.Context, p records.Patient) assess.Group {
	if sp, err := s.findSpecies(ctx, p.SpeciesScientific); err == nil {
		return sp.Group
	}
	return ""
}

// clearancePanel reads the current state of the items that apply to p's
// species group and the history of changes.
func (s *Server) clearancePanel(c echo.Context, p records.Patient) (views.ClearancePanel, error) {
	ctx := c.Request().Context()
	all, err := s.store.Clearances(ctx, p.ID)
	if err != nil {
		return views.ClearancePanel{}, err
	}
	hist, err := s.store.ClearanceHistory(ctx, p.ID)
	if err != nil {
		return views.ClearancePanel{}, err
	}
	apply := assess.ClearanceItemsFor(s.clearanceGroup(ctx, p))
	panel := views.ClearancePanel{Case: p.CaseNumber, History: hist, CSRF: s.csrfToken(c),
		CanSet: currentUser(c).HasAny(records.ClearanceRoles...), State: string(assess.ClearanceCleared),
		Cautions: s.cautionsAbout("before release")}
	for _, cl := range all {
		if slices.Contains(apply, cl.Item) {
			panel.Items = append(panel.Items, cl)
		}
	}
	return panel, nil
}

func (s *Server) handleClearanceForm(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	panel, err := s.clearancePanel(c, p)
	if err != nil {
		return err
	}
	panel.Item = c.QueryParam("item")
	return render(c, http.StatusOK, views.ClearancePage(s.meta(c, "Clinical clearance · "+p.CaseNumber), p, panel))
}

// handleSetClearance records one clearance change. The route is guarded by
// requireRole; the store checks the role again from the database.
func (s *Server) handleSetClearance(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	item := assess.ClearanceItem(c.FormValue("item"))
	state := assess.ClearanceState(c.FormValue("state"))
	note := strings.TrimSpace(c.FormValue("note"))
	var errs assess.ValidationErrors
	if item.Valid() && !slices.Contains(assess.ClearanceItemsFor(s.clearanceGroup(c.Request().Context(), p)), item) {
		errs = append(errs, &assess.ValidationError{Field: "item", Value: string(item),
			Message: "this item does not apply to the species: live-prey capture is for raptors and owls"})
	}
	if len(errs) == 0 {
		_, err = s.store.SetClearance(c.Request().Context(), currentUser(c), p.ID, item, state, note)
		errs = asValidation(err)
	}
	if len(errs) > 0 {
		panel, perr := s.clearancePanel(c, p)
		if perr != nil {
			return perr
		}
		panel.Item, panel.State, panel.Note, panel.Errors = string(item), string(state), note, errs
		return render(c, http.StatusUnprocessableEntity, views.ClearancePage(s.meta(c, "Clinical clearance · "+p.CaseNumber), p, panel))
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/patients/"+p.CaseNumber+"#clearance")
}

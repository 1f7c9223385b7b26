package web

import (
	"fmt"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// speciesEditors may set the centre's species values and add species.
var speciesEditors = []records.Role{records.RoleVet, records.RoleRehabilitator, records.RoleAdmin}

// speciesRoutes adds the species reference: every logged-in user reads it;
// vets, rehabilitators and admins set the centre's values.
func (s *Server) speciesRoutes(g *echo.Group) {
	ed := requireRole(speciesEditors...)
	g.GET("/species", s.handleSpeciesList)
	g.GET("/species/new", s.handleNewSpeciesForm, ed)
	g.POST("/species/new", s.handleAddSpecies, ed)
	g.GET("/species/:name", s.handleSpeciesDetail)
	g.GET("/species/:name/override", s.handleOverrideForm, ed)
	g.POST("/species/:name/override", s.handleOverride, ed)
	g.POST("/species/:name/override/reset", s.handleOverrideReset, ed)
}

// speciesURL is a species' page: its scientific name with hyphens for
// spaces (the table's lookup folds them back).
func speciesURL(scientific string) string {
	return "/species/" + url.PathEscape(strings.ReplaceAll(scientific, " ", "-"))
}

func canEditSpecies(c echo.Context) bool {
	ls := session(c)
	return ls != nil && ls.User.HasAny(speciesEditors...)
}

// handleSpeciesList lists the species matching ?q= (a name), ?group= and
// ?centre=1 (only those with the centre's values).
func (s *Server) handleSpeciesList(c echo.Context) error {
	tab, err := s.store.SpeciesTable(c.Request().Context())
	if err != nil {
		return err
	}
	v := views.SpeciesListView{Query: strings.TrimSpace(c.QueryParam("q")), Group: c.QueryParam("group"),
		ChangedOnly: c.QueryParam("centre") == "1", Total: tab.Len(), CanEdit: canEditSpecies(c)}
	for _, g := range assess.Groups {
		v.Groups = append(v.Groups, views.SpeciesOpt{Value: string(g), Label: g.Label()})
	}
	list := tab.All()
	if v.Query != "" {
		list = tab.Search(v.Query, 0)
	}
	for _, sp := range list {
		if v.Group != "" && string(sp.Group) != v.Group || v.ChangedOnly && !tab.Changed(sp.ScientificName) {
			continue
		}
		v.Rows = append(v.Rows, speciesListRow(tab, sp))
	}
	if saved := c.QueryParam("saved"); saved != "" {
		v.Notice = "Saved: " + saved + "."
	}
	return render(c, http.StatusOK, views.SpeciesListPage(s.meta(c, "Species"), v))
}

// speciesListRow shows a species' main values; a value the centre changed
// reads "new (shipped old)".
func speciesListRow(tab *records.CentreSpecies, sp *assess.Species) views.SpeciesListRow {
	shipped, isShipped := tab.Shipped(sp.ScientificName)
	show := func(key string) string {
		f, _ := records.SpeciesFieldByKey(key)
		now := records.FormatSpeciesValue(f, records.SpeciesValue(sp, key))
		if isShipped && shipped != sp {
			if was := records.FormatSpeciesValue(f, records.SpeciesValue(shipped, key)); was != now {
				return fmt.Sprintf("%s (shipped %s)", orNoneText(now), orNoneText(was))
			}
		}
		return now
	}
	r := views.SpeciesListRow{URL: speciesURL(sp.ScientificName), Common: sp.CommonName, Scientific: sp.ScientificName,
		Group: sp.Group.Label(), MassG: show("mass_g.pooled"), RangeG: show("mass_range_g.unknown"), SpanMM: show("span_mm"),
		AreaCM2: show("area_cm2"), Launch: show("launch_mode")}
	if sp.SpanAreaEstimated {
		r.SpanSource = "(estimated)"
	}
	switch n := len(tab.Overrides(sp.ScientificName)); {
	case tab.Added(sp.ScientificName):
		r.Centre = "added by the centre"
	case n == 1:
		r.Centre = "1 value of the centre's"
	case n > 1:
		r.Centre = strconv.Itoa(n) + " values of the centre's"
	}
	return r
}

func orNoneText(s string) string {
	if s == "" {
		return "none"
	}
	return s
}

// speciesFromPath resolves the :name of the path in the centre's table.
func (s *Server) speciesFromPath(c echo.Context) (*records.CentreSpecies, *assess.Species, error) {
	tab, err := s.store.SpeciesTable(c.Request().Context())
	if err != nil {
		return nil, nil, err
	}
	name, err := url.PathUnescape(c.Param("name"))
	if err != nil {
		name = c.Param("name")
	}
	sp, err := tab.Find(name)
	if err != nil {
		return nil, nil, echo.NewHTTPError(http.StatusNotFound, "There is no such species in the reference.")
	}
	return tab, sp, nil
}

func (s *Server) handleSpeciesDetail(c echo.Context) error {
	tab, sp, err := s.speciesFromPath(c)
	if err != nil {
		return err
	}
	v := speciesDetail(tab, sp, canEditSpecies(c))
	if saved := c.QueryParam("saved"); saved != "" {
		v.Notice = "Saved: " + saved + ". Assessments use it from now on."
	}
	return render(c, http.StatusOK, views.SpeciesDetailPage(s.meta(c, sp.CommonName), v))
}

// speciesDetail lays out every value the centre can set of sp: shipped and
// in force, each with its source, and who set the centre's.
func speciesDetail(tab *records.CentreSpecies, sp *assess.Species, canEdit bool) views.SpeciesDetailView {
	shipped, isShipped := tab.Shipped(sp.ScientificName)
	v := views.SpeciesDetailView{Common: sp.CommonName, Scientific: sp.ScientificName, GroupLabel: sp.Group.Label(),
		URL: speciesURL(sp.ScientificName), Added: !isShipped, CanEdit: canEdit}
	ovs := map[string]records.SpeciesOverride{}
	for _, o := range tab.Overrides(sp.ScientificName) {
		ovs[o.Field] = o
	}
	for _, f := range records.SpeciesFields {
		if f.AddedOnly && isShipped {
			continue
		}
		v.Rows = append(v.Rows, speciesValueRow(f, sp, shipped, ovs))
	}
	add := func(label, value, key string) {
		src := ""
		if ref, ok := sp.Sources[key]; ok {
			src = sourceLabel(ref)
		}
		v.Other = append(v.Other, views.RefRow{Label: label, Value: value, Source: src})
	}
	if isShipped {
		add("Family", sp.Family, "family")
		add("Order", sp.Order, "order")
		add("Flying style", string(sp.FlightStyle), "flight_style")
		add("Passerine", yesNo(sp.Passerine), "passerine")
		add("Migrant", yesNo(sp.Migrant), "migrant")
	}
	return v
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// speciesValueRow is one value of sp, shipped (nil for an added species)
// beside the value in force.
func speciesValueRow(f records.SpeciesField, sp, shipped *assess.Species, ovs map[string]records.SpeciesOverride) views.SpeciesValueRow {
	r := views.SpeciesValueRow{Key: f.Key, Label: f.Label, Unit: f.Unit, Hint: f.Hint, Kind: string(f.Kind), Required: f.Required,
		Current: records.FormatSpeciesValue(f, records.SpeciesValue(sp, f.Key)), CurrentSource: sourceOf(sp, f.Key)}
	if shipped != nil {
		sv := records.SpeciesValue(shipped, f.Key)
		r.Shipped, r.ShippedSource = records.FormatSpeciesValue(f, sv), sourceOf(shipped, f.Key)
		r.Placeholder = bareValue(f, sv, 0)
		r.PlaceholderMax = bareValue(f, sv, 1)
	}
	if o, ok := ovs[f.Key]; ok {
		r.Override, r.SetBy, r.SetAt, r.Note = true, o.SetBy, o.SetAt.Local().Format("2 Jan 2006"), o.Note
		r.Typed, r.TypedMax = bareValue(f, o.Value, 0), bareValue(f, o.Value, 1)
	}
	switch f.Kind {
	case records.ValueLaunch:
		for _, m := range assess.LaunchModes {
			r.Options = append(r.Options, views.SpeciesOpt{Value: string(m), Label: string(m)})
		}
	case records.ValueGroup:
		for _, g := range assess.Groups {
			r.Options = append(r.Options, views.SpeciesOpt{Value: string(g), Label: g.Label()})
		}
	case records.ValueBool:
		r.Options = []views.SpeciesOpt{{Value: "yes", Label: "yes"}, {Value: "no", Label: "no"}}
	}
	return r
}

// sourceOf is the source of value key of sp in words; a range without its
// own entry falls back to the ranges' shared one, a mass to the pooled one.
func sourceOf(sp *assess.Species, key string) string {
	for _, k := range []string{key, strings.SplitN(key, ".", 2)[0]} {
		if ref, ok := sp.Sources[k]; ok {
			return sourceLabel(ref)
		}
	}
	return ""
}

// bareValue is a value as a form field holds it, without its unit: end 0
// or 1 of a range, "yes"/"no" for a boolean.
func bareValue(f records.SpeciesField, v any, end int) string {
	switch x := v.(type) {
	case nil:
		return ""
	case assess.RangeG:
		if x == (assess.RangeG{}) {
			return ""
		}
		return strconv.FormatFloat([2]float64{x.Min, x.Max}[end], 'f', -1, 64)
	}
	if end > 0 {
		return ""
	}
	out := records.FormatSpeciesValue(f, v)
	if f.Unit != "" {
		out = strings.TrimSuffix(out, " "+f.Unit)
	}
	return out
}

func (s *Server) handleOverrideForm(c echo.Context) error {
	tab, sp, err := s.speciesFromPath(c)
	if err != nil {
		return err
	}
	v := views.SpeciesFormView{Detail: speciesDetail(tab, sp, true), Action: speciesURL(sp.ScientificName) + "/override"}
	return render(c, http.StatusOK, views.SpeciesFormPage(s.meta(c, sp.CommonName+": centre values"), v))
}

// typedValues reads every field of the species form as typed.
func typedValues(c echo.Context, fields []records.SpeciesField) map[string][2]string {
	out := map[string][2]string{}
	for _, f := range fields {
		if f.Kind == records.ValueRange {
			out[f.Key] = [2]string{c.FormValue(f.Key + ".min"), c.FormValue(f.Key + ".max")}
		} else {
			out[f.Key] = [2]string{c.FormValue(f.Key)}
		}
	}
	return out
}

// handleOverride saves the centre's values of a species: each field typed
// differently from the centre's current value is set, each emptied one
// removed. Refused: the form again with what was typed (422).
func (s *Server) handleOverride(c echo.Context) error {
	tab, sp, err := s.speciesFromPath(c)
	if err != nil {
		return err
	}
	note := strings.TrimSpace(c.FormValue("note"))
	typed := typedValues(c, records.SpeciesFields)
	current := map[string]any{}
	for _, o := range tab.Overrides(sp.ScientificName) {
		current[o.Field] = o.Value
	}
	_, isShipped := tab.Shipped(sp.ScientificName)
	var changes []records.SpeciesChange
	var errs assess.ValidationErrors
	for _, f := range records.SpeciesFields {
		if f.AddedOnly && isShipped {
			continue
		}
		t := typed[f.Key]
		v, err := f.Parse(t[0], t[1])
		if err != nil {
			errs = append(errs, asValidation(err)...)
			continue
		}
		was, had := current[f.Key]
		switch {
		case v == nil && !had:
		case v == nil:
			changes = append(changes, records.SpeciesChange{Field: f.Key})
		case !had || records.FormatSpeciesValue(f, was) != records.FormatSpeciesValue(f, v):
			changes = append(changes, records.SpeciesChange{Field: f.Key, Value: v})
		}
	}
	if len(errs) == 0 && len(changes) > 0 {
		err = s.store.SetSpeciesValues(c.Request().Context(), currentUser(c).ID, sp.ScientificName, changes, note)
		if err == nil {
			return c.Redirect(http.StatusSeeOther, speciesURL(sp.ScientificName)+"?saved="+url.QueryEscape(changedWords(changes)))
		}
		if errs = asValidation(err); errs == nil {
			return err
		}
	}
	if len(errs) == 0 {
		return c.Redirect(http.StatusSeeOther, speciesURL(sp.ScientificName)+"?saved="+url.QueryEscape("nothing changed"))
	}
	v := views.SpeciesFormView{Detail: speciesDetail(tab, sp, true), Action: speciesURL(sp.ScientificName) + "/override",
		Note: note, Errors: errs, Failed: "Nothing was saved: correct the fields marked below."}
	refill(&v, typed, errs)
	return render(c, http.StatusUnprocessableEntity, views.SpeciesFormPage(s.meta(c, sp.CommonName+": centre values"), v))
}

// refill puts what was typed and each field's error back into the form.
func refill(v *views.SpeciesFormView, typed map[string][2]string, errs assess.ValidationErrors) {
	for i := range v.Detail.Rows {
		r := &v.Detail.Rows[i]
		t := typed[r.Key]
		r.Typed, r.TypedMax = strings.TrimSpace(t[0]), strings.TrimSpace(t[1])
		for _, e := range errs {
			if e.Field == r.Key || strings.HasPrefix(e.Field, r.Key+".") {
				r.Error = e.Message
			}
		}
	}
}

// changedWords lists the labels of the values changed.
func changedWords(cs []records.SpeciesChange) string {
	var out []string
	for _, c := range cs {
		f, _ := records.SpeciesFieldByKey(c.Field)
		w := strings.ToLower(f.Label)
		if c.Value == nil {
			w += " (shipped value again)"
		}
		out = append(out, w)
	}
	return strings.Join(out, ", ")
}

// handleOverrideReset removes the centre's value of one field (one click).
func (s *Server) handleOverrideReset(c echo.Context) error {
	_, sp, err := s.speciesFromPath(c)
	if err != nil {
		return err
	}
	ch := []records.SpeciesChange{{Field: c.FormValue("field")}}
	err = s.store.SetSpeciesValues(c.Request().Context(), currentUser(c).ID, sp.ScientificName, ch, "")
	if errs := asValidation(err); errs != nil {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "Not changed: "+errs[0].Message+".")
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, speciesURL(sp.ScientificName)+"?saved="+url.QueryEscape(changedWords(ch)))
}

// newSpeciesForm is the blank add-a-species form.
func newSpeciesForm() views.SpeciesFormView {
	v := views.SpeciesFormView{New: true, Action: "/species/new", Detail: views.SpeciesDetailView{Added: true}}
	for _, f := range records.SpeciesFields {
		v.Detail.Rows = append(v.Detail.Rows, speciesValueRow(f, &assess.Species{}, nil, nil))
	}
	for i := range v.Detail.Rows {
		v.Detail.Rows[i].Current = ""
	}
	return v
}

func (s *Server) handleNewSpeciesForm(c echo.Context) error {
	return render(c, http.StatusOK, views.SpeciesFormPage(s.meta(c, "Add a species"), newSpeciesForm()))
}

// handleAddSpecies adds a species that is not shipped: 303 to its page, or
// the form again with what was typed (422).
func (s *Server) handleAddSpecies(c echo.Context) error {
	ctx := c.Request().Context()
	typed := typedValues(c, records.SpeciesFields)
	n := records.NewSpecies{ScientificName: strings.TrimSpace(c.FormValue("scientific_name")), Values: map[string]any{}}
	note := strings.TrimSpace(c.FormValue("note"))
	var errs assess.ValidationErrors
	for _, f := range records.SpeciesFields {
		t := typed[f.Key]
		v, err := f.Parse(t[0], t[1])
		if err != nil {
			errs = append(errs, asValidation(err)...)
		} else if v != nil {
			n.Values[f.Key] = v
		}
	}
	if len(errs) == 0 {
		sp, err := s.store.AddSpecies(ctx, currentUser(c).ID, n, note)
		if err == nil {
			return c.Redirect(http.StatusSeeOther, speciesURL(sp.ScientificName)+"?saved="+url.QueryEscape(sp.CommonName+" added"))
		}
		if errs = asValidation(err); errs == nil {
			return err
		}
	}
	v := newSpeciesForm()
	v.Scientific, v.Note, v.Errors = n.ScientificName, note, errs
	v.Failed = "Nothing was saved: correct the fields marked below."
	refill(&v, typed, errs)
	return render(c, http.StatusUnprocessableEntity, views.SpeciesFormPage(s.meta(c, "Add a species"), v))
}

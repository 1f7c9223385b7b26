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

// settingsRoutes adds the centre's settings: the thresholds (admins), the
// species reference and its overrides, and the release sites.
func (s *Server) settingsRoutes(g *echo.Group) {
	g.GET("/settings", s.handleSettings)
	admin := requireRole(records.RoleAdmin)
	g.GET("/settings/thresholds", s.handleThresholds, admin)
	g.POST("/settings/thresholds", s.handleSetThreshold, admin)
	g.POST("/settings/thresholds/reset", s.handleResetThreshold, admin)
	g.GET("/settings/centre", s.handleCentreForm, admin)
	g.POST("/settings/centre", s.handleSetCentre, admin)
	s.speciesRoutes(g)
	s.siteRoutes(g)
}

// handleSettings is the settings landing page.
func (s *Server) handleSettings(c echo.Context) error {
	ctx := c.Request().Context()
	u := currentUser(c)
	v := views.SettingsIndex{CanThresholds: u.Has(records.RoleAdmin), CanSpecies: u.HasAny(speciesEditors...),
		CanSites: u.HasAny(siteEditors...)}
	list, err := s.store.ThresholdSettings(ctx)
	if err != nil {
		return err
	}
	ovs, err := s.store.AllSpeciesOverrides(ctx)
	if err != nil {
		return err
	}
	species := map[string]bool{}
	for _, o := range ovs {
		species[o.Species] = true
	}
	sites, err := s.store.ReleaseSites(ctx, false)
	if err != nil {
		return err
	}
	v.Thresholds, v.Species, v.Sites = len(list), len(species), len(sites)
	return render(c, http.StatusOK, views.SettingsPage(s.meta(c, "Settings"), v))
}

// thresholdInput is a change of one threshold as posted.
type thresholdInput struct {
	ID    assess.ThresholdID
	Group assess.Group
	Value string
	Note  string
}

func thresholdInputOf(c echo.Context) thresholdInput {
	return thresholdInput{ID: assess.ThresholdID(c.FormValue("threshold")), Group: assess.Group(c.FormValue("group")),
		Value: c.FormValue("value"), Note: strings.TrimSpace(c.FormValue("note"))}
}

// anchor is the HTML id of a threshold's row.
func (in thresholdInput) anchor() string { return thresholdAnchor(string(in.ID), in.Group) }

func thresholdAnchor(id string, g assess.Group) string {
	if g == "" {
		return "th-" + id
	}
	return "th-" + id + "--" + string(g)
}

func (s *Server) handleThresholds(c echo.Context) error {
	v, err := s.thresholdsView(c, thresholdInput{}, nil)
	if err != nil {
		return err
	}
	if saved := c.QueryParam("saved"); saved != "" {
		v.Notice = "Saved: " + saved + ". The assessment uses it from now on."
	}
	return render(c, http.StatusOK, views.ThresholdsPage(s.meta(c, "Thresholds"), v))
}

// handleSetThreshold changes one threshold: 303 back to its row, or the
// page again with the value typed and the reason beside it (422).
func (s *Server) handleSetThreshold(c echo.Context) error {
	in := thresholdInputOf(c)
	v, verr := parseFloatField(string(in.ID), in.Value, false)
	if verr == nil {
		_, err := s.store.SetThreshold(c.Request().Context(), currentUser(c).ID, in.ID, in.Group, v, in.Note)
		if err == nil {
			return s.thresholdSaved(c, in)
		}
		errs := asValidation(err)
		if errs == nil {
			return err
		}
		verr = errs[0]
	}
	return s.thresholdRefused(c, in, verr)
}

// handleResetThreshold puts one threshold back to its default.
func (s *Server) handleResetThreshold(c echo.Context) error {
	in := thresholdInputOf(c)
	err := s.store.ResetThreshold(c.Request().Context(), currentUser(c).ID, in.ID, in.Group)
	if err == nil {
		return s.thresholdSaved(c, in)
	}
	errs := asValidation(err)
	if errs == nil {
		return err
	}
	return s.thresholdRefused(c, in, errs[0])
}

func (s *Server) thresholdSaved(c echo.Context, in thresholdInput) error {
	what := thresholdWords(in.ID, in.Group)
	return c.Redirect(http.StatusSeeOther, "/settings/thresholds?saved="+url.QueryEscape(what)+"#"+in.anchor())
}

func (s *Server) thresholdRefused(c echo.Context, in thresholdInput, verr *assess.ValidationError) error {
	v, err := s.thresholdsView(c, in, verr)
	if err != nil {
		return err
	}
	v.Failed = "Not changed: " + thresholdWords(in.ID, in.Group) + ". " + verr.Message + "."
	return render(c, http.StatusUnprocessableEntity, views.ThresholdsPage(s.meta(c, "Thresholds"), v))
}

// thresholdWords names a threshold (and group) for a notice.
func thresholdWords(id assess.ThresholdID, g assess.Group) string {
	th, ok := assess.DefaultThresholds().Get(id)
	if !ok {
		return string(id)
	}
	if g != "" {
		return th.Label + " — " + g.Label()
	}
	return th.Label
}

// thresholdsView lays out every threshold in sections; typed and verr put a
// refused change back into its row.
func (s *Server) thresholdsView(c echo.Context, typed thresholdInput, verr *assess.ValidationError) (views.ThresholdsView, error) {
	ctx := c.Request().Context()
	list, err := s.store.ThresholdSettings(ctx)
	if err != nil {
		return views.ThresholdsView{}, err
	}
	th, skipped := records.ApplyThresholdSettings(list)
	notes := map[string]string{}
	for _, st := range list {
		notes[thresholdAnchor(string(st.ThresholdID), st.Group)] = st.Note
	}
	var v views.ThresholdsView
	for _, sk := range skipped {
		v.Skipped = append(v.Skipped, fmt.Sprintf("%s: %g set by %s (%v)", thresholdWords(sk.Setting.ThresholdID, sk.Setting.Group),
			sk.Setting.Value, sk.Setting.SetBy, sk.Err))
	}
	secs := map[string]*views.ThresholdSection{}
	var order []string
	defaults := assess.DefaultThresholds()
	for _, t := range th.All() {
		key, title, intro := thresholdSectionOf(t)
		sec, ok := secs[key]
		if !ok {
			sec = &views.ThresholdSection{ID: key, Title: title, Intro: intro}
			secs[key] = sec
			order = append(order, key)
		}
		def, _ := defaults.Get(t.ID)
		if !t.PerGroup {
			sec.Rows = append(sec.Rows, thresholdRow(t, "", t.Label, t.Setting, def.Setting))
			continue
		}
		for i, gs := range t.Groups {
			sec.Rows = append(sec.Rows, thresholdRow(t, gs.Group, gs.Group.Label(), gs.Setting, def.Groups[i].Setting))
		}
	}
	for _, key := range order {
		sec := secs[key]
		for i := range sec.Rows {
			r := &sec.Rows[i]
			r.Note = notes[r.Anchor]
			if r.Anchor == typed.anchor() && verr != nil {
				r.Typed, r.Error = typed.Value, verr.Message
			}
		}
		v.Sections = append(v.Sections, *sec)
	}
	return v, nil
}

// thresholdSectionOf puts a threshold in a section of the page.
func thresholdSectionOf(t assess.Threshold) (key, title, intro string) {
	id := string(t.ID)
	switch {
	case t.ID == assess.ThStaleDays || t.ID == assess.ThDropCapM:
		return "evidence-safety", "Evidence and safety", "How old evidence may be before it cannot support the top advice, and the highest drop test offered (staff are warned before any drop test)."
	case t.PerGroup:
		return "group-" + id, t.Label, "Set per species group. A group without a value is not assessed on this until the centre sets one."
	case strings.HasPrefix(id, string(assess.ThMuscleFactorPrefix)):
		return "muscle-factors", "Flight model: muscle factor by pectoral muscle score", "The share of a healthy bird's sustained power the flight model allows for each pectoral muscle score (0–3)."
	case strings.HasPrefix(id, string(assess.ThFatFractionKaiser)):
		return "fat-0-8", "Flight model: fat fraction by fat score, 0–8 scale", "The share of body mass taken as fat for each score. Fat scores explain less than half the variation in true fat (Krementz & Pendleton 1990)."
	case strings.HasPrefix(id, string(assess.ThFatFractionHelmsPfx)):
		return "fat-0-5", "Flight model: fat fraction by fat score, 0–5 scale", "The share of body mass taken as fat for each score on the 0–5 scale."
	}
	return "criteria", "Criteria", "Limits the criteria compare the evidence with."
}

// thresholdRow lays out one setting s (its default def) of threshold t.
func thresholdRow(t assess.Threshold, g assess.Group, label string, s, def assess.Setting) views.ThresholdRow {
	r := views.ThresholdRow{Anchor: thresholdAnchor(string(t.ID), g), ID: string(t.ID), Group: string(g), Label: label,
		Unit: t.Unit, Default: "none", DefaultKind: def.Provenance, DefaultSrc: def.Source, Current: "not set",
		Changed: s.Provenance == assess.ProvCentreSetting, SetBy: s.SetBy, Step: "any",
		Min: strconv.FormatFloat(t.Min, 'f', -1, 64), Max: strconv.FormatFloat(t.Max, 'f', -1, 64)}
	if def.Default != nil {
		r.Default = strconv.FormatFloat(*def.Default, 'f', -1, 64)
	}
	if s.Value != nil {
		r.Current = strconv.FormatFloat(*s.Value, 'f', -1, 64)
	}
	if s.SetAt != nil {
		r.SetAt = s.SetAt.Local().Format("2 Jan 2006 15:04")
	}
	if t.Integer {
		r.Step = "1"
	}
	return r
}

// dropCapM is the centre's highest drop test, m: its drop-cap threshold,
// else Aloft's default.
func (s *Server) dropCapM(c echo.Context) float64 {
	th, err := s.store.Thresholds(c.Request().Context())
	if err != nil {
		return assess.DefaultDropCapM
	}
	if v, ok := th.Value(assess.ThDropCapM, ""); ok {
		return v
	}
	return assess.DefaultDropCapM
}

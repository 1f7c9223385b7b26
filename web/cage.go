package web

import (
	"crypto/rand"
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/labstack/echo/v4"

	"aloft/assess"
	"aloft/records"
	"aloft/web/views"
)

// The cage-side page: a session logged on a phone at the flight cage, for
// one patient or for a group housed and flown together. The page is a plain
// form (POST /cage/…); cage.js turns it into tap counters that keep a draft
// on the phone and send it to the JSON API of cage_api.go.

// maxGroupBirds caps a group session [project default: larger than the
// groups of songbirds or ducklings a centre flies together].
const maxGroupBirds = 50

// cageRoutes adds the cage-side page, its plain-form fallback and its API.
func (s *Server) cageRoutes(g *echo.Group) {
	g.GET("/cage/group", s.handleCageGroup)
	g.POST("/cage/group", s.handleCageGroupPost)
	g.GET("/cage/:case", s.handleCage)
	g.POST("/cage/:case", s.handleCagePost)
	g.GET("/api/v1/csrf", s.handleCSRFToken)
	g.GET("/api/v1/patients/:case/flight-sessions", s.handleListFlightSessions)
	g.POST("/api/v1/patients/:case/flight-sessions", s.handleAddFlightSession)
}

// cageSections adds the link to the cage-side page to the patient page.
func (s *Server) cageSections() []patientSection {
	return []patientSection{s.cageSection}
}

func (s *Server) cageSection(c echo.Context, p records.Patient) (views.Section, bool, error) {
	if !p.InCare() {
		return views.Section{}, false, nil
	}
	l := views.CageLinks{Case: p.CaseNumber}
	mates, encl, err := s.enclosureMates(c, p)
	if err != nil {
		return views.Section{}, false, err
	}
	l.Mates, l.Enclosure = mates, encl
	return views.Section{ID: "cage", Title: "At the flight cage", Body: views.CageLinksBlock(l)}, true, nil
}

// currentHousing returns the patient's latest housing record, or ok false.
func (s *Server) currentHousing(c echo.Context, patientID int64) (assess.Housing, bool, error) {
	hs, err := s.store.HousingHistory(c.Request().Context(), patientID)
	if err != nil || len(hs) == 0 {
		return assess.Housing{}, false, err
	}
	latest := hs[0]
	for _, h := range hs[1:] {
		if !h.From.Before(latest.From) {
			latest = h
		}
	}
	return latest, true, nil
}

// enclosureMates lists the other in-care patients whose current enclosure
// is p's, and its name.
func (s *Server) enclosureMates(c echo.Context, p records.Patient) ([]views.CageBird, string, error) {
	h, ok, err := s.currentHousing(c, p.ID)
	if err != nil || !ok || strings.TrimSpace(h.EnclosureName) == "" {
		return nil, "", err
	}
	housed, err := s.store.CurrentHousings(c.Request().Context())
	if err != nil {
		return nil, "", err
	}
	inCare, err := s.store.Patients(c.Request().Context(), records.PatientFilter{Status: string(assess.DispInCare), Limit: 1 << 20})
	if err != nil {
		return nil, "", err
	}
	var mates []views.CageBird
	for _, o := range inCare {
		if oh, ok := housed[o.ID]; ok && o.ID != p.ID && strings.EqualFold(oh.EnclosureName, h.EnclosureName) {
			mates = append(mates, cageBird(o))
		}
	}
	return mates, h.EnclosureName, nil
}

func cageBird(p records.Patient) views.CageBird {
	name := p.SpeciesCommon
	if name == "" {
		name = p.SpeciesScientific
	}
	return views.CageBird{Case: p.CaseNumber, Species: name, URL: "/patients/" + p.CaseNumber}
}

// caseSplit splits lists of case numbers typed or passed in a query
// ("2026-0001,2026-0002", or several values) into distinct case numbers,
// in the order given.
func caseSplit(values []string) []string {
	var out []string
	for _, v := range values {
		for _, c := range strings.FieldsFunc(v, func(r rune) bool { return r == ',' || r == ' ' || r == ';' || r == '\n' }) {
			if c = strings.TrimSpace(c); c != "" && !slices.Contains(out, c) {
				out = append(out, c)
			}
		}
	}
	return out
}

// cagePatients loads the patients a session covers; each must exist and be
// in care. Problems are validation errors on field.
func (s *Server) cagePatients(c echo.Context, field string, cases []string) ([]records.Patient, error) {
	var out []records.Patient
	for _, cn := range cases {
		p, err := s.store.PatientByCase(c.Request().Context(), cn)
		switch {
		case errors.Is(err, records.ErrNotFound):
			return nil, assess.ValidationErrors{{Field: field, Value: cn, Message: fmt.Sprintf("there is no patient with case number %q", cn)}}
		case err != nil:
			return nil, err
		case !p.InCare():
			return nil, assess.ValidationErrors{{Field: field, Value: cn, Message: fmt.Sprintf(
				"%s is no longer in care (%s on %s): sessions are logged for birds in care", cn, p.Status, p.StatusDate)}}
		}
		out = append(out, p)
	}
	return out, nil
}

func (s *Server) handleCage(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	if !p.InCare() {
		return echo.NewHTTPError(http.StatusConflict, fmt.Sprintf("%s is no longer in care (%s): flight sessions are logged for birds in care.", p.CaseNumber, p.Status))
	}
	pg, err := s.cagePage(c, []records.Patient{p})
	if err != nil {
		return err
	}
	return s.renderCage(c, http.StatusOK, pg)
}

func (s *Server) handleCageGroup(c echo.Context) error {
	cases := caseSplit(c.QueryParams()["cases"])
	ps, err := s.groupPatients(c, cases)
	if ve := asValidation(err); ve != nil {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "This group cannot be flown together: "+ve[0].Message+".")
	}
	if err != nil {
		return err
	}
	pg, err := s.cagePage(c, ps)
	if err != nil {
		return err
	}
	return s.renderCage(c, http.StatusOK, pg)
}

// groupPatients checks a group's case numbers: 2 to maxGroupBirds distinct
// patients, each in care.
func (s *Server) groupPatients(c echo.Context, cases []string) ([]records.Patient, error) {
	if len(cases) < 2 || len(cases) > maxGroupBirds {
		return nil, assess.ValidationErrors{{Field: "group_cases", Value: strings.Join(cases, ","),
			Message: fmt.Sprintf("a group session covers 2 to %d birds: give their case numbers, comma-separated", maxGroupBirds)}}
	}
	return s.cagePatients(c, "group_cases", cases)
}

// cagePage builds the page for the patients covered, with a fresh form:
// a new idempotency key, the exercise, the air temperature of the centre's
// last session today, and the enclosure the birds share.
func (s *Server) cagePage(c echo.Context, ps []records.Patient) (views.CagePage, error) {
	pg := cageFrame(c, ps)
	pg.Form = views.CageForm{Key: newUUID(), At: s.now().UTC().Format(time.RFC3339), Exercise: string(assess.ExerciseCage),
		Droop: string(assess.DroopNone)}
	if t, note, err := s.lastAirTemp(c); err != nil {
		return pg, err
	} else if t != nil {
		pg.Form.AirTempC, pg.AirTempNote = cageNum(*t), note
	}
	name, length, err := s.sharedEnclosure(c, ps)
	if err != nil {
		return pg, err
	}
	if name != "" {
		pg.Form.Enclosure, pg.EnclosureNote = name, "Where the bird is housed now."
		if len(ps) > 1 {
			pg.EnclosureNote = "Where the birds are housed now."
		}
		if length > 0 {
			pg.Form.LengthM = cageNum(length)
		}
	}
	return pg, nil
}

// cageFrame is the part of the page that does not depend on the form.
func cageFrame(c echo.Context, ps []records.Patient) views.CagePage {
	pg := views.CagePage{BackURL: "/patients/" + ps[0].CaseNumber}
	var cases []string
	for _, p := range ps {
		pg.Birds = append(pg.Birds, cageBird(p))
		cases = append(cases, p.CaseNumber)
	}
	pg.APIURL = "/api/v1/patients/" + url.PathEscape(ps[0].CaseNumber) + "/flight-sessions"
	if len(ps) == 1 {
		pg.Scope = ps[0].CaseNumber
		pg.PostURL = "/cage/" + url.PathEscape(ps[0].CaseNumber)
	} else {
		sorted := slices.Clone(cases)
		slices.Sort(sorted)
		pg.Scope = "group:" + strings.Join(sorted, ",")
		pg.PostURL = "/cage/group?cases=" + url.QueryEscape(strings.Join(cases, ","))
	}
	pg.LoginURL = "/login?next=" + url.QueryEscape(pg.PostURL)
	return pg
}

func (s *Server) renderCage(c echo.Context, status int, pg views.CagePage) error {
	pg.Cautions = cageCautions(s.cfg.Cautions)
	if n, err := parseSaved(c.QueryParam("saved")); err == nil {
		pg.Saved = n
	}
	title := pg.Heading()
	if !pg.Group() {
		title += " · " + pg.Birds[0].Case
	}
	return render(c, status, views.CageView(s.meta(c, title), pg))
}

func parseSaved(v string) (int, error) {
	var n int
	_, err := fmt.Sscanf(v, "%d", &n)
	return n, err
}

// cageCautions are the cautions shown at the cage: the advisory note, the
// handling cautions, flight trial safety and the limits of the model
// (open-mouth breathing read with the air temperature).
func cageCautions(md string) []views.CautionSection {
	var out []views.CautionSection
	for _, sec := range views.ParseCautions(md) {
		h := strings.ToLower(sec.Heading)
		if strings.Contains(h, "advice") || strings.Contains(h, "handling") || strings.Contains(h, "flight trial") ||
			strings.Contains(h, "limits") || strings.Contains(h, "influenza") {
			out = append(out, sec)
		}
	}
	if len(out) == 0 {
		out = views.ParseCautions(md)
	}
	return out
}

// lastAirTemp returns the air temperature of the centre's latest flight
// session today (any patient in care), with a note naming it; nil when
// there is none.
func (s *Server) lastAirTemp(c echo.Context) (*float64, string, error) {
	ctx := c.Request().Context()
	now := s.now().Local()
	dayStart := time.Date(now.Year(), now.Month(), now.Day(), 0, 0, 0, 0, now.Location())
	ps, err := s.store.Patients(ctx, records.PatientFilter{Status: string(assess.DispInCare)})
	if err != nil {
		return nil, "", err
	}
	var best *assess.FlightSession
	var bestP records.Patient
	for _, p := range ps {
		es, err := s.store.Entries(ctx, p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindSession}, Newest: true, Limit: 5})
		if err != nil {
			return nil, "", err
		}
		for _, e := range es {
			var f assess.FlightSession
			if err := e.Decode(&f); err != nil {
				return nil, "", err
			}
			if f.AirTempC == nil || f.At.Before(dayStart) || f.At.After(now.Add(time.Hour)) {
				continue
			}
			if best == nil || f.At.After(best.At) {
				best, bestP = &f, p
			}
			break
		}
	}
	if best == nil {
		return nil, "", nil
	}
	note := fmt.Sprintf("From today's %s session (%s %s). Change it if the air has warmed or cooled.",
		best.At.Local().Format("15:04"), bestP.CaseNumber, cageBird(bestP).Species)
	return best.AirTempC, note, nil
}

// sharedEnclosure returns the enclosure all ps are housed in now, with its
// flight length in metres, or "" when they are not all in one.
func (s *Server) sharedEnclosure(c echo.Context, ps []records.Patient) (string, float64, error) {
	var name string
	var length float64
	for i, p := range ps {
		h, ok, err := s.currentHousing(c, p.ID)
		if err != nil || !ok {
			return "", 0, err
		}
		if i > 0 && !strings.EqualFold(h.EnclosureName, name) {
			return "", 0, nil
		}
		name, length = h.EnclosureName, h.LengthM
	}
	return name, length, nil
}

// uuidRe is the shape of the idempotency keys cage pages make: a UUID, or
// any short token of letters, digits and dashes.
var uuidRe = regexp.MustCompile(`^[A-Za-z0-9-]{8,64}$`)

// newUUID returns a random (version 4) UUID.
func newUUID() string {
	b := make([]byte, 16)
	_, _ = rand.Read(b) // crypto/rand never fails on supported platforms
	b[6] = b[6]&0x0f | 0x40
	b[8] = b[8]&0x3f | 0x80
	return fmt.Sprintf("%x-%x-%x-%x-%x", b[0:4], b[4:6], b[6:8], b[8:10], b[10:16])
}

// cageNum formats a number as staff would type it (no trailing zeros).
func cageNum(f float64) string { return strconv.FormatFloat(f, 'f', -1, 64) }

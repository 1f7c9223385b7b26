package web

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
	"aloft/web/views"
)

// Hostile text in every text field of every form: it must be stored
// exactly as typed and shown as text wherever it appears — pages, charts,
// CSV and JSON exports, PDF reports — never as markup, a formula or SQL.
// The payloads are the classic examples of each attack (OWASP Cheat Sheet
// Series: "Cross Site Scripting Prevention", "SQL Injection Prevention",
// and the OWASP "CSV Injection" page, whose example is a HYPERLINK formula).
var plPayloads = []struct{ name, text string }{
	{"script", `<script>alert(1)</script>`},
	{"attribute", `"><img src=x onerror=alert(1)>`},
	{"sql", `'; DROP TABLE patients; --`},
	{"formula", `=HYPERLINK("http://x")`},
}

// plEnv is one payload's centre: set up through the set-up form, with the
// payload as the centre's name, and a logged-in person holding every role.
type plEnv struct {
	t       *testing.T
	a       *testApp
	P       string
	sp      *assess.Species // the Mallard
	p, p2   records.Patient
	pages   []string // paths whose HTML is checked
	enclID  int64
	version bool // a report version was frozen
}

const plPassword = "payload test password"

func newPlEnv(t *testing.T, payload string) *plEnv {
	t.Helper()
	a := newTestApp(t)
	e := &plEnv{t: t, a: a, P: payload}
	var err error
	if e.sp, err = speciesTable.Find("Anas platyrhynchos"); err != nil {
		t.Fatal(err)
	}
	a.get("/setup")
	e.post("/setup", url.Values{"centre_name": {payload}, "address": {payload}, "elevation_m": {"100"}, "username": {"boss"},
		"display_name": {payload}, "password": {plPassword}, "password2": {plPassword}})
	boss, err := a.store.UserByName(context.Background(), "boss")
	if err != nil {
		t.Fatal(err)
	}
	if err := a.store.SetRoles(context.Background(), 0, boss.ID, records.AllRoles); err != nil {
		t.Fatal(err)
	}
	a.get("/login")
	e.post("/login", url.Values{"username": {"boss"}, "password": {plPassword}})
	a.get("/patients")
	return e
}

// post submits a form and fails unless it was accepted (a redirect, or a
// page or JSON answer below 400).
func (e *plEnv) post(path string, form url.Values) *http.Response {
	e.t.Helper()
	resp, doc := e.a.post(path, form)
	if resp.StatusCode >= 400 {
		e.t.Fatalf("POST %s: status %d: %s", path, resp.StatusCode, doc.Find(".field-error, .form-error, [role=alert], main").Text())
	}
	return resp
}

// optional posts a form of a feature that may not exist yet: a 404 is
// logged and skipped.
func (e *plEnv) optional(path string, form url.Values) bool {
	e.t.Helper()
	resp, doc := e.a.post(path, form)
	switch {
	case resp.StatusCode == http.StatusNotFound:
		e.t.Logf("POST %s: 404, skipped", path)
		return false
	case resp.StatusCode >= 400:
		e.t.Errorf("POST %s: status %d: %s", path, resp.StatusCode, doc.Find(".field-error, .form-error, [role=alert]").Text())
		return false
	}
	return true
}

func (e *plEnv) now() string { return e.a.clock.Now().Local().Format(condTimeLayout) }

func (e *plEnv) base() string { return "/patients/" + e.p.CaseNumber }

// entries returns every version of the patient's records of kind, decoded
// as JSON objects.
func (e *plEnv) entries(p records.Patient, kind records.Kind) []map[string]any {
	e.t.Helper()
	es, err := e.a.store.Entries(context.Background(), p.ID, records.EntryFilter{Kinds: []records.Kind{kind}, AllVersions: true})
	if err != nil {
		e.t.Fatal(err)
	}
	var out []map[string]any
	for _, en := range es {
		var m map[string]any
		if err := json.Unmarshal(en.Data, &m); err != nil {
			e.t.Fatal(err)
		}
		out = append(out, m)
	}
	if len(out) == 0 {
		e.t.Fatalf("no %s stored", kind)
	}
	return out
}

// stored fails unless the value stored under each JSON key of the newest
// record of kind is the payload exactly.
func (e *plEnv) stored(kind records.Kind, keys ...string) {
	e.t.Helper()
	es := e.entries(e.p, kind)
	m := es[len(es)-1]
	for _, k := range keys {
		var v any = m
		for _, part := range strings.Split(k, ".") {
			if mm, ok := v.(map[string]any); ok {
				v = mm[part]
			}
		}
		if v != e.P {
			e.t.Errorf("%s.%s stored as %#v, want %q", kind, k, v, e.P)
		}
	}
}

func (e *plEnv) same(what, got string) {
	e.t.Helper()
	if got != e.P {
		e.t.Errorf("%s stored as %q, want %q", what, got, e.P)
	}
}

// fill sets every text field of a form to the payload.
func (e *plEnv) fill(form url.Values, fields ...string) url.Values {
	for _, f := range fields {
		form.Set(f, e.P)
	}
	return form
}

func (e *plEnv) intake() {
	ctx := context.Background()
	form := e.fill(url.Values{"species": {"Mallard (Anas platyrhynchos)"}, "age_class": {"adult"}, "sex": {"female"},
		"found_date": {recordstest.Epoch.Format(records.DateLayout)}, "intake_mass_g": {"1100"}},
		"found_place", "finder_name", "finder_contact", "reason", "intake_condition", "mass_note")
	resp := e.post("/intake", form)
	var err error
	if e.p, err = e.a.store.PatientByCase(ctx, strings.TrimPrefix(resp.Header.Get("Location"), "/patients/")); err != nil {
		e.t.Fatal(err)
	}
	for what, got := range map[string]string{"found_place": e.p.FoundPlace, "finder_name": e.p.FinderName,
		"finder_contact": e.p.FinderContact, "reason": e.p.Reason, "intake_condition": e.p.IntakeCondition, "mass_note": e.p.MassNote} {
		e.same("patient "+what, got)
	}
	if e.p2, err = e.a.store.AdmitPatient(ctx, 0, recordstest.Intake("Anas platyrhynchos", "Mallard", 1050)); err != nil {
		e.t.Fatal(err)
	}
	c, err := e.a.store.Centre(ctx)
	if err != nil {
		e.t.Fatal(err)
	}
	e.same("centre name", c.Name)
	e.same("centre address", c.Address)
}

func (e *plEnv) conditioning() {
	ctx := context.Background()
	e.post("/enclosures", e.fill(url.Values{"kind": {"flight-cage"}, "length": {"15"}, "width": {"3"}, "height": {"3.6"}, "unit": {"m"}},
		"name", "notes"))
	encl, err := e.a.store.EnclosureByName(ctx, e.P)
	if err != nil {
		e.t.Fatalf("the enclosure named %q: %v", e.P, err)
	}
	e.enclID = encl.ID
	e.same("enclosure name", encl.Name)
	e.same("enclosure notes", encl.Notes)

	b := e.base()
	e.post(b+"/weigh-ins", e.fill(url.Values{"at": {e.now()}, "mass_g": {"1100"}, "fed": {"before-feed"}}, "note"))
	e.stored(records.KindWeighIn, "note")
	e.post(b+"/wings", e.fill(url.Values{"at": {e.now()}, "span_mm": {condNum(e.sp.SpanMM)}, "area_cm2": {condNum(e.sp.AreaCM2)},
		"area_method": {"traced"}, "feathers_examined": {"1"}, "lp3": {"broken"}}, "note"))
	e.stored(records.KindWing, "note")
	mode := assess.TrialRulesFor(e.sp, assess.DefaultDropCapM).SafeModes[0]
	e.post(b+"/trials", e.fill(url.Values{"at": {e.now()}, "mode": {string(mode)}, "wind": {"calm"}, "attempt_1": {"climbed"}},
		"mode_reason", "surface", "notes"))
	e.stored(records.KindTrial, "mode_reason", "surface", "notes")
	e.post(b+"/housing", url.Values{"at": {e.now()}, "enclosure": {e.P}})
	e.stored(records.KindHousing, "enclosure_name")
	e.post(b+"/flight-sessions", e.fill(url.Values{"at": {e.now()}, "exercise": {"cage"}, "passes": {"6"}, "longest_run": {"6"},
		"highest": {"high-perch"}, "droop": {"none"}, "enclosure": {e.P}}, "notes"))
	e.stored(records.KindSession, "enclosure_name", "notes")
	e.post(b+"/waterproofing", url.Values{"at": {e.now()}, "minutes_on_water": {"20"}, "result": {"waterproof"}})

	// A second weigh-in, removed with the payload as the reason.
	e.post(b+"/weigh-ins", url.Values{"at": {e.now()}, "mass_g": {"1090"}, "fed": {"after-feed"}})
	es, _ := e.a.store.Entries(ctx, e.p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindWeighIn}, Newest: true})
	e.post(condRecordURL(e.p, es[0].Key, "remove"), url.Values{"reason": {e.P}})
	removed, _ := e.a.store.Entry(ctx, es[0].Key)
	e.same("removal reason", removed.RemovedReason)
	e.pages = append(e.pages, condRecordURL(e.p, es[1].Key, "correct"), condRecordURL(e.p, es[1].Key, "remove"),
		"/enclosures", fmt.Sprintf("/enclosures/%d/edit", e.enclID))
	for _, k := range []records.Kind{records.KindWing, records.KindTrial, records.KindSession} {
		x, _ := e.a.store.Entries(ctx, e.p.ID, records.EntryFilter{Kinds: []records.Kind{k}})
		e.pages = append(e.pages, condRecordURL(e.p, x[0].Key, "correct"))
	}
}

func (e *plEnv) cage() {
	ctx := context.Background()
	e.pages = append(e.pages, "/cage/"+e.p.CaseNumber, "/cage/group?cases="+e.p.CaseNumber+","+e.p2.CaseNumber)
	at := e.a.clock.Now().UTC().Format("2006-01-02T15:04:05Z")
	e.post("/cage/"+e.p.CaseNumber, e.fill(url.Values{"idempotency_key": {newUUID()}, "at": {at}, "exercise": {"cage"},
		"passes": {"4"}, "longest_run": {"4"}, "highest": {"low-perch"}, "droop": {"none"}}, "enclosure", "notes"))
	e.stored(records.KindSession, "enclosure_name", "notes")
	group := url.Values{"idempotency_key": {newUUID()}, "at": {at}, "exercise": {"cage"}, "passes": {"3"}, "highest": {"floor"},
		"droop": {"none"}, "group_cases": {e.p.CaseNumber + "," + e.p2.CaseNumber},
		views.CageBirdField(e.p2.CaseNumber, "notes"): {e.P}}
	e.post("/cage/group?cases="+e.p.CaseNumber+","+e.p2.CaseNumber, e.fill(group, "notes"))
	es := e.entries(e.p2, records.KindSession)
	if notes, _ := es[len(es)-1]["notes"].(string); notes != e.P+"\nThis bird: "+e.P {
		e.t.Errorf("group session notes of the second bird stored as %q, want the group's and the bird's", notes)
	}
	in := cageInput{IdempotencyKey: newUUID(), Session: goodSession(e.a.clock.Now())}
	in.Session.Notes, in.Session.EnclosureName = e.P, e.P
	resp, body := e.a.postJSON(apiPath(e.p), in, e.a.csrf)
	if resp.StatusCode != http.StatusCreated {
		e.t.Fatalf("cage API: status %d: %s", resp.StatusCode, body)
	}
	e.stored(records.KindSession, "enclosure_name", "notes")
	resp, list := e.a.getBody(apiPath(e.p))
	plCheckJSON(e.t, "GET "+apiPath(e.p), resp, list, e.P)
	_ = ctx
}

// plClinical are the clinical forms with their text fields (form names;
// the JSON keys are the same but for the exam's findings).
func (e *plEnv) clinical() {
	ctx := context.Background()
	at := e.a.clock.Now().Local().Format(clinDateTime)
	today := e.a.clock.Now().Local().Format(records.DateLayout)
	exam := url.Values{"at": {at}, "eye_left": {"abnormal"}, "eye_right": {"normal"}, "feet_legs": {"abnormal"}, "feathers": {"abnormal"},
		"hydration": {"normal"}, "keel_score": {"2"}}
	var findings []string
	for _, b := range assess.BodySystems {
		exam.Set("findings_"+string(b), e.P)
		findings = append(findings, "findings."+string(b))
	}
	forms := []struct {
		kind   records.Kind
		form   url.Values
		fields []string
	}{
		{records.KindExam, exam, []string{"eyes_note", "feet_legs_note", "feathers_note", "notes"}},
		{records.KindDiagnosis, url.Values{"at": {at}, "status": {"active"}}, []string{"condition", "notes"}},
		{records.KindTreatment, url.Values{"at": {at}}, []string{"procedure", "notes"}},
		{records.KindMedication, url.Values{"at": {at}, "dose": {"0.5"}, "dose_unit": {"mg/kg"}, "route": {"PO"}, "every_hours": {"24"},
			"first_dose": {"08:00"}, "start": {today}, "end": {today}}, []string{"drug", "prescriber", "notes"}},
		{records.KindLab, url.Values{"at": {at}}, []string{"test", "value", "unit", "lab", "notes"}},
		{records.KindDiseaseTest, url.Values{"at": {at}, "result": {"pending"}}, []string{"test", "sample", "lab", "reported_to", "notes"}},
	}
	for _, f := range forms {
		e.post(clinicalPath(e.p, f.kind), e.fill(f.form, f.fields...))
		keys := f.fields
		if f.kind == records.KindExam {
			keys = append(keys, findings...)
		}
		e.stored(f.kind, keys...)
		x, _ := e.a.store.Entries(ctx, e.p.ID, records.EntryFilter{Kinds: []records.Kind{f.kind}})
		e.pages = append(e.pages, fmt.Sprintf("%s/%d", clinicalPath(e.p, f.kind), x[0].Key))
	}
	// A second treatment, removed with the payload as the reason.
	e.post(clinicalPath(e.p, records.KindTreatment), url.Values{"at": {at}, "procedure": {"second"}})
	x, _ := e.a.store.Entries(ctx, e.p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindTreatment}, Newest: true})
	e.post(fmt.Sprintf("%s/%d/remove", clinicalPath(e.p, records.KindTreatment), x[0].Key), url.Values{"reason": {e.P}})
	removed, _ := e.a.store.Entry(ctx, x[0].Key)
	e.same("clinical removal reason", removed.RemovedReason)

	e.post(e.base()+"/clearance", url.Values{"item": {"vision"}, "state": {"not-cleared"}, "note": {e.P}})
	hist, _ := e.a.store.ClearanceHistory(ctx, e.p.ID)
	if len(hist) == 0 {
		e.t.Fatal("no clearance stored")
	}
	e.same("clearance note", hist[0].Note)
	e.pages = append(e.pages, e.base()+"/clearance")
}

func (e *plEnv) people() {
	ctx := context.Background()
	e.post("/users", url.Values{"username": {"payload.person"}, "display_name": {e.P}, "password": {plPassword}, "roles": {"staff"}})
	u, err := e.a.store.UserByName(ctx, "payload.person")
	if err != nil {
		e.t.Fatal(err)
	}
	e.same("display name", u.DisplayName)
	e.post(fmt.Sprintf("/users/%d/tokens", u.ID), url.Values{"label": {e.P}})
	toks, _ := e.a.store.APITokens(ctx)
	if len(toks) == 0 {
		e.t.Fatal("no token stored")
	}
	e.same("token label", toks[0].Label)
	e.pages = append(e.pages, "/users")
}

func (e *plEnv) settings() {
	ctx := context.Background()
	db := e.a.store.DB()
	if e.optional("/settings/thresholds", url.Values{"threshold": {"stale-days"}, "value": {"5"}, "note": {e.P}}) {
		var note string
		db.QueryRowContext(ctx, `SELECT note FROM threshold_settings ORDER BY id DESC LIMIT 1`).Scan(&note)
		e.same("threshold note", note)
		e.pages = append(e.pages, "/settings", "/settings/thresholds")
	}
	if e.optional("/sites", url.Values{"name": {e.P}, "elevation_m": {"300"}, "notes": {e.P}}) {
		var name, notes string
		var id int64
		db.QueryRowContext(ctx, `SELECT id, name, notes FROM release_sites ORDER BY id DESC LIMIT 1`).Scan(&id, &name, &notes)
		e.same("site name", name)
		e.same("site notes", notes)
		e.pages = append(e.pages, "/sites", fmt.Sprintf("/sites/%d/edit", id))
	}
	if e.optional("/species/Anas-platyrhynchos/override", url.Values{"span_mm": {"900"}, "note": {e.P}}) {
		var note string
		db.QueryRowContext(ctx, `SELECT note FROM species_overrides ORDER BY id DESC LIMIT 1`).Scan(&note)
		e.same("species override note", note)
		e.pages = append(e.pages, "/species", "/species/Anas-platyrhynchos", "/species/Anas-platyrhynchos/override")
	}
	if e.optional("/species/new", url.Values{"scientific_name": {"Cygnus atratus"}, "common_name": {e.P}, "group": {"swan-goose"},
		"passerine": {"no"}, "migrant": {"no"}, "mass_g.pooled": {"5000"}, "span_mm": {"1800"}, "area_cm2": {"3983"},
		"launch_mode": {"run-up-water"}, "note": {e.P}}) {
		e.pages = append(e.pages, "/species?q=Cygnus", "/species/Cygnus-atratus", "/intake")
	}
}

func (e *plEnv) reports() {
	resp, _ := e.a.post(e.base()+"/reports", url.Values{"page_size": {"A4"}, "elevation_m": {"100"}, "site_name": {e.P}})
	if resp.StatusCode == http.StatusNotFound {
		e.t.Log("POST /patients/:case/reports: 404, the report checks are skipped")
		return
	}
	if resp.StatusCode != http.StatusSeeOther {
		e.t.Fatalf("generate a report: status %d", resp.StatusCode)
	}
	e.version = true
	e.post(e.base()+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {plPassword}, "comment": {e.P}})
	vs, err := e.a.store.ReportVersions(context.Background(), e.p.ID)
	if err != nil || len(vs) != 1 || len(vs[0].SignOffs) != 1 {
		e.t.Fatalf("report versions %+v (%v), want one, signed once", vs, err)
	}
	e.same("report site", vs[0].Site.Label)
	e.same("sign-off comment", vs[0].SignOffs[0].Comment)
	e.pages = append(e.pages, e.base()+"/reports")
}

func (e *plEnv) disposition() {
	ctx := context.Background()
	e.post(e.base()+"/disposition", e.fill(url.Values{"kind": {"transferred"}, "date": {recordstest.Epoch.Format(records.DateLayout)}},
		"place", "receiver", "reason", "performed_by"))
	e.post(e.base()+"/disposition/correct", e.fill(url.Values{"kind": {"released"}, "date": {recordstest.Epoch.Format(records.DateLayout)},
		"version": {"1"}}, "place", "reason", "no_report_reason", "performed_by", "note"))
	vs, err := e.a.store.DispositionVersions(ctx, e.p.ID)
	if err != nil || len(vs) != 2 {
		e.t.Fatalf("disposition versions %d (%v), want 2", len(vs), err)
	}
	for _, d := range vs {
		if d.Kind == assess.DispTransferred {
			e.same("receiver", d.Receiver)
		} else {
			e.same("no report reason", d.NoReportReason)
			e.same("correction note", d.Note)
		}
		e.same("disposition place", d.Place)
		e.same("disposition reason", d.Reason)
		e.same("performed by", d.PerformedBy)
	}
	e.pages = append(e.pages, e.base()+"/disposition")
}

// TestPayloads_StoredLiterallyAndShownAsText walks every form with each
// payload in every text field, then reads everything back: the store holds
// the text exactly; every page shows it as text and carries no injected
// element or handler; chart SVGs stay well-formed and script-free; CSV
// cells that a spreadsheet would run as a formula are neutralised; the
// JSON exports carry the text; the PDF report prints it and holds no
// script or launch action; and the patients table is still there.
func TestPayloads_StoredLiterallyAndShownAsText(t *testing.T) {
	for _, pl := range plPayloads {
		t.Run(pl.name, func(t *testing.T) {
			t.Parallel()
			e := newPlEnv(t, pl.text)
			e.intake()
			e.conditioning()
			e.cage()
			e.clinical()
			e.people()
			e.settings()
			e.reports()
			e.checkPages(false)
			e.disposition()
			e.checkPages(true)
			e.checkCharts()
			e.checkExports()
			e.checkPDFs()
			if n := countRows(t, e.a.store, "patients"); n != 2 {
				t.Errorf("%d patients after the payloads, want 2", n)
			}
		})
	}
}

// checkPages checks every page that shows what was typed; after is true
// once the patient has left care (the cage pages are then refused).
func (e *plEnv) checkPages(after bool) {
	e.t.Helper()
	mustShow := map[string]bool{"/patients": true, e.base(): true, "/enclosures": true, "/users": true,
		e.base() + "/reports": true, e.base() + "/disposition": true, e.base() + "/clearance": true}
	pages := []string{"/patients", e.base(), e.base() + "/assessment", e.base() + "/what-if", "/exports", "/cautions"}
	for _, p := range e.pages {
		if !after || !strings.HasPrefix(p, "/cage/") {
			pages = append(pages, p)
		}
	}
	for _, p := range pages {
		resp, body := e.a.getBody(p)
		if resp.StatusCode == http.StatusNotFound && (strings.HasSuffix(p, "/what-if") || strings.HasSuffix(p, "/assessment")) {
			e.t.Logf("GET %s: 404, skipped", p)
			continue
		}
		if resp.StatusCode != http.StatusOK {
			e.t.Errorf("GET %s: status %d, want 200", p, resp.StatusCode)
			continue
		}
		if shown := plCheckHTML(e.t, "GET "+p, body, e.P); mustShow[p] && !shown {
			e.t.Errorf("GET %s: the payload %q is not shown as text", p, e.P)
		}
	}
	// The login page shows the centre's name to anyone.
	resp, err := http.Get(e.a.srv.URL + "/login")
	if err != nil {
		e.t.Fatal(err)
	}
	body, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	plCheckHTML(e.t, "GET /login (anonymous)", body, e.P)
}

// plCheckHTML fails on any sign that the payload became markup, and
// reports whether it is shown as text (or as a form value).
func plCheckHTML(t *testing.T, what string, body []byte, payload string) bool {
	t.Helper()
	for _, bad := range []string{`<script>alert(1)</script>`, `<img src=x onerror=alert(1)>`} {
		if bytes.Contains(body, []byte(bad)) {
			t.Errorf("%s: the page contains %s as markup", what, bad)
		}
	}
	doc, err := goquery.NewDocumentFromReader(bytes.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	// Shown: in the page's main part (the header shows the centre's name
	// on every page), as text or as a form's value.
	main := doc.Find("main")
	shown := strings.Contains(main.Text(), payload)
	main.Find("*").Each(func(_ int, s *goquery.Selection) {
		for _, at := range s.Get(0).Attr {
			shown = shown || strings.Contains(at.Val, payload)
		}
	})
	doc.Find("*").Each(func(_ int, s *goquery.Selection) {
		node := s.Get(0)
		if node.Data == "script" && (strings.Contains(s.Text(), "alert") || s.AttrOr("src", "/static/") == "x") {
			t.Errorf("%s: an injected script element: %s", what, s.Text())
		}
		if node.Data == "img" && s.AttrOr("src", "") == "x" {
			t.Errorf("%s: an injected img element", what)
		}
		for _, at := range node.Attr {
			if strings.HasPrefix(strings.ToLower(at.Key), "on") {
				t.Errorf("%s: <%s> carries an event handler %s=%q", what, node.Data, at.Key, at.Val)
			}
		}
	})
	return shown
}

// plCheckSVG fails unless doc is well-formed XML without script, foreign
// content or event handlers.
func plCheckSVG(t *testing.T, what string, doc []byte) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(doc))
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			return
		}
		if err != nil {
			t.Errorf("%s: not well-formed XML: %v", what, err)
			return
		}
		el, ok := tok.(xml.StartElement)
		if !ok {
			continue
		}
		if n := strings.ToLower(el.Name.Local); n == "script" || n == "foreignobject" || n == "iframe" {
			t.Errorf("%s: a <%s> element", what, el.Name.Local)
		}
		for _, at := range el.Attr {
			if strings.HasPrefix(strings.ToLower(at.Name.Local), "on") || strings.HasPrefix(strings.ToLower(strings.TrimSpace(at.Value)), "javascript:") {
				t.Errorf("%s: <%s %s=%q>", what, el.Name.Local, at.Name.Local, at.Value)
			}
		}
	}
}

// plCheckJSON fails unless a JSON answer is typed as JSON, escapes < and >
// (so it is inert even if sniffed as HTML), and carries the payload.
func plCheckJSON(t *testing.T, what string, resp *http.Response, body []byte, payload string) {
	t.Helper()
	if ct := resp.Header.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") || resp.Header.Get("X-Content-Type-Options") != "nosniff" {
		t.Errorf("%s: Content-Type %q, nosniff %q", what, ct, resp.Header.Get("X-Content-Type-Options"))
	}
	if bytes.ContainsAny(body, "<>") {
		t.Errorf("%s: raw < or > in JSON", what)
	}
	var v any
	if err := json.Unmarshal(body, &v); err != nil {
		t.Fatalf("%s: %v", what, err)
	}
	if !plJSONHas(v, payload) {
		t.Errorf("%s: the payload is not in the JSON", what)
	}
}

// plJSONHas reports whether any string in v contains s.
func plJSONHas(v any, s string) bool {
	switch x := v.(type) {
	case string:
		return strings.Contains(x, s)
	case []any:
		for _, y := range x {
			if plJSONHas(y, s) {
				return true
			}
		}
	case map[string]any:
		for _, y := range x {
			if plJSONHas(y, s) {
				return true
			}
		}
	}
	return false
}

func (e *plEnv) checkCharts() {
	for _, name := range chartNames {
		p := e.base() + "/charts/" + name + ".svg"
		resp, body := e.a.getBody(p)
		if resp.StatusCode != http.StatusOK {
			e.t.Errorf("GET %s: status %d", p, resp.StatusCode)
			continue
		}
		plCheckSVG(e.t, "GET "+p, body)
	}
}

// checkExports reads the permit CSVs and the case file: a cell a
// spreadsheet would evaluate (starting = + - @, tab or CR) is only ever a
// number; the payload is in them, neutralised when it is a formula.
func (e *plEnv) checkExports() {
	year := recordstest.Epoch.Format("2006")
	for _, p := range []string{"/exports/cases.csv?finders=1&year=" + year, "/exports/summary.csv?year=" + year,
		"/exports/patients/" + e.p.CaseNumber + "/record.csv?finders=1"} {
		resp, body := e.a.getBody(p)
		if resp.StatusCode != http.StatusOK {
			e.t.Errorf("GET %s: status %d", p, resp.StatusCode)
			continue
		}
		if ct, cd := resp.Header.Get("Content-Type"), resp.Header.Get("Content-Disposition"); !strings.HasPrefix(ct, "text/csv") ||
			!strings.HasPrefix(cd, "attachment") {
			e.t.Errorf("GET %s: Content-Type %q, Content-Disposition %q: want a CSV download", p, ct, cd)
		}
		rows, err := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(body, []byte("\xef\xbb\xbf")))).ReadAll()
		if err != nil {
			e.t.Errorf("GET %s: %v", p, err)
			continue
		}
		found := false
		for _, row := range rows {
			for _, c := range row {
				if c != "" && strings.ContainsRune("=+-@\t\r", rune(c[0])) {
					if _, err := strconv.ParseFloat(c, 64); err != nil {
						e.t.Errorf("GET %s: cell %q would run as a formula", p, c)
					}
				}
				found = found || c == e.P || c == "'"+e.P || strings.Contains(c, e.P)
			}
		}
		if !found && !strings.Contains(p, "summary") {
			e.t.Errorf("GET %s: the payload is in no cell", p)
		}
	}
	p := "/exports/patients/" + e.p.CaseNumber + "/casefile.json?finders=1"
	resp, body := e.a.getBody(p)
	if resp.StatusCode != http.StatusOK {
		e.t.Errorf("GET %s: status %d", p, resp.StatusCode)
		return
	}
	var v any
	if err := json.Unmarshal(body, &v); err != nil || !plJSONHas(v, e.P) {
		e.t.Errorf("GET %s: the payload is not in the case file (%v)", p, err)
	}
}

// checkPDFs reads the report back with pdftotext: the payload is printed as
// text, and the file carries no JavaScript, launch or automatic action, and
// no link made from the payload.
func (e *plEnv) checkPDFs() {
	paths := []string{e.base() + "/reports/preview.pdf"}
	if e.version {
		paths = append(paths, e.base()+"/reports/1/report.pdf", e.base()+"/reports/1/signoff-sheet.pdf")
	}
	for _, p := range paths {
		resp, body := e.a.getBody(p)
		if resp.StatusCode == http.StatusNotFound {
			e.t.Logf("GET %s: 404, skipped", p)
			continue
		}
		if resp.StatusCode != http.StatusOK || !bytes.HasPrefix(body, []byte("%PDF-")) {
			e.t.Errorf("GET %s: status %d, not a PDF", p, resp.StatusCode)
			continue
		}
		for _, bad := range []string{"/JavaScript", "/JS ", "/JS(", "/OpenAction", "/AA ", "/AA<<", "/Launch", "/URI (http://x"} {
			if bytes.Contains(body, []byte(bad)) {
				e.t.Errorf("GET %s: the PDF contains %s", p, bad)
			}
		}
		text, ok := plPDFText(e.t, body)
		if !ok {
			e.t.Logf("pdftotext is not installed: the text of %s is not checked", p)
			continue
		}
		if want := strings.Join(strings.Fields(e.P), " "); !strings.Contains(text, want) {
			e.t.Errorf("GET %s: the PDF's text does not contain %q", p, want)
		}
	}
}

// plPDFText returns the text of a PDF with runs of white space as one
// space, or ok false when pdftotext is not installed (outside CI).
func plPDFText(t *testing.T, pdf []byte) (string, bool) {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("pdftotext is required under CI")
		}
		return "", false
	}
	path := filepath.Join(t.TempDir(), "report.pdf")
	if err := os.WriteFile(path, pdf, 0o600); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(bin, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return strings.Join(strings.Fields(string(out)), " "), true
}

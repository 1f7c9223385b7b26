package web

import (
	"context"
	"fmt"
	"io/fs"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"aloft/records"
	"aloft/records/recordstest"
	"aloft/web/views"
)

// Audit integrity: every change the application makes leaves exactly one
// audit row (who, when, before and after), written in the change's own
// transaction; and nothing in the application can update or delete an
// audit row except the finder-redaction path, which the database itself
// guards (the triggers of records/migrations/0001_init.sql).

// audEnv is the centre the audit walk runs in: a fresh database set up
// through the set-up form, then the records each later route works on.
type audEnv struct {
	t     *testing.T
	a     *testApp
	actor int64 // the logged-in person
	p, p2 records.Patient
	kim   records.User
	token int64
	encl  int64
	site  int64
	key   int64 // a weigh-in's record key
	clin  int64 // a diagnosis's record key
}

const audPassword = "audit walk password"

// login logs boss in (outside any measured step).
func (e *audEnv) login() {
	e.a.get("/login")
	resp, _ := e.a.post("/login", url.Values{"username": {"boss"}, "password": {audPassword}})
	wantStatus(e.t, resp, http.StatusSeeOther)
	e.a.get("/patients")
}

func (e *audEnv) now() string { return e.a.clock.Now().Local().Format(condTimeLayout) }

func (e *audEnv) base() string { return "/patients/" + e.p.CaseNumber }

// auditStep is one valid request to one registered route and the audit
// rows it must leave.
type auditStep struct {
	route string // as registered: "POST /patients/:case/weigh-ins"
	// prep readies what the request needs; its own writes are not counted.
	prep func(e *audEnv)
	do   func(e *audEnv) *http.Response
	want int  // audit rows when not 1
	none bool // no audit row: the request changes no record
	why  string
	// rows, when set, computes the rows wanted after the request (a change
	// whose number of parts depends on the form, such as a species' values).
	rows func(e *audEnv) int
}

// wanted is the number of audit rows st must leave.
func (st auditStep) wanted(e *audEnv) int {
	switch {
	case st.rows != nil:
		return st.rows(e)
	case st.none:
		return 0
	case st.want != 0:
		return st.want
	}
	return 1
}

func (e *audEnv) post(path string, form url.Values) *http.Response {
	resp, _ := e.a.post(path, form)
	return resp
}

// auditSteps is the walk, in order: each step may rely on what the earlier
// ones made. A route registered without a step here fails the test.
var auditSteps = []auditStep{
	{route: "POST /setup", want: 2, why: "the centre's details and the first account", do: func(e *audEnv) *http.Response {
		e.a.get("/setup")
		return e.post("/setup", url.Values{"centre_name": {"Audit Centre"}, "elevation_m": {"100"}, "username": {"boss"},
			"display_name": {"Boss"}, "password": {audPassword}, "password2": {audPassword}})
	}},
	{route: "POST /login", none: true, why: "a login starts a session: it changes no record",
		prep: func(e *audEnv) {
			boss, err := e.a.store.UserByName(context.Background(), "boss")
			if err != nil {
				e.t.Fatal(err)
			}
			e.actor = boss.ID
			if err := e.a.store.SetRoles(context.Background(), boss.ID, boss.ID, records.AllRoles); err != nil {
				e.t.Fatal(err)
			}
			e.a.get("/login")
		},
		do: func(e *audEnv) *http.Response {
			return e.post("/login", url.Values{"username": {"boss"}, "password": {audPassword}})
		}},
	{route: "POST /logout", none: true, why: "ending a session changes no record",
		prep: func(e *audEnv) { e.a.get("/patients") },
		do:   func(e *audEnv) *http.Response { return e.post("/logout", url.Values{}) }},
	{route: "POST /intake", prep: (*audEnv).login, do: func(e *audEnv) *http.Response {
		resp := e.post("/intake", intakeForm())
		var err error
		if e.p, err = e.a.store.PatientByCase(context.Background(), strings.TrimPrefix(resp.Header.Get("Location"), "/patients/")); err != nil {
			e.t.Fatal(err)
		}
		return resp
	}},
	{route: "POST /users", do: func(e *audEnv) *http.Response {
		resp := e.post("/users", url.Values{"username": {"kim"}, "display_name": {"Kim"}, "password": {audPassword}, "roles": {"staff"}})
		e.kim, _ = e.a.store.UserByName(context.Background(), "kim")
		return resp
	}},
	{route: "POST /users/:id/disable", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/users/%d/disable", e.kim.ID), url.Values{})
	}},
	{route: "POST /users/:id/enable", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/users/%d/enable", e.kim.ID), url.Values{})
	}},
	{route: "POST /users/:id/password", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/users/%d/password", e.kim.ID), url.Values{"password": {"another long password"}})
	}},
	{route: "POST /users/:id/tokens", do: func(e *audEnv) *http.Response {
		resp := e.post(fmt.Sprintf("/users/%d/tokens", e.kim.ID), url.Values{"label": {"cage tablet"}})
		toks, _ := e.a.store.APITokens(context.Background())
		if len(toks) > 0 {
			e.token = toks[0].ID
		}
		return resp
	}},
	{route: "POST /tokens/:id/revoke", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/tokens/%d/revoke", e.token), url.Values{})
	}},
	{route: "POST /enclosures", do: func(e *audEnv) *http.Response {
		resp := e.post("/enclosures", url.Values{"name": {"Flight cage 1"}, "kind": {"flight-cage"}, "length": {"15"}, "width": {"3"},
			"height": {"3.6"}, "unit": {"m"}})
		encl, _ := e.a.store.EnclosureByName(context.Background(), "Flight cage 1")
		e.encl = encl.ID
		return resp
	}},
	{route: "POST /enclosures/:id", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/enclosures/%d", e.encl), url.Values{"name": {"Flight cage 1"}, "kind": {"flight-cage"},
			"length": {"16"}, "width": {"3"}, "height": {"3.6"}, "unit": {"m"}, "version": {"1"}})
	}},
	{route: "POST /patients/:case/weigh-ins", do: func(e *audEnv) *http.Response {
		resp := e.post(e.base()+"/weigh-ins", url.Values{"at": {e.now()}, "mass_g": {"1105"}, "fed": {"before-feed"}})
		es, _ := e.a.store.Entries(context.Background(), e.p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindWeighIn}})
		if len(es) > 0 {
			e.key = es[0].Key
		}
		return resp
	}},
	{route: "POST /patients/:case/conditions", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/conditions", url.Values{"at": {e.now()}, "fat_score": {"2"}, "fat_scale": {"0-8"}, "muscle_score": {"2"}})
	}},
	{route: "POST /patients/:case/wings", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/wings", url.Values{"at": {e.now()}, "span_mm": {"1190"}, "area_cm2": {"2250"}, "area_method": {"traced"},
			"feathers_examined": {"1"}, "lp8": {"imped"}})
	}},
	{route: "POST /patients/:case/trials", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/trials", url.Values{"at": {e.now()}, "mode": {"standing"}, "wind": {"calm"}, "attempt_1": {"climbed"}})
	}},
	{route: "POST /patients/:case/flight-sessions", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/flight-sessions", url.Values{"at": {e.now()}, "exercise": {"cage"}, "enclosure": {"Flight cage 1"},
			"passes": {"8"}, "longest_run": {"6"}, "highest": {"high-perch"}, "droop": {"none"}})
	}},
	{route: "POST /patients/:case/waterproofing", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/waterproofing", url.Values{"at": {e.now()}, "minutes_on_water": {"20"}, "result": {"waterproof"}})
	}},
	{route: "POST /patients/:case/housing", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/housing", url.Values{"at": {e.now()}, "enclosure": {"Flight cage 1"}})
	}},
	{route: "POST /patients/:case/records/:key/correct", do: func(e *audEnv) *http.Response {
		return e.post(condRecordURL(e.p, e.key, "correct"), url.Values{"at": {e.now()}, "mass_g": {"1110"}, "fed": {"before-feed"},
			"version": {"1"}})
	}},
	{route: "POST /patients/:case/records/:key/remove", do: func(e *audEnv) *http.Response {
		return e.post(condRecordURL(e.p, e.key, "remove"), url.Values{"reason": {"weighed the wrong bird"}})
	}},
	{route: "POST /patients/:case/clinical/:kind", do: func(e *audEnv) *http.Response {
		resp := e.post(clinicalPath(e.p, records.KindDiagnosis), url.Values{"at": {e.a.clock.Now().Local().Format(clinDateTime)},
			"condition": {"keel abrasion"}, "status": {"active"}})
		es, _ := e.a.store.Entries(context.Background(), e.p.ID, records.EntryFilter{Kinds: []records.Kind{records.KindDiagnosis}})
		if len(es) > 0 {
			e.clin = es[0].Key
		}
		return resp
	}},
	{route: "POST /patients/:case/clinical/:kind/:key", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("%s/%d", clinicalPath(e.p, records.KindDiagnosis), e.clin), url.Values{
			"at": {e.a.clock.Now().Local().Format(clinDateTime)}, "condition": {"keel abrasion, healing"}, "status": {"active"},
			"version": {"1"}})
	}},
	{route: "POST /patients/:case/clinical/:kind/:key/remove", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("%s/%d/remove", clinicalPath(e.p, records.KindDiagnosis), e.clin), url.Values{"reason": {"wrong patient"}})
	}},
	{route: "POST /patients/:case/clearance", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/clearance", url.Values{"item": {"vision"}, "state": {"cleared"}})
	}},
	{route: "POST /cage/:case", do: func(e *audEnv) *http.Response {
		return e.post("/cage/"+e.p.CaseNumber, url.Values{"idempotency_key": {newUUID()}, "at": {e.a.clock.Now().UTC().Format("2006-01-02T15:04:05Z")},
			"exercise": {"cage"}, "passes": {"5"}, "longest_run": {"5"}, "highest": {"high-perch"}, "droop": {"none"}})
	}},
	{route: "POST /cage/group", want: 2, why: "one flight session for each of the two birds flown together", prep: func(e *audEnv) {
		var err error
		if e.p2, err = e.a.store.AdmitPatient(context.Background(), e.actor, recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)); err != nil {
			e.t.Fatal(err)
		}
	}, do: func(e *audEnv) *http.Response {
		cases := e.p.CaseNumber + "," + e.p2.CaseNumber
		return e.post("/cage/group?cases="+cases, url.Values{"idempotency_key": {newUUID()}, "group_cases": {cases},
			"at": {e.a.clock.Now().UTC().Format("2006-01-02T15:04:05Z")}, "exercise": {"cage"}, "passes": {"4"}, "highest": {"low-perch"},
			"droop": {"none"}, views.CageBirdField(e.p2.CaseNumber, "notes"): {"landed short twice"}})
	}},
	{route: "POST /api/v1/patients/:case/flight-sessions", do: func(e *audEnv) *http.Response {
		resp, _ := e.a.postJSON(apiPath(e.p), cageInput{IdempotencyKey: newUUID(), Session: goodSession(e.a.clock.Now())}, e.a.csrf)
		return resp
	}},
	{route: "POST /patients/:case/reports", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/reports", url.Values{"page_size": {"A4"}})
	}},
	{route: "POST /patients/:case/reports/:version/signoffs", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/reports/1/signoffs", url.Values{"role": {"vet"}, "password": {audPassword}, "comment": {"fit"}})
	}},
	{route: "POST /settings/thresholds", do: func(e *audEnv) *http.Response {
		return e.post("/settings/thresholds", url.Values{"threshold": {"stale-days"}, "value": {"5"}, "note": {"weekly rounds"}})
	}},
	{route: "POST /settings/centre", do: func(e *audEnv) *http.Response {
		return e.post("/settings/centre", url.Values{"centre_name": {"Audit Centre"}, "address": {"1 Lane"}, "elevation_m": {"120"}, "page_size": {"Letter"}})
	}},
	{route: "POST /settings/thresholds/reset", do: func(e *audEnv) *http.Response {
		return e.post("/settings/thresholds/reset", url.Values{"threshold": {"stale-days"}})
	}},
	{route: "POST /sites", do: func(e *audEnv) *http.Response {
		resp := e.post("/sites", url.Values{"name": {"Ridge meadow"}, "elevation_m": {"300"}})
		e.a.store.DB().QueryRow(`SELECT id FROM release_sites WHERE name = 'Ridge meadow'`).Scan(&e.site)
		return resp
	}},
	{route: "POST /sites/:id", do: func(e *audEnv) *http.Response {
		return e.post(fmt.Sprintf("/sites/%d", e.site), url.Values{"name": {"Ridge meadow"}, "elevation_m": {"320"}, "version": {"1"}})
	}},
	{route: "POST /species/:name/override", do: func(e *audEnv) *http.Response {
		return e.post("/species/Anas-platyrhynchos/override", url.Values{"span_mm": {"900"}, "note": {"our own birds"}})
	}},
	{route: "POST /species/:name/override/reset", do: func(e *audEnv) *http.Response {
		return e.post("/species/Anas-platyrhynchos/override/reset", url.Values{"field": {"span_mm"}})
	}},
	{route: "POST /species/new", why: "one row for each value of the species added", do: func(e *audEnv) *http.Response {
		return e.post("/species/new", url.Values{"scientific_name": {"Cygnus atratus"}, "common_name": {"Black Swan"},
			"group": {"swan-goose"}, "passerine": {"no"}, "migrant": {"no"}, "mass_g.pooled": {"5000"}, "span_mm": {"1800"},
			"area_cm2": {"3983"}, "launch_mode": {"run-up-water"}, "note": {"escaped collection birds"}})
	}, rows: func(e *audEnv) int {
		var n int
		e.a.store.DB().QueryRow(`SELECT count(*) FROM species_overrides WHERE species = 'Cygnus atratus'`).Scan(&n)
		return n
	}},
	{route: "POST /patients/:case/disposition", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/disposition", url.Values{"kind": {"transferred"}, "date": {recordstest.Epoch.Format(records.DateLayout)},
			"place": {"Hill Centre"}, "receiver": {"Hill Centre"}})
	}},
	{route: "POST /patients/:case/disposition/correct", do: func(e *audEnv) *http.Response {
		return e.post(e.base()+"/disposition/correct", url.Values{"kind": {"released"}, "date": {recordstest.Epoch.Format(records.DateLayout)},
			"place": {"Ridge meadow"}, "no_report_reason": {"judged in person"}, "note": {"it was released, not transferred"}, "version": {"1"}})
	}},
	{route: "POST /patients/:case/redact-finder", why: "one row saying a redaction happened; the scrubbed rows are rewritten, not added",
		do: func(e *audEnv) *http.Response {
			return e.post(e.base()+"/redact-finder", url.Values{"confirm": {"1"}})
		}},
}

func audCount(t *testing.T, s *records.Store) (n int, maxID int64) {
	t.Helper()
	if err := s.DB().QueryRow(`SELECT count(*), COALESCE(MAX(id), 0) FROM audit_log`).Scan(&n, &maxID); err != nil {
		t.Fatal(err)
	}
	return n, maxID
}

// TestAudit_EveryChangeOneRow walks every unsafe route with a valid request
// and counts the audit rows each leaves: exactly one per change, each
// naming the person who made it. A route registered without a step in
// auditSteps fails the test, so a new route cannot skip its audit.
func TestAudit_EveryChangeOneRow(t *testing.T) {
	e := &audEnv{t: t, a: newTestApp(t)}
	done := map[string]bool{}
	for _, st := range auditSteps {
		if st.prep != nil {
			st.prep(e)
		}
		before, lastID := audCount(t, e.a.store)
		resp := st.do(e)
		done[st.route] = true
		if resp.StatusCode >= 400 {
			t.Errorf("%s: status %d, want the valid request accepted", st.route, resp.StatusCode)
			continue
		}
		after, _ := audCount(t, e.a.store)
		if got, want := after-before, st.wanted(e); got != want {
			t.Errorf("%s left %d audit rows, want %d (%s)", st.route, got, want, cmpOr(st.why, "one change"))
		}
		rows, err := e.a.store.DB().Query(`SELECT id, COALESCE(user_id, 0), entity FROM audit_log WHERE id > ?`, lastID)
		if err != nil {
			t.Fatal(err)
		}
		for rows.Next() {
			var id, uid int64
			var entity string
			rows.Scan(&id, &uid, &entity)
			if wantUser := e.actor; st.route != "POST /setup" && uid != wantUser {
				t.Errorf("%s: audit row %d (%s) by user %d, want the person logged in (%d)", st.route, id, entity, uid, wantUser)
			}
		}
		rows.Close()
	}
	s := e.a.srv.Config.Handler.(*Server)
	registered := map[string]bool{}
	for _, r := range s.echo.Routes() {
		if r.Method == http.MethodGet || r.Method == http.MethodHead || strings.HasPrefix(r.Name, "echo_route_not_found") ||
			r.Method == "echo_route_not_found" {
			continue
		}
		key := r.Method + " " + r.Path
		registered[key] = true
		if !done[key] {
			t.Errorf("route %s has no valid request in auditSteps (web/audit_test.go): add one, with the audit rows it must leave", key)
		}
	}
	for _, st := range auditSteps {
		if !registered[st.route] {
			t.Errorf("auditSteps walks %s, which is not registered: remove or rename the step", st.route)
		}
	}
}

func cmpOr(a, b string) string {
	if a != "" {
		return a
	}
	return b
}

// audWritePaths matches SQL that would change or remove audit rows, or
// lower the guard that lets the redaction rewrite them.
var audWritePaths = regexp.MustCompile(`(?is)\bUPDATE\s+(OR\s+\w+\s+)?audit_log\b|\bDELETE\s+FROM\s+audit_log\b|` +
	`\b(REPLACE|INSERT\s+OR\s+REPLACE)\s+INTO\s+audit_log\b|\bDROP\s+(TABLE|TRIGGER)\s+(IF\s+EXISTS\s+)?(audit_log|audit_no_\w+)\b|` +
	`\bredaction_guard\b|\bALTER\s+TABLE\s+audit_log\b`)

// TestAudit_NoUpdateOrDeletePath reads every Go source of the module (tests
// aside) and every migration: only the redaction (records/redact.go) may
// touch audit rows after they are written, and only the first migration
// defines the append-only triggers and the guard. The database refuses an
// update or delete of an audit row from anywhere else.
func TestAudit_NoUpdateOrDeletePath(t *testing.T) {
	root := ".."
	allowed := map[string]bool{"records/redact.go": true, "records/migrations/0001_init.sql": true}
	checked := 0
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, path)
		rel = filepath.ToSlash(rel)
		if d.IsDir() {
			if name := d.Name(); rel != "." && (strings.HasPrefix(name, ".") || name == "testdata" || name == "node_modules") {
				return filepath.SkipDir
			}
			return nil
		}
		if !(strings.HasSuffix(rel, ".go") && !strings.HasSuffix(rel, "_test.go") || strings.HasSuffix(rel, ".sql")) {
			return nil
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		checked++
		if loc := audWritePaths.FindIndex(b); loc != nil && !allowed[rel] {
			t.Errorf("%s: %q changes audit rows or their guard; only the redaction path may", rel, b[loc[0]:loc[1]])
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if checked < 50 {
		t.Fatalf("only %d source files read: is the module root %s?", checked, root)
	}

	// The database holds the line too, before and after a redaction.
	ctx := context.Background()
	store := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, store, "boss", records.RoleAdmin)
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.FinderName = "Finder Person"
	p, err := store.AdmitPatient(ctx, admin.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	tamper := func(when string) {
		for _, q := range []string{`UPDATE audit_log SET action = 'x'`, `DELETE FROM audit_log`,
			`UPDATE audit_log SET after_json = NULL WHERE id = (SELECT MIN(id) FROM audit_log)`} {
			if _, err := store.DB().ExecContext(ctx, q); err == nil {
				t.Errorf("%s: %q succeeded, want the append-only trigger to refuse it", when, q)
			}
		}
	}
	tamper("before a redaction")
	if err := store.RedactFinder(ctx, admin, p.ID); err != nil {
		t.Fatal(err)
	}
	var active int
	store.DB().QueryRowContext(ctx, `SELECT active FROM redaction_guard`).Scan(&active)
	if active != 0 {
		t.Errorf("the redaction guard is left raised (%d)", active)
	}
	tamper("after a redaction")
}

package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// Fuzz targets for every form decoder and validator, through the real
// handler: each input is posted as the form's body (or the cage API's
// JSON) by a logged-in person holding every role, to one server and
// database per fuzz worker. Whatever the input: no answer is a 5xx (a
// panic is recovered into a 500, so it fails too), and every row the input
// stored — patients, records of every kind, enclosures, dispositions,
// people — validates again as the engine and the store would validate it,
// with one audit row for each. Run one with
//
//	go test -run '^$' -fuzz '^FuzzIntakeForm$' -fuzztime 60s -fuzzminimizetime 0s ./web
//
// or all of them with .ci/fuzz-all. (Each input is a request and a
// transaction: minimising every new input, as go test does by default,
// takes most of a short run.)

// fzApp is one fuzz target's server, reused for every input.
type fzApp struct {
	store  *records.Store
	srv    *httptest.Server
	client *http.Client
	anon   *http.Client // nobody logged in: no cookie jar (a login it makes is not kept)
	csrf   string
	pre    string // the pre-login CSRF token
	clock  *recordstest.Clock
	p, p2  records.Patient // red-tailed hawks in care, admitted a day ago
	cur    records.Patient // the patient of the current input (dispositions)
}

func newFzApp(tb testing.TB) *fzApp {
	tb.Helper()
	ctx := context.Background()
	clock := recordstest.NewClock(recordstest.Epoch.Add(24 * time.Hour))
	store := recordstest.Open(tb, clock)
	if err := store.SetCentre(ctx, 0, records.Centre{Name: "Fuzz Centre", ElevationM: 100}); err != nil {
		tb.Fatal(err)
	}
	quiet := slog.New(slog.NewTextHandler(io.Discard, nil))
	srv := httptest.NewServer(New(Config{Now: clock.Now, Logger: quiet, Cautions: "# C\n\n## Advisory\n- Aloft advises only.\n"}, store, speciesTable))
	tb.Cleanup(srv.Close)
	a := &fzApp{store: store, srv: srv, clock: clock}
	u := recordstest.AddUser(tb, store, "boss", records.AllRoles...)
	tok, ls, err := store.CreateLoginSession(ctx, u.ID)
	if err != nil {
		tb.Fatal(err)
	}
	a.csrf = ls.CSRFToken
	jar, _ := cookiejar.New(nil)
	base, _ := url.Parse(srv.URL)
	jar.SetCookies(base, []*http.Cookie{{Name: sessionCookie, Value: tok, Path: "/"}})
	noRedirect := func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }
	a.client = &http.Client{Jar: jar, CheckRedirect: noRedirect}
	a.pre = records.NewToken()
	a.anon = &http.Client{CheckRedirect: noRedirect}
	a.p, a.p2 = a.admit(tb), a.admit(tb)
	if _, err := store.AddEnclosure(ctx, 0, records.EnclosureInput{Name: "Flight cage 1", Kind: assess.EnclosureFlightCage,
		LengthM: 15, WidthM: 3, HeightM: 3.6}); err != nil {
		tb.Fatal(err)
	}
	return a
}

// admit admits a female red-tailed hawk at the test epoch.
func (a *fzApp) admit(tb testing.TB) records.Patient {
	tb.Helper()
	in := recordstest.Intake("Buteo jamaicensis", "Red-tailed Hawk", 1100)
	in.Sex, in.AdmittedAt = assess.SexFemale, recordstest.Epoch
	p, err := a.store.AdmitPatient(context.Background(), 0, in)
	if err != nil {
		tb.Fatal(err)
	}
	return p
}

// fzMark is the last row id of each table an input may write.
type fzMark struct{ patient, entry, encl, disp, user, site, report, signoff, audit int64 }

func (a *fzApp) mark(t *testing.T) fzMark {
	t.Helper()
	var m fzMark
	for _, x := range []struct {
		table string
		dst   *int64
	}{{"patients", &m.patient}, {"entries", &m.entry}, {"enclosures", &m.encl}, {"dispositions", &m.disp},
		{"users", &m.user}, {"release_sites", &m.site}, {"report_versions", &m.report}, {"signoffs", &m.signoff},
		{"audit_log", &m.audit}} {
		if err := a.store.DB().QueryRow(`SELECT COALESCE(MAX(id), 0) FROM ` + x.table).Scan(x.dst); err != nil {
			t.Fatal(err)
		}
	}
	return m
}

// post sends body to path as a form (after the CSRF token, so the fuzzer
// cannot shadow it) or as JSON, and returns the status.
func (a *fzApp) post(t *testing.T, c *http.Client, path, body string, asJSON bool, token string) int {
	t.Helper()
	var req *http.Request
	if asJSON {
		req, _ = http.NewRequest(http.MethodPost, a.srv.URL+path, strings.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
		req.Header.Set(csrfHeader, token)
	} else {
		req, _ = http.NewRequest(http.MethodPost, a.srv.URL+path, strings.NewReader("_csrf="+url.QueryEscape(token)+"&"+body))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	}
	if c == a.anon {
		req.AddCookie(&http.Cookie{Name: preCSRFCookie, Value: a.pre})
	}
	resp, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	io.Copy(io.Discard, resp.Body)
	resp.Body.Close()
	return resp.StatusCode
}

// idsSince lists the ids of table's rows above last.
func (a *fzApp) idsSince(t *testing.T, table string, last int64) []int64 {
	t.Helper()
	rows, err := a.store.DB().Query(`SELECT id FROM `+table+` WHERE id > ? ORDER BY id`, last)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	var ids []int64
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			t.Fatal(err)
		}
		ids = append(ids, id)
	}
	return ids
}

// checkSince re-validates every row stored since m and counts its audit
// rows: one per row stored (each record version, patient, enclosure,
// disposition, person, release site, report version and sign-off is one
// change; a threshold or species value, kept as one row that changes,
// counts by its audit rows).
func (a *fzApp) checkSince(t *testing.T, m fzMark, input string) {
	t.Helper()
	ctx := context.Background()
	now := a.clock.Now()
	changes := 0
	patient := func(id int64) records.Patient {
		p, err := a.store.Patient(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	for _, id := range a.idsSince(t, "patients", m.patient) {
		changes++
		fzCheckPatient(t, patient(id), now, input)
	}
	for _, id := range a.idsSince(t, "entries", m.entry) {
		changes++
		e := records.Entry{ID: id}
		var kind, data string
		if err := a.store.DB().QueryRow(`SELECT patient_id, kind, data_json FROM entries WHERE id = ?`, id).Scan(&e.PatientID, &kind, &data); err != nil {
			t.Fatal(err)
		}
		e.Kind, e.Data = records.Kind(kind), json.RawMessage(data)
		fzCheckEntry(t, e, patient(e.PatientID), now, input)
	}
	for _, id := range a.idsSince(t, "enclosures", m.encl) {
		changes++
		e, err := a.store.Enclosure(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		in := records.EnclosureInput{Name: e.Name, Kind: e.Kind, LengthM: e.LengthM, WidthM: e.WidthM, HeightM: e.HeightM, Notes: e.Notes}
		if err := in.Validate(); err != nil {
			t.Fatalf("input %q stored enclosure %+v, which does not validate: %v", input, e, err)
		}
	}
	for _, id := range a.idsSince(t, "dispositions", m.disp) {
		changes++
		var pid int64
		a.store.DB().QueryRow(`SELECT patient_id FROM dispositions WHERE id = ?`, id).Scan(&pid)
		p := patient(pid)
		d, err := a.store.Disposition(ctx, pid)
		if err != nil {
			t.Fatal(err)
		}
		if err := d.DispositionInput.Validate(p, now); err != nil || d.Normalise() != d.DispositionInput {
			t.Fatalf("input %q stored disposition %+v, which does not validate: %v", input, d.DispositionInput, err)
		}
		if string(p.Status) != string(d.Kind) || p.StatusDate != d.Date {
			t.Fatalf("input %q: patient status %s on %s, disposition %s on %s", input, p.Status, p.StatusDate, d.Kind, d.Date)
		}
	}
	for _, id := range a.idsSince(t, "users", m.user) {
		changes++
		u, err := a.store.User(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		nu := records.NewUser{Username: u.Username, DisplayName: u.DisplayName, Password: "a valid password", Roles: u.Roles}
		if err := nu.Validate(); err != nil {
			t.Fatalf("input %q stored person %+v, which does not validate: %v", input, u, err)
		}
	}
	for _, id := range a.idsSince(t, "release_sites", m.site) {
		changes++
		r, err := a.store.ReleaseSite(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if err := (records.ReleaseSiteInput{Name: r.Name, ElevationM: r.ElevationM, Notes: r.Notes}).Validate(); err != nil {
			t.Fatalf("input %q stored release site %+v, which does not validate: %v", input, r, err)
		}
	}
	for _, id := range a.idsSince(t, "report_versions", m.report) {
		changes++
		v, err := a.store.ReportVersionByID(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if err := v.Site.Site().Validate(); err != nil || !slices.Contains(records.PageSizes, v.PageSize) || v.SizeBytes == 0 {
			t.Fatalf("input %q froze report version %+v: site %v", input, v, err)
		}
	}
	changes += len(a.idsSince(t, "signoffs", m.signoff))
	var settings int
	a.store.DB().QueryRow(`SELECT count(*) FROM audit_log WHERE id > ? AND entity IN ('threshold_setting', 'species_override')`,
		m.audit).Scan(&settings)
	changes += settings
	if audits := len(a.idsSince(t, "audit_log", m.audit)); audits != changes {
		t.Fatalf("input %q stored %d rows with %d audit rows, want one each", input, changes, audits)
	}
}

func fzCheckPatient(t *testing.T, p records.Patient, now time.Time, input string) {
	t.Helper()
	in := inputOf(p)
	if err := in.Validate(now); err != nil {
		t.Fatalf("input %q stored patient %+v, which does not validate: %v", input, p, err)
	}
	sp, err := speciesTable.Find(p.SpeciesScientific)
	if err != nil {
		t.Fatalf("input %q stored patient of species %q, not in the table", input, p.SpeciesScientific)
	}
	if mc := assess.CheckMass("intake_mass_g", p.IntakeMassG, sp, p.Sex); mc != nil && mc.NeedsConfirm && strings.TrimSpace(p.MassNote) == "" {
		t.Fatalf("input %q stored an implausible intake mass %g g with no reason", input, p.IntakeMassG)
	}
}

// inputOf is the intake a stored patient was admitted with.
func inputOf(p records.Patient) records.PatientInput {
	return records.PatientInput{SpeciesScientific: p.SpeciesScientific, SpeciesCommon: p.SpeciesCommon, AgeClass: p.AgeClass,
		Sex: p.Sex, FoundDate: p.FoundDate, FoundPlace: p.FoundPlace, FoundLat: p.FoundLat, FoundLon: p.FoundLon,
		FinderName: p.FinderName, FinderContact: p.FinderContact, Reason: p.Reason, IntakeCondition: p.IntakeCondition,
		IntakeMassG: p.IntakeMassG, MassNote: p.MassNote, AdmittedAt: p.AdmittedAt}
}

// fzDecode decodes an entry's data strictly into a T.
func fzDecode[T any](t *testing.T, e records.Entry) T {
	t.Helper()
	var v T
	if err := e.Decode(&v); err != nil {
		t.Fatalf("entry %d: %v", e.ID, err)
	}
	return v
}

// fzCheckEntry validates a stored record as the engine reads it.
func fzCheckEntry(t *testing.T, e records.Entry, p records.Patient, now time.Time, input string) {
	t.Helper()
	sp, _ := speciesTable.Find(p.SpeciesScientific)
	var err error
	switch e.Kind {
	case records.KindWeighIn:
		w := fzDecode[assess.WeighIn](t, e)
		err = w.Validate()
		if mc := assess.CheckMass("mass_g", w.MassG, sp, p.Sex); err == nil && mc != nil && mc.NeedsConfirm && strings.TrimSpace(w.Note) == "" {
			err = fmt.Errorf("an implausible mass %g g stored with no reason", w.MassG)
		}
	case records.KindCondition:
		err = fzDecode[assess.ConditionScore](t, e).Validate()
	case records.KindWing:
		err = fzDecode[assess.WingMeasurement](t, e).Validate(sp)
	case records.KindTrial:
		err = fzDecode[assess.TakeoffTrial](t, e).Validate(assess.TrialRulesFor(sp, assess.DefaultDropCapM))
	case records.KindSession:
		s := fzDecode[assess.FlightSession](t, e)
		err = s.Validate()
		if err == nil && s.Group && (s.GroupSize != len(s.GroupCases) || s.GroupSize < 2 || !containsFold(s.GroupCases, p.CaseNumber)) {
			err = fmt.Errorf("group of %d naming %v, for %s", s.GroupSize, s.GroupCases, p.CaseNumber)
		}
	case records.KindWaterproof:
		err = fzDecode[assess.WaterproofTest](t, e).Validate()
	case records.KindHousing:
		err = fzDecode[assess.Housing](t, e).Validate()
	case records.KindExam:
		err = fzDecode[assess.Exam](t, e).Validate(now)
	case records.KindDiagnosis:
		err = fzDecode[assess.Diagnosis](t, e).Validate(now)
	case records.KindTreatment:
		err = fzDecode[assess.Treatment](t, e).Validate(now)
	case records.KindMedication:
		err = fzDecode[assess.Medication](t, e).Validate(now)
	case records.KindLab:
		err = fzDecode[assess.LabResult](t, e).Validate(now)
	case records.KindDiseaseTest:
		err = fzDecode[assess.DiseaseTest](t, e).Validate(now)
	case records.KindClearance:
		err = fzDecode[assess.Clearance](t, e).ValidateChange()
	default:
		err = fmt.Errorf("unknown kind %q", e.Kind)
	}
	if err != nil {
		t.Fatalf("input %q stored %s %s, which does not validate: %v", input, e.Kind, e.Data, err)
	}
}

// fzTarget is one form under fuzz.
type fzTarget struct {
	path func(a *fzApp, sel uint8) string
	// prep readies each input (a fresh patient for a disposition).
	prep   func(t *testing.T, a *fzApp, sel uint8)
	json   bool
	public bool // posted by nobody logged in (the login form)
}

// fzRun fuzzes target with seeds: sel picks among the target's variants
// (a clinical kind, a single or group session), body is what is posted.
func fzRun(f *testing.F, tg fzTarget, seeds ...fzSeed) {
	for _, s := range seeds {
		f.Add(s.sel, s.body)
	}
	a := newFzApp(f)
	f.Fuzz(func(t *testing.T, sel uint8, body string) {
		if tg.prep != nil {
			tg.prep(t, a, sel)
		}
		m := a.mark(t)
		c, token := a.client, a.csrf
		if tg.public {
			c, token = a.anon, a.pre
		}
		path := tg.path(a, sel)
		if code := a.post(t, c, path, body, tg.json, token); code >= 500 {
			t.Fatalf("POST %s %q: status %d", path, body, code)
		}
		a.checkSince(t, m, body)
	})
}

type fzSeed struct {
	sel  uint8
	body string
}

// fzForms encodes forms as seeds of selector sel.
func fzForms(sel uint8, forms ...url.Values) []fzSeed {
	var out []fzSeed
	for _, f := range forms {
		out = append(out, fzSeed{sel, f.Encode()})
	}
	return out
}

func fzCond(kind records.Kind) fzTarget {
	return fzTarget{path: func(a *fzApp, _ uint8) string { return condPath(a.p, kind) }}
}

// fzCondSeeds are the valid form of kind and a few awkward variants.
func fzCondSeeds(kind records.Kind) []fzSeed {
	valid := condValid(kind)
	odd := url.Values{}
	for k, v := range valid {
		odd[k] = v
	}
	odd.Set("at", "2026-06-16T09:11") // a minute past the slack
	bare := url.Values{"at": valid["at"]}
	return fzForms(0, valid, odd, bare)
}

func FuzzIntakeForm(f *testing.F) {
	implausible := intakeForm()
	implausible.Set("intake_mass_g", "1,15")
	confirmed := intakeForm()
	confirmed.Set("intake_mass_g", "11500")
	confirmed.Set("confirm_mass", "1")
	confirmed.Set("mass_note", "weighed in the carrier")
	coords := intakeForm()
	coords.Set("found_lat", "42,45")
	coords.Set("found_lon", "-76.5")
	fzRun(f, fzTarget{path: func(*fzApp, uint8) string { return "/intake" }},
		fzForms(0, intakeForm(), implausible, confirmed, coords)...)
}

func FuzzWeighInForm(f *testing.F) {
	fzRun(f, fzCond(records.KindWeighIn), fzCondSeeds(records.KindWeighIn)...)
}

func FuzzConditionForm(f *testing.F) {
	fzRun(f, fzCond(records.KindCondition), fzCondSeeds(records.KindCondition)...)
}

func FuzzWingForm(f *testing.F) {
	fzRun(f, fzCond(records.KindWing), fzCondSeeds(records.KindWing)...)
}

func FuzzTrialForm(f *testing.F) {
	fzRun(f, fzCond(records.KindTrial), fzCondSeeds(records.KindTrial)...)
}

func FuzzSessionForm(f *testing.F) {
	fzRun(f, fzCond(records.KindSession), fzCondSeeds(records.KindSession)...)
}

func FuzzWaterproofForm(f *testing.F) {
	fzRun(f, fzCond(records.KindWaterproof), fzCondSeeds(records.KindWaterproof)...)
}

func FuzzHousingForm(f *testing.F) {
	fzRun(f, fzCond(records.KindHousing), fzCondSeeds(records.KindHousing)...)
}

// FuzzCageForm posts the cage-side page's plain form: sel even for one
// bird, odd for the group of both hawks.
func FuzzCageForm(f *testing.F) {
	at := recordstest.Epoch.Add(20 * time.Hour).UTC().Format(time.RFC3339)
	one := url.Values{"idempotency_key": {"3f2b8c1e-6a4d-4c2e-9b7a-1d2e3f4a5b6c"}, "at": {at}, "exercise": {"cage"}, "passes": {"10"},
		"longest_run": {"10"}, "landings": {"1"}, "landings_controlled": {"1"}, "recovery_s": {"35"}, "highest": {"high-perch"},
		"droop": {"none"}, "open_mouth": {"1"}, "air_temp_c": {"12,5"}, "enclosure": {"Flight cage 1"}}
	group := url.Values{"group_cases": {"2026-0001,2026-0002"}, "bird_2026-0002_notes": {"landed short"}, "bird_2026-0002_droop": {"left"}}
	for k, v := range one {
		group[k] = v
	}
	fzRun(f, fzTarget{path: func(a *fzApp, sel uint8) string {
		if sel%2 == 1 {
			return "/cage/group?cases=" + a.p.CaseNumber + "," + a.p2.CaseNumber
		}
		return "/cage/" + a.p.CaseNumber
	}}, append(fzForms(0, one), fzForms(1, group)...)...)
}

// FuzzCageAPI posts JSON to the cage-side API (sel is unused).
func FuzzCageAPI(f *testing.F) {
	at := recordstest.Epoch.Add(20 * time.Hour)
	single, _ := json.Marshal(cageInput{IdempotencyKey: testKey, Session: goodSession(at)})
	g := goodSession(at)
	g.Group, g.GroupCases = true, []string{"2026-0001", "2026-0002"}
	group, _ := json.Marshal(cageInput{IdempotencyKey: "a1b2c3d4-0000-4000-8000-000000000001", Session: g,
		Birds: map[string]cageBirdObs{"2026-0002": {OpenMouth: true, Droop: assess.DroopLeft, Notes: "tired"}}})
	fzRun(f, fzTarget{json: true, path: func(a *fzApp, _ uint8) string { return apiPath(a.p) }},
		fzSeed{0, string(single)}, fzSeed{0, string(group)},
		fzSeed{0, `{"idempotency_key":"x","session":{"passes":1e400}}`}, fzSeed{0, `{"session":{"at":"9999-12-31T23:59:59Z"}} {}`})
}

// FuzzClinicalForm posts each clinical record form: sel picks the kind.
func FuzzClinicalForm(f *testing.F) {
	var seeds []fzSeed
	forms := clinicalForms()
	for i, k := range records.ClinicalKinds {
		seeds = append(seeds, fzForms(uint8(i), forms[k])...)
	}
	fzRun(f, fzTarget{path: func(a *fzApp, sel uint8) string {
		return clinicalPath(a.p, records.ClinicalKinds[int(sel)%len(records.ClinicalKinds)])
	}}, seeds...)
}

func FuzzClearanceForm(f *testing.F) {
	fzRun(f, fzTarget{path: func(a *fzApp, _ uint8) string { return "/patients/" + a.p.CaseNumber + "/clearance" }},
		fzForms(0, url.Values{"item": {"vision"}, "state": {"cleared"}},
			url.Values{"item": {"live-prey"}, "state": {"not-cleared"}, "note": {"misses the mouse"}})...)
}

func FuzzEnclosureForm(f *testing.F) {
	fzRun(f, fzTarget{path: func(*fzApp, uint8) string { return "/enclosures" }},
		fzForms(0, url.Values{"name": {"Aviary 2"}, "kind": {"outdoor-aviary"}, "length": {"6"}, "width": {"3"}, "height": {"3"}, "unit": {"m"}},
			url.Values{"name": {"Pool"}, "kind": {"pool"}, "length": {"20"}, "width": {"10"}, "height": {"8"}, "unit": {"ft"}, "notes": {"salt"}})...)
}

// FuzzDispositionForm records a disposition of a fresh patient per input
// (sel odd: a correction of a death recorded first).
func FuzzDispositionForm(f *testing.F) {
	fzRun(f, fzTarget{
		prep: func(t *testing.T, a *fzApp, sel uint8) {
			a.cur = a.admit(t)
			if sel%2 == 1 {
				if _, err := a.store.Dispose(context.Background(), 0, a.cur.ID, records.DispositionInput{Kind: assess.DispDied,
					Date: recordstest.Epoch.Format(records.DateLayout), Reason: "unknown"}); err != nil {
					t.Fatal(err)
				}
			}
		},
		path: func(a *fzApp, sel uint8) string {
			if sel%2 == 1 {
				return "/patients/" + a.cur.CaseNumber + "/disposition/correct"
			}
			return "/patients/" + a.cur.CaseNumber + "/disposition"
		}},
		append(fzForms(0, releaseForm(), url.Values{"kind": {"transferred"}, "date": {"2026-06-15"}, "place": {"Hill"}, "receiver": {"Hill Centre"}}),
			fzForms(1, url.Values{"kind": {"euthanised"}, "date": {"2026-06-15"}, "reason": {"wing"}, "note": {"was not a death"}, "version": {"1"}})...)...)
}

func FuzzUserForm(f *testing.F) {
	fzRun(f, fzTarget{path: func(*fzApp, uint8) string { return "/users" }},
		fzForms(0, url.Values{"username": {"new.vet"}, "display_name": {"New Vet"}, "password": {"long password 1"}, "roles": {"vet", "staff"}},
			url.Values{"username": {"x"}, "display_name": {" "}, "password": {"short"}, "roles": {"root"}})...)
}

// FuzzLoginForm posts the login form as nobody: refusals, the throttle,
// never a 5xx.
func FuzzLoginForm(f *testing.F) {
	fzRun(f, fzTarget{public: true, path: func(*fzApp, uint8) string { return "/login" }},
		fzForms(0, url.Values{"username": {"boss"}, "password": {"wrong"}, "next": {"/patients"}},
			url.Values{"username": {"boss"}, "password": {recordstest.Password}, "next": {"//evil.example"}})...)
}

// FuzzCorrectForm corrects a conditioning record of each kind (sel picks
// it), stored afresh through its form before each input.
func FuzzCorrectForm(f *testing.F) {
	var seeds []fzSeed
	for i, k := range records.ConditioningKinds {
		v := condValid(k)
		v.Set("version", "1")
		seeds = append(seeds, fzForms(uint8(i), v)...)
	}
	var key int64
	fzRun(f, fzTarget{
		prep: func(t *testing.T, a *fzApp, sel uint8) {
			k := records.ConditioningKinds[int(sel)%len(records.ConditioningKinds)]
			if code := a.post(t, a.client, condPath(a.p, k), condValid(k).Encode(), false, a.csrf); code != http.StatusSeeOther {
				t.Fatalf("store a %s to correct: status %d", k, code)
			}
			a.store.DB().QueryRow(`SELECT MAX(entry_key) FROM entries WHERE kind = ?`, string(k)).Scan(&key)
		},
		path: func(a *fzApp, _ uint8) string { return condRecordURL(a.p, key, "correct") },
	}, seeds...)
}

// FuzzSettingsForms posts the centre's settings forms: sel picks a
// threshold, its reset, a release site, or a species value.
func FuzzSettingsForms(f *testing.F) {
	paths := []string{"/settings/thresholds", "/settings/thresholds/reset", "/sites", "/species/Anas-platyrhynchos/override"}
	seeds := append(fzForms(0, url.Values{"threshold": {"stale-days"}, "value": {"5"}, "note": {"weekly rounds"}},
		url.Values{"threshold": {"passes"}, "group": {"raptor"}, "value": {"1e9"}}),
		fzForms(1, url.Values{"threshold": {"stale-days"}})...)
	seeds = append(seeds, fzForms(2, url.Values{"name": {"Ridge"}, "elevation_m": {"300"}, "notes": {"gate code"}})...)
	seeds = append(seeds, fzForms(3, url.Values{"span_mm": {"900"}, "note": {"our own birds"}},
		url.Values{"span_mm": {"9 m"}, "mass_range_g.male.min": {"1200"}, "mass_range_g.male.max": {"900"}})...)
	fzRun(f, fzTarget{path: func(_ *fzApp, sel uint8) string { return paths[int(sel)%len(paths)] }}, seeds...)
}

// FuzzReportForm posts the report forms: sel even freezes a version for
// review (release site and page size), odd signs version 1 off (role,
// password, comment).
func FuzzReportForm(f *testing.F) {
	seeds := append(fzForms(0, url.Values{"page_size": {"A4"}},
		url.Values{"page_size": {"Letter"}, "elevation_m": {"600"}, "temp_c": {"-3,5"}, "site_name": {"Ridge meadow"}},
		url.Values{"page_size": {"A3"}, "elevation_m": {"9000"}, "temp_c": {"70"}}),
		fzForms(1, url.Values{"role": {"vet"}, "password": {recordstest.Password}, "comment": {"fit to fly"}},
			url.Values{"role": {"admin"}, "password": {"nope"}})...)
	fzRun(f, fzTarget{
		prep: func(t *testing.T, a *fzApp, sel uint8) {
			var n int
			a.store.DB().QueryRow(`SELECT count(*) FROM report_versions WHERE patient_id = ?`, a.p.ID).Scan(&n)
			if sel%2 == 1 && n == 0 {
				if code := a.post(t, a.client, "/patients/"+a.p.CaseNumber+"/reports", "page_size=A4", false, a.csrf); code != http.StatusSeeOther {
					t.Fatalf("freeze version 1: status %d", code)
				}
			}
		},
		path: func(a *fzApp, sel uint8) string {
			if sel%2 == 1 {
				return "/patients/" + a.p.CaseNumber + "/reports/1/signoffs"
			}
			return "/patients/" + a.p.CaseNumber + "/reports"
		},
	}, seeds...)
}

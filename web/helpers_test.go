package web

import (
	"context"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"github.com/PuerkitoBio/goquery"

	"aloft/assess"
	"aloft/records"
	"aloft/records/recordstest"
)

// testApp is a real server over a real SQLite file, with a cookie-keeping client.
type testApp struct {
	t      *testing.T
	store  *records.Store
	srv    *httptest.Server
	client *http.Client
	csrf   string
	clock  *recordstest.Clock
}

var speciesTable = func() *assess.SpeciesTable {
	t, err := assess.LoadSpecies()
	if err != nil {
		panic(err)
	}
	return t
}()

func newTestApp(t *testing.T) *testApp {
	t.Helper()
	clock := recordstest.NewClock(recordstest.Epoch)
	store := recordstest.Open(t, clock)
	if err := store.SetCentre(context.Background(), 0, records.Centre{Name: "Test Centre", ElevationM: 100}); err != nil {
		t.Fatal(err)
	}
	s := New(Config{Now: clock.Now, Cautions: "# C\n\n## Advisory\n- Aloft advises only.\n"}, store, speciesTable)
	srv := httptest.NewServer(s)
	t.Cleanup(srv.Close)
	jar, _ := cookiejar.New(nil)
	client := &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	return &testApp{t: t, store: store, srv: srv, client: client, clock: clock}
}

var csrfRe = regexp.MustCompile(`name="_csrf" value="([^"]+)"`)

// get fetches path and remembers the page's CSRF token.
func (a *testApp) get(path string) (*http.Response, *goquery.Document) {
	a.t.Helper()
	resp, err := a.client.Get(a.srv.URL + path)
	if err != nil {
		a.t.Fatal(err)
	}
	return resp, a.parse(resp)
}

func (a *testApp) parse(resp *http.Response) *goquery.Document {
	a.t.Helper()
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	if m := csrfRe.FindSubmatch(b); m != nil {
		a.csrf = string(m[1])
	}
	doc, err := goquery.NewDocumentFromReader(strings.NewReader(string(b)))
	if err != nil {
		a.t.Fatal(err)
	}
	return doc
}

// post submits a form with the current CSRF token (unless form sets _csrf).
func (a *testApp) post(path string, form url.Values) (*http.Response, *goquery.Document) {
	a.t.Helper()
	if _, ok := form["_csrf"]; !ok {
		form.Set("_csrf", a.csrf)
	}
	resp, err := a.client.PostForm(a.srv.URL+path, form)
	if err != nil {
		a.t.Fatal(err)
	}
	return resp, a.parse(resp)
}

// login adds a user with roles and logs in as them.
func (a *testApp) login(username string, roles ...records.Role) records.User {
	a.t.Helper()
	u := recordstest.AddUser(a.t, a.store, username, roles...)
	a.get("/login")
	resp, _ := a.post("/login", url.Values{"username": {username}, "password": {recordstest.Password}})
	if resp.StatusCode != http.StatusSeeOther {
		a.t.Fatalf("login %s: status %d", username, resp.StatusCode)
	}
	a.get("/patients")
	return u
}

func wantStatus(t *testing.T, resp *http.Response, want int) {
	t.Helper()
	if resp.StatusCode != want {
		t.Fatalf("%s %s: status %d, want %d", resp.Request.Method, resp.Request.URL.Path, resp.StatusCode, want)
	}
}

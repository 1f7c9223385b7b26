package web

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"aloft/records"
	"aloft/records/recordstest"
	"aloft/web/browsertest"
)

// On a phone, a vet generates the report for review, opens the sign-off
// form, signs with their password and sees the sign-off; the reports block,
// with its 64-character hash, never makes the page scroll sideways. Set
// ALOFT_SCREENSHOTS to keep the screenshots.
func TestReports_Browser(t *testing.T) {
	a := newTestApp(t)
	recordstest.AddUser(t, a.store, "vera", records.RoleVet, records.RoleStaff)
	p := reportPatient(t, a)
	b := browsertest.New(t, browsertest.Phone())
	b.Open(a.srv.URL+"/login", "#username")
	b.Fill("#username", "vera")
	b.Fill("#password", recordstest.Password)
	b.ClickAndWait("button[type=submit]", "main")
	b.Open(a.srv.URL+"/patients/"+p.CaseNumber, "[data-testid=section-reports]")
	if code := b.ClickAndWait("[data-testid=report-generate]", "[data-testid=report-version-1]"); code != 200 {
		t.Fatalf("generating the report: status %d", code)
	}
	b.NoHorizontalScroll()
	b.Click("[data-testid=report-version-1] [data-testid=signoff-open]")
	b.WaitVisible("#signoff_password_1")
	b.SetValue("#signoff_comment_1", "Wing healed; flies level.") // an empty textarea cannot be cleared key by key
	b.Fill("#signoff_password_1", recordstest.Password)
	b.NoHorizontalScroll()
	shotReports(t, b, "report-signoff-form")
	if code := b.ClickAndWait("[data-testid=signoff-submit-1]", "[data-testid=signoff-vet]"); code != 200 {
		t.Fatalf("signing: status %d", code)
	}
	if got := b.Text("[data-testid=signoff-vet]"); !strings.Contains(got, "Wing healed") {
		t.Errorf("the sign-off shows %q", got)
	}
	b.NoHorizontalScroll()
	shotReports(t, b, "report-signed")
}

func shotReports(t *testing.T, b *browsertest.Browser, name string) {
	t.Helper()
	dir := os.Getenv("ALOFT_SCREENSHOTS")
	if dir == "" {
		dir = t.TempDir()
	}
	b.Screenshot(filepath.Join(dir, name+".png"))
}

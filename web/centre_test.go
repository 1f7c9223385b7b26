package web

import (
	"context"
	"net/http"
	"net/url"
	"testing"

	"aloft/records"
)

func TestCentreDetails_AdminEditsAudited(t *testing.T) {
	a := newTestApp(t)
	a.login("kim", records.RoleStaff, records.RoleVet)
	resp, _ := a.get("/settings/centre")
	wantStatus(t, resp, http.StatusForbidden)

	b := newTestApp(t)
	b.login("boss", records.RoleAdmin)
	resp, doc := b.get("/settings/centre")
	wantStatus(t, resp, http.StatusOK)
	if got, _ := doc.Find("#centre_name").Attr("value"); got != "Test Centre" {
		t.Errorf("centre name shown %q", got)
	}
	bad := url.Values{"centre_name": {""}, "elevation_m": {"9000"}, "page_size": {"A3"}}
	resp, doc = b.post("/settings/centre", bad)
	wantStatus(t, resp, http.StatusUnprocessableEntity)
	if n := doc.Find(".field-error").Length(); n < 2 {
		t.Errorf("%d field errors, want messages beside the name and the elevation", n)
	}
	resp, _ = b.post("/settings/centre", url.Values{"centre_name": {"Hill Centre"}, "address": {"2 Road"}, "elevation_m": {"850"}, "page_size": {"Letter"}})
	wantStatus(t, resp, http.StatusSeeOther)
	ctr, err := b.store.Centre(context.Background())
	if err != nil || ctr.Name != "Hill Centre" || ctr.ElevationM != 850 || ctr.PageSize != records.PageLetter {
		t.Errorf("centre = %+v, %v", ctr, err)
	}
	audit, _ := b.store.Audit(context.Background(), records.AuditFilter{Entity: "centre"})
	if len(audit) == 0 || audit[0].Before == "" || audit[0].Username != "boss" {
		t.Errorf("centre change not audited with before/after by boss: %+v", audit)
	}
}

package records_test

import (
	"context"
	"errors"
	"testing"

	"aloft/records"
	"aloft/records/recordstest"
)

func TestAPITokens_IssueUseRevoke(t *testing.T) {
	ctx := context.Background()
	s := recordstest.Open(t, nil)
	admin := recordstest.AddUser(t, s, "boss", records.RoleAdmin)
	staff := recordstest.AddUser(t, s, "kim", records.RoleStaff)
	if _, _, err := s.IssueAPIToken(ctx, staff, staff.ID, "mine"); !errors.Is(err, records.ErrForbidden) {
		t.Errorf("staff issuing a token: %v, want ErrForbidden", err)
	}
	secret, tok, err := s.IssueAPIToken(ctx, admin, staff.ID, "nightly export")
	if err != nil {
		t.Fatal(err)
	}
	u, err := s.UserByAPIToken(ctx, secret)
	if err != nil || u.ID != staff.ID || u.Has(records.RoleAdmin) {
		t.Errorf("token acts as %+v, %v; want kim with staff role only", u, err)
	}
	if _, err := s.UserByAPIToken(ctx, secret+"x"); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("wrong token: %v", err)
	}
	if err := s.RevokeAPIToken(ctx, admin, tok.ID); err != nil {
		t.Fatal(err)
	}
	if _, err := s.UserByAPIToken(ctx, secret); !errors.Is(err, records.ErrNotFound) {
		t.Errorf("revoked token still works: %v", err)
	}
	list, _ := s.APITokens(ctx)
	if len(list) != 1 || list[0].RevokedAt == nil {
		t.Errorf("tokens = %+v", list)
	}
	var n int
	s.DB().QueryRow(`SELECT count(*) FROM api_tokens WHERE token_hash LIKE 'aloft_%'`).Scan(&n)
	if n != 0 {
		t.Error("a token secret is stored in clear")
	}
}

package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"

	"aloft/assess"
)

// APIToken is a per-user token for the JSON API. The secret is shown once,
// when issued; only its hash is stored.
type APIToken struct {
	ID        int64      `json:"id"`
	UserID    int64      `json:"user_id"`
	Username  string     `json:"username"`
	Label     string     `json:"label"`
	CreatedAt time.Time  `json:"created_at"`
	RevokedAt *time.Time `json:"revoked_at,omitempty"`
	LastUsed  *time.Time `json:"last_used,omitempty"`
}

// apiTokenPrefix marks Aloft tokens so they are recognisable in logs.
const apiTokenPrefix = "aloft_"

// IssueAPIToken creates a token for userID and returns its secret (shown
// once) and record. Only admins issue tokens.
func (s *Store) IssueAPIToken(ctx context.Context, actor User, userID int64, label string) (string, APIToken, error) {
	if !actor.Has(RoleAdmin) {
		return "", APIToken{}, ErrForbidden
	}
	label = strings.TrimSpace(label)
	if label == "" || len(label) > 80 {
		return "", APIToken{}, assess.ValidationErrors{{Field: "label", Value: label, Message: "name the token's use in up to 80 characters, e.g. \"nightly export\""}}
	}
	secret := apiTokenPrefix + NewToken()
	var tok APIToken
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		u, _, err := s.scanUser(ctx, tx, "id = ?", userID)
		if err != nil {
			return err
		}
		now := s.now()
		res, err := tx.ExecContext(ctx, `INSERT INTO api_tokens (user_id, label, token_hash, created_by, created_at) VALUES (?, ?, ?, ?, ?)`,
			userID, label, hashToken(secret), nullID(actor.ID), fmtTime(now))
		if err != nil {
			return err
		}
		id, _ := res.LastInsertId()
		tok = APIToken{ID: id, UserID: userID, Username: u.Username, Label: label, CreatedAt: now.UTC().Truncate(time.Second)}
		return s.writeAudit(ctx, tx, auditRow{userID: actor.ID, entity: "api_token", entityID: id, action: ActionCreate, after: tok})
	})
	if err != nil {
		return "", APIToken{}, wrapValidation("issue api token", err)
	}
	return secret, tok, nil
}

// RevokeAPIToken revokes token id; revoked tokens stop working at once.
func (s *Store) RevokeAPIToken(ctx context.Context, actor User, id int64) error {
	if !actor.Has(RoleAdmin) {
		return ErrForbidden
	}
	return wrapValidation("revoke api token", s.inTx(ctx, func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `UPDATE api_tokens SET revoked_at = ?, revoked_by = ? WHERE id = ? AND revoked_at IS NULL`,
			fmtTime(s.now()), nullID(actor.ID), id)
		if err != nil {
			return err
		}
		if n, _ := res.RowsAffected(); n == 0 {
			return ErrNotFound
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actor.ID, entity: "api_token", entityID: id, action: ActionUpdate,
			after: map[string]string{"state": "revoked"}})
	}))
}

// APITokens lists every token, newest first.
func (s *Store) APITokens(ctx context.Context) ([]APIToken, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT t.id, t.user_id, u.username, t.label, t.created_at, t.revoked_at, t.last_used
		FROM api_tokens t JOIN users u ON u.id = t.user_id ORDER BY t.id DESC`)
	if err != nil {
		return nil, fmt.Errorf("records: api tokens: %w", err)
	}
	defer rows.Close()
	var out []APIToken
	for rows.Next() {
		var t APIToken
		var created string
		var revoked, used sql.NullString
		if err := rows.Scan(&t.ID, &t.UserID, &t.Username, &t.Label, &created, &revoked, &used); err != nil {
			return nil, err
		}
		t.CreatedAt = parseTime(created)
		if revoked.Valid {
			r := parseTime(revoked.String)
			t.RevokedAt = &r
		}
		if used.Valid {
			u := parseTime(used.String)
			t.LastUsed = &u
		}
		out = append(out, t)
	}
	return out, rows.Err()
}

// UserByAPIToken returns the user a live token acts for, or ErrNotFound for
// an unknown or revoked token or a disabled user.
func (s *Store) UserByAPIToken(ctx context.Context, secret string) (User, error) {
	if !strings.HasPrefix(secret, apiTokenPrefix) {
		return User{}, ErrNotFound
	}
	var id, uid int64
	var revoked sql.NullString
	err := s.db.QueryRowContext(ctx, `SELECT id, user_id, revoked_at FROM api_tokens WHERE token_hash = ?`, hashToken(secret)).Scan(&id, &uid, &revoked)
	if errors.Is(err, sql.ErrNoRows) || revoked.Valid {
		return User{}, ErrNotFound
	}
	if err != nil {
		return User{}, fmt.Errorf("records: api token: %w", err)
	}
	u, err := s.User(ctx, uid)
	if err != nil {
		return User{}, err
	}
	if u.Disabled {
		return User{}, ErrNotFound
	}
	_, _ = s.db.ExecContext(ctx, `UPDATE api_tokens SET last_used = ? WHERE id = ?`, fmtTime(s.now()), id)
	return u, nil
}

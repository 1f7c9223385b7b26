package records

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"database/sql"
	"encoding/base64"
	"encoding/hex"
	"errors"
	"fmt"
	"time"
)

// LoginSession is an authenticated browser session. Only a hash of the
// token is stored, so a copy of the database does not let anyone log in.
type LoginSession struct {
	User      User
	CSRFToken string
	ExpiresAt time.Time
}

// SessionTTL is how long a login lasts without use.
const SessionTTL = 12 * time.Hour

// NewToken returns 32 random bytes, base64url-encoded.
func NewToken() string {
	b := make([]byte, 32)
	if _, err := rand.Read(b); err != nil {
		panic("records: crypto/rand failed: " + err.Error())
	}
	return base64.RawURLEncoding.EncodeToString(b)
}

func hashToken(tok string) string {
	h := sha256.Sum256([]byte(tok))
	return hex.EncodeToString(h[:])
}

// CreateLoginSession starts a session for userID and returns its token (for
// the cookie). Each login gets a fresh token.
func (s *Store) CreateLoginSession(ctx context.Context, userID int64) (string, LoginSession, error) {
	tok := NewToken()
	csrf := NewToken()
	now := s.now()
	exp := now.Add(SessionTTL)
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx, `DELETE FROM login_sessions WHERE expires_at < ?`, fmtTime(now)); err != nil {
			return err
		}
		_, err := tx.ExecContext(ctx, `INSERT INTO login_sessions (token_hash, user_id, csrf_token, created_at, expires_at) VALUES (?, ?, ?, ?, ?)`,
			hashToken(tok), userID, csrf, fmtTime(now), fmtTime(exp))
		return err
	})
	if err != nil {
		return "", LoginSession{}, fmt.Errorf("records: create session: %w", err)
	}
	u, err := s.User(ctx, userID)
	if err != nil {
		return "", LoginSession{}, err
	}
	return tok, LoginSession{User: u, CSRFToken: csrf, ExpiresAt: exp}, nil
}

// LoginSessionByToken returns the live session for a cookie token, or
// ErrNotFound when it is unknown, expired, or its user is disabled.
func (s *Store) LoginSessionByToken(ctx context.Context, tok string) (LoginSession, error) {
	if tok == "" {
		return LoginSession{}, ErrNotFound
	}
	var uid int64
	var csrf, exp string
	err := s.db.QueryRowContext(ctx, `SELECT user_id, csrf_token, expires_at FROM login_sessions WHERE token_hash = ?`, hashToken(tok)).
		Scan(&uid, &csrf, &exp)
	if errors.Is(err, sql.ErrNoRows) {
		return LoginSession{}, ErrNotFound
	}
	if err != nil {
		return LoginSession{}, fmt.Errorf("records: session: %w", err)
	}
	ls := LoginSession{CSRFToken: csrf, ExpiresAt: parseTime(exp)}
	if !s.now().Before(ls.ExpiresAt) {
		return LoginSession{}, ErrNotFound
	}
	ls.User, err = s.User(ctx, uid)
	if err != nil {
		return LoginSession{}, err
	}
	if ls.User.Disabled {
		return LoginSession{}, ErrNotFound
	}
	return ls, nil
}

// DeleteLoginSession ends a session (logout). Unknown tokens are not an error.
func (s *Store) DeleteLoginSession(ctx context.Context, tok string) error {
	_, err := s.db.ExecContext(ctx, `DELETE FROM login_sessions WHERE token_hash = ?`, hashToken(tok))
	if err != nil {
		return fmt.Errorf("records: delete session: %w", err)
	}
	return nil
}

// ExpireLoginSessions ends every session of userID (tests use it to simulate
// an expired login; SetPassword and disabling use it too).
func (s *Store) ExpireLoginSessions(ctx context.Context, userID int64) error {
	_, err := s.db.ExecContext(ctx, `DELETE FROM login_sessions WHERE user_id = ?`, userID)
	return err
}

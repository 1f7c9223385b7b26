package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"golang.org/x/crypto/bcrypt"

	"aloft/assess"
)

// Role is what a user may do. A person may hold several.
type Role string

// Roles (DESIGN.md).
const (
	RoleStaff         Role = "staff"         // records
	RoleRehabilitator Role = "rehabilitator" // licensed permit holder: clearance, release sign-off
	RoleVet           Role = "vet"           // clinical clearance, veterinary sign-off
	RoleAdmin         Role = "admin"         // users, settings
)

// AllRoles lists the roles in display order.
var AllRoles = []Role{RoleStaff, RoleRehabilitator, RoleVet, RoleAdmin}

// MinPasswordLen is the shortest password accepted.
const MinPasswordLen = 10

// User is an account. PasswordHash never leaves this package's callers' control.
type User struct {
	ID          int64     `json:"id"`
	Username    string    `json:"username"`
	DisplayName string    `json:"display_name"`
	Roles       []Role    `json:"roles"`
	Disabled    bool      `json:"disabled"`
	CreatedAt   time.Time `json:"created_at"`
}

// Has reports whether u holds role r.
func (u User) Has(r Role) bool { return slices.Contains(u.Roles, r) }

// HasAny reports whether u holds any of rs.
func (u User) HasAny(rs ...Role) bool {
	for _, r := range rs {
		if u.Has(r) {
			return true
		}
	}
	return false
}

// NewUser is the input to AddUser.
type NewUser struct {
	Username    string
	DisplayName string
	Password    string
	Roles       []Role
}

// Validate checks a new account.
func (n NewUser) Validate() error {
	var errs assess.ValidationErrors
	if !validUsername(n.Username) {
		errs = append(errs, &assess.ValidationError{Field: "username", Value: n.Username,
			Message: "use 2 to 40 letters, digits, dots, dashes or underscores"})
	}
	if strings.TrimSpace(n.DisplayName) == "" || utf8.RuneCountInString(n.DisplayName) > 80 {
		errs = append(errs, &assess.ValidationError{Field: "display_name", Value: n.DisplayName,
			Message: "give the person's name, up to 80 characters"})
	}
	if err := checkPassword(n.Password); err != nil {
		errs = append(errs, err)
	}
	if len(n.Roles) == 0 {
		errs = append(errs, &assess.ValidationError{Field: "roles", Value: "", Message: "choose at least one role"})
	}
	for _, r := range n.Roles {
		if !slices.Contains(AllRoles, r) {
			errs = append(errs, &assess.ValidationError{Field: "roles", Value: string(r),
				Message: "roles are staff, rehabilitator, vet and admin"})
		}
	}
	if len(errs) > 0 {
		return errs
	}
	return nil
}

func validUsername(s string) bool {
	if len(s) < 2 || len(s) > 40 {
		return false
	}
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '.' || r == '-' || r == '_') {
			return false
		}
	}
	return true
}

func checkPassword(p string) *assess.ValidationError {
	if utf8.RuneCountInString(p) < MinPasswordLen || len(p) > 72 {
		return &assess.ValidationError{Field: "password", Value: "(hidden)",
			Message: fmt.Sprintf("use at least %d characters (at most 72 bytes)", MinPasswordLen)}
	}
	return nil
}

func (s *Store) hashPassword(p string) (string, error) {
	cost := s.bcryptCost
	if cost == 0 {
		cost = bcrypt.DefaultCost
	}
	h, err := bcrypt.GenerateFromPassword([]byte(p), cost)
	return string(h), err
}

// AddUser creates an account; actorID 0 is the system (first set-up, CLI).
func (s *Store) AddUser(ctx context.Context, actorID int64, n NewUser) (User, error) {
	if err := n.Validate(); err != nil {
		return User{}, err
	}
	hash, err := s.hashPassword(n.Password)
	if err != nil {
		return User{}, fmt.Errorf("records: add user: %w", err)
	}
	var u User
	err = s.inTx(ctx, func(tx *sql.Tx) error {
		var taken int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM users WHERE username = ?`, n.Username).Scan(&taken); err != nil {
			return err
		}
		if taken > 0 {
			return assess.ValidationErrors{{Field: "username", Value: n.Username, Message: "this username is taken"}}
		}
		now := s.now()
		res, err := tx.ExecContext(ctx, `INSERT INTO users (username, display_name, password_hash, created_at) VALUES (?, ?, ?, ?)`,
			n.Username, strings.TrimSpace(n.DisplayName), hash, fmtTime(now))
		if err != nil {
			return err
		}
		id, _ := res.LastInsertId()
		for _, r := range dedupRoles(n.Roles) {
			if _, err := tx.ExecContext(ctx, `INSERT INTO user_roles (user_id, role) VALUES (?, ?)`, id, string(r)); err != nil {
				return err
			}
		}
		u = User{ID: id, Username: n.Username, DisplayName: strings.TrimSpace(n.DisplayName), Roles: dedupRoles(n.Roles), CreatedAt: now.UTC().Truncate(time.Second)}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "user", entityID: id, action: ActionCreate, after: u})
	})
	if err != nil {
		return User{}, wrapValidation("add user", err)
	}
	return u, nil
}

func dedupRoles(rs []Role) []Role {
	var out []Role
	for _, r := range AllRoles {
		if slices.Contains(rs, r) {
			out = append(out, r)
		}
	}
	return out
}

// wrapValidation passes validation errors through unwrapped (so the web layer
// can show them by field) and prefixes every other error.
func wrapValidation(op string, err error) error {
	if err == nil {
		return nil
	}
	var ve assess.ValidationErrors
	var v1 *assess.ValidationError
	if errors.As(err, &ve) || errors.As(err, &v1) || errors.Is(err, ErrNotFound) || errors.Is(err, ErrConflict) || errors.Is(err, ErrForbidden) {
		return err
	}
	return fmt.Errorf("records: %s: %w", op, err)
}

const userCols = `id, username, display_name, disabled, created_at`

func (s *Store) scanUser(ctx context.Context, q interface {
	QueryRowContext(context.Context, string, ...any) *sql.Row
}, where string, arg any) (User, string, error) {
	var u User
	var created, hash string
	err := q.QueryRowContext(ctx, `SELECT `+userCols+`, password_hash FROM users WHERE `+where, arg).
		Scan(&u.ID, &u.Username, &u.DisplayName, &u.Disabled, &created, &hash)
	if errors.Is(err, sql.ErrNoRows) {
		return User{}, "", ErrNotFound
	}
	if err != nil {
		return User{}, "", err
	}
	u.CreatedAt = parseTime(created)
	u.Roles, err = s.userRoles(ctx, u.ID)
	return u, hash, err
}

func (s *Store) userRoles(ctx context.Context, id int64) ([]Role, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT role FROM user_roles WHERE user_id = ?`, id)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var rs []Role
	for rows.Next() {
		var r string
		if err := rows.Scan(&r); err != nil {
			return nil, err
		}
		rs = append(rs, Role(r))
	}
	return dedupRoles(rs), rows.Err()
}

// User returns the account with id.
func (s *Store) User(ctx context.Context, id int64) (User, error) {
	u, _, err := s.scanUser(ctx, s.db, "id = ?", id)
	return u, wrapValidation("user", err)
}

// UserByName returns the account with username (case-insensitive).
func (s *Store) UserByName(ctx context.Context, username string) (User, error) {
	u, _, err := s.scanUser(ctx, s.db, "username = ?", username)
	return u, wrapValidation("user", err)
}

// Users lists every account, by username.
func (s *Store) Users(ctx context.Context) ([]User, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT id FROM users ORDER BY username`)
	if err != nil {
		return nil, fmt.Errorf("records: users: %w", err)
	}
	var ids []int64
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			rows.Close()
			return nil, err
		}
		ids = append(ids, id)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return nil, err
	}
	out := make([]User, 0, len(ids))
	for _, id := range ids {
		u, err := s.User(ctx, id)
		if err != nil {
			return nil, err
		}
		out = append(out, u)
	}
	return out, nil
}

// CountUsers returns how many accounts exist (0 before first set-up).
func (s *Store) CountUsers(ctx context.Context) (int, error) {
	var n int
	err := s.db.QueryRowContext(ctx, `SELECT count(*) FROM users`).Scan(&n)
	return n, err
}

// ErrBadLogin is returned by Authenticate for a wrong username or password
// or a disabled account: one error, so it does not reveal which.
var ErrBadLogin = errors.New("records: wrong username or password")

// Authenticate checks a username and password.
func (s *Store) Authenticate(ctx context.Context, username, password string) (User, error) {
	u, hash, err := s.scanUser(ctx, s.db, "username = ?", username)
	if errors.Is(err, ErrNotFound) {
		// Spend the same time as a real check, so timing does not reveal names.
		_ = bcrypt.CompareHashAndPassword([]byte("$2a$10$7EqJtq98hPqEX7fNZaFWoO5X4fJ7ZG9VXgYi0Fm8x6S0YqU9t6Y8a"), []byte(password))
		return User{}, ErrBadLogin
	}
	if err != nil {
		return User{}, fmt.Errorf("records: authenticate: %w", err)
	}
	if bcrypt.CompareHashAndPassword([]byte(hash), []byte(password)) != nil || u.Disabled {
		return User{}, ErrBadLogin
	}
	return u, nil
}

// SetPassword replaces a user's password and ends their login sessions.
func (s *Store) SetPassword(ctx context.Context, actorID, userID int64, password string) error {
	if err := checkPassword(password); err != nil {
		return assess.ValidationErrors{err}
	}
	hash, err := s.hashPassword(password)
	if err != nil {
		return fmt.Errorf("records: set password: %w", err)
	}
	return wrapValidation("set password", s.inTx(ctx, func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `UPDATE users SET password_hash = ? WHERE id = ?`, hash, userID)
		if err != nil {
			return err
		}
		if n, _ := res.RowsAffected(); n == 0 {
			return ErrNotFound
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM login_sessions WHERE user_id = ?`, userID); err != nil {
			return err
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "user", entityID: userID, action: ActionUpdate,
			after: map[string]string{"password": "changed"}})
	}))
}

// SetDisabled disables or re-enables an account; disabling ends its sessions.
func (s *Store) SetDisabled(ctx context.Context, actorID, userID int64, disabled bool) error {
	return wrapValidation("disable user", s.inTx(ctx, func(tx *sql.Tx) error {
		var was bool
		err := tx.QueryRowContext(ctx, `SELECT disabled FROM users WHERE id = ?`, userID).Scan(&was)
		if errors.Is(err, sql.ErrNoRows) {
			return ErrNotFound
		}
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE users SET disabled = ? WHERE id = ?`, disabled, userID); err != nil {
			return err
		}
		if disabled {
			if _, err := tx.ExecContext(ctx, `DELETE FROM login_sessions WHERE user_id = ?`, userID); err != nil {
				return err
			}
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "user", entityID: userID, action: ActionUpdate,
			before: map[string]bool{"disabled": was}, after: map[string]bool{"disabled": disabled}})
	}))
}

// SetRoles replaces a user's roles.
func (s *Store) SetRoles(ctx context.Context, actorID, userID int64, roles []Role) error {
	if len(roles) == 0 {
		return assess.ValidationErrors{{Field: "roles", Message: "choose at least one role"}}
	}
	before, err := s.userRoles(ctx, userID)
	if err != nil {
		return wrapValidation("set roles", err)
	}
	return wrapValidation("set roles", s.inTx(ctx, func(tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx, `DELETE FROM user_roles WHERE user_id = ?`, userID); err != nil {
			return err
		}
		for _, r := range dedupRoles(roles) {
			if _, err := tx.ExecContext(ctx, `INSERT INTO user_roles (user_id, role) VALUES (?, ?)`, userID, string(r)); err != nil {
				return err
			}
		}
		return s.writeAudit(ctx, tx, auditRow{userID: actorID, entity: "user", entityID: userID, action: ActionUpdate,
			before: map[string]any{"roles": before}, after: map[string]any{"roles": dedupRoles(roles)}})
	}))
}

package records

import (
	"context"
	"database/sql"
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"net/url"
	"sort"
	"strconv"
	"strings"
	"time"

	_ "modernc.org/sqlite" // registers the "sqlite" driver
)

//go:embed migrations/*.sql
var migrationFS embed.FS

// Sentinel errors. Callers test them with errors.Is.
var (
	// ErrNotFound: no row with that id, case number or name.
	ErrNotFound = errors.New("records: not found")
	// ErrConflict: the row changed since it was read (a stale version), or a
	// unique value is taken.
	ErrConflict = errors.New("records: conflict")
	// ErrForbidden: the acting user lacks the role the change needs.
	ErrForbidden = errors.New("records: not allowed for this role")
)

// Store is the SQLite database of one centre. It is safe for concurrent use.
type Store struct {
	db         *sql.DB
	path       string
	now        func() time.Time
	bcryptCost int // for new password hashes; 0 = bcrypt.DefaultCost
}

// Options configure Open.
type Options struct {
	// Now is the clock; nil means time.Now. Tests and the demo inject theirs.
	Now func() time.Time
	// BcryptCost for new password hashes; 0 means bcrypt.DefaultCost.
	BcryptCost int
}

// DSN returns the connection string for a database file, with the pragmas
// every pooled connection needs: foreign keys, a busy timeout, WAL, and
// immediate transactions (without them concurrent read-then-write
// transactions fail with SQLITE_BUSY).
func DSN(path string) string {
	q := url.Values{}
	q.Add("_pragma", "foreign_keys(1)")
	q.Add("_pragma", "busy_timeout(10000)")
	q.Add("_pragma", "journal_mode(WAL)")
	q.Add("_pragma", "synchronous(NORMAL)")
	q.Set("_txlock", "immediate")
	return "file:" + path + "?" + q.Encode()
}

// Open opens (creating if needed) the database at path and applies every
// pending migration. path must be a file: ":memory:" gives each pooled
// connection its own empty database.
func Open(ctx context.Context, path string, opts Options) (*Store, error) {
	if path == "" || path == ":memory:" {
		return nil, fmt.Errorf("records: open: a database file path is required")
	}
	db, err := sql.Open("sqlite", DSN(path))
	if err != nil {
		return nil, fmt.Errorf("records: open %s: %w", path, err)
	}
	db.SetMaxOpenConns(8)
	s := &Store{db: db, path: path, now: opts.Now}
	if s.now == nil {
		s.now = time.Now
	}
	s.bcryptCost = opts.BcryptCost
	if err := s.migrate(ctx); err != nil {
		db.Close()
		return nil, err
	}
	return s, nil
}

// Close closes the database; a WAL checkpoint leaves the file self-contained.
func (s *Store) Close() error {
	_, _ = s.db.Exec("PRAGMA wal_checkpoint(TRUNCATE)")
	return s.db.Close()
}

// Path is the database file's path.
func (s *Store) Path() string { return s.path }

// DB exposes the handle for read-only reporting queries and tests.
func (s *Store) DB() *sql.DB { return s.db }

// Now is the store's clock.
func (s *Store) Now() time.Time { return s.now() }

type migration struct {
	version int
	name    string
	sql     string
}

func loadMigrations() ([]migration, error) {
	entries, err := fs.ReadDir(migrationFS, "migrations")
	if err != nil {
		return nil, err
	}
	var ms []migration
	for _, e := range entries {
		num, _, ok := strings.Cut(e.Name(), "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil {
			return nil, fmt.Errorf("records: migration %q: name must start with a number and _", e.Name())
		}
		b, err := migrationFS.ReadFile("migrations/" + e.Name())
		if err != nil {
			return nil, err
		}
		ms = append(ms, migration{v, e.Name(), string(b)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	for i := 1; i < len(ms); i++ {
		if ms[i].version == ms[i-1].version {
			return nil, fmt.Errorf("records: two migrations numbered %d", ms[i].version)
		}
	}
	return ms, nil
}

// migrate applies each pending migration once, in its own transaction, and
// records it in schema_migrations.
func (s *Store) migrate(ctx context.Context) error {
	if _, err := s.db.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`); err != nil {
		return fmt.Errorf("records: migrate: %w", err)
	}
	ms, err := loadMigrations()
	if err != nil {
		return err
	}
	for _, m := range ms {
		err := s.inTx(ctx, func(tx *sql.Tx) error {
			var n int
			if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM schema_migrations WHERE version = ?`, m.version).Scan(&n); err != nil {
				return err
			}
			if n > 0 {
				return nil
			}
			if _, err := tx.ExecContext(ctx, m.sql); err != nil {
				return err
			}
			_, err := tx.ExecContext(ctx, `INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)`,
				m.version, m.name, fmtTime(s.now()))
			return err
		})
		if err != nil {
			return fmt.Errorf("records: migration %s: %w", m.name, err)
		}
	}
	return nil
}

// inTx runs fn in one immediate transaction, committing when fn returns nil.
func (s *Store) inTx(ctx context.Context, fn func(tx *sql.Tx) error) error {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	if err := fn(tx); err != nil {
		_ = tx.Rollback()
		return err
	}
	return tx.Commit()
}

// Time formats: instants as RFC 3339 in UTC, calendar dates as YYYY-MM-DD.
const (
	timeLayout = time.RFC3339
	DateLayout = "2006-01-02"
)

func fmtTime(t time.Time) string { return t.UTC().Format(timeLayout) }

func parseTime(s string) time.Time {
	t, err := time.Parse(timeLayout, s)
	if err != nil {
		return time.Time{}
	}
	return t
}

func nullFloat(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

func floatPtr(n sql.NullFloat64) *float64 {
	if !n.Valid {
		return nil
	}
	v := n.Float64
	return &v
}

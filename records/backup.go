package records

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// Backup writes a consistent copy of the live database to dest with VACUUM
// INTO, which reads one snapshot while writers carry on. dest must not exist.
func (s *Store) Backup(ctx context.Context, dest string) error {
	if _, err := os.Stat(dest); err == nil {
		return fmt.Errorf("records: backup: %s already exists", dest)
	}
	if _, err := s.db.ExecContext(ctx, `VACUUM INTO ?`, dest); err != nil {
		return fmt.Errorf("records: backup to %s: %w", dest, err)
	}
	return nil
}

// CheckIntegrity opens the database file at path read-only and runs PRAGMA
// integrity_check; it returns nil only when SQLite answers "ok" and the file
// holds an Aloft schema.
func CheckIntegrity(ctx context.Context, path string) error {
	if _, err := os.Stat(path); err != nil {
		return fmt.Errorf("records: check %s: %w", path, err)
	}
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		return fmt.Errorf("records: check %s: %w", path, err)
	}
	defer db.Close()
	var res string
	if err := db.QueryRowContext(ctx, `PRAGMA integrity_check`).Scan(&res); err != nil {
		return fmt.Errorf("records: check %s: %w", path, err)
	}
	if res != "ok" {
		return fmt.Errorf("records: check %s: integrity check says %q", path, res)
	}
	var n int
	if err := db.QueryRowContext(ctx, `SELECT count(*) FROM sqlite_master WHERE name IN ('patients', 'audit_log', 'schema_migrations')`).Scan(&n); err != nil || n != 3 {
		return fmt.Errorf("records: check %s: not an Aloft database", path)
	}
	return nil
}

// ErrInUse: restore refuses to replace a database that a process has open.
var ErrInUse = errors.New("records: the database is in use (stop the server first)")

// Restore replaces the database at dest with the backup at src, after
// checking the backup's integrity. It refuses while dest is in use: a live
// server holds its WAL files, and an exclusive lock cannot be had.
func Restore(ctx context.Context, src, dest string) error {
	if err := CheckIntegrity(ctx, src); err != nil {
		return err
	}
	if _, err := os.Stat(dest); err == nil {
		if err := ensureUnused(ctx, dest); err != nil {
			return err
		}
	}
	tmp, err := os.CreateTemp(filepath.Dir(dest), ".restore-*")
	if err != nil {
		return fmt.Errorf("records: restore: %w", err)
	}
	defer os.Remove(tmp.Name())
	in, err := os.Open(src)
	if err != nil {
		tmp.Close()
		return fmt.Errorf("records: restore: %w", err)
	}
	_, err = io.Copy(tmp, in)
	in.Close()
	if err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("records: restore: %w", err)
	}
	for _, suffix := range []string{"-wal", "-shm"} {
		_ = os.Remove(dest + suffix)
	}
	if err := os.Rename(tmp.Name(), dest); err != nil {
		return fmt.Errorf("records: restore: %w", err)
	}
	return CheckIntegrity(ctx, dest)
}

// ensureUnused takes an exclusive lock on path briefly; another process with
// the database open (a server in WAL mode keeps a shared lock) makes it fail.
func ensureUnused(ctx context.Context, path string) error {
	db, err := sql.Open("sqlite", "file:"+path+"?_pragma=busy_timeout(0)")
	if err != nil {
		return fmt.Errorf("records: restore: %w", err)
	}
	defer db.Close()
	conn, err := db.Conn(ctx)
	if err != nil {
		return fmt.Errorf("records: restore: %w", err)
	}
	defer conn.Close()
	var mode string
	if err := conn.QueryRowContext(ctx, `PRAGMA journal_mode`).Scan(&mode); err != nil {
		return ErrInUse
	}
	if strings.EqualFold(mode, "wal") {
		// Leaving WAL mode needs exclusive access: it fails while a server is attached.
		if err := conn.QueryRowContext(ctx, `PRAGMA journal_mode=DELETE`).Scan(&mode); err != nil || !strings.EqualFold(mode, "delete") {
			return ErrInUse
		}
	}
	if _, err := conn.ExecContext(ctx, `BEGIN EXCLUSIVE`); err != nil {
		return ErrInUse
	}
	_, _ = conn.ExecContext(ctx, `ROLLBACK`)
	return nil
}

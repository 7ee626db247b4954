package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Backup writes a consistent copy of the live database to outPath with
// SQLite's VACUUM INTO, while the server keeps running: the copy is one
// read transaction's snapshot (WAL readers do not block writers, so writes
// go on meanwhile), compacted, and a single self-contained file (no -wal).
// outPath must not exist yet. The copy is checked with PRAGMA
// integrity_check before Backup returns.
func (s *Store) Backup(ctx context.Context, outPath string) error {
	const op = "store.Backup"
	if outPath == "" {
		return &Error{Code: EINVALID, Op: op, Message: "out: a backup file path is required"}
	}
	if _, err := os.Stat(outPath); err == nil {
		return &Error{Code: ECONFLICT, Op: op, Message: fmt.Sprintf("out: %s exists already; choose a new file name", outPath)}
	}
	// VACUUM INTO writes a new file, so it cannot run on the query_only
	// read pool; a dedicated connection keeps the single writer free.
	db, err := sql.Open("sqlite", dsn(s.path, false))
	if err != nil {
		return wrap(op, err)
	}
	defer db.Close()
	if _, err := db.ExecContext(ctx, "VACUUM INTO ?", outPath); err != nil {
		return wrap(op, fmt.Errorf("vacuum into %s: %w", outPath, err))
	}
	if err := checkDatabaseFile(ctx, outPath); err != nil {
		return wrap(op, err)
	}
	return nil
}

// checkDatabaseFile opens a database file read-only and runs
// integrity_check and a schema-version read on it.
func checkDatabaseFile(ctx context.Context, path string) error {
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro&_pragma=busy_timeout(5000)")
	if err != nil {
		return err
	}
	defer db.Close()
	var res string
	if err := db.QueryRowContext(ctx, "PRAGMA integrity_check").Scan(&res); err != nil {
		return fmt.Errorf("check %s: %w", path, err)
	}
	if res != "ok" {
		return fmt.Errorf("check %s: integrity_check says %q", path, res)
	}
	var v int
	if err := db.QueryRowContext(ctx, "SELECT coalesce(max(version), 0) FROM schema_migrations").Scan(&v); err != nil {
		return fmt.Errorf("check %s: not a phasecast database: %w", path, err)
	}
	ms, err := migrations()
	if err != nil {
		return err
	}
	if newest := ms[len(ms)-1].version; v > newest {
		return fmt.Errorf("check %s: schema version %d is newer than this program's %d", path, v, newest)
	}
	return nil
}

// Restore puts a backup in place of the database at dbPath. The procedure,
// which Restore follows and which works by hand too:
//
//  1. Stop the server (nothing may have dbPath open: Restore cannot tell).
//  2. Check the backup: PRAGMA integrity_check says "ok" and its schema is
//     not newer than this program's.
//  3. Copy the backup next to dbPath (same directory, so the final rename
//     is atomic) and fsync it.
//  4. Keep the old database as dbPath + ".before-restore" (with its -wal
//     and -shm files, which belong to it and must not be applied to the
//     backup), then rename the copy to dbPath.
//  5. Start the server; it migrates an older backup forward on Open.
//
// Restore refuses to run when dbPath + ".before-restore" exists, so that a
// second restore never overwrites the only copy of the old data.
func Restore(ctx context.Context, backupPath, dbPath string) error {
	const op = "store.Restore"
	if err := checkDatabaseFile(ctx, backupPath); err != nil {
		return &Error{Code: EINVALID, Op: op, Message: "the backup file is not a usable phasecast database", Err: err}
	}
	keep := dbPath + ".before-restore"
	if _, err := os.Stat(keep); err == nil {
		return &Error{Code: ECONFLICT, Op: op, Message: fmt.Sprintf("%s exists from an earlier restore; move it away first", keep)}
	}
	tmp, err := os.CreateTemp(filepath.Dir(dbPath), filepath.Base(dbPath)+".restore-*")
	if err != nil {
		return wrap(op, err)
	}
	defer os.Remove(tmp.Name()) // no-op after the rename
	if err := copyInto(tmp, backupPath); err != nil {
		tmp.Close()
		return wrap(op, err)
	}
	if err := tmp.Close(); err != nil {
		return wrap(op, err)
	}
	if _, err := os.Stat(dbPath); err == nil {
		if err := os.Rename(dbPath, keep); err != nil {
			return wrap(op, err)
		}
		for _, suffix := range []string{"-wal", "-shm"} {
			if err := os.Rename(dbPath+suffix, keep+suffix); err != nil && !errors.Is(err, os.ErrNotExist) {
				return wrap(op, err)
			}
		}
	}
	if err := os.Rename(tmp.Name(), dbPath); err != nil {
		return wrap(op, err)
	}
	return syncDir(filepath.Dir(dbPath))
}

func copyInto(dst *os.File, src string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	if _, err := io.Copy(dst, in); err != nil {
		return err
	}
	return dst.Sync()
}

// syncDir makes a rename in dir durable (best effort where directories
// cannot be opened for sync).
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return nil
	}
	defer d.Close()
	if err := d.Sync(); err != nil && !errors.Is(err, os.ErrInvalid) {
		return fmt.Errorf("sync %s: %w", dir, err)
	}
	return nil
}

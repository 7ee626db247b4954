package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"
	"time"

	"phasecast/store"
)

const backupSynopsis = `Take a consistent copy of a phasecast database while the server runs.

The copy is one snapshot (SQLite's VACUUM INTO): writes made meanwhile are
either wholly in it or not at all. It is checked with PRAGMA integrity_check
before the command reports success. --out must not exist yet.`

const restoreSynopsis = `Put a backup in place of a database. Stop the server first.

The backup is checked (integrity and schema version) and copied beside --db;
the old database is kept as --db FILE.before-restore (with its -wal and -shm
files), then the copy is renamed into place. Start the server afterwards: an
older backup is migrated forward on open. restore refuses to run when a
.before-restore file already exists, so that it never overwrites the only
copy of the old data.`

// runBackup is the backup command.
func runBackup(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("backup", backupSynopsis)
	db := fl.text("db", dbMeta, DefaultDBPath, "the live database: "+dbUsage)
	out := fl.text("out", "FILE", "", "the backup file to write (must not exist); required")
	asJSON := fl.boolean("json", `print one JSON object {"database", "backup"}`)
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	dbPath, err := dbFlag(db)
	if err != nil {
		return err
	}
	outPath, err := requiredPath(out)
	if err != nil {
		return err
	}
	if store.IsPostgresURL(dbPath) {
		return pgToolAdvice(stdout, "backup", dbPath, outPath)
	}
	// Opening a missing file would make an empty database at the mistyped
	// path and back that up.
	if err := existingDB(db, dbPath); err != nil {
		return err
	}
	st, err := store.Open(ctx, dbPath, now)
	if err != nil {
		return fmt.Errorf("open database %s: %w", dbPath, err)
	}
	defer st.Close()
	if err := st.Backup(ctx, outPath); err != nil {
		return fmt.Errorf("backup of %s: %w", dbPath, err)
	}
	if *asJSON {
		return writeJSON(stdout, map[string]string{"database": dbPath, "backup": outPath})
	}
	_, err = fmt.Fprintf(stdout, "phasecast: backup of %s written to %s (integrity checked)\n", dbPath, outPath)
	return err
}

// runRestore is the restore command.
func runRestore(ctx context.Context, _ func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("restore", restoreSynopsis)
	from := fl.text("from", "FILE", "", "the backup file to restore; required")
	db := fl.text("db", dbMeta, DefaultDBPath, "the database to replace (the server must be stopped): "+dbUsage)
	asJSON := fl.boolean("json", `print one JSON object {"database", "restored_from", "kept_as"} (kept_as empty when there was no database)`)
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	fromPath, err := requiredPath(from)
	if err != nil {
		return err
	}
	dbPath, err := dbFlag(db)
	if err != nil {
		return err
	}
	if store.IsPostgresURL(dbPath) {
		return pgToolAdvice(stdout, "restore", dbPath, fromPath)
	}
	kept := ""
	if _, err := os.Stat(dbPath); err == nil {
		kept = dbPath + ".before-restore"
	}
	if err := store.Restore(ctx, fromPath, dbPath); err != nil {
		return fmt.Errorf("restore %s into %s: %w", fromPath, dbPath, err)
	}
	if *asJSON {
		return writeJSON(stdout, map[string]string{"database": dbPath, "restored_from": fromPath, "kept_as": kept})
	}
	if kept == "" {
		_, err = fmt.Fprintf(stdout, "phasecast: %s restored into %s (there was no previous database)\n", fromPath, dbPath)
		return err
	}
	_, err = fmt.Fprintf(stdout, "phasecast: %s restored into %s; the previous database is kept as %s\n", fromPath, dbPath, kept)
	return err
}

// requiredPath returns a required file-path flag's value.
func requiredPath(v *textValue) (string, error) {
	if !v.set {
		return "", missing(v)
	}
	return pathFlag(v, "")
}

// pathFlag returns a file-path flag's value, or def when it was not given.
func pathFlag(v *textValue, def string) (string, error) {
	if !v.set {
		return def, nil
	}
	if strings.TrimSpace(v.value) == "" {
		return "", fieldError(v, "empty", "a file path")
	}
	return v.value, nil
}

// pgToolAdvice is backup's and restore's answer on a PostgreSQL database:
// phasecast does not copy a server's database itself, PostgreSQL's own
// pg_dump and pg_restore do (consistently, while the servers run, in the
// custom format that pg_restore reads). The commands are given for the
// URL with its password hidden; they take the password from PGPASSWORD or
// ~/.pgpass, or from the URL as given to --db.
func pgToolAdvice(stdout io.Writer, cmd, db, file string) error {
	u := store.RedactURL(db)
	fmt.Fprintf(stdout, "PostgreSQL's own tools copy a PostgreSQL database (password as in --db, or in PGPASSWORD or ~/.pgpass):\n")
	fmt.Fprintf(stdout, "  backup (the servers may keep running):\n    pg_dump --format=custom --file=%s --dbname='%s'\n", shellWord(file), u)
	fmt.Fprintf(stdout, "  restore (stop every phasecast server first):\n    pg_restore --clean --if-exists --no-owner --single-transaction --dbname='%s' %s\n", u, shellWord(file))
	fmt.Fprintf(stdout, "To move one team between SQLite and PostgreSQL: phasecast export-team and import-team.\n")
	return usageErrorf("%s: --db %s is a PostgreSQL database; phasecast %s copies only SQLite files: use the pg_dump/pg_restore commands above", cmd, u, cmd)
}

// shellWord quotes s for a POSIX shell when it holds anything but plain
// path characters.
func shellWord(s string) string {
	plain := s != ""
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("/._-+=:,@", r)) {
			plain = false
			break
		}
	}
	if plain {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"phasecast/store"
)

const exportTeamSynopsis = `Write one whole team as a JSON document, to move it to another database.

The document holds the team, its members (by email), sites, target lists
with every target's ephemeris history and timings, runs, saved plans and
observations, read in one snapshot while the server runs. Share links,
invitations and the audit log stay behind. import-team reads it into a
SQLite file or a PostgreSQL database of the same phasecast version.`

const importTeamSynopsis = `Make a team anew from a document written by export-team.

All or nothing, in one transaction. Members are matched to accounts by
email; an account missing here is made without a password (it signs in by
a one-time link: phasecast serve --signin-link EMAIL). The team gets new
ids; the document's own are only used to join its rows.`

// runExportTeam is the export-team command.
func runExportTeam(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("export-team", exportTeamSynopsis)
	db := fl.text("db", dbMeta, DefaultDBPath, dbUsage)
	team := fl.text("team", "ID", "", "the team's id (the number in its /teams/ID address); required")
	out := fl.text("out", "FILE", "", "the document to write (must not exist), or - for standard output; required")
	asJSON := fl.boolean("json", `print one JSON object {"database", "team_id", "file"} (not with --out -)`)
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	dbName, err := dbFlag(db)
	if err != nil {
		return err
	}
	if !team.set {
		return missing(team)
	}
	teamID, err := strconv.ParseInt(team.value, 10, 64)
	if err != nil || teamID < 1 {
		return fieldError(team, "not a team id", "a whole number from 1")
	}
	outPath, err := requiredPath(out)
	if err != nil {
		return err
	}
	if outPath == "-" && *asJSON {
		return usageErrorf("--json describes a written file; with --out - the document itself is the output")
	}
	if outPath != "-" {
		if _, err := os.Stat(outPath); err == nil {
			return fieldError(out, "exists already", "a new file name")
		}
	}
	if err := existingDB(db, dbName); err != nil {
		return err
	}
	st, err := store.Open(ctx, dbName, now)
	if err != nil {
		return fmt.Errorf("open database %s: %w", store.RedactURL(dbName), err)
	}
	defer st.Close()
	if outPath == "-" {
		return st.ExportTeam(ctx, teamID, stdout)
	}
	// Written beside the target and renamed into place, so that a failure
	// never leaves half a document under the asked name.
	tmp, err := os.CreateTemp(filepath.Dir(outPath), filepath.Base(outPath)+".part-*")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name()) // no-op after the rename
	if err := st.ExportTeam(ctx, teamID, tmp); err != nil {
		tmp.Close()
		return fmt.Errorf("export team %d: %w", teamID, err)
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Rename(tmp.Name(), outPath); err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, map[string]any{"database": store.RedactURL(dbName), "team_id": teamID, "file": outPath})
	}
	_, err = fmt.Fprintf(stdout, "phasecast: team %d of %s written to %s\n", teamID, store.RedactURL(dbName), outPath)
	return err
}

// runImportTeam is the import-team command.
func runImportTeam(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("import-team", importTeamSynopsis)
	db := fl.text("db", dbMeta, DefaultDBPath, dbUsage+"; a file is made when missing")
	from := fl.text("from", "FILE", "", "the document written by export-team; required")
	asJSON := fl.boolean("json", `print one JSON object {"team_id", "name"}`)
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	dbName, err := dbFlag(db)
	if err != nil {
		return err
	}
	fromPath, err := requiredPath(from)
	if err != nil {
		return err
	}
	f, err := os.Open(fromPath)
	if err != nil {
		return fieldError(from, "cannot be read", "a document written by export-team")
	}
	defer f.Close()
	st, err := store.Open(ctx, dbName, now)
	if err != nil {
		return fmt.Errorf("open database %s: %w", store.RedactURL(dbName), err)
	}
	defer st.Close()
	tm, err := st.ImportTeam(ctx, f)
	if err != nil {
		return fmt.Errorf("import %s: %w", fromPath, err)
	}
	if *asJSON {
		return writeJSON(stdout, map[string]any{"team_id": tm.ID, "name": tm.Name})
	}
	_, err = fmt.Fprintf(stdout, "phasecast: team %q imported into %s as team %d\n", tm.Name, store.RedactURL(dbName), tm.ID)
	return err
}

// existingDB refuses a SQLite file that does not exist: opening it would
// make an empty database at a mistyped path.
func existingDB(v *textValue, db string) error {
	if store.IsPostgresURL(db) {
		return nil
	}
	if fi, err := os.Stat(db); err != nil || !fi.Mode().IsRegular() {
		return fieldError(v, "no such database file", "the path of an existing phasecast database (the file serve uses), or a postgres:// URL")
	}
	return nil
}

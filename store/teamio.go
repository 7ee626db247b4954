package store

import (
	"cmp"
	"context"
	"database/sql"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
)

// TeamFormatTag is the "format" of a whole-team document (ExportTeam).
const TeamFormatTag = "phasecast-team"

// TeamDoc is a whole team as JSON, to move it from one database to another
// (SQLite to PostgreSQL or back): the team, its members (by email), its
// sites, lists, targets with their whole ephemeris history and timings,
// runs, saved plans and observations. Rows are kept column by column as
// stored; ids are the source's and are renumbered on import. Share links
// and invitations are not moved (their secrets are one-time; make new
// ones), nor is the audit log (it stays with the source).
type TeamDoc struct {
	Format string        `json:"format"`
	Schema int           `json:"schema"` // the source's schema version; import needs the same
	Engine string        `json:"engine"` // the source's engine, for the record
	Team   teamRow       `json:"team"`
	Users  []teamDocUser `json:"users"` // everyone the rows refer to
	// Tables holds the rows of each moved table, in id order, each row a
	// column → value map (bytes as base64 text).
	Tables map[string][]teamRow `json:"tables"`
}

type teamRow = map[string]any

type teamDocUser struct {
	ID    int64  `json:"id"`
	Email string `json:"email"`
	Name  string `json:"name"`
}

// teamTable is one table moved with a team: how to select the team's rows
// and which columns refer to other moved rows (renumbered on import) or to
// users (matched by email on import).
type teamTable struct {
	name  string
	where string            // selects the team's rows; one '?' = the team id
	refs  map[string]string // column → table whose (new) id it holds
	users []string          // columns holding a user id
	noID  bool              // no id column of its own (memberships)
}

// teamTables are the moved tables, parents before children. A table added
// later that refers to a team's rows must be listed here or in
// teamTablesLeft (TestTeamTablesCoverEveryReference enforces that).
var teamTables = []teamTable{
	{name: "memberships", where: "team_id = ?", refs: map[string]string{"team_id": "teams"}, users: []string{"user_id"}, noID: true},
	{name: "sites", where: "team_id = ?", refs: map[string]string{"team_id": "teams"}},
	{name: "target_lists", where: "team_id = ?", refs: map[string]string{"team_id": "teams"}},
	{name: "targets", where: "list_id IN (SELECT id FROM target_lists WHERE team_id = ?)", refs: map[string]string{"list_id": "target_lists"}},
	{name: "ephemerides", where: "target_id IN (SELECT t.id FROM targets t JOIN target_lists l ON l.id = t.list_id WHERE l.team_id = ?)",
		refs: map[string]string{"target_id": "targets"}, users: []string{"created_by"}},
	{name: "timings", where: "target_id IN (SELECT t.id FROM targets t JOIN target_lists l ON l.id = t.list_id WHERE l.team_id = ?)",
		refs: map[string]string{"target_id": "targets"}, users: []string{"created_by"}},
	{name: "runs", where: "team_id = ?", refs: map[string]string{"team_id": "teams", "site_id": "sites", "list_id": "target_lists"}},
	{name: "saved_plans", where: "run_id IN (SELECT id FROM runs WHERE team_id = ?)", refs: map[string]string{"run_id": "runs"}, users: []string{"created_by"}},
	{name: "observations", where: "target_id IN (SELECT t.id FROM targets t JOIN target_lists l ON l.id = t.list_id WHERE l.team_id = ?)",
		refs: map[string]string{"target_id": "targets", "run_id": "runs"}, users: []string{"created_by"}},
}

// teamTablesLeft are the tables that refer to a team's rows and are not
// moved, with the reason in TeamDoc's comment.
var teamTablesLeft = []string{"share_links", "invitations"}

// colKind is how a column's values are kept: integer, real, text or bytes.
type colKind byte

const (
	kInt   colKind = 'i'
	kReal  colKind = 'f'
	kText  colKind = 's'
	kBytes colKind = 'b'
)

// kindOf maps a driver's column type name to a colKind: SQLite reports the
// declared type (INTEGER, REAL, TEXT, BLOB), PostgreSQL its own (INT8,
// FLOAT8, TEXT, BYTEA).
func kindOf(typ string) (colKind, error) {
	switch strings.ToUpper(typ) {
	case "INTEGER", "INT8", "INT4", "BIGINT":
		return kInt, nil
	case "REAL", "FLOAT8", "DOUBLE PRECISION":
		return kReal, nil
	case "TEXT", "VARCHAR":
		return kText, nil
	case "BLOB", "BYTEA":
		return kBytes, nil
	}
	return 0, fmt.Errorf("column type %q is not one a team document can hold", typ)
}

// columnsOf returns the columns of table and their kinds, as the engine
// reports them.
func columnsOf(t *txn, table string) ([]string, []colKind, error) {
	rows, err := t.tx.QueryContext(t.ctx, "SELECT * FROM "+table+" WHERE 1 = 0")
	if err != nil {
		return nil, nil, fmt.Errorf("columns of %s: %w", table, err)
	}
	defer rows.Close()
	cts, err := rows.ColumnTypes()
	if err != nil {
		return nil, nil, fmt.Errorf("columns of %s: %w", table, err)
	}
	names := make([]string, len(cts))
	kinds := make([]colKind, len(cts))
	for i, ct := range cts {
		names[i] = ct.Name()
		if kinds[i], err = kindOf(ct.DatabaseTypeName()); err != nil {
			return nil, nil, fmt.Errorf("%s.%s: %w", table, ct.Name(), err)
		}
	}
	return names, kinds, rows.Err()
}

// ExportTeam writes team teamID as one JSON document (TeamDoc), read in
// one snapshot. It is an operator's command (the CLI's export-team on the
// database file or URL), like SeedDemo: no actor, no authorization.
func (s *Store) ExportTeam(ctx context.Context, teamID int64, w io.Writer) error {
	const op = "store.ExportTeam"
	t, err := s.beginRead(ctx, Anonymous())
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	doc, err := exportTeam(t, teamID)
	if err != nil {
		return wrap(op, err)
	}
	if err := commit(t, op); err != nil {
		return err
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	if err := enc.Encode(doc); err != nil {
		return wrap(op, fmt.Errorf("write team document: %w", err))
	}
	return nil
}

func exportTeam(t *txn, teamID int64) (TeamDoc, error) {
	var schema int
	if err := t.queryRow("SELECT coalesce(max(version), 0) FROM schema_migrations").Scan(&schema); err != nil {
		return TeamDoc{}, err
	}
	doc := TeamDoc{Format: TeamFormatTag, Schema: schema, Engine: t.d.name(), Tables: map[string][]teamRow{}}
	teams, err := selectRows(t, "teams", "id = ?", teamID)
	if err != nil {
		return TeamDoc{}, err
	}
	if len(teams) != 1 {
		return TeamDoc{}, errNotFound("team", teamID)
	}
	doc.Team = teams[0]
	users := map[int64]bool{}
	for _, tt := range teamTables {
		rows, err := selectRows(t, tt.name, tt.where, teamID)
		if err != nil {
			return TeamDoc{}, err
		}
		for _, r := range rows {
			for _, c := range tt.users {
				if id, ok := r[c].(int64); ok {
					users[id] = true
				}
			}
		}
		doc.Tables[tt.name] = rows
	}
	for id := range users {
		var u teamDocUser
		err := t.queryRow("SELECT id, email, name FROM users WHERE id = ?", id).Scan(&u.ID, &u.Email, &u.Name)
		if err != nil {
			return TeamDoc{}, fmt.Errorf("user %d: %w", id, err)
		}
		doc.Users = append(doc.Users, u)
	}
	slices.SortFunc(doc.Users, func(a, b teamDocUser) int { return cmp.Compare(a.ID, b.ID) })
	return doc, nil
}

// selectRows reads the rows of table that where selects, in key order, as
// column → value maps (int64, float64, string, []byte or nil).
func selectRows(t *txn, table, where string, arg any) ([]teamRow, error) {
	names, kinds, err := columnsOf(t, table)
	if err != nil {
		return nil, err
	}
	order := "id"
	if names[0] != "id" {
		order = strings.Join(names[:2], ", ")
	}
	rows, err := t.query("SELECT "+strings.Join(names, ", ")+" FROM "+table+" WHERE "+where+" ORDER BY "+order, arg)
	if err != nil {
		return nil, fmt.Errorf("read %s: %w", table, err)
	}
	defer rows.Close()
	var out []teamRow
	for rows.Next() {
		vals := make([]any, len(names))
		ptrs := make([]any, len(names))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			return nil, fmt.Errorf("read %s: %w", table, err)
		}
		r := teamRow{}
		for i, v := range vals {
			if r[names[i]], err = normValue(v, kinds[i]); err != nil {
				return nil, fmt.Errorf("read %s.%s: %w", table, names[i], err)
			}
		}
		out = append(out, r)
	}
	return out, rows.Err()
}

// normValue gives a scanned value the Go type of its column's kind.
func normValue(v any, k colKind) (any, error) {
	if v == nil {
		return nil, nil
	}
	switch k {
	case kInt:
		if x, ok := v.(int64); ok {
			return x, nil
		}
	case kReal:
		switch x := v.(type) {
		case float64:
			return x, nil
		case int64:
			return float64(x), nil
		}
	case kText:
		switch x := v.(type) {
		case string:
			return x, nil
		case []byte:
			return string(x), nil
		}
	case kBytes:
		if x, ok := v.([]byte); ok {
			return append([]byte(nil), x...), nil
		}
	}
	return nil, fmt.Errorf("value of type %T", v)
}

// ImportTeam reads a team document (ExportTeam) and makes the team anew in
// this database, all or nothing, in one transaction: members are matched
// to accounts by email, and accounts missing here are made without a
// password (they sign in by a link an operator makes, as on a first
// start). The document must come from the same schema version. Like
// ExportTeam it is an operator's command.
func (s *Store) ImportTeam(ctx context.Context, r io.Reader) (Team, error) {
	const op = "store.ImportTeam"
	var doc TeamDoc
	dec := json.NewDecoder(r)
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		return Team{}, &Error{Code: EINVALID, Op: op, Message: fmt.Sprintf("the team document is not valid JSON: %v", err)}
	}
	if doc.Format != TeamFormatTag {
		return Team{}, &Error{Code: EINVALID, Op: op, Message: fmt.Sprintf("format: %q is not accepted; accepted: %q (a document written by export-team)", doc.Format, TeamFormatTag)}
	}
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return Team{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	tm, err := importTeam(t, doc)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	return tm, commit(t, op)
}

func importTeam(t *txn, doc TeamDoc) (Team, error) {
	var schema int
	if err := t.queryRow("SELECT coalesce(max(version), 0) FROM schema_migrations").Scan(&schema); err != nil {
		return Team{}, err
	}
	if doc.Schema != schema {
		return Team{}, errInvalid("schema: %d is not accepted; accepted: %d, this database's schema (export and import with the same phasecast version)", doc.Schema, schema)
	}
	for name := range doc.Tables {
		if !knownTeamTable(name) {
			return Team{}, errInvalid("tables: %q is not accepted; accepted: %s", name, teamTableNames())
		}
	}
	users := map[int64]int64{} // source id → id here
	for i, u := range doc.Users {
		id, err := userForImport(t, u)
		if err != nil {
			return Team{}, fmt.Errorf("users[%d] (%s): %w", i, u.Email, err)
		}
		users[u.ID] = id
	}
	ids := map[string]map[int64]int64{} // table → source id → id here
	teamID, err := insertRow(t, "teams", doc.Team, teamTable{name: "teams"}, ids, users, "team")
	if err != nil {
		return Team{}, err
	}
	for _, tt := range teamTables {
		for i, r := range doc.Tables[tt.name] {
			if _, err := insertRow(t, tt.name, r, tt, ids, users, fmt.Sprintf("tables.%s[%d]", tt.name, i)); err != nil {
				return Team{}, err
			}
		}
	}
	tm, err := getTeam(t, teamID)
	if err != nil {
		return Team{}, err
	}
	if err := t.audit(teamID, EntTeam, teamID, ActCreate, nil, tm); err != nil {
		return Team{}, err
	}
	return tm, nil
}

func knownTeamTable(name string) bool {
	for _, tt := range teamTables {
		if tt.name == name {
			return true
		}
	}
	return false
}

func teamTableNames() string {
	var ns []string
	for _, tt := range teamTables {
		ns = append(ns, tt.name)
	}
	return strings.Join(ns, ", ")
}

// userForImport returns the id here of the account with u's email, making
// it (without a password) when there is none.
func userForImport(t *txn, u teamDocUser) (int64, error) {
	var id int64
	err := t.queryRow("SELECT id FROM users WHERE email = ?", u.Email).Scan(&id)
	if err == nil {
		return id, nil
	}
	if !errors.Is(err, sql.ErrNoRows) {
		return 0, err
	}
	nu, _, err := prepareUser(PasswordParams{}, NewUser{Email: u.Email, Name: u.Name}) // no password: nothing is hashed
	if err != nil {
		return 0, err
	}
	made, err := createUser(t, nu, "")
	if err != nil {
		return 0, err
	}
	return made.ID, nil
}

// insertRow inserts one document row into table: its own id is dropped
// (the engine gives a new one, remembered in ids), references to moved
// rows and to users are renumbered, every other column is taken as it is
// after a check of its kind. where names the row in messages.
func insertRow(t *txn, table string, r teamRow, tt teamTable, ids map[string]map[int64]int64, users map[int64]int64, where string) (int64, error) {
	names, kinds, err := columnsOf(t, table)
	if err != nil {
		return 0, err
	}
	for c := range r {
		if !slices.Contains(names, c) {
			return 0, errInvalid("%s.%s: not a column of %s here", where, c, table)
		}
	}
	var cols []string
	var args []any
	var srcID int64
	for i, c := range names {
		raw, ok := r[c]
		if !ok {
			return 0, errInvalid("%s: column %s is missing", where, c)
		}
		v, err := docValue(raw, kinds[i])
		if err != nil {
			return 0, errInvalid("%s.%s: %v", where, c, err)
		}
		if c == "id" && !tt.noID {
			id, ok := v.(int64)
			if !ok {
				return 0, errInvalid("%s.id: an integer id is required", where)
			}
			srcID = id
			continue
		}
		if ref, ok := tt.refs[c]; ok && v != nil {
			src, _ := v.(int64)
			if ref == "teams" {
				if len(ids["teams"]) != 1 {
					return 0, errInvalid("%s.%s: the team comes first", where, c)
				}
				for _, here := range ids["teams"] {
					v = here
				}
			} else if here, ok := ids[ref][src]; ok {
				v = here
			} else {
				return 0, errInvalid("%s.%s: %d is not a row of %s in the document", where, c, src, ref)
			}
		}
		if slices.Contains(tt.users, c) && v != nil {
			src, _ := v.(int64)
			here, ok := users[src]
			if !ok {
				return 0, errInvalid("%s.%s: user %d is not in the document's users", where, c, src)
			}
			v = here
		}
		cols = append(cols, c)
		args = append(args, v)
	}
	q := "INSERT INTO " + table + " (" + strings.Join(cols, ", ") + ") VALUES (" + strings.TrimSuffix(strings.Repeat("?, ", len(cols)), ", ") + ")"
	if tt.noID {
		_, err := t.exec(q, args...)
		return 0, wrapRow(where, err)
	}
	id, err := t.insertID(q, args...)
	if err != nil {
		return 0, wrapRow(where, err)
	}
	if ids[table] == nil {
		ids[table] = map[int64]int64{}
	}
	ids[table][srcID] = id
	return id, nil
}

// wrapRow names the document row in a constraint failure.
func wrapRow(where string, err error) error {
	if err == nil {
		return nil
	}
	e := wrap("", err)
	var se *Error
	if errors.As(e, &se) && se.Code != EINTERNAL {
		return &Error{Code: se.Code, Message: where + ": " + se.Message, Err: err}
	}
	return fmt.Errorf("%s: %w", where, err)
}

// docValue converts a decoded JSON value (json.Number, string, nil) to the
// Go value of the column's kind.
func docValue(raw any, k colKind) (any, error) {
	if raw == nil {
		return nil, nil
	}
	switch k {
	case kInt:
		if n, ok := raw.(json.Number); ok {
			if i, err := strconv.ParseInt(n.String(), 10, 64); err == nil {
				return i, nil
			}
		}
		return nil, fmt.Errorf("%v is not accepted; accepted: an integer", raw)
	case kReal:
		if n, ok := raw.(json.Number); ok {
			if f, err := n.Float64(); err == nil {
				return f, nil
			}
		}
		return nil, fmt.Errorf("%v is not accepted; accepted: a number", raw)
	case kText:
		if s, ok := raw.(string); ok {
			return s, nil
		}
		return nil, fmt.Errorf("%v is not accepted; accepted: text", raw)
	case kBytes:
		if s, ok := raw.(string); ok {
			b, err := base64.StdEncoding.DecodeString(s)
			if err == nil {
				return b, nil
			}
		}
		return nil, fmt.Errorf("%v is not accepted; accepted: bytes as base64 text", raw)
	}
	return nil, fmt.Errorf("unknown column kind")
}

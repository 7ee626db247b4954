package store

import (
	"bytes"
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"phasecast/store/testdb"
)

var teamIOClock = func() time.Time { return time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC) }

func openForTeamIO(t *testing.T, db string) *Store {
	t.Helper()
	s, err := Open(context.Background(), db, teamIOClock, WithPasswordParams(PasswordParams{Time: 1, MemoryKiB: 1024, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

func exportDoc(t *testing.T, s *Store, teamID int64) (TeamDoc, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := s.ExportTeam(context.Background(), teamID, &buf); err != nil {
		t.Fatal(err)
	}
	var doc TeamDoc
	dec := json.NewDecoder(bytes.NewReader(buf.Bytes()))
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		t.Fatal(err)
	}
	return doc, buf.Bytes()
}

// normalTeam is a team document without its ids: each row's id becomes its
// place in its table, each reference the place of the row it refers to,
// each user reference the user's email. Two databases holding the same
// team give the same normalTeam.
func normalTeam(t *testing.T, doc TeamDoc) map[string][]map[string]string {
	t.Helper()
	emails := map[string]string{}
	for _, u := range doc.Users {
		emails[fmt.Sprint(u.ID)] = u.Email
	}
	place := map[string]map[string]int{}
	for _, tt := range teamTables {
		place[tt.name] = map[string]int{}
		for i, r := range doc.Tables[tt.name] {
			place[tt.name][fmt.Sprint(r["id"])] = i
		}
	}
	out := map[string][]map[string]string{}
	for _, tt := range append([]teamTable{{name: "teams"}}, teamTables...) {
		rows := doc.Tables[tt.name]
		if tt.name == "teams" {
			rows = []teamRow{doc.Team}
		}
		for _, r := range rows {
			n := map[string]string{}
			for c, v := range r {
				s := fmt.Sprint(v)
				switch {
				case c == "id" && !tt.noID:
					continue
				case tt.refs[c] == "teams":
					s = "the team"
				case tt.refs[c] != "" && v != nil:
					s = fmt.Sprintf("%s#%d", tt.refs[c], place[tt.refs[c]][s])
				case slices.Contains(tt.users, c) && v != nil:
					s = emails[s]
				}
				n[c] = s
			}
			out[tt.name] = append(out[tt.name], n)
		}
	}
	return out
}

// TestTeamMovesBetweenDatabases: the demo team exported from the engine
// under test, imported into a fresh SQLite file, exported again and
// imported into a fresh database of the engine under test (PostgreSQL when
// PHASECAST_TEST_PG is set: so SQLite → PostgreSQL and back) is the same
// team every time, row for row.
func TestTeamMovesBetweenDatabases(t *testing.T) {
	ctx := context.Background()
	src := openForTeamIO(t, testdb.Target(t, "src.db"))
	info, err := src.SeedDemo(ctx, teamIOClock())
	if err != nil {
		t.Fatal(err)
	}
	doc1, raw1 := exportDoc(t, src, info.Team.ID)
	if len(doc1.Tables["targets"]) != len(info.Targets) || len(doc1.Tables["ephemerides"]) < len(info.Targets) ||
		len(doc1.Tables["memberships"]) != 3 || len(doc1.Tables["runs"]) == 0 || len(doc1.Users) != 3 {
		t.Fatalf("export: %d targets, %d ephemerides, %d members, %d runs, %d users; the demo has %d targets, 3 members, a run",
			len(doc1.Tables["targets"]), len(doc1.Tables["ephemerides"]), len(doc1.Tables["memberships"]),
			len(doc1.Tables["runs"]), len(doc1.Users), len(info.Targets))
	}
	want := normalTeam(t, doc1)

	lite := openForTeamIO(t, filepath.Join(t.TempDir(), "lite.db"))
	tm2, err := lite.ImportTeam(ctx, bytes.NewReader(raw1))
	if err != nil {
		t.Fatalf("import into SQLite: %v", err)
	}
	doc2, raw2 := exportDoc(t, lite, tm2.ID)
	if got := normalTeam(t, doc2); !reflect.DeepEqual(got, want) {
		t.Errorf("after %s → sqlite the team differs:\n got %v\nwant %v", doc1.Engine, got, want)
	}

	back := openForTeamIO(t, testdb.Target(t, "back.db"))
	tm3, err := back.ImportTeam(ctx, bytes.NewReader(raw2))
	if err != nil {
		t.Fatalf("import into %s: %v", back.Engine(), err)
	}
	doc3, _ := exportDoc(t, back, tm3.ID)
	if got := normalTeam(t, doc3); !reflect.DeepEqual(got, want) {
		t.Errorf("after sqlite → %s the team differs", back.Engine())
	}
	// The members arrive as accounts without a password that sign in by a
	// link, and the moved team is theirs.
	link, err := back.CreateSignInLink(ctx, info.Owner.Email, time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	_, sess, err := back.RedeemSignInLink(ctx, link)
	if err != nil {
		t.Fatal(err)
	}
	a, err := back.SessionActor(ctx, sess)
	if err != nil {
		t.Fatal(err)
	}
	lists, err := back.ListLists(ctx, a, tm3.ID)
	if err != nil || len(lists) != len(doc1.Tables["target_lists"]) {
		t.Errorf("the owner sees %d lists of the moved team (%v), want %d", len(lists), err, len(doc1.Tables["target_lists"]))
	}
}

// TestTeamImportIsAllOrNothing: a document with one bad row leaves the
// database as it was, and the message names the row and the column.
func TestTeamImportIsAllOrNothing(t *testing.T) {
	ctx := context.Background()
	src := openForTeamIO(t, testdb.Target(t, "src.db"))
	info, err := src.SeedDemo(ctx, teamIOClock())
	if err != nil {
		t.Fatal(err)
	}
	_, raw := exportDoc(t, src, info.Team.ID)
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	targets := doc["tables"].(map[string]any)["targets"].([]any)
	last := len(targets) - 1
	targets[last].(map[string]any)["priority"] = 9 // the schema accepts 1..5
	bad, _ := json.Marshal(doc)

	dst := openForTeamIO(t, testdb.Target(t, "dst.db"))
	count := func() (n int) {
		if err := dst.rdb.QueryRow("SELECT (SELECT count(*) FROM teams) + (SELECT count(*) FROM users) + (SELECT count(*) FROM targets)").Scan(&n); err != nil {
			t.Fatal(err)
		}
		return n
	}
	before := count()
	_, err = dst.ImportTeam(ctx, bytes.NewReader(bad))
	if ErrorCode(err) != EINVALID || !strings.Contains(err.Error(), fmt.Sprintf("tables.targets[%d]", last)) {
		t.Errorf("import of a bad row: %v; want EINVALID naming tables.targets[%d]", err, last)
	}
	if after := count(); after != before {
		t.Errorf("a failed import left %d rows (teams+users+targets) behind", after-before)
	}
	for _, c := range []struct{ doc, want string }{
		{`{"format":"something-else"}`, "format"},
		{`{"format":"phasecast-team","schema":1}`, "schema"},
		{`not json`, "not valid JSON"},
	} {
		if _, err := dst.ImportTeam(ctx, strings.NewReader(c.doc)); ErrorCode(err) != EINVALID || !strings.Contains(err.Error(), c.want) {
			t.Errorf("import of %s: %v; want EINVALID about %s", c.doc, err, c.want)
		}
	}
}

// TestTeamTablesCoverEveryReference: every foreign key to a team's rows is
// in teamTables (renumbered on import) or teamTablesLeft, and every
// reference of a moved table is renumbered or matched to a user, so that a
// table or column added later is not left out of the team document
// silently. It reads SQLite's schema, which the PostgreSQL twins mirror.
func TestTeamTablesCoverEveryReference(t *testing.T) {
	s := openForTeamIO(t, filepath.Join(t.TempDir(), "fk.db"))
	db := s.rdb
	moved := map[string]teamTable{"teams": {name: "teams"}}
	for _, tt := range teamTables {
		moved[tt.name] = tt
	}
	tables := queryStrings(t, db, "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'")
	for _, table := range tables {
		rows, err := db.Query(`SELECT "table", "from" FROM pragma_foreign_key_list(?)`, table)
		if err != nil {
			t.Fatal(err)
		}
		for rows.Next() {
			var to, from string
			if err := rows.Scan(&to, &from); err != nil {
				t.Fatal(err)
			}
			tt, isMoved := moved[table]
			switch {
			case isMoved && to == "users":
				if !slices.Contains(tt.users, from) {
					t.Errorf("%s.%s refers to users but is not in its teamTables users", table, from)
				}
			case isMoved:
				if tt.refs[from] != to {
					t.Errorf("%s.%s refers to %s but teamTables does not renumber it", table, from, to)
				}
			case to != "users" && moved[to].name != "" && !slices.Contains(teamTablesLeft, table):
				t.Errorf("%s refers to %s (a team's rows) but is neither in teamTables nor in teamTablesLeft", table, to)
			}
		}
		rows.Close()
	}
}

func queryStrings(t *testing.T, db *sql.DB, q string) []string {
	t.Helper()
	rows, err := db.Query(q)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var s string
		if err := rows.Scan(&s); err != nil {
			t.Fatal(err)
		}
		out = append(out, s)
	}
	return out
}

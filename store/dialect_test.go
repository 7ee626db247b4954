package store_test

import (
	"os"
	"slices"
	"strings"
	"testing"

	"phasecast/store/testdb"
)

// TestEveryMigrationHasItsPostgresTwin fails when store/migrations and
// store/migrations/postgres differ in their NNNN_name.sql files, so that a
// SQLite migration added without its PostgreSQL twin (or the reverse) fails
// CI.
func TestEveryMigrationHasItsPostgresTwin(t *testing.T) {
	names := func(dir string) []string {
		es, err := os.ReadDir(dir)
		if err != nil {
			t.Fatal(err)
		}
		var out []string
		for _, e := range es {
			if !e.IsDir() && strings.HasSuffix(e.Name(), ".sql") {
				out = append(out, e.Name())
			}
		}
		return out
	}
	lite, pg := names("migrations"), names("migrations/postgres")
	if len(lite) == 0 {
		t.Fatal("no SQLite migrations found")
	}
	for _, n := range lite {
		if !slices.Contains(pg, n) {
			t.Errorf("store/migrations/%s has no PostgreSQL twin store/migrations/postgres/%s", n, n)
		}
	}
	for _, n := range pg {
		if !slices.Contains(lite, n) {
			t.Errorf("store/migrations/postgres/%s has no SQLite twin store/migrations/%s", n, n)
		}
	}
}

// TestSchemaRefusesTextThatIsNotJSON: the *_json columns' CHECK
// (json_valid) refuses text that does not parse, on either engine, and
// accepts JSON.
func TestSchemaRefusesTextThatIsNotJSON(t *testing.T) {
	w := newWorld(t)
	db := rawDB(t, w.s.Path())
	q := "UPDATE sites SET horizon_json = ? WHERE id = ?"
	if testdb.Postgres() {
		q = "UPDATE sites SET horizon_json = $1 WHERE id = $2"
	}
	if _, err := db.Exec(q, "[[0, 10], [180, 5]]", w.site.ID); err != nil {
		t.Errorf("valid JSON refused: %v", err)
	}
	for _, bad := range []string{"[1, 2", "not json", ""} {
		if _, err := db.Exec(q, bad, w.site.ID); err == nil {
			t.Errorf("horizon_json %q accepted", bad)
		}
	}
}

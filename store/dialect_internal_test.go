package store

import "testing"

func TestRebind(t *testing.T) {
	cases := []struct{ in, want string }{
		{"SELECT 1", "SELECT 1"},
		{"SELECT a FROM t WHERE b = ? AND c = ?", "SELECT a FROM t WHERE b = $1 AND c = $2"},
		{"SELECT '?' , ? FROM t", "SELECT '?' , $1 FROM t"},
		{`SELECT "odd?name" FROM t WHERE x = ?`, `SELECT "odd?name" FROM t WHERE x = $1`},
		{"SELECT ? -- why?\nFROM t WHERE y = ?", "SELECT $1 -- why?\nFROM t WHERE y = $2"},
		{"SELECT 'it''s ?' WHERE z = ?", "SELECT 'it''s ?' WHERE z = $1"},
	}
	for _, c := range cases {
		if got := (dialect{pg: true}).rebind(c.in); got != c.want {
			t.Errorf("rebind(%q) = %q, want %q", c.in, got, c.want)
		}
		if got := (dialect{}).rebind(c.in); got != c.in {
			t.Errorf("SQLite rebind(%q) = %q, want it unchanged", c.in, got)
		}
	}
}

func TestMigrationsOfBothEnginesAgree(t *testing.T) {
	lite, err := dialect{}.migrations()
	if err != nil {
		t.Fatal(err)
	}
	pg, err := dialect{pg: true}.migrations()
	if err != nil {
		t.Fatal(err)
	}
	if len(lite) != len(pg) {
		t.Fatalf("%d SQLite migrations, %d PostgreSQL ones", len(lite), len(pg))
	}
	for i := range lite {
		if lite[i].version != pg[i].version || lite[i].name != pg[i].name {
			t.Errorf("migration %d: SQLite %04d_%s, PostgreSQL %04d_%s", i, lite[i].version, lite[i].name, pg[i].version, pg[i].name)
		}
	}
}

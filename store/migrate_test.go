package store_test

import (
	"context"
	"database/sql"
	"slices"
	"strings"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testdb"
)

// rawDB opens the store's database directly (the SQLite file, or the
// PostgreSQL database of a URL), for inspecting the schema.
func rawDB(tb testing.TB, path string) *sql.DB {
	tb.Helper()
	driver, dsn := "sqlite", "file:"+path+"?_pragma=busy_timeout(5000)"
	if store.IsPostgresURL(path) {
		driver, dsn = "pgx", path
	}
	db, err := sql.Open(driver, dsn)
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { db.Close() })
	return db
}

func columns(tb testing.TB, db *sql.DB, table string) []string {
	tb.Helper()
	q := "SELECT name FROM pragma_table_info(?)"
	if testdb.Postgres() {
		q = "SELECT column_name FROM information_schema.columns WHERE table_schema = 'public' AND table_name = $1"
	}
	rows, err := db.Query(q, table)
	if err != nil {
		tb.Fatal(err)
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			tb.Fatal(err)
		}
		out = append(out, n)
	}
	if err := rows.Err(); err != nil {
		tb.Fatal(err)
	}
	return out
}

func TestMigrateEmptyDatabase(t *testing.T) {
	ctx := context.Background()
	s, _ := newStore(t)
	v, err := s.SchemaVersion(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if v != 7 {
		t.Errorf("schema version = %d, want 7", v)
	}
	db := rawDB(t, s.Path())
	rows, err := db.Query("SELECT version, name FROM schema_migrations ORDER BY version")
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for rows.Next() {
		var v int
		var n string
		if err := rows.Scan(&v, &n); err != nil {
			t.Fatal(err)
		}
		got = append(got, n)
	}
	rows.Close()
	want := []string{"accounts", "sites_targets", "runs_sharing", "audit", "rv_goals", "brightness_instruments", "site_telescope"}
	if !slices.Equal(got, want) {
		t.Errorf("migrations = %v, want %v", got, want)
	}
	// Each table with the columns the store relies on.
	tables := map[string][]string{
		"users":        {"id", "email", "name", "password_hash", "version"},
		"sessions":     {"token_hash", "user_id", "expires_at"},
		"signin_links": {"token_hash", "user_id", "expires_at", "used_at"},
		"api_tokens":   {"token_hash", "user_id", "name", "revoked_at", "expires_at"},
		"teams":        {"id", "name", "version"},
		"memberships":  {"team_id", "user_id", "role", "version"},
		"invitations":  {"team_id", "token_hash", "role", "accepted_by", "revoked_at"},
		"sites":        {"team_id", "lat_deg", "lon_east_deg", "elev_m", "zone", "horizon_json", "constraints_json", "instruments_json", "version", "telescope_json"},
		"target_lists": {"team_id", "name", "version"},
		"targets": {"list_id", "ra_deg", "dec_deg", "pm_ra_masyr", "mag", "priority", "goals_json", "tags_json", "notes", "version",
			"rv_model", "rv_k_kms", "rv_sigma_kms", "rv_want_rel_k", "band", "faint_mag", "faint_phase", "bright_mag", "bright_phase"},
		"ephemerides": {"target_id", "t0_day", "t0_frac", "t0_in_text", "t0_in_standard", "convention", "period_err_days",
			"pdot", "ecc", "omega_deg", "source", "fit_json", "created_by", "created_at"},
		"timings":      {"target_id", "event", "t_day", "t_in_standard", "err_days", "version"},
		"runs":         {"team_id", "site_id", "list_id", "nights_json", "constraints_json", "version"},
		"saved_plans":  {"run_id", "engine_version", "inputs_json", "output_json"},
		"observations": {"target_id", "run_id", "mid_utc", "exposure_s", "status", "source", "version"},
		"share_links":  {"team_id", "token_hash", "list_id", "run_id", "expires_at", "revoked_at"},
		"audit_log":    {"at", "team_id", "user_id", "actor", "entity", "entity_id", "action", "before_json", "after_json"},
	}
	for table, cols := range tables {
		t.Run(table, func(t *testing.T) {
			have := columns(t, db, table)
			for _, c := range cols {
				if !slices.Contains(have, c) {
					t.Errorf("table %s lacks column %s (has %v)", table, c, have)
				}
			}
		})
	}
	if testdb.Postgres() {
		return
	}
	var mode string
	if err := db.QueryRow("PRAGMA journal_mode").Scan(&mode); err != nil || mode != "wal" {
		t.Errorf("journal_mode = %q (%v), want wal", mode, err)
	}
}

func TestMigrateIsIdempotentAndRefusesNewer(t *testing.T) {
	ctx := context.Background()
	path := testdb.Target(t, "db.sqlite")
	s, err := store.Open(ctx, path, func() time.Time { return t0 })
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	s, err = store.Open(ctx, path, func() time.Time { return t0 }) // second open applies nothing
	if err != nil {
		t.Fatalf("reopen: %v", err)
	}
	var n int
	if err := rawDB(t, path).QueryRow("SELECT count(*) FROM schema_migrations").Scan(&n); err != nil || n != 7 {
		t.Errorf("schema_migrations rows = %d (%v), want 7", n, err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := rawDB(t, path).Exec("INSERT INTO schema_migrations (version, name, applied_at) VALUES (99, 'future', 'x')"); err != nil {
		t.Fatal(err)
	}
	if _, err := store.Open(ctx, path, func() time.Time { return t0 }); err == nil || !strings.Contains(err.Error(), "newer") {
		t.Errorf("Open of a newer schema: err = %v, want a 'newer' error", err)
	}
}

func TestOpenRejectsMemory(t *testing.T) {
	_, err := store.Open(context.Background(), ":memory:", func() time.Time { return t0 })
	wantCode(t, err, store.EINVALID)
}

// TestMigrateConcurrentOpens: servers starting together on one empty
// database apply each migration once (on PostgreSQL under the advisory
// lock; on SQLite under its write lock).
func TestMigrateConcurrentOpens(t *testing.T) {
	ctx := context.Background()
	path := testdb.Target(t, "db.sqlite")
	const n = 4
	errs := make(chan error, n)
	stores := make(chan *store.Store, n)
	for range n {
		go func() {
			s, err := store.Open(ctx, path, func() time.Time { return t0 })
			errs <- err
			stores <- s
		}()
	}
	for range n {
		if err := <-errs; err != nil {
			t.Errorf("concurrent Open: %v", err)
		}
		if s := <-stores; s != nil {
			defer s.Close()
		}
	}
	var rows, distinct int
	if err := rawDB(t, path).QueryRow("SELECT count(*), count(DISTINCT version) FROM schema_migrations").Scan(&rows, &distinct); err != nil {
		t.Fatal(err)
	}
	want, err := store.MigrationCount()
	if err != nil {
		t.Fatal(err)
	}
	if rows != want || distinct != want {
		t.Errorf("schema_migrations has %d rows, %d versions; want %d and %d (every migration once)", rows, distinct, want, want)
	}
}

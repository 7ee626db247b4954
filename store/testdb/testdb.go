// Package testdb gives each test its own database on the engine the suite
// runs on: a SQLite file in the test's temporary directory by default, or,
// when PHASECAST_TEST_PG holds a PostgreSQL server URL, a fresh database on
// that server (CREATE DATABASE test_<random>, dropped when the test ends).
// Only test files import it; the program never reads the variable.
package testdb

import (
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/hex"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	_ "github.com/jackc/pgx/v5/stdlib" // the "pgx" database/sql driver
)

// Env names the PostgreSQL server the suite runs against, as a URL whose
// user may create databases, e.g. postgres://phasecast@/postgres?host=/tmp/pg.
const Env = "PHASECAST_TEST_PG"

// Postgres reports whether the suite runs on PostgreSQL (PHASECAST_TEST_PG
// set).
func Postgres() bool { return os.Getenv(Env) != "" }

var (
	reachOnce sync.Once
	reachErr  error
)

// Target returns where a test's database is: with PHASECAST_TEST_PG set,
// the URL of a new, empty PostgreSQL database that is dropped at the end of
// the test; otherwise the path of file in tb.TempDir(). When the server
// cannot be reached the test is skipped with one line saying so, or fails
// when CI=true (CI must not pass by skipping).
func Target(tb testing.TB, file string) string {
	tb.Helper()
	server := os.Getenv(Env)
	if server == "" {
		return filepath.Join(tb.TempDir(), file)
	}
	reachOnce.Do(func() { reachErr = ping(server) })
	if reachErr != nil {
		msg := "PostgreSQL at " + Env + " is not reachable (" + reachErr.Error() + "); unset " + Env + " to run on SQLite"
		if os.Getenv("CI") == "true" {
			tb.Fatal(msg)
		}
		tb.Skip(msg)
	}
	name := "test_" + randomHex(8)
	admin, err := sql.Open("pgx", server)
	if err != nil {
		tb.Fatalf("%s: %v", Env, err)
	}
	defer admin.Close()
	ctx := context.Background()
	if _, err := admin.ExecContext(ctx, "CREATE DATABASE "+name); err != nil {
		tb.Fatalf("create test database %s: %v", name, err)
	}
	tb.Cleanup(func() {
		db, err := sql.Open("pgx", server)
		if err != nil {
			tb.Errorf("drop test database %s: %v", name, err)
			return
		}
		defer db.Close()
		if _, err := db.ExecContext(context.Background(), "DROP DATABASE IF EXISTS "+name+" WITH (FORCE)"); err != nil {
			tb.Errorf("drop test database %s: %v", name, err)
		}
	})
	return withDatabase(tb, server, name)
}

// withDatabase returns the server URL with its database replaced by name.
func withDatabase(tb testing.TB, server, name string) string {
	tb.Helper()
	u, err := url.Parse(server)
	if err != nil {
		tb.Fatalf("%s=%q is not a URL: %v", Env, server, err)
	}
	u.Path = "/" + name
	u.RawPath = ""
	return u.String()
}

func ping(server string) error {
	db, err := sql.Open("pgx", server)
	if err != nil {
		return err
	}
	defer db.Close()
	return db.PingContext(context.Background())
}

func randomHex(n int) string {
	b := make([]byte, n)
	rand.Read(b) // crypto/rand.Read never fails (Go ≥ 1.24)
	return strings.ToLower(hex.EncodeToString(b))
}

package store

import (
	"context"
	"database/sql"
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"strconv"
	"strings"
	"sync"
	"time"

	_ "modernc.org/sqlite" // the "sqlite" database/sql driver, pure Go
)

//go:embed migrations/*.sql
var migrationFS embed.FS

// readConns is the size of the read pool. Readers never block each other
// or the writer in WAL mode; a handful is plenty for a team server.
const readConns = 4

// Store is the team database. Its methods are safe for concurrent use.
type Store struct {
	wdb        *sql.DB // exactly one connection; BEGIN IMMEDIATE
	rdb        *sql.DB // read-only connections (query_only)
	path       string
	now        func() time.Time
	pw         PasswordParams
	sessionTTL time.Duration

	dummyOnce sync.Once // a hash to check against for unknown emails
	dummyHash string
	dummyErr  error
}

// Option changes how Open sets up a Store.
type Option func(*Store)

// WithPasswordParams sets the argon2id parameters for NEW password hashes
// (default DefaultPasswordParams). Existing hashes carry their own.
func WithPasswordParams(p PasswordParams) Option { return func(s *Store) { s.pw = p } }

// WithSessionTTL sets how long a sign-in session lasts (default 30 days).
func WithSessionTTL(d time.Duration) Option { return func(s *Store) { s.sessionTTL = d } }

// dsn returns the connection string for path. Every pooled connection gets
// the same pragmas: WAL, a 5 s busy timeout, foreign keys on; writers begin
// with BEGIN IMMEDIATE.
func dsn(path string, readOnly bool) string {
	d := "file:" + path +
		"?_pragma=journal_mode(WAL)&_pragma=busy_timeout(5000)&_pragma=foreign_keys(1)&_txlock=immediate"
	if readOnly {
		d += "&_pragma=query_only(1)"
	}
	return d
}

// Open opens (creating if needed) the database file at path and migrates it
// to the latest schema. path must be a file path, not ":memory:". now is the
// clock the store stamps rows with and checks expiries (sessions, sign-in
// links, tokens, invitations, share links) against: the program's one clock,
// handed down by cmd/phasecast; tests pass a pinned one.
func Open(ctx context.Context, path string, now func() time.Time, opts ...Option) (*Store, error) {
	const op = "store.Open"
	if path == "" || strings.ContainsAny(path, "?#") || strings.HasPrefix(path, ":memory:") {
		return nil, &Error{Code: EINVALID, Op: op, Message: fmt.Sprintf("database path %q is not accepted; accepted: a file path without '?' or '#'", path)}
	}
	if now == nil {
		return nil, &Error{Code: EINVALID, Op: op, Message: "no clock given; the caller hands the store its clock"}
	}
	s := &Store{path: path, now: now, pw: DefaultPasswordParams, sessionTTL: 30 * 24 * time.Hour}
	for _, o := range opts {
		o(s)
	}
	w, err := sql.Open("sqlite", dsn(path, false))
	if err != nil {
		return nil, wrap(op, err)
	}
	w.SetMaxOpenConns(1)
	w.SetMaxIdleConns(1)
	w.SetConnMaxLifetime(0)
	w.SetConnMaxIdleTime(0)
	if err := w.PingContext(ctx); err != nil {
		w.Close()
		return nil, wrap(op, fmt.Errorf("open %s: %w", path, err))
	}
	s.wdb = w
	if err := s.migrate(ctx); err != nil {
		w.Close()
		return nil, wrap(op, err)
	}
	r, err := sql.Open("sqlite", dsn(path, true))
	if err != nil {
		w.Close()
		return nil, wrap(op, err)
	}
	r.SetMaxOpenConns(readConns)
	r.SetMaxIdleConns(readConns)
	s.rdb = r
	return s, nil
}

// Close closes both connection pools.
func (s *Store) Close() error {
	return errors.Join(s.rdb.Close(), s.wdb.Close())
}

// Path returns the database file path.
func (s *Store) Path() string { return s.path }

// Ping reports whether the database answers a query (for /healthz).
func (s *Store) Ping(ctx context.Context) error {
	var one int
	if err := s.rdb.QueryRowContext(ctx, "SELECT 1").Scan(&one); err != nil {
		return wrap("store.Ping", err)
	}
	return nil
}

// txn is a transaction with what every helper needs: the context, the
// instant the transaction acts at, and who acts.
type txn struct {
	tx    *sql.Tx
	ctx   context.Context
	now   time.Time
	actor Actor
	stmts map[string]*sql.Stmt // prepared once per transaction, closed with it
}

// stmt returns q prepared on the transaction, preparing it on first use:
// SQLite's parser is a large part of a small statement's cost, and a bulk
// import runs the same few statements thousands of times.
func (t *txn) stmt(q string) (*sql.Stmt, error) {
	if st, ok := t.stmts[q]; ok {
		return st, nil
	}
	st, err := t.tx.PrepareContext(t.ctx, q)
	if err != nil {
		return nil, err
	}
	if t.stmts == nil {
		t.stmts = map[string]*sql.Stmt{}
	}
	t.stmts[q] = st
	return st, nil
}

func (t *txn) exec(q string, args ...any) (sql.Result, error) {
	st, err := t.stmt(q)
	if err != nil {
		return nil, err
	}
	return st.ExecContext(t.ctx, args...)
}

func (t *txn) query(q string, args ...any) (*sql.Rows, error) {
	st, err := t.stmt(q)
	if err != nil {
		return nil, err
	}
	return st.QueryContext(t.ctx, args...)
}

// queryRow is QueryRow on the cached statement; a preparation error comes
// back from Scan, as database/sql does.
func (t *txn) queryRow(q string, args ...any) *sql.Row {
	st, err := t.stmt(q)
	if err != nil {
		return t.tx.QueryRowContext(t.ctx, q, args...) // reports the same error on Scan
	}
	return st.QueryRowContext(t.ctx, args...)
}

// beginWrite starts a write transaction on the single writer connection
// (BEGIN IMMEDIATE: the write lock is taken at once, so the transaction
// never has to upgrade a read lock and never meets SQLITE_BUSY from our own
// writers). The caller defers t.tx.Rollback() and calls t.tx.Commit().
func (s *Store) beginWrite(ctx context.Context, a Actor) (*txn, error) {
	tx, err := s.wdb.BeginTx(ctx, nil)
	if err != nil {
		return nil, fmt.Errorf("begin write: %w", err)
	}
	return &txn{tx: tx, ctx: ctx, now: s.now().UTC(), actor: a}, nil
}

// beginRead starts a read transaction on the read pool: one consistent
// snapshot of the database for the whole method (no torn reads).
func (s *Store) beginRead(ctx context.Context, a Actor) (*txn, error) {
	tx, err := s.rdb.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return nil, fmt.Errorf("begin read: %w", err)
	}
	return &txn{tx: tx, ctx: ctx, now: s.now().UTC(), actor: a}, nil
}

// commit commits t and reports a failure as EINTERNAL for op.
func commit(t *txn, op string) error {
	if err := t.tx.Commit(); err != nil {
		return wrap(op, fmt.Errorf("commit: %w", err))
	}
	return nil
}

// Time columns are UTC text of fixed width, so that they sort as text.
const timeLayout = "2006-01-02T15:04:05.000000Z"

func fmtTime(t time.Time) string { return t.UTC().Format(timeLayout) }

func parseTime(s string) (time.Time, error) {
	t, err := time.Parse(timeLayout, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("stored time %q: %w", s, err)
	}
	return t, nil
}

// nullTime returns the stored text for an optional time (nil for zero).
func nullTime(t time.Time) any {
	if t.IsZero() {
		return nil
	}
	return fmtTime(t)
}

// parseNullTime reads an optional time column (zero for NULL).
func parseNullTime(ns sql.NullString) (time.Time, error) {
	if !ns.Valid {
		return time.Time{}, nil
	}
	return parseTime(ns.String)
}

// migration is one numbered schema step.
type migration struct {
	version int
	name    string
	sql     string
}

// migrations returns the embedded migrations in order, checking that their
// numbers strictly increase (no repeats). Numbers are handed out to parallel
// changes in advance, so a gap (0004, then 0010) is allowed: the numbers in
// between are applied when they arrive (see migrate).
func migrations() ([]migration, error) {
	entries, err := fs.ReadDir(migrationFS, "migrations")
	if err != nil {
		return nil, err
	}
	var ms []migration
	for _, e := range entries {
		name := e.Name()
		num, rest, ok := strings.Cut(strings.TrimSuffix(name, ".sql"), "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil || len(num) != 4 || rest == "" {
			return nil, fmt.Errorf("migration file %q is not named NNNN_name.sql", name)
		}
		body, err := fs.ReadFile(migrationFS, path.Join("migrations", name))
		if err != nil {
			return nil, err
		}
		ms = append(ms, migration{version: v, name: rest, sql: string(body)})
	}
	for i, m := range ms { // ReadDir sorts by name
		if m.version < 1 || (i > 0 && m.version <= ms[i-1].version) {
			return nil, fmt.Errorf("migration %04d_%s: numbers must be 0001 and up, each once", m.version, m.name)
		}
	}
	return ms, nil
}

// migrate applies every migration not yet recorded in schema_migrations,
// each in its own transaction together with its record.
func (s *Store) migrate(ctx context.Context) error {
	ms, err := migrations()
	if err != nil {
		return err
	}
	if _, err := s.wdb.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version    INTEGER PRIMARY KEY,
		name       TEXT NOT NULL,
		applied_at TEXT NOT NULL
	) STRICT`); err != nil {
		return fmt.Errorf("create schema_migrations: %w", err)
	}
	applied, err := s.appliedMigrations(ctx)
	if err != nil {
		return err
	}
	known := map[int]bool{}
	for _, m := range ms {
		known[m.version] = true
	}
	for v := range applied {
		if !known[v] {
			return fmt.Errorf("the database has schema migration %04d, which this program does not know (newer than its %04d): use a newer phasecast", v, ms[len(ms)-1].version)
		}
	}
	for _, m := range ms {
		if applied[m.version] {
			continue
		}
		if err := s.applyMigration(ctx, m); err != nil {
			return err
		}
	}
	return nil
}

func (s *Store) applyMigration(ctx context.Context, m migration) error {
	tx, err := s.wdb.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("migration %04d_%s: begin: %w", m.version, m.name, err)
	}
	defer tx.Rollback()
	if _, err := tx.ExecContext(ctx, m.sql); err != nil {
		return fmt.Errorf("migration %04d_%s: %w", m.version, m.name, err)
	}
	if _, err := tx.ExecContext(ctx, "INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)",
		m.version, m.name, fmtTime(s.now())); err != nil {
		return fmt.Errorf("migration %04d_%s: record: %w", m.version, m.name, err)
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("migration %04d_%s: commit: %w", m.version, m.name, err)
	}
	return nil
}

// appliedMigrations reads the numbers recorded in schema_migrations.
func (s *Store) appliedMigrations(ctx context.Context) (map[int]bool, error) {
	rows, err := s.wdb.QueryContext(ctx, "SELECT version FROM schema_migrations")
	if err != nil {
		return nil, fmt.Errorf("read schema migrations: %w", err)
	}
	defer rows.Close()
	out := map[int]bool{}
	for rows.Next() {
		var v int
		if err := rows.Scan(&v); err != nil {
			return nil, fmt.Errorf("read schema migrations: %w", err)
		}
		out[v] = true
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("read schema migrations: %w", err)
	}
	return out, nil
}

// SchemaVersion returns the number of the newest applied migration.
func (s *Store) SchemaVersion(ctx context.Context) (int, error) {
	var v int
	if err := s.rdb.QueryRowContext(ctx, "SELECT coalesce(max(version), 0) FROM schema_migrations").Scan(&v); err != nil {
		return 0, wrap("store.SchemaVersion", err)
	}
	return v, nil
}

// IsEmpty reports whether the database has no users yet (a first start).
func (s *Store) IsEmpty(ctx context.Context) (bool, error) {
	var n int
	if err := s.rdb.QueryRowContext(ctx, "SELECT count(*) FROM users").Scan(&n); err != nil {
		return false, wrap("store.IsEmpty", err)
	}
	return n == 0, nil
}

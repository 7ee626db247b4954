package store

import (
	"strconv"
	"strings"
)

// dialect is the one place where the store's SQL differs between its two
// engines, SQLite (the embedded default) and PostgreSQL. Call sites write
// one SQL text with '?' placeholders; the methods below turn it into what
// the engine in use expects, or hold the two texts of a statement side by
// side where the engines really differ.
type dialect struct {
	pg bool // PostgreSQL; false = SQLite
}

// Lock keys for pg_advisory_xact_lock: one serialises schema migrations
// between servers starting together, one serialises writers (see
// beginWrite). The values are arbitrary but fixed ("phas", "phaw" in
// ASCII), so that every phasecast server uses the same ones.
const (
	pgMigrateLockKey int64 = 0x70686173
	pgWriteLockKey   int64 = 0x70686177
)

// name is the engine's name as shown to people: "sqlite" or "postgres".
func (d dialect) name() string {
	if d.pg {
		return "postgres"
	}
	return "sqlite"
}

// rebind turns the '?' placeholders of q into PostgreSQL's $1, $2, …;
// '?' inside a quoted string ('…' or "…") or a comment is left alone.
// For SQLite q is returned as it is.
func (d dialect) rebind(q string) string {
	if !d.pg || !strings.Contains(q, "?") {
		return q
	}
	var b strings.Builder
	b.Grow(len(q) + 16)
	n := 0
	for i := 0; i < len(q); i++ {
		c := q[i]
		switch {
		case c == '\'' || c == '"':
			j := i + 1
			for j < len(q) && q[j] != c {
				j++
			}
			if j >= len(q) {
				j = len(q) - 1
			}
			b.WriteString(q[i : j+1])
			i = j
		case c == '-' && i+1 < len(q) && q[i+1] == '-':
			j := strings.IndexByte(q[i:], '\n')
			if j < 0 {
				j = len(q) - i - 1
			}
			b.WriteString(q[i : i+j+1])
			i += j
		case c == '?':
			n++
			b.WriteByte('$')
			b.WriteString(strconv.Itoa(n))
		default:
			b.WriteByte(c)
		}
	}
	return b.String()
}

// returningID is the text of an INSERT that hands back the new row's id:
// PostgreSQL says so with RETURNING id; SQLite's driver reports it as the
// result's LastInsertId, so the statement stays as written.
func (d dialect) returningID(insert string) string {
	if d.pg {
		return insert + " RETURNING id"
	}
	return insert
}

// offsetOnly skips the first '?' rows and keeps all the rest: SQLite
// takes OFFSET only after a LIMIT (-1 for none), PostgreSQL takes it alone.
func (d dialect) offsetOnly() string {
	if d.pg {
		return "OFFSET ?"
	}
	return "LIMIT -1 OFFSET ?"
}

// schemaMigrationsDDL creates the table that records applied migrations.
func (d dialect) schemaMigrationsDDL() string {
	if d.pg {
		return `CREATE TABLE IF NOT EXISTS schema_migrations (
		version    BIGINT PRIMARY KEY,
		name       TEXT NOT NULL,
		applied_at TEXT NOT NULL
	)`
	}
	return `CREATE TABLE IF NOT EXISTS schema_migrations (
		version    INTEGER PRIMARY KEY,
		name       TEXT NOT NULL,
		applied_at TEXT NOT NULL
	) STRICT`
}

// migrationDir is the embedded directory of the engine's migrations.
func (d dialect) migrationDir() string {
	if d.pg {
		return "migrations/postgres"
	}
	return "migrations"
}

// insertID runs an INSERT of one row into a table with an "id" key and
// returns the new row's id, whichever the engine.
func (t *txn) insertID(q string, args ...any) (int64, error) {
	if !t.d.pg {
		res, err := t.exec(q, args...)
		if err != nil {
			return 0, err
		}
		return res.LastInsertId()
	}
	var id int64
	if err := t.queryRow(t.d.returningID(q), args...).Scan(&id); err != nil {
		return 0, err
	}
	return id, nil
}

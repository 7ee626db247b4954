// Package store keeps a team's phasecast data in one SQLite file: accounts,
// teams and roles, sites, target lists with their ephemeris history and
// timings, runs with saved plans and observed exposures, share links, API
// tokens, and an audit log of every change. It uses modernc.org/sqlite (pure
// Go, driver "sqlite") and imports the ephem and planner domain types;
// nothing from web.
//
// The same store runs on PostgreSQL when Open is given a postgres:// URL
// (driver github.com/jackc/pgx/v5/stdlib), so that several phasecast
// servers can share one database. Call sites write one SQL text with '?'
// placeholders; the few statements whose text really differs between the
// engines say so through the dialect (dialect.go), and PostgreSQL has its
// own migrations, store/migrations/postgres/NNNN_name.sql, one twin of each
// SQLite migration with the same number and name. On PostgreSQL, writers
// take turns on a transaction-level advisory lock, as SQLite's single
// writer does, and readers get REPEATABLE READ snapshots.
//
// # Schema
//
// The schema is built by numbered migrations, store/migrations/NNNN_name.sql,
// embedded in the binary. Open applies each one not yet recorded in
// schema_migrations, each in its own transaction together with its record,
// and refuses a database whose schema is newer than the program. A shipped
// migration is never edited: changes come as a new file.
//
// # Concurrency: one writer, many readers
//
// Every connection gets WAL journaling, a 5 s busy timeout and foreign keys
// (pragmas in the DSN apply to each pooled connection). The Store holds two
// pools on the same file:
//
//   - a write pool of exactly ONE connection, whose transactions begin with
//     BEGIN IMMEDIATE (_txlock=immediate). Writers queue in Go for that
//     connection instead of racing for SQLite's lock, so our own writes never
//     see SQLITE_BUSY ("database is locked"); and since the write lock is
//     taken when the transaction starts, no transaction ever has to upgrade
//     a read lock to a write lock midway — the case in which SQLite gives up
//     at once, busy timeout or not, when another writer committed in between.
//     The busy timeout remains for other processes (a backup, the sqlite3
//     shell).
//   - a read pool of a few connections with query_only set, whose
//     transactions are plain BEGIN (read-only). In WAL mode readers do not
//     block the writer nor each other, and each read transaction sees one
//     snapshot, so a method that reads several tables never sees half of a
//     concurrent change.
//
// A team server's writes are small and short (a form, an import in one
// transaction), so serialising them costs little, and correctness does not
// depend on retry loops. Slow work that is not database work (argon2id
// password hashing) is done before the write transaction begins.
//
// # Shape of a method
//
// Every public method takes a context first and, for team data, the Actor
// making the call. It begins a transaction, defers its rollback, calls
// unexported helpers that take the transaction, and commits. Queries use ?
// placeholders and explicit column lists and check rows.Err. Not found is an
// error (ENOTFOUND), never a zero value with a nil error.
//
// # Errors
//
// Every error is a *Error with a Code (EINVALID, ENOTFOUND, ECONFLICT,
// EFORBIDDEN, EINTERNAL), a short Message safe to show, the Op (method) and
// the cause. Input problems carry a *ValidationError listing every bad field
// (named as in FORMAT.md), or for files a *planner.TableError listing every
// bad cell by line and column. ErrorCode gives the code of any error.
//
// # Optimistic concurrency
//
// Every editable row has a version, starting at 1 and raised by each change.
// Update and delete methods take the version the caller last saw; if the row
// has moved on, they fail with ECONFLICT whose Error.Current holds the row as
// it is now, so that the caller can show "someone else changed this; here is
// their version". Ephemerides and saved plans are never changed in place:
// a new ephemeris is added to the target's history and becomes current.
//
// # Authorization in one place
//
// Can(role, action, entity) is the single policy table: owners run the
// team, editors change and share its data, viewers read, a share link reads
// the one list or run it names (with the run's site and list). Every method
// that touches team data reads the caller's membership inside its own
// transaction (so a removed member or a revoked link loses access at once),
// consults Can, and scopes its queries to that team. A caller who may not
// see a row gets ENOTFOUND, exactly as for a row that does not exist; a
// caller who may see it but not do this gets EFORBIDDEN.
//
// # Secrets
//
// Passwords are hashed with argon2id (golang.org/x/crypto/argon2) with the
// parameters of RFC 9106's second recommended option (DefaultPasswordParams:
// t = 3, m = 64 MiB, p = 4, 128-bit salt, 256-bit tag), stored in the PHC
// string format so that older hashes keep verifying if the parameters
// change, and compared in constant time. Session, API, share-link,
// invitation and sign-in tokens are 256 random bits from crypto/rand with a
// short prefix naming their use; the database keeps only their SHA-256.
//
// # Audit
//
// Every change writes an audit entry (who, when, entity, id, action, the
// row before and after as JSON) in the same transaction as the change, so
// both are committed or neither is. Secrets and password hashes never
// appear in it.
//
// # Backups
//
// Backup takes a consistent online copy with VACUUM INTO while the server
// runs; Restore puts one in place while the server is stopped (the procedure
// is in its doc comment).
package store

package store

import (
	"errors"
	"fmt"
	"github.com/jackc/pgx/v5/pgconn"
	"strings"

	"phasecast/planner"

	"modernc.org/sqlite"
	sqlite3 "modernc.org/sqlite/lib"
)

// Error codes. The web layer maps each to one HTTP status in one place.
const (
	EINVALID   = "EINVALID"   // the input is bad; Message says which field and what is accepted
	ENOTFOUND  = "ENOTFOUND"  // no such thing, or the caller may not see it
	ECONFLICT  = "ECONFLICT"  // stale version, duplicate name, or still in use
	EFORBIDDEN = "EFORBIDDEN" // the caller may see it but not do this, or bad credentials
	EINTERNAL  = "EINTERNAL"  // a bug or a database failure; details only in the log
)

// Error is the one error type the store returns. Message is short and safe to
// show to users; Op names the store method; Err is the cause, for the log.
type Error struct {
	Code    string
	Message string
	Op      string
	Err     error
	// Current is set on an ECONFLICT caused by a stale version: the row as it
	// is now (the same type the method returns, e.g. StoredTarget), so that
	// the caller can say "someone else changed this; here is their version".
	Current any
}

// Error returns "op: message: cause".
func (e *Error) Error() string {
	var b strings.Builder
	if e.Op != "" {
		b.WriteString(e.Op)
		b.WriteString(": ")
	}
	b.WriteString(e.Code)
	if e.Message != "" {
		b.WriteString(": ")
		b.WriteString(e.Message)
	}
	if e.Err != nil && e.Err.Error() != e.Message {
		b.WriteString(": ")
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns the cause.
func (e *Error) Unwrap() error { return e.Err }

// ErrorCode returns the code of the first *Error in err's chain, "" for nil
// and EINTERNAL for any other error.
func ErrorCode(err error) string {
	if err == nil {
		return ""
	}
	var e *Error
	if errors.As(err, &e) {
		return e.Code
	}
	return EINTERNAL
}

// ErrorMessage returns the user-safe message of err: the Message of its
// *Error, or "internal error" for EINTERNAL and foreign errors.
func ErrorMessage(err error) string {
	if err == nil {
		return ""
	}
	var e *Error
	if errors.As(err, &e) && e.Code != EINTERNAL && e.Message != "" {
		return e.Message
	}
	return "internal error"
}

// FieldError is one rejected field of an input: its name (the same name as
// the form field and the CSV column), the value as given, and what is
// accepted.
type FieldError struct {
	Field    string
	Value    string
	Accepted string
}

func (f FieldError) String() string {
	return fmt.Sprintf("%s: %q is not accepted; accepted: %s", f.Field, f.Value, f.Accepted)
}

// ValidationError lists every rejected field of one input. It is the Err of
// an EINVALID *Error, so that a form can show each message beside its field.
type ValidationError struct {
	Fields []FieldError
}

func (v *ValidationError) Error() string {
	parts := make([]string, len(v.Fields))
	for i, f := range v.Fields {
		parts[i] = f.String()
	}
	return strings.Join(parts, "; ")
}

// add records a rejected field.
func (v *ValidationError) add(field, value, accepted string) {
	v.Fields = append(v.Fields, FieldError{Field: field, Value: planner.ClipValue(value), Accepted: accepted})
}

// err returns an EINVALID *Error carrying v, or nil when v is empty.
func (v *ValidationError) err() error {
	if v == nil || len(v.Fields) == 0 {
		return nil
	}
	msg := v.Fields[0].String()
	if len(v.Fields) > 1 {
		msg = fmt.Sprintf("%s (and %d more)", msg, len(v.Fields)-1)
	}
	return &Error{Code: EINVALID, Message: msg, Err: v}
}

func errInvalid(format string, args ...any) error {
	return &Error{Code: EINVALID, Message: fmt.Sprintf(format, args...)}
}

func errNotFound(what string, id int64) error {
	return &Error{Code: ENOTFOUND, Message: fmt.Sprintf("%s %d not found", what, id)}
}

func errForbidden(format string, args ...any) error {
	return &Error{Code: EFORBIDDEN, Message: fmt.Sprintf(format, args...)}
}

func errConflict(format string, args ...any) error {
	return &Error{Code: ECONFLICT, Message: fmt.Sprintf(format, args...)}
}

// errStale is the ECONFLICT of an update or delete with a stale version.
func errStale(what string, id, given, current int64, row any) error {
	return &Error{
		Code:    ECONFLICT,
		Message: fmt.Sprintf("someone else changed %s %d (your version %d, current version %d)", what, id, given, current),
		Current: row,
	}
}

// wrap gives err the operation name op. A *Error keeps its code (and gets
// op if it has none); SQLite and PostgreSQL constraint failures become ECONFLICT or
// EINVALID; anything else becomes EINTERNAL.
func wrap(op string, err error) error {
	if err == nil {
		return nil
	}
	var e *Error
	if errors.As(err, &e) {
		if e.Op != "" {
			return err
		}
		c := *e
		c.Op = op
		return &c
	}
	var se *sqlite.Error
	if errors.As(err, &se) {
		switch se.Code() {
		case sqlite3.SQLITE_CONSTRAINT_UNIQUE, sqlite3.SQLITE_CONSTRAINT_PRIMARYKEY:
			return &Error{Code: ECONFLICT, Message: "an entry with the same name or key already exists", Op: op, Err: err}
		case sqlite3.SQLITE_CONSTRAINT_FOREIGNKEY:
			return &Error{Code: ECONFLICT, Message: "it is referred to by other entries, or refers to a missing one", Op: op, Err: err}
		case sqlite3.SQLITE_CONSTRAINT_CHECK, sqlite3.SQLITE_CONSTRAINT_NOTNULL:
			return &Error{Code: EINVALID, Message: "a value is out of its accepted range", Op: op, Err: err}
		}
	}
	var pe *pgconn.PgError
	if errors.As(err, &pe) {
		// SQLSTATE class 23, integrity constraint violation (PostgreSQL
		// manual, appendix A "PostgreSQL Error Codes").
		switch pe.Code {
		case "23505": // unique_violation
			return &Error{Code: ECONFLICT, Message: "an entry with the same name or key already exists", Op: op, Err: err}
		case "23503": // foreign_key_violation
			return &Error{Code: ECONFLICT, Message: "it is referred to by other entries, or refers to a missing one", Op: op, Err: err}
		case "23514", "23502": // check_violation, not_null_violation
			return &Error{Code: EINVALID, Message: "a value is out of its accepted range", Op: op, Err: err}
		case "22P02": // invalid_text_representation: json_valid on text that is not JSON
			return &Error{Code: EINVALID, Message: "a value is not in its accepted form", Op: op, Err: err}
		}
	}
	return &Error{Code: EINTERNAL, Message: "internal error", Op: op, Err: err}
}

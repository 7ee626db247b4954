package web

import (
	"errors"
	"fmt"

	"phasecast/planner"
	"phasecast/store"
)

// codedError is an error raised by the web layer itself with one of the
// shared codes (a missing route, a form that does not parse).
type codedError struct {
	code string
	msg  string // safe for users
	err  error  // details for the log
}

func (e *codedError) Error() string {
	if e.err != nil {
		return e.code + ": " + e.msg + ": " + e.err.Error()
	}
	return e.code + ": " + e.msg
}

func (e *codedError) Unwrap() error { return e.err }

func errNotFound(msg string) error  { return &codedError{code: codeNotFound, msg: msg} }
func errInvalid(msg string) error   { return &codedError{code: codeInvalid, msg: msg} }
func errForbidden(msg string) error { return &codedError{code: codeForbidden, msg: msg} }

// errorCode extracts the code and the user-safe message of err: the web's
// own codedError, the store's *store.Error, and the input errors of ephem
// and planner (which name the field, the value and what is accepted).
func errorCode(err error) (code, msg string) {
	var ce *codedError
	if errors.As(err, &ce) {
		return ce.code, ce.msg
	}
	var se *store.Error
	if errors.As(err, &se) {
		return store.ErrorCode(err), store.ErrorMessage(err)
	}
	var ie *planner.InputError
	if errors.As(err, &ie) {
		return codeInvalid, fmt.Sprintf("%s: %s is not accepted; accepted: %s", ie.Field, planner.ClipValue(ie.Value), ie.Accepted)
	}
	var te *planner.TableError
	if errors.As(err, &te) {
		return codeInvalid, fmt.Sprintf("%d cells of the file are not accepted", len(te.Cells))
	}
	return codeInternal, ""
}

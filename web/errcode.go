package web

import "errors"

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

// errorCode extracts the code and the safe message of err.
func errorCode(err error) (code, msg string) {
	var ce *codedError
	if errors.As(err, &ce) {
		return ce.code, ce.msg
	}
	return codeInternal, ""
}

package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"strconv"
)

// Error codes shared with the store; statusFor maps them to HTTP statuses.
const (
	codeInvalid   = "EINVALID"
	codeNotFound  = "ENOTFOUND"
	codeConflict  = "ECONFLICT"
	codeForbidden = "EFORBIDDEN"
	codeInternal  = "EINTERNAL"
	// codeUnauthenticated is the web's own: an API request whose bearer
	// token is missing, revoked, expired or unknown (RFC 6750, section 3.1).
	codeUnauthenticated = "EUNAUTHENTICATED"
	// codeTooLarge is the web's own: a request body over the route's
	// limit (bodyLimitError).
	codeTooLarge = "ETOOLARGE"
)

// errMalformed marks a request that could not be parsed at all (bad form
// encoding, bad JSON): 400, where a parsed but unacceptable value is 422.
var errMalformed = errors.New("malformed request")

// statusFor is the one place that maps an error to an HTTP status and the
// short, safe message a user may see. Details stay in the log.
//
//	EINVALID   → 422 (400 when the request could not be parsed)
//	ENOTFOUND  → 404
//	ECONFLICT  → 409
//	EFORBIDDEN → 403
//	EUNAUTHENTICATED → 401 (API requests without a valid bearer token)
//	ETOOLARGE  → 413 (a body over its limit)
//	ETOOMANY   → 429 (the caller's heavy requests; heavy.go)
//	EBUSY      → 503 (the server's heavy slots; heavy.go)
//	EINTERNAL and anything unknown → 500
func statusFor(err error) (status int, message string) {
	if errors.Is(err, errMalformed) {
		_, msg := errorCode(err)
		return http.StatusBadRequest, orDefault(msg, "The request could not be read.")
	}
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return http.StatusServiceUnavailable, "The computation was stopped before it finished."
	}
	code, msg := errorCode(err)
	switch code {
	case codeInvalid:
		return http.StatusUnprocessableEntity, orDefault(msg, "Some values are not accepted.")
	case codeNotFound:
		return http.StatusNotFound, orDefault(msg, "Not found.")
	case codeConflict:
		return http.StatusConflict, orDefault(msg, "Someone else changed this in the meantime.")
	case codeForbidden:
		return http.StatusForbidden, orDefault(msg, "You are not allowed to do that.")
	case codeUnauthenticated:
		return http.StatusUnauthorized, orDefault(msg, "Send a valid API token.")
	case codeTooLarge:
		return http.StatusRequestEntityTooLarge, msg
	case codeTooMany:
		return http.StatusTooManyRequests, msg
	case codeBusy:
		return http.StatusServiceUnavailable, msg
	}
	return http.StatusInternalServerError, "Something went wrong on our side; it has been logged."
}

// bodyLimitError returns err as ETOOLARGE naming what was sent and the
// limit when a request body ran over http.MaxBytesReader's limit, else
// nil.
func bodyLimitError(err error, what string) error {
	var mb *http.MaxBytesError
	if !errors.As(err, &mb) {
		return nil
	}
	return &codedError{code: codeTooLarge, err: err, msg: fmt.Sprintf("%s is larger than the limit of %s; accepted: at most %s",
		what, mibString(mb.Limit), mibString(mb.Limit))}
}

// mibString writes a byte count in MiB ("16 MiB").
func mibString(n int64) string {
	return strconv.FormatFloat(float64(n)/(1<<20), 'f', -1, 64) + " MiB"
}

func orDefault(s, d string) string {
	if s == "" {
		return d
	}
	return s
}

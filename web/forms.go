package web

import (
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// formErrs turns an error the user can fix (a rejected value, a stale
// version, a duplicate) into inline messages and the status to answer
// with; ok is false for any other error, which gets the error page.
func formErrs(err error) (errs page.Errs, status int, ok bool) {
	status, msg := statusFor(err)
	if status != http.StatusUnprocessableEntity && status != http.StatusConflict {
		return nil, status, false
	}
	errs = page.Errs{}
	var ve *store.ValidationError
	var ie *planner.InputError
	switch {
	case errors.As(err, &ve):
		for _, f := range ve.Fields {
			if _, seen := errs[f.Field]; !seen {
				errs[f.Field] = fmt.Sprintf("“%s” is not accepted; accepted: %s", planner.ClipValue(f.Value), f.Accepted)
			}
		}
	case errors.As(err, &ie):
		errs[ie.Field] = fmt.Sprintf("“%s” is not accepted; accepted: %s", planner.ClipValue(ie.Value), ie.Accepted)
	default:
		errs[""] = msg
	}
	return errs, status, true
}

// parseForm reads a posted form (at most 2 MiB).
func parseForm(w http.ResponseWriter, r *http.Request) error {
	r.Body = http.MaxBytesReader(w, r.Body, 2<<20)
	err := r.ParseForm()
	if tl := bodyLimitError(err, "the form"); tl != nil {
		return tl
	}
	if err != nil {
		return fmt.Errorf("%w: %v", errMalformed, err)
	}
	return nil
}

// pathID reads a numeric path value such as {id}.
func pathID(r *http.Request, name string) (int64, error) {
	v := r.PathValue(name)
	id, err := strconv.ParseInt(v, 10, 64)
	if err != nil || id <= 0 {
		return 0, errNotFound("There is nothing at this address.")
	}
	return id, nil
}

// formInt64 reads an integer form value such as a version; bad input is
// malformed (the pages write these fields themselves).
func formInt64(r *http.Request, name string) (int64, error) {
	v, err := strconv.ParseInt(strings.TrimSpace(r.PostFormValue(name)), 10, 64)
	if err != nil {
		return 0, fmt.Errorf("%w: field %s: %q is not an integer", errMalformed, name, r.PostFormValue(name))
	}
	return v, nil
}

// fmtUTC formats an instant for tables: "2026-03-14 21:30 UTC", or "—".
func fmtUTC(t time.Time) string {
	if t.IsZero() {
		return "—"
	}
	return t.UTC().Format("2006-01-02 15:04 UTC")
}

package web

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"strings"
	"unicode/utf8"

	"phasecast/planner"
	"phasecast/store"
)

// apiUser wraps a JSON API handler: the caller authenticates with an API
// token ("Authorization: Bearer TOKEN"); the current team is ?team=ID or
// the token owner's first team.
func (s *Server) apiUser(h func(http.ResponseWriter, *http.Request, *user)) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		auth := r.Header.Get("Authorization")
		token, ok := strings.CutPrefix(auth, "Bearer ")
		if !ok || strings.TrimSpace(token) == "" {
			w.Header().Set("WWW-Authenticate", `Bearer realm="phasecast"`)
			s.apiError(w, r, &codedError{code: codeUnauthenticated, msg: "send an API token: Authorization: Bearer TOKEN (make one on the account page)"})
			return
		}
		a, err := s.store.APITokenActor(r.Context(), strings.TrimSpace(token))
		if err != nil {
			if code, _ := errorCode(err); code == codeInternal || code == "" {
				s.apiError(w, r, err)
				return
			}
			// RFC 6750, section 3.1: an invalid token is answered 401.
			w.Header().Set("WWW-Authenticate", `Bearer realm="phasecast", error="invalid_token"`)
			s.apiError(w, r, &codedError{code: codeUnauthenticated, err: err,
				msg: "the API token is not valid (revoked, expired or unknown); make a new one on the account page"})
			return
		}
		u := &user{actor: a}
		want, err := queryID(r.URL.Query(), "team")
		if err != nil {
			s.apiError(w, r, err)
			return
		}
		for _, m := range a.Teams {
			if m.TeamID == want || (want == 0 && u.team.TeamID == 0) {
				u.team = m
			}
		}
		if want != 0 && u.team.TeamID != want {
			s.apiError(w, r, errNotFound(fmt.Sprintf("team %d not found among your teams", want)))
			return
		}
		h(w, r, u)
	}
}

// apiErrorBody is the JSON of every API error.
type apiErrorBody struct {
	Error struct {
		Code    string          `json:"code"`
		Message string          `json:"message"`
		Fields  []apiFieldError `json:"fields,omitempty"`
		// Cells lists every rejected cell of an uploaded file.
		Cells []apiCellError `json:"cells,omitempty"`
	} `json:"error"`
	// Current is the row as it is now, after a stale-version update.
	Current any `json:"current,omitempty"`
}

// apiError writes err as JSON with the status of statusFor; details go to
// the log only.
func (s *Server) apiError(w http.ResponseWriter, r *http.Request, err error) {
	status, msg := statusFor(err)
	if code, _ := errorCode(err); code == codeBusy {
		s.log.Warn("api request refused: busy", "path", r.URL.Path, "err", err)
	} else if status >= 500 {
		s.log.Error("api request failed", "path", r.URL.Path, "err", err)
	} else {
		s.log.Info("api request refused", "path", r.URL.Path, "status", status, "err", err)
	}
	var body apiErrorBody
	code, _ := errorCode(err)
	if errors.Is(err, errMalformed) {
		code = codeInvalid
	}
	if status == http.StatusServiceUnavailable && code != codeBusy {
		code = codeInternal
	}
	body.Error.Code, body.Error.Message = code, msg
	var ve *store.ValidationError
	if errors.As(err, &ve) {
		for _, f := range ve.Fields {
			body.Error.Fields = append(body.Error.Fields, apiFieldError{apiFieldName(f.Field), f.Value, f.Accepted})
		}
	}
	var te *planner.TableError
	if errors.As(err, &te) {
		for _, c := range te.Cells {
			body.Error.Cells = append(body.Error.Cells, apiCellError{Line: c.Line, Column: c.Column, Value: c.Value, Reason: c.Reason})
		}
	}
	var se *store.Error
	if errors.As(err, &se) && se.Current != nil {
		if t, ok := se.Current.(store.StoredTarget); ok {
			body.Current = targetToJSON(t)
		}
	}
	writeJSON(w, status, body)
}

// apiFieldError is one rejected field of a JSON body, named as in the
// body ("dec_deg", "ephemeris.period_days", "goals[0].exposure_s").
type apiFieldError struct {
	Field    string `json:"field"`
	Value    string `json:"value"`
	Accepted string `json:"accepted"`
}

// apiCellError is one rejected cell of an uploaded file: its line (1 =
// the header), the column's name ("" for the whole line), the value as
// written and why it is refused (what is accepted).
type apiCellError struct {
	Line   int    `json:"line"`
	Column string `json:"column"`
	Value  string `json:"value"`
	Reason string `json:"reason"`
}

// ephemFields are the store's names of ephemeris fields, which the API
// nests under "ephemeris".
var ephemFields = map[string]bool{"t0": true, "t0_form": true, "t0_standard": true, "t0_convention": true, "t0_err_days": true,
	"period_days": true, "period_err_days": true, "cov_t0_period": true, "pdot": true, "pdot_err": true, "phase_offset": true,
	"ecc": true, "omega_deg": true}

// apiFieldName names a store field as the JSON body does.
func apiFieldName(f string) string {
	switch {
	case f == "ra" || f == "dec":
		return f + "_deg"
	case ephemFields[f]:
		return "ephemeris." + f
	}
	return f
}

// writeDoc sends a document package export wrote (JSON) with status 200.
func writeDoc(w http.ResponseWriter, doc []byte) {
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("Cache-Control", "no-store")
	_, _ = w.Write(doc) // dropped: the status is sent; a client that has gone cannot be told more
}

// writeJSON writes v as indented JSON with status.
func writeJSON(w http.ResponseWriter, status int, v any) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		http.Error(w, `{"error":{"code":"EINTERNAL","message":"internal error"}}`, http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	_, _ = buf.WriteTo(w) // dropped: the status is sent; a client that has gone cannot be told more
}

// maxAPIBody bounds a JSON API request body (bytes).
const maxAPIBody = 4 << 20

// readJSON decodes a request body of at most maxAPIBody into v: a larger
// body is 413, text that is not UTF-8 is 422 naming the member (the JSON
// decoder would silently store U+FFFD), unknown members and trailing data
// are 400.
func readJSON(w http.ResponseWriter, r *http.Request, v any) error {
	b, err := io.ReadAll(http.MaxBytesReader(w, r.Body, maxAPIBody))
	if tl := bodyLimitError(err, "the JSON body"); tl != nil {
		return tl
	}
	if err != nil {
		return &codedError{code: codeInvalid, msg: "the JSON body could not be read", err: fmt.Errorf("%w: %v", errMalformed, err)}
	}
	if !utf8.Valid(b) {
		return errInvalid(fmt.Sprintf("%s: the text is not valid UTF-8; accepted: UTF-8 text", invalidUTF8Member(b)))
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return &codedError{code: codeInvalid, msg: "the JSON body is not accepted: " + err.Error(), err: errMalformed}
	}
	if _, err := dec.Token(); err != io.EOF {
		return &codedError{code: codeInvalid, msg: "the JSON body has data after the object", err: errMalformed}
	}
	return nil
}

// invalidUTF8Member names the member of a JSON document b whose text
// holds the first byte that is not UTF-8 ("name", "goals[1].event"), or
// "body" when that byte is outside any string.
func invalidUTF8Member(b []byte) string {
	at := len(b)
	for i := 0; i < len(b); {
		r, n := utf8.DecodeRune(b[i:])
		if r == utf8.RuneError && n <= 1 {
			at = i
			break
		}
		i += n
	}
	type level struct {
		array bool
		key   string
		index int
	}
	var path []level
	memberPath := func() string {
		var sb strings.Builder
		for _, l := range path {
			if l.array {
				fmt.Fprintf(&sb, "[%d]", l.index)
			} else if l.key != "" {
				if sb.Len() > 0 {
					sb.WriteByte('.')
				}
				sb.WriteString(l.key)
			}
		}
		if sb.Len() == 0 {
			return "body"
		}
		return sb.String()
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	expectKey := false
	for {
		tok, err := dec.Token()
		if err != nil {
			return "body"
		}
		end, top := int(dec.InputOffset()), len(path)-1
		if d, ok := tok.(json.Delim); ok && (d == '}' || d == ']') {
			path = path[:top]
			expectKey = len(path) > 0 && !path[len(path)-1].array
			continue
		}
		if key, ok := tok.(string); ok && expectKey && top >= 0 {
			path[top].key, expectKey = key, false
			if end > at {
				return memberPath() // the member's name itself
			}
			continue
		}
		if top >= 0 && path[top].array {
			path[top].index++
		}
		if d, ok := tok.(json.Delim); ok {
			path = append(path, level{array: d == '[', index: -1})
			expectKey = d == '{'
			continue
		}
		if end > at {
			return memberPath()
		}
		expectKey = top >= 0 && !path[top].array
	}
}

// apiNotFound answers API paths no route matches, in JSON.
func (s *Server) apiNotFound(w http.ResponseWriter, r *http.Request) {
	s.apiError(w, r, errNotFound("no such API endpoint: "+r.Method+" "+r.URL.Path+" (see docs/api.md)"))
}

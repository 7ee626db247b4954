package web

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"
)

func TestStatusFor(t *testing.T) {
	tests := []struct {
		name string
		err  error
		want int
	}{
		{"Invalid", &codedError{code: codeInvalid, msg: "period: -1 is not accepted"}, http.StatusUnprocessableEntity},
		{"Malformed", fmt.Errorf("parse form: %w", errMalformed), http.StatusBadRequest},
		{"NotFound", &codedError{code: codeNotFound}, http.StatusNotFound},
		{"Conflict", fmt.Errorf("update: %w", &codedError{code: codeConflict}), http.StatusConflict},
		{"Forbidden", &codedError{code: codeForbidden}, http.StatusForbidden},
		{"Internal", &codedError{code: codeInternal}, http.StatusInternalServerError},
		{"Unknown", errors.New("disk on fire"), http.StatusInternalServerError},
		{"Canceled", context.Canceled, http.StatusServiceUnavailable},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, msg := statusFor(tt.err)
			if got != tt.want {
				t.Errorf("statusFor(%v) = %d, want %d", tt.err, got, tt.want)
			}
			if strings.Contains(msg, "disk on fire") {
				t.Errorf("message %q leaks internal details", msg)
			}
		})
	}
}

func TestRedactPath(t *testing.T) {
	tests := []struct{ in, want string }{
		{"/login/link/abcdef", "/login/link/[redacted]"},
		{"/share/abcdef/night.ics", "/share/[redacted]/night.ics"},
		{"/invite/xyz", "/invite/[redacted]"},
		{"/targets", "/targets"},
		{"/share/", "/share/"},
	}
	for _, tt := range tests {
		if got := redactPath(tt.in); got != tt.want {
			t.Errorf("redactPath(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

func TestLimiter(t *testing.T) {
	l := newLimiter(3, 10*time.Second)
	t0 := time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
	for i := range 3 {
		if !l.allow("a", t0) {
			t.Fatalf("attempt %d refused within the burst", i+1)
		}
	}
	if l.allow("a", t0) {
		t.Error("4th attempt at once allowed; want refused")
	}
	if !l.allow("b", t0) {
		t.Error("another client refused")
	}
	if !l.allow("a", t0.Add(11*time.Second)) {
		t.Error("attempt after the refill interval refused")
	}
}

// newBareServer is a harness server whose database check is ping.
func newBareServer(t *testing.T, ping func(context.Context) error) *Server {
	t.Helper()
	s := newHarness(t).srv
	if ping != nil {
		s.ping = ping
	}
	return s
}

func TestHealthz(t *testing.T) {
	tests := []struct {
		name string
		ping func(context.Context) error
		want int
	}{
		{"Reachable", func(context.Context) error { return nil }, http.StatusOK},
		{"Unreachable", func(context.Context) error { return errors.New("closed") }, http.StatusServiceUnavailable},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			h := newBareServer(t, tt.ping).Handler()
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, httptest.NewRequest("GET", "/healthz", nil))
			if rec.Code != tt.want {
				t.Errorf("GET /healthz = %d, want %d", rec.Code, tt.want)
			}
		})
	}
}

func TestSecurityHeadersAndNotFound(t *testing.T) {
	h := newBareServer(t, func(context.Context) error { return nil }).Handler()
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest("GET", "/no/such/page", nil))
	if rec.Code != http.StatusNotFound {
		t.Errorf("status = %d, want 404", rec.Code)
	}
	csp := rec.Header().Get("Content-Security-Policy")
	if !strings.Contains(csp, "default-src 'self'") || strings.Contains(csp, "unsafe-inline") {
		t.Errorf("CSP = %q, want default-src 'self' without unsafe-inline", csp)
	}
	for _, h := range []string{"X-Content-Type-Options", "X-Frame-Options", "Referrer-Policy"} {
		if rec.Header().Get(h) == "" {
			t.Errorf("header %s missing", h)
		}
	}
	if !strings.Contains(rec.Body.String(), `data-testid="error-heading"`) {
		t.Error("404 page lacks its heading")
	}
}

func TestCrossOriginPostRefused(t *testing.T) {
	h := newBareServer(t, func(context.Context) error { return nil }).Handler()
	req := httptest.NewRequest("POST", "/theme", nil)
	req.Header.Set("Sec-Fetch-Site", "cross-site")
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	if rec.Code != http.StatusForbidden {
		t.Errorf("cross-site POST /theme = %d, want 403", rec.Code)
	}
	req = httptest.NewRequest("POST", "/theme", nil)
	req.Header.Set("Sec-Fetch-Site", "same-origin")
	rec = httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	if rec.Code != http.StatusSeeOther {
		t.Errorf("same-origin POST /theme = %d, want 303", rec.Code)
	}
	if c := rec.Result().Cookies(); len(c) != 1 || c[0].Value != "night" {
		t.Errorf("theme cookie = %v, want theme=night", c)
	}
}

func TestPanicRecovered(t *testing.T) {
	s := newBareServer(t, func(context.Context) error { return nil })
	h := s.recoverPanics(http.HandlerFunc(func(http.ResponseWriter, *http.Request) { panic("boom") }))
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest("GET", "/", nil))
	if rec.Code != http.StatusInternalServerError {
		t.Errorf("status = %d, want 500", rec.Code)
	}
	if strings.Contains(rec.Body.String(), "boom") {
		t.Error("panic value shown to the user")
	}
}

func TestStaticServed(t *testing.T) {
	h := newBareServer(t, func(context.Context) error { return nil }).Handler()
	for _, p := range []string{"/static/app.css?v=1", "/static/app.js"} {
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, httptest.NewRequest("GET", p, nil))
		if rec.Code != http.StatusOK || rec.Body.Len() == 0 {
			t.Errorf("GET %s = %d (%d bytes), want 200 with content", p, rec.Code, rec.Body.Len())
		}
	}
}

package web

import (
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"strings"
	"time"

	"github.com/go-chi/chi/v5/middleware"
)

// contentSecurityPolicy allows only the server's own scripts, styles and
// images: no inline script, no inline style, no framing.
const contentSecurityPolicy = "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; " +
	"object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"

// secureHeaders sets the security headers every response carries.
func secureHeaders(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", contentSecurityPolicy)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Referrer-Policy", "same-origin")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		h.Set("Permissions-Policy", "geolocation=(), camera=(), microphone=()")
		if r.TLS != nil {
			h.Set("Strict-Transport-Security", "max-age=31536000")
		}
		next.ServeHTTP(w, r)
	})
}

// logRequests writes one structured log line per request. Secret path
// segments (sign-in, invitation and share tokens) are redacted.
func (s *Server) logRequests(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		start := time.Now() // elapsed
		ww := middleware.NewWrapResponseWriter(w, r.ProtoMajor)
		next.ServeHTTP(ww, r)
		status := ww.Status()
		if status == 0 {
			status = http.StatusOK
		}
		level := slog.LevelInfo
		switch {
		case status == http.StatusServiceUnavailable && ww.Header().Get("Retry-After") != "":
			level = slog.LevelWarn // the heavy-work gate refused it (heavy.go)
		case status >= 500:
			level = slog.LevelError
		}
		s.log.LogAttrs(r.Context(), level, "request",
			slog.String("method", r.Method),
			slog.String("path", redactPath(r.URL.Path)),
			slog.Int("status", status),
			slog.Int("bytes", ww.BytesWritten()),
			slog.Duration("duration", time.Since(start)), // elapsed
			slog.String("remote", r.RemoteAddr),
		)
	})
}

// secretPrefixes are paths whose last segment is a bearer secret.
var secretPrefixes = []string{"/login/link/", "/invite/", "/share/"}

func redactPath(p string) string {
	for _, pre := range secretPrefixes {
		if strings.HasPrefix(p, pre) && len(p) > len(pre) {
			rest := p[len(pre):]
			if i := strings.IndexByte(rest, '/'); i >= 0 {
				return pre + "[redacted]" + rest[i:]
			}
			return pre + "[redacted]"
		}
	}
	return p
}

// recoverPanics turns a panic in a handler into a logged error and a plain
// 500 page: no panic reaches a user.
func (s *Server) recoverPanics(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		defer func() {
			v := recover()
			if v == nil {
				return
			}
			if v == http.ErrAbortHandler {
				panic(v)
			}
			s.log.Error("panic in handler", "path", redactPath(r.URL.Path), "panic", fmt.Sprint(v), "stack", string(debug.Stack()))
			s.renderError(w, r, fmt.Errorf("panic: %v", v))
		}()
		next.ServeHTTP(w, r)
	})
}

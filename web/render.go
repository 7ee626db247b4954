package web

import (
	"bytes"
	"net/http"

	"github.com/a-h/templ"

	"phasecast/web/page"
)

// render writes a component with status. The page is rendered into a buffer
// first so a failure half-way gives a clean error page, not half a page.
func (s *Server) render(w http.ResponseWriter, r *http.Request, status int, c templ.Component) {
	var buf bytes.Buffer
	if err := c.Render(r.Context(), &buf); err != nil {
		s.log.Error("render", "path", redactPath(r.URL.Path), "err", err)
		http.Error(w, "Something went wrong on our side; it has been logged.", http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(status)
	if _, err := buf.WriteTo(w); err != nil {
		s.log.Debug("write response", "err", err)
	}
}

// renderError shows the short safe message for err and logs the details.
func (s *Server) renderError(w http.ResponseWriter, r *http.Request, err error) {
	status, msg := statusFor(err)
	if code, _ := errorCode(err); code == codeBusy {
		s.log.Warn("request refused: busy", "path", redactPath(r.URL.Path), "err", err)
	} else if status >= 500 {
		s.log.Error("request failed", "path", redactPath(r.URL.Path), "err", err)
	} else {
		s.log.Info("request refused", "path", redactPath(r.URL.Path), "status", status, "err", err)
	}
	c := s.chrome(r, http.StatusText(status), "")
	if u, ok := s.pageUser(r); ok {
		c = s.chromeFor(r, u, http.StatusText(status), "")
	}
	s.render(w, r, status, page.ErrorPage(c, page.ErrorView{Status: status, Heading: http.StatusText(status), Message: msg}))
}

// chrome returns the page frame for r: title, active navigation entry,
// signed-in user and theme.
func (s *Server) chrome(r *http.Request, title, nav string) page.Chrome {
	c := page.Chrome{Title: title, Nav: nav, NightMode: nightMode(r)}
	return c
}

package web

import (
	"net/http"
	"net/url"
	"time"
)

const themeCookie = "theme"

// nightMode reports whether r asks for the night-vision theme.
func nightMode(r *http.Request) bool {
	c, err := r.Cookie(themeCookie)
	return err == nil && c.Value == "night"
}

// toggleTheme switches between the day and night-vision themes without
// JavaScript (the script does the same in the browser) and returns to the
// page the form was on.
func (s *Server) toggleTheme(w http.ResponseWriter, r *http.Request) {
	v := "night"
	if nightMode(r) {
		v = "day"
	}
	http.SetCookie(w, &http.Cookie{
		Name: themeCookie, Value: v, Path: "/", MaxAge: int((365 * 24 * time.Hour).Seconds()),
		SameSite: http.SameSiteLaxMode, Secure: s.secure(r),
	})
	http.Redirect(w, r, localReferer(r), http.StatusSeeOther)
}

// localReferer returns the path of the Referer when it is on this site, and
// "/" otherwise (never an open redirect).
func localReferer(r *http.Request) string {
	u, err := url.Parse(r.Referer())
	if err != nil || u.Host != r.Host || u.Path == "" || u.Path[0] != '/' {
		return "/"
	}
	if u.RawQuery != "" {
		return u.Path + "?" + u.RawQuery
	}
	return u.Path
}

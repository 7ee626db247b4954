package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"phasecast/store"
	"phasecast/web/page"
)

const (
	sessionCookie = "phasecast_session"
	teamCookie    = "phasecast_team"
)

// user is a signed-in request: who is calling and which of their teams the
// pages show (Team.TeamID is 0 for a user in no team).
type user struct {
	actor store.Actor
	team  store.Membership
}

// canEdit reports whether the user's role in the current team may change
// entity (the store's single policy decides).
func (u *user) can(action store.Action, entity store.Entity) bool {
	return store.Can(u.team.Role, action, entity)
}

// sessionUser returns the signed-in user of r, if any.
func (s *Server) sessionUser(r *http.Request) (*user, bool) {
	c, err := r.Cookie(sessionCookie)
	if err != nil || c.Value == "" {
		return nil, false
	}
	a, err := s.store.SessionActor(r.Context(), c.Value)
	if err != nil {
		if store.ErrorCode(err) != store.EFORBIDDEN {
			s.log.Error("session lookup", "err", err)
		}
		return nil, false
	}
	u := &user{actor: a}
	want, err := strconv.ParseInt(cookieValue(r, teamCookie), 10, 64)
	if err != nil {
		want = 0 // no team cookie, or a garbled one: the user's first team
	}
	for _, m := range a.Teams {
		if m.TeamID == want || u.team.TeamID == 0 {
			u.team = m
		}
		if m.TeamID == want {
			break
		}
	}
	return u, true
}

func cookieValue(r *http.Request, name string) string {
	c, err := r.Cookie(name)
	if err != nil {
		return ""
	}
	return c.Value
}

// userKey is the request context key of the signed-in *user, so that an
// error page shows the header of the user it refuses.
type userKey struct{}

// pageUser returns the signed-in user of r: the one signedIn found, or a
// session lookup on routes without a guard (a page that does not exist).
func (s *Server) pageUser(r *http.Request) (*user, bool) {
	if u, ok := r.Context().Value(userKey{}).(*user); ok {
		return u, true
	}
	return s.sessionUser(r)
}

// signedIn wraps a handler that needs a signed-in user; anyone else is sent
// to the sign-in page (and back afterwards).
func (s *Server) signedIn(h func(http.ResponseWriter, *http.Request, *user)) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		u, ok := s.sessionUser(r)
		if !ok {
			next := r.URL.Path
			if r.Method != http.MethodGet {
				next = localReferer(r)
			} else if r.URL.RawQuery != "" {
				next += "?" + r.URL.RawQuery
			}
			http.Redirect(w, r, "/login?next="+url.QueryEscape(next), http.StatusSeeOther)
			return
		}
		h(w, r.WithContext(context.WithValue(r.Context(), userKey{}, u)), u)
	}
}

// inTeam wraps a handler that needs a current team; a user in no team is
// offered to make one.
func (s *Server) inTeam(h func(http.ResponseWriter, *http.Request, *user)) http.HandlerFunc {
	return s.signedIn(func(w http.ResponseWriter, r *http.Request, u *user) {
		if u.team.TeamID == 0 {
			s.render(w, r, http.StatusOK, page.NoTeam(s.chromeFor(r, u, "No team", ""), page.NoTeamView{Errs: page.Errs{}}))
			return
		}
		h(w, r, u)
	})
}

// startSession sets the session cookie for a new session token, after
// ending the session the browser came with (a new token on every sign-in:
// no session fixation).
func (s *Server) startSession(w http.ResponseWriter, r *http.Request, token string) {
	if old := cookieValue(r, sessionCookie); old != "" {
		if err := s.store.SignOut(r.Context(), old); err != nil {
			s.log.Warn("end previous session", "err", err)
		}
	}
	http.SetCookie(w, &http.Cookie{
		Name: sessionCookie, Value: token, Path: "/", HttpOnly: true,
		SameSite: http.SameSiteLaxMode, Secure: s.secure(r), MaxAge: 30 * 24 * 3600,
	})
}

// endSession clears the session cookie.
func (s *Server) endSession(w http.ResponseWriter, r *http.Request) {
	http.SetCookie(w, &http.Cookie{
		Name: sessionCookie, Value: "", Path: "/", HttpOnly: true,
		SameSite: http.SameSiteLaxMode, Secure: s.secure(r), MaxAge: -1,
	})
}

// secure reports whether cookies must be Secure: the request came over
// TLS, or the server is reached at an https:// address (TLS ended by a
// proxy in front).
func (s *Server) secure(r *http.Request) bool {
	return r.TLS != nil || strings.HasPrefix(s.baseURL, "https://")
}

// safeNext returns next when it is a path on this site, and def otherwise
// (never an open redirect: "//host" and "/\host" are refused).
func safeNext(next, def string) string {
	if next == "" || next[0] != '/' || strings.HasPrefix(next, "//") || strings.HasPrefix(next, "/\\") {
		return def
	}
	return next
}

// chromeFor returns the page frame for a signed-in user.
func (s *Server) chromeFor(r *http.Request, u *user, title, nav string) page.Chrome {
	c := s.chrome(r, title, nav)
	c.User = u.actor.Name
	c.Team = u.team.TeamName
	c.Flash, c.FlashErr = flashFor(r.URL.Query().Get("m"))
	return c
}

package web

import "net/http"

// routes registers every route of the application. This is the only place
// routes are declared. Every state-changing route is a POST (or, under
// /api/v1, PUT/DELETE) and passes the cross-origin protection of Handler.
func (s *Server) routes(mux *http.ServeMux) {
	mux.HandleFunc("GET /healthz", s.healthz)
	mux.Handle("GET /static/", staticFiles())
	mux.HandleFunc("POST /theme", s.toggleTheme)
	mux.HandleFunc("GET /{$}", s.home)

	// Signing in and out, invitations.
	mux.HandleFunc("GET /login", s.signInForm)
	mux.HandleFunc("POST /login", s.signInSubmit)
	mux.HandleFunc("GET /login/link/{token}", s.signInLinkForm)
	mux.HandleFunc("POST /login/link/{token}", s.signInLinkSubmit)
	mux.HandleFunc("POST /logout", s.signOut)
	mux.HandleFunc("GET /invite/{token}", s.invitationShow)
	mux.HandleFunc("POST /invite/{token}", s.invitationAccept)

	// Account.
	mux.HandleFunc("GET /account", s.signedIn(s.accountShow))
	mux.HandleFunc("POST /account/profile", s.signedIn(s.accountProfile))
	mux.HandleFunc("POST /account/password", s.signedIn(s.accountPassword))
	mux.HandleFunc("POST /account/tokens", s.signedIn(s.accountTokenCreate))
	mux.HandleFunc("POST /account/tokens/{id}/revoke", s.signedIn(s.accountTokenRevoke))

	// Team.
	mux.HandleFunc("GET /team", s.inTeam(s.teamShow))
	mux.HandleFunc("POST /teams", s.signedIn(s.teamCreate))
	mux.HandleFunc("POST /team/select", s.signedIn(s.teamSelect))
	mux.HandleFunc("POST /team/invitations", s.inTeam(s.teamInviteCreate))
	mux.HandleFunc("POST /team/invitations/{id}/revoke", s.inTeam(s.teamInviteRevoke))
	mux.HandleFunc("POST /team/members/{id}/role", s.inTeam(s.teamMemberRole))
	mux.HandleFunc("POST /team/members/{id}/remove", s.inTeam(s.teamMemberRemove))

	mux.HandleFunc("/", s.notFound)
}

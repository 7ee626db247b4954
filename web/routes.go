package web

import (
	"net/http"

	"phasecast/store"
)

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

	mux.HandleFunc("GET /tonight", s.inTeam(s.tonightShow))
	mux.HandleFunc("GET /tonight/body", s.inTeam(s.tonightBody))
	mux.HandleFunc("GET /night", s.inTeam(s.nightShow))
	mux.HandleFunc("GET /night/sheet", s.inTeam(s.nightSheet))
	mux.HandleFunc("GET /night.csv", s.inTeam(s.nightExport("csv")))
	mux.HandleFunc("GET /night.json", s.inTeam(s.nightExport("json")))
	mux.HandleFunc("GET /night.ics", s.inTeam(s.nightExport("ics")))

	// Targets and lists.
	mux.HandleFunc("GET /targets", s.inTeam(s.targetsList))
	mux.HandleFunc("GET /targets/new", s.inTeam(s.targetNew))
	mux.HandleFunc("POST /targets", s.inTeam(s.targetCreate))
	mux.HandleFunc("GET /targets/{id}", s.inTeam(s.targetShow))
	mux.HandleFunc("GET /targets/{id}/edit", s.inTeam(s.targetEdit))
	mux.HandleFunc("POST /targets/{id}", s.inTeam(s.targetUpdate))
	mux.HandleFunc("POST /targets/{id}/delete", s.inTeam(s.targetDelete))
	mux.HandleFunc("POST /targets/{id}/timings", s.inTeam(s.timingAdd))
	mux.HandleFunc("POST /targets/{id}/refine", s.inTeam(s.targetRefine))
	mux.HandleFunc("POST /timings/{id}/delete", s.inTeam(s.timingDelete))
	mux.HandleFunc("POST /lists", s.inTeam(s.listCreate))
	mux.HandleFunc("POST /lists/{id}", s.inTeam(s.listUpdate))
	mux.HandleFunc("POST /lists/{id}/delete", s.inTeam(s.listDelete))
	mux.HandleFunc("GET /lists/{id}/import", s.inTeam(s.importForm))
	mux.HandleFunc("POST /lists/{id}/import/preview", s.inTeam(s.importPreview))
	mux.HandleFunc("POST /lists/{id}/import", s.inTeam(s.importCommit))
	mux.HandleFunc("GET /lists/{id}/export.csv", s.inTeam(s.listExport(store.FormatCSV)))
	mux.HandleFunc("GET /lists/{id}/export.json", s.inTeam(s.listExport(store.FormatJSON)))
	mux.HandleFunc("POST /lists/{id}/share", s.inTeam(s.shareCreate))
	mux.HandleFunc("POST /shares/{id}/revoke", s.inTeam(s.shareRevoke))

	// Runs and background computations.
	mux.HandleFunc("GET /runs", s.inTeam(s.runsList))
	mux.HandleFunc("POST /runs", s.inTeam(s.runCreate))
	mux.HandleFunc("GET /runs/{id}", s.inTeam(s.runShow))
	mux.HandleFunc("POST /runs/{id}/optimize", s.inTeam(s.runOptimize))
	mux.HandleFunc("POST /runs/{id}/mark", s.inTeam(s.runMark))
	mux.HandleFunc("POST /runs/{id}/share", s.inTeam(s.runShare))
	mux.HandleFunc("POST /runs/{id}/observed", s.inTeam(s.runObserved))
	mux.HandleFunc("GET /runs/{id}/plan.csv", s.inTeam(s.runExport("csv")))
	mux.HandleFunc("GET /runs/{id}/plan.json", s.inTeam(s.runExport("json")))
	mux.HandleFunc("GET /runs/{id}/plan.ics", s.inTeam(s.runExport("ics")))
	mux.HandleFunc("GET /jobs/{id}", s.signedIn(s.jobShow))
	mux.HandleFunc("GET /jobs/{id}/progress", s.signedIn(s.jobProgress))
	mux.HandleFunc("POST /jobs/{id}/cancel", s.signedIn(s.jobCancel))

	// Queue windows.
	mux.HandleFunc("GET /windows", s.inTeam(s.windowsShow))
	mux.HandleFunc("GET /windows.csv", s.inTeam(s.windowsExport("csv")))
	mux.HandleFunc("GET /windows.json", s.inTeam(s.windowsExport("json")))
	mux.HandleFunc("GET /windows.ics", s.inTeam(s.windowsExport("ics")))

	// Sites.
	mux.HandleFunc("GET /sites", s.inTeam(s.sitesList))
	mux.HandleFunc("GET /sites/new", s.inTeam(s.siteNew))
	mux.HandleFunc("POST /sites", s.inTeam(s.siteCreate))
	mux.HandleFunc("GET /sites/{id}", s.inTeam(s.siteShow))
	mux.HandleFunc("POST /sites/{id}", s.inTeam(s.siteUpdate))
	mux.HandleFunc("POST /sites/{id}/delete", s.inTeam(s.siteDelete))

	// Read-only share links (no sign-in).
	mux.HandleFunc("GET /share/{token}", s.shareShow)
	mux.HandleFunc("GET /share/{token}/night", s.shareNight)

	// JSON API (Authorization: Bearer TOKEN); see docs/api.md.
	mux.HandleFunc("GET /api/v1/teams", s.apiUser(s.apiTeams))
	mux.HandleFunc("GET /api/v1/lists", s.apiUser(s.apiLists))
	mux.HandleFunc("POST /api/v1/lists", s.apiUser(s.apiListCreate))
	mux.HandleFunc("PUT /api/v1/lists/{id}", s.apiUser(s.apiListUpdate))
	mux.HandleFunc("GET /api/v1/lists/{id}/targets", s.apiUser(s.apiTargetsList))
	mux.HandleFunc("POST /api/v1/lists/{id}/targets", s.apiUser(s.apiTargetCreate))
	mux.HandleFunc("GET /api/v1/targets/{id}", s.apiUser(s.apiTargetGet))
	mux.HandleFunc("PUT /api/v1/targets/{id}", s.apiUser(s.apiTargetUpdate))
	mux.HandleFunc("DELETE /api/v1/targets/{id}", s.apiUser(s.apiTargetDelete))
	mux.HandleFunc("GET /api/v1/night", s.apiUser(s.apiNight))
	mux.HandleFunc("GET /api/v1/windows", s.apiUser(s.apiWindows))
	mux.HandleFunc("GET /api/v1/runs", s.apiUser(s.apiRuns))
	mux.HandleFunc("GET /api/v1/runs/{id}/plan", s.apiUser(s.apiRunPlan))
	mux.HandleFunc("POST /api/v1/runs/{id}/plan", s.apiUser(s.apiRunPlanCreate))
	mux.HandleFunc("GET /api/v1/runs/{id}/coverage", s.apiUser(s.apiRunCoverage))
	mux.HandleFunc("/api/", s.apiNotFound)

	mux.HandleFunc("/", s.notFound)
}

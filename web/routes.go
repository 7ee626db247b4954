package web

import (
	"errors"
	"net/http"
	"strings"

	"github.com/go-chi/chi/v5"
	"github.com/go-chi/chi/v5/middleware"

	"phasecast/store"
)

// userHandler is a handler that runs for a known user (from a session or
// an API token).
type userHandler = func(http.ResponseWriter, *http.Request, *user)

// guarded registers userHandlers on a chi.Router through one guard
// (signedIn, inTeam or apiUser), so that a route group states its guard
// once.
type guarded struct {
	r     chi.Router
	guard func(userHandler) http.HandlerFunc
}

func (g guarded) get(pattern string, h userHandler)  { g.r.Get(pattern, g.guard(h)) }
func (g guarded) post(pattern string, h userHandler) { g.r.Post(pattern, g.guard(h)) }
func (g guarded) put(pattern string, h userHandler)  { g.r.Put(pattern, g.guard(h)) }
func (g guarded) del(pattern string, h userHandler)  { g.r.Delete(pattern, g.guard(h)) }

// router returns the chi router with every route of the application and
// the middleware around them: request log, panic recovery, security
// headers and cross-origin protection (outermost first). This is the only
// place routes are declared. Every state-changing route is a POST (or,
// under /api/v1, PUT/DELETE) and passes the cross-origin protection.
//
// Path parameters ({id}, {token}) are read with r.PathValue: chi v5.5
// copies its URL parameters into the request's path values.
func (s *Server) router() chi.Router {
	r := chi.NewRouter()
	csrf := http.NewCrossOriginProtection()
	csrf.SetDenyHandler(http.HandlerFunc(s.crossOriginDenied))
	r.Use(s.logRequests, s.recoverPanics, secureHeaders, csrf.Handler,
		middleware.GetHead) // a GET route answers HEAD too, as with net/http's ServeMux
	// No 405s: an address without a route for the method is "not found",
	// as a page or, under /api/, as a JSON error.
	r.NotFound(s.noRoute)
	r.MethodNotAllowed(s.noRoute)

	r.Get("/healthz", s.healthz)
	r.Method(http.MethodGet, "/static/*", staticFiles())
	r.Post("/theme", s.toggleTheme)
	r.Get("/", s.home)

	// Signing in and out, invitations: no sign-in needed.
	r.Get("/login", s.signInForm)
	r.Post("/login", s.signInSubmit)
	r.Get("/login/link/{token}", s.signInLinkForm)
	r.Post("/login/link/{token}", s.signInLinkSubmit)
	r.Post("/logout", s.signOut)
	r.Get("/invite/{token}", s.invitationShow)
	r.Post("/invite/{token}", s.invitationAccept)

	// Read-only share links (no sign-in).
	r.Get("/share/{token}", s.shareShow)
	r.Get("/share/{token}/night", s.heavyPublic(s.shareNight))

	// Signed in, with or without a team.
	r.Group(func(r chi.Router) {
		g := guarded{r, s.signedIn}
		g.get("/account", s.accountShow)
		g.post("/account/profile", s.accountProfile)
		g.post("/account/password", s.accountPassword)
		g.post("/account/tokens", s.accountTokenCreate)
		g.post("/account/tokens/{id}/revoke", s.accountTokenRevoke)
		g.post("/teams", s.teamCreate)
		g.post("/team/select", s.teamSelect)
		g.get("/jobs/{id}", s.jobShow)
		g.get("/jobs/{id}/progress", s.jobProgress)
		g.post("/jobs/{id}/cancel", s.jobCancel)
	})

	// Signed in with a current team.
	r.Group(func(r chi.Router) {
		g := guarded{r, s.inTeam}
		g.get("/team", s.teamShow)
		g.post("/team/invitations", s.teamInviteCreate)
		g.post("/team/invitations/{id}/revoke", s.teamInviteRevoke)
		g.post("/team/members/{id}/role", s.teamMemberRole)
		g.post("/team/members/{id}/remove", s.teamMemberRemove)

		g.get("/tonight", s.heavy(s.tonightShow))
		g.get("/tonight/body", s.heavy(s.tonightBody))
		g.get("/night", s.heavy(s.nightShow))
		g.get("/night/sheet", s.heavy(s.nightSheet))
		g.get("/night/telescope", s.heavy(s.nightTelescope))
		g.get("/night/telescope.csv", s.heavy(s.nightTelescopeExport("csv")))
		g.get("/night/telescope.json", s.heavy(s.nightTelescopeExport("json")))
		g.get("/night.csv", s.heavy(s.nightExport("csv")))
		g.get("/night.json", s.heavy(s.nightExport("json")))
		g.get("/night.ics", s.heavy(s.nightExport("ics")))

		// Targets and lists.
		g.get("/targets", s.targetsList)
		g.get("/targets/new", s.targetNew)
		g.post("/targets", s.targetCreate)
		g.get("/targets/{id}", s.targetShow)
		g.get("/targets/{id}/edit", s.targetEdit)
		g.post("/targets/{id}", s.targetUpdate)
		g.post("/targets/{id}/delete", s.targetDelete)
		g.post("/targets/{id}/timings", s.timingAdd)
		g.post("/targets/{id}/timings/preview", s.timingsPreview)
		g.post("/targets/{id}/timings/upload", s.timingsCommit)
		g.post("/targets/{id}/refine", s.targetRefine)
		g.post("/timings/{id}/delete", s.timingDelete)
		g.post("/lists", s.listCreate)
		g.post("/lists/{id}", s.listUpdate)
		g.post("/lists/{id}/delete", s.listDelete)
		g.get("/lists/{id}/import", s.importForm)
		g.post("/lists/{id}/import/preview", s.heavy(s.importPreview))
		g.post("/lists/{id}/import", s.heavy(s.importCommit))
		g.get("/lists/{id}/export.csv", s.listExport(store.FormatCSV))
		g.get("/lists/{id}/export.json", s.listExport(store.FormatJSON))
		g.post("/lists/{id}/share", s.shareCreate)
		g.post("/shares/{id}/revoke", s.shareRevoke)

		// Runs and background computations.
		g.get("/runs", s.runsList)
		g.post("/runs", s.runCreate)
		g.get("/runs/{id}", s.runShow)
		g.post("/runs/{id}/optimize", s.runOptimize)
		g.post("/runs/{id}/mark", s.runMark)
		g.post("/runs/{id}/share", s.runShare)
		g.post("/runs/{id}/observed", s.runObserved)
		g.get("/runs/{id}/plan.csv", s.runExport("csv"))
		g.get("/runs/{id}/plan.json", s.runExport("json"))
		g.get("/runs/{id}/plan.ics", s.runExport("ics"))

		// Queue windows.
		g.get("/windows", s.heavy(s.windowsShow))
		g.get("/windows.csv", s.heavy(s.windowsExport("csv")))
		g.get("/windows.json", s.heavy(s.windowsExport("json")))
		g.get("/windows.ics", s.heavy(s.windowsExport("ics")))

		// Proposal sizing.
		g.get("/propose", s.heavy(s.proposeShow))
		g.get("/propose.json", s.heavy(s.proposeExport))

		// Sites.
		g.get("/sites", s.sitesList)
		g.get("/sites/new", s.siteNew)
		g.post("/sites", s.siteCreate)
		g.get("/sites/{id}", s.siteShow)
		g.post("/sites/{id}", s.siteUpdate)
		g.post("/sites/{id}/delete", s.siteDelete)
	})

	// JSON API (Authorization: Bearer TOKEN); see docs/api.md.
	r.Route("/api/v1", func(r chi.Router) {
		g := guarded{r, s.apiUser}
		g.get("/teams", s.apiTeams)
		g.get("/lists", s.apiLists)
		g.post("/lists", s.apiListCreate)
		g.put("/lists/{id}", s.apiListUpdate)
		g.get("/lists/{id}/targets", s.apiTargetsList)
		g.post("/lists/{id}/targets", s.apiTargetCreate)
		g.get("/targets/{id}", s.apiTargetGet)
		g.put("/targets/{id}", s.apiTargetUpdate)
		g.del("/targets/{id}", s.apiTargetDelete)
		g.post("/targets/{id}/timings", s.apiTimingsUpload)
		g.get("/night", s.heavy(s.apiNight))
		g.get("/windows", s.heavy(s.apiWindows))
		g.get("/runs", s.apiRuns)
		g.get("/runs/{id}/plan", s.apiRunPlan)
		g.post("/runs/{id}/plan", s.heavy(s.apiRunPlanCreate))
		g.get("/runs/{id}/coverage", s.apiRunCoverage)
	})
	return r
}

// crossOriginDenied answers a state-changing request sent from another
// site (http.CrossOriginProtection's refusal) with the app's 403 page, or
// a JSON error under /api/.
func (s *Server) crossOriginDenied(w http.ResponseWriter, r *http.Request) {
	err := &codedError{code: codeForbidden, err: errors.New("cross-origin request refused"),
		msg: "This request came from another site, so it was refused (protection against cross-site request forgery). Open the page on this site and send the form from there."}
	if strings.HasPrefix(r.URL.Path, "/api/") {
		s.apiError(w, r, err)
		return
	}
	s.renderError(w, r, err)
}

// noRoute answers a request no route takes: a JSON error under /api/, the
// "no page here" page elsewhere.
func (s *Server) noRoute(w http.ResponseWriter, r *http.Request) {
	if strings.HasPrefix(r.URL.Path, "/api/") {
		s.apiNotFound(w, r)
		return
	}
	s.notFound(w, r)
}

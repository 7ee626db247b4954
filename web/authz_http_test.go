package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"sort"
	"strings"
	"testing"
	"time"

	"github.com/go-chi/chi/v5"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// authzRoles are the callers every route is tried with: the three member
// roles of the test team, a member of another team, a signed-out visitor,
// a cookie-less visitor holding a share link of the team, and API clients
// holding a token of another team's member and of the team's editor.
var authzRoles = []string{"owner", "editor", "viewer", "outsider", "anon", "share", "apiOther", "apiOwn"}

// want is the expected status for each of authzRoles, in that order.
type want [8]int

const (
	ok   = http.StatusOK
	made = http.StatusCreated
	see  = http.StatusSeeOther // a redirect: after a change, or to sign in
	bad  = http.StatusUnprocessableEntity
	forb = http.StatusForbidden
	unau = http.StatusUnauthorized // API without a valid bearer token (RFC 6750, section 3.1)
	nf   = http.StatusNotFound
	tmr  = http.StatusTooManyRequests
)

// Recurring patterns of the table.
var (
	// A page of the caller's own current team (the outsider sees their own).
	teamPage = want{ok, ok, ok, ok, see, see, see, see}
	// A page of one of this team's things: another team's member gets 404.
	teamThing = want{ok, ok, ok, nf, see, see, see, see}
	// A change to one of this team's things by an editor or an owner.
	teamWrite = want{see, see, forb, nf, see, see, see, see}
	// An API read of one of this team's things.
	apiThing = want{unau, unau, unau, unau, unau, unau, nf, ok}
)

// authzWorld holds the ids a route's path and form are made from. A fresh
// world is made for each case of a row that changes something, so the
// order of the cases does not matter.
type authzWorld struct {
	list, target, targetVersion, site, siteVersion, run, timing  int64
	listVersion, shareID, inviteID, tokenID, memberID, memberVer int64
	plan                                                         int64 // the run's saved plan (shared world only)
	runShareToken, inviteToken, linkToken                        string
}

// authzRow is one route: its method and chi pattern, how to make the
// concrete request, and the expected status for every caller.
type authzRow struct {
	method, pattern string
	fresh           bool // make a new world for each case
	path            func(w authzWorld) string
	form            func(w authzWorld) url.Values
	json            func(w authzWorld) string
	want            want
}

func p(s string) func(authzWorld) string { return func(authzWorld) string { return s } }

func ids(w authzWorld) map[string]int64 {
	return map[string]int64{"list": w.list, "target": w.target, "site": w.site, "run": w.run}
}

// pf builds a path from a format using fields of the world by name.
func pf(format string, names ...string) func(authzWorld) string {
	return func(w authzWorld) string {
		m := ids(w)
		m["timing"], m["share"], m["invite"], m["token"], m["member"], m["plan"] = w.timing, w.shareID, w.inviteID, w.tokenID, w.memberID, w.plan
		args := make([]any, len(names))
		for i, n := range names {
			args[i] = m[n]
		}
		return fmt.Sprintf(format, args...)
	}
}

func form(kv ...string) func(authzWorld) url.Values {
	return func(authzWorld) url.Values {
		v := url.Values{}
		for i := 0; i+1 < len(kv); i += 2 {
			v.Set(kv[i], kv[i+1])
		}
		return v
	}
}

// authzTable is every route of the application. TestAuthorizationEveryRoute
// fails when a registered route has no row here.
func authzTable() []authzRow {
	night := func(w authzWorld) string {
		return fmt.Sprintf("?site=%d&list=%d&date=2026-03-14", w.site, w.list)
	}
	public := want{ok, ok, ok, ok, ok, ok, ok, ok}
	// Windows are computed for the caller's own team: another team's member
	// is told their team has no site and list (nothing of this team shown).
	windowsWant := want{ok, ok, ok, bad, see, see, see, see}
	return []authzRow{
		{method: "GET", pattern: "/healthz", path: p("/healthz"), want: public},
		{method: "GET", pattern: "/static/*", path: p("/static/nothing-here.css"), want: want{nf, nf, nf, nf, nf, nf, nf, nf}},
		{method: "POST", pattern: "/theme", path: p("/theme"), want: want{see, see, see, see, see, see, see, see}},
		{method: "GET", pattern: "/", path: p("/"), want: want{see, see, see, see, see, see, see, see}},

		{method: "GET", pattern: "/login", path: p("/login"), want: want{see, see, see, see, ok, ok, ok, ok}},
		{method: "POST", pattern: "/login", path: p("/login"), form: form("email", "nobody@example.org", "password", "not the password"),
			want: want{forb, forb, forb, forb, forb, forb, forb, forb}},
		{method: "GET", pattern: "/login/link/{token}", fresh: true, path: func(w authzWorld) string { return "/login/link/" + w.linkToken }, want: public},
		{method: "POST", pattern: "/login/link/{token}", fresh: true, path: func(w authzWorld) string { return "/login/link/" + w.linkToken },
			want: want{see, see, see, see, see, see, see, see}}, // members already
		{method: "POST", pattern: "/logout", path: p("/logout"), want: want{see, see, see, see, see, see, see, see}},
		{method: "GET", pattern: "/invite/{token}", fresh: true, path: func(w authzWorld) string { return "/invite/" + w.inviteToken }, want: public},

		// Share links: every caller holds the run's share link, except the
		// signed-out visitor, who tries an unknown token.
		{method: "GET", pattern: "/share/{token}", path: func(w authzWorld) string { return "/share/" + w.runShareToken },
			want: want{ok, ok, ok, ok, nf, ok, ok, ok}},
		{method: "GET", pattern: "/share/{token}/night", path: func(w authzWorld) string { return "/share/" + w.runShareToken + "/night?n=0" },
			want: want{ok, ok, ok, ok, nf, ok, ok, ok}},

		// Signed in, any team.
		{method: "GET", pattern: "/account", path: p("/account"), want: teamPage},
		{method: "POST", pattern: "/account/profile", path: p("/account/profile"), form: form("name", "", "email", "", "version", "1"),
			want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "POST", pattern: "/account/password", path: p("/account/password"), form: form("current", "wrong", "new_password", "x", "confirm", "y"),
			want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "POST", pattern: "/account/tokens", path: p("/account/tokens"), form: form("token_name", "script", "ttl_days", "30"),
			want: want{ok, ok, ok, ok, see, see, see, see}},
		// The token is the editor's: only the editor may revoke it.
		{method: "POST", pattern: "/account/tokens/{id}/revoke", fresh: true, path: pf("/account/tokens/%d/revoke", "token"),
			want: want{nf, see, nf, nf, see, see, see, see}},
		{method: "POST", pattern: "/team/select", path: p("/team/select"), form: form("team_id", "TEAM"), want: want{see, see, see, nf, see, see, see, see}},
		{method: "GET", pattern: "/jobs/{id}", path: p("/jobs/no-such-job"), want: want{nf, nf, nf, nf, see, see, see, see}},
		{method: "GET", pattern: "/jobs/{id}/progress", path: p("/jobs/no-such-job/progress"), want: want{nf, nf, nf, nf, see, see, see, see}},
		{method: "POST", pattern: "/jobs/{id}/cancel", path: p("/jobs/no-such-job/cancel"), want: want{nf, nf, nf, nf, see, see, see, see}},

		// Team.
		{method: "GET", pattern: "/team", path: p("/team"), want: teamPage},
		// The outsider owns their own team: the invitation is to that team.
		{method: "POST", pattern: "/team/invitations", path: p("/team/invitations"), form: form("role", "viewer", "ttl_days", "7"),
			want: want{ok, forb, forb, ok, see, see, see, see}},
		{method: "POST", pattern: "/team/invitations/{id}/revoke", fresh: true, path: pf("/team/invitations/%d/revoke", "invite"),
			want: want{see, forb, forb, nf, see, see, see, see}},
		{method: "POST", pattern: "/team/members/{id}/role", fresh: true, path: pf("/team/members/%d/role", "member"),
			form: func(w authzWorld) url.Values {
				return url.Values{"role": {"editor"}, "version": {fmt.Sprint(w.memberVer)}}
			},
			want: want{see, forb, forb, nf, see, see, see, see}},
		{method: "POST", pattern: "/team/members/{id}/remove", fresh: true, path: pf("/team/members/%d/remove", "member"),
			want: want{see, forb, forb, nf, see, see, see, see}},

		// Nights.
		{method: "GET", pattern: "/tonight", path: p("/tonight"), want: teamPage},
		{method: "GET", pattern: "/tonight/body", path: p("/tonight/body"), want: teamPage},
		{method: "GET", pattern: "/night", path: func(w authzWorld) string { return "/night" + night(w) }, want: teamPage},
		{method: "GET", pattern: "/night/sheet", path: func(w authzWorld) string { return "/night/sheet" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night/telescope", path: func(w authzWorld) string { return "/night/telescope" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night/telescope.csv", path: func(w authzWorld) string { return "/night/telescope.csv" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night/telescope.json", path: func(w authzWorld) string { return "/night/telescope.json" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night.csv", path: func(w authzWorld) string { return "/night.csv" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night.json", path: func(w authzWorld) string { return "/night.json" + night(w) }, want: teamThing},
		{method: "GET", pattern: "/night.ics", path: func(w authzWorld) string { return "/night.ics" + night(w) }, want: teamThing},

		// Targets and lists.
		{method: "GET", pattern: "/targets", path: pf("/targets?list=%d", "list"), want: teamThing},
		{method: "GET", pattern: "/targets/new", path: pf("/targets/new?list=%d", "list"), want: want{ok, ok, ok, nf, see, see, see, see}},
		{method: "POST", pattern: "/targets", path: p("/targets"), form: func(w authzWorld) url.Values {
			return url.Values{"list": {fmt.Sprint(w.list)}}
		}, want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "GET", pattern: "/targets/{id}", path: pf("/targets/%d", "target"), want: teamThing},
		{method: "GET", pattern: "/targets/{id}/edit", path: pf("/targets/%d/edit", "target"), want: want{ok, ok, ok, nf, see, see, see, see}},
		{method: "POST", pattern: "/targets/{id}", path: pf("/targets/%d", "target"), form: func(w authzWorld) url.Values {
			return url.Values{"list": {fmt.Sprint(w.list)}, "version": {fmt.Sprint(w.targetVersion)}}
		}, want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "POST", pattern: "/targets/{id}/delete", fresh: true, path: pf("/targets/%d/delete", "target"),
			form: func(w authzWorld) url.Values { return url.Values{"version": {fmt.Sprint(w.targetVersion)}} }, want: teamWrite},
		{method: "POST", pattern: "/targets/{id}/timings", path: pf("/targets/%d/timings", "target"), form: form("event", "nonsense"),
			want: want{bad, bad, bad, nf, see, see, see, see}},
		{method: "POST", pattern: "/targets/{id}/timings/preview", path: pf("/targets/%d/timings/preview", "target"), form: form("content", ""),
			want: want{bad, bad, bad, nf, see, see, see, see}},
		{method: "POST", pattern: "/targets/{id}/timings/upload", path: pf("/targets/%d/timings/upload", "target"), form: form("content", ""),
			want: want{bad, bad, bad, nf, see, see, see, see}},
		{method: "POST", pattern: "/targets/{id}/refine", fresh: true, path: pf("/targets/%d/refine", "target"),
			form: func(w authzWorld) url.Values { return url.Values{"version": {fmt.Sprint(w.targetVersion)}} },
			want: teamWrite}, // two T0 timings: the fit is adopted
		{method: "POST", pattern: "/timings/{id}/delete", fresh: true, path: pf("/timings/%d/delete", "timing"),
			form: func(w authzWorld) url.Values {
				return url.Values{"target": {fmt.Sprint(w.target)}, "version": {fmt.Sprint(w.targetVersion)}}
			}, want: teamWrite},
		{method: "POST", pattern: "/lists", fresh: true, path: p("/lists"), form: func(w authzWorld) url.Values { return url.Values{"name": {fmt.Sprint("Another list ", w.run)}} }, want: want{see, see, forb, see, see, see, see, see}},
		{method: "POST", pattern: "/lists/{id}", fresh: true, path: pf("/lists/%d", "list"), form: func(w authzWorld) url.Values {
			return url.Values{"name": {fmt.Sprint("Renamed ", w.run)}, "version": {fmt.Sprint(w.listVersion)}}
		}, want: teamWrite},
		{method: "POST", pattern: "/lists/{id}/delete", fresh: true, path: pf("/lists/%d/delete", "list"), form: func(w authzWorld) url.Values {
			return url.Values{"version": {fmt.Sprint(w.listVersion)}}
		}, want: want{http.StatusConflict, http.StatusConflict, forb, nf, see, see, see, see}}, // in use by the run
		{method: "GET", pattern: "/lists/{id}/import", path: pf("/lists/%d/import", "list"), want: want{ok, ok, ok, nf, see, see, see, see}},
		{method: "POST", pattern: "/lists/{id}/import/preview", path: pf("/lists/%d/import/preview", "list"), want: want{bad, bad, bad, nf, see, see, see, see}},
		{method: "POST", pattern: "/lists/{id}/import", path: pf("/lists/%d/import", "list"), want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "GET", pattern: "/lists/{id}/export.csv", path: pf("/lists/%d/export.csv", "list"), want: teamThing},
		{method: "GET", pattern: "/lists/{id}/export.json", path: pf("/lists/%d/export.json", "list"), want: teamThing},
		{method: "POST", pattern: "/lists/{id}/share", path: pf("/lists/%d/share", "list"), form: form("label", "x", "ttl_days", "7"),
			want: want{ok, ok, forb, nf, see, see, see, see}},
		{method: "POST", pattern: "/shares/{id}/revoke", fresh: true, path: pf("/shares/%d/revoke", "share"), want: teamWrite},

		// Runs and jobs.
		{method: "GET", pattern: "/runs", path: p("/runs"), want: teamPage},
		{method: "POST", pattern: "/runs", fresh: true, path: p("/runs"), form: func(w authzWorld) url.Values {
			return url.Values{"name": {fmt.Sprint("New run ", w.run)}, "list": {fmt.Sprint(w.list)}, "site": {fmt.Sprint(w.site)}, "nights": {"2026-03-14"}}
		}, want: teamWrite},
		{method: "GET", pattern: "/runs/{id}", path: pf("/runs/%d", "run"), want: teamThing},
		// A started job is followed to its end (a saved plan) before the next case.
		{method: "POST", pattern: "/runs/{id}/optimize", fresh: true, path: pf("/runs/%d/optimize", "run"), form: form("past", "0"), want: teamWrite},
		{method: "POST", pattern: "/runs/{id}/mark", path: pf("/runs/%d/mark", "run"), form: func(w authzWorld) url.Values {
			return url.Values{"plan": {fmt.Sprint(w.plan)}, "night": {"0"}, "block": {"0"}, "status": {"done"}}
		}, want: teamWrite},
		{method: "POST", pattern: "/runs/{id}/share", path: pf("/runs/%d/share", "run"), form: form("label", "x", "ttl_days", "7"),
			want: want{ok, ok, forb, nf, see, see, see, see}},
		{method: "POST", pattern: "/runs/{id}/observed", path: pf("/runs/%d/observed", "run"), want: want{bad, bad, bad, nf, see, see, see, see}},
		{method: "GET", pattern: "/runs/{id}/plan.csv", path: pf("/runs/%d/plan.csv?plan=%d", "run", "plan"), want: teamThing},
		{method: "GET", pattern: "/runs/{id}/plan.json", path: pf("/runs/%d/plan.json?plan=%d", "run", "plan"), want: teamThing},
		{method: "GET", pattern: "/runs/{id}/plan.ics", path: pf("/runs/%d/plan.ics?plan=%d", "run", "plan"), want: teamThing},

		// Queue windows.
		{method: "GET", pattern: "/windows", path: p("/windows"), want: teamPage},
		{method: "GET", pattern: "/windows.csv", path: windowsQuery("/windows.csv"), want: windowsWant},
		{method: "GET", pattern: "/windows.json", path: windowsQuery("/windows.json"), want: windowsWant},
		{method: "GET", pattern: "/windows.ics", path: windowsQuery("/windows.ics"), want: windowsWant},

		// Proposal sizing: computed for the caller's own team, like windows.
		{method: "GET", pattern: "/propose", path: p("/propose"), want: teamPage},
		{method: "GET", pattern: "/propose.json", path: func(w authzWorld) string {
			return fmt.Sprintf("/propose.json?site=%d&list=%d&t=%d&from=2026-03-14&to=2026-03-15&n=2", w.site, w.list, w.target)
		}, want: windowsWant},

		// Sites.
		{method: "GET", pattern: "/sites", path: p("/sites"), want: teamPage},
		{method: "GET", pattern: "/sites/new", path: p("/sites/new"), want: want{ok, ok, ok, ok, see, see, see, see}},
		{method: "POST", pattern: "/sites", path: p("/sites"), form: form("name", ""), want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "GET", pattern: "/sites/{id}", path: pf("/sites/%d", "site"), want: teamThing},
		{method: "POST", pattern: "/sites/{id}", path: pf("/sites/%d", "site"), form: func(w authzWorld) url.Values {
			return url.Values{"name": {""}, "version": {fmt.Sprint(w.siteVersion)}}
		}, want: want{bad, bad, bad, bad, see, see, see, see}},
		{method: "POST", pattern: "/sites/{id}/delete", fresh: true, path: pf("/sites/%d/delete", "site"), form: func(w authzWorld) url.Values {
			return url.Values{"version": {fmt.Sprint(w.siteVersion)}}
		}, want: want{http.StatusConflict, http.StatusConflict, forb, nf, see, see, see, see}}, // in use by the run

		// JSON API (401 without a valid token): session cookies and share links do not count, only an
		// API token; another team's token finds nothing of this team.
		{method: "GET", pattern: "/api/v1/teams", path: p("/api/v1/teams"), want: want{unau, unau, unau, unau, unau, unau, ok, ok}},
		{method: "GET", pattern: "/api/v1/lists", path: p("/api/v1/lists"), want: want{unau, unau, unau, unau, unau, unau, ok, ok}},
		{method: "POST", pattern: "/api/v1/lists", path: p("/api/v1/lists"), json: func(authzWorld) string { return `{"name":"API list"}` },
			want: want{unau, unau, unau, unau, unau, unau, made, made}},
		{method: "PUT", pattern: "/api/v1/lists/{id}", fresh: true, path: pf("/api/v1/lists/%d", "list"),
			json: func(w authzWorld) string {
				return fmt.Sprintf(`{"name":"Renamed %d","version":%d}`, w.run, w.listVersion)
			},
			want: want{unau, unau, unau, unau, unau, unau, nf, ok}},
		{method: "GET", pattern: "/api/v1/lists/{id}/targets", path: pf("/api/v1/lists/%d/targets", "list"), want: apiThing},
		{method: "POST", pattern: "/api/v1/lists/{id}/targets", path: pf("/api/v1/lists/%d/targets", "list"), json: func(authzWorld) string { return `{}` },
			want: want{unau, unau, unau, unau, unau, unau, bad, bad}},
		{method: "GET", pattern: "/api/v1/targets/{id}", path: pf("/api/v1/targets/%d", "target"), want: apiThing},
		{method: "PUT", pattern: "/api/v1/targets/{id}", path: pf("/api/v1/targets/%d", "target"), json: func(authzWorld) string { return `{}` },
			want: want{unau, unau, unau, unau, unau, unau, bad, bad}},
		{method: "DELETE", pattern: "/api/v1/targets/{id}", fresh: true, path: pf("/api/v1/targets/%d?version=VERSION", "target"),
			want: want{unau, unau, unau, unau, unau, unau, nf, http.StatusNoContent}},
		{method: "POST", pattern: "/api/v1/targets/{id}/timings", path: pf("/api/v1/targets/%d/timings", "target"), json: func(authzWorld) string { return `{}` },
			want: want{unau, unau, unau, unau, unau, unau, bad, bad}},
		{method: "GET", pattern: "/api/v1/night", path: func(w authzWorld) string { return "/api/v1/night" + night(w) }, want: apiThing},
		{method: "GET", pattern: "/api/v1/windows", path: windowsQuery("/api/v1/windows"), want: want{unau, unau, unau, unau, unau, unau, bad, ok}},
		{method: "GET", pattern: "/api/v1/runs", path: p("/api/v1/runs"), want: want{unau, unau, unau, unau, unau, unau, ok, ok}},
		{method: "GET", pattern: "/api/v1/runs/{id}/plan", path: pf("/api/v1/runs/%d/plan", "run"), want: apiThing},
		{method: "POST", pattern: "/api/v1/runs/{id}/plan", path: pf("/api/v1/runs/%d/plan", "run"), json: func(authzWorld) string { return `{}` },
			want: want{unau, unau, unau, unau, unau, unau, nf, made}},
		{method: "GET", pattern: "/api/v1/runs/{id}/coverage", path: pf("/api/v1/runs/%d/coverage", "run"), want: apiThing},

		// Last: these change the callers' memberships. Making a team adds
		// one to the caller (and the API picks a token's first team).
		{method: "POST", pattern: "/teams", path: p("/teams"), form: form("team_name", "Another team"), want: want{see, see, see, see, see, see, see, see}},
		// Accepting an invitation makes the outsider a member.
		{method: "POST", pattern: "/invite/{token}", fresh: true, path: func(w authzWorld) string { return "/invite/" + w.inviteToken },
			form: func(w authzWorld) url.Values {
				return url.Values{"name": {"New member"}, "email": {fmt.Sprintf("new%d@example.org", w.run)}, "password": {"long enough pass"}}
			},
			want: want{http.StatusConflict, http.StatusConflict, http.StatusConflict, see, see, see, see, see}}, // members already
	}
}

func windowsQuery(base string) func(authzWorld) string {
	return func(w authzWorld) string {
		return fmt.Sprintf("%s?site=%d&list=%d&t=%d&from=2026-03-14&to=2026-03-16", base, w.site, w.list, w.target)
	}
}

// newAuthzWorld makes, in the harness team, a site, a list with one
// target (with one timing), a run with a share link, a list share link,
// an open invitation, an API token of the editor, a sign-in link of a new
// user and one more viewer to change or remove.
func (h *harness) newAuthzWorld(tb testing.TB, n int) authzWorld {
	tb.Helper()
	ctx := context.Background()
	owner := h.actor("owner")
	site, err := h.store.CreateSite(ctx, owner, h.teamID, store.SiteInput{Name: fmt.Sprintf("Ridge %d", n), Zone: "America/Phoenix",
		Site: ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}, Constraints: planner.DefaultConstraints()})
	if err != nil {
		tb.Fatal(err)
	}
	list, err := h.store.CreateList(ctx, owner, h.teamID, store.ListInput{Name: fmt.Sprintf("List %d", n)})
	if err != nil {
		tb.Fatal(err)
	}
	t0, err := store.ParseEpoch("2460400.123457", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		tb.Fatal(err)
	}
	tg, err := h.store.CreateTarget(ctx, owner, list.ID, store.TargetInput{T0: t0, Target: planner.Target{Name: fmt.Sprintf("AZT %02d", n),
		RADeg: 150, DecDeg: 20, Priority: 1, AcquireS: 120,
		Ephem: ephem.Ephemeris{PeriodDays: 0.08, T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}}}})
	if err != nil {
		tb.Fatal(err)
	}
	w := authzWorld{list: list.ID, site: site.ID, target: tg.ID}
	ep, err := store.ParseEpoch("2460400.123457", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		tb.Fatal(err)
	}
	// A second T0 timing 1,000 cycles on, 4.3 s late: enough to refine.
	ep2, err := store.ParseEpoch("2460480.123507", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		tb.Fatal(err)
	}
	tms, err := h.store.AddTimings(ctx, owner, w.target, []store.TimingInput{{Event: "", T: ep, ErrDays: 1e-5}, {Event: "", T: ep2, ErrDays: 1e-5}})
	if err != nil {
		tb.Fatal(err)
	}
	w.timing = tms[0].ID
	if tg, err = h.store.GetTarget(ctx, owner, w.target); err != nil {
		tb.Fatal(err)
	}
	w.targetVersion = tg.Version
	sites, err := h.store.ListSites(ctx, owner, h.teamID)
	if err != nil {
		tb.Fatal(err)
	}
	for _, s := range sites {
		if s.ID == w.site {
			w.siteVersion = s.Version
		}
	}
	lists, err := h.store.ListLists(ctx, owner, h.teamID)
	if err != nil {
		tb.Fatal(err)
	}
	for _, l := range lists {
		if l.ID == w.list {
			w.listVersion = l.Version
		}
	}
	run, err := h.store.CreateRun(ctx, owner, h.teamID, store.RunInput{Name: fmt.Sprintf("Run %d", n), SiteID: w.site, ListID: w.list,
		Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}}})
	if err != nil {
		tb.Fatal(err)
	}
	w.run = run.ID
	if _, w.runShareToken, err = h.store.CreateShareLink(ctx, owner, store.ShareInput{RunID: w.run, Label: "run", TTL: 24 * time.Hour}); err != nil {
		tb.Fatal(err)
	}
	sl, _, err := h.store.CreateShareLink(ctx, owner, store.ShareInput{ListID: w.list, Label: "list", TTL: 24 * time.Hour})
	if err != nil {
		tb.Fatal(err)
	}
	w.shareID = sl.ID
	inv, tok, err := h.store.CreateInvitation(ctx, owner, h.teamID, store.RoleViewer, 24*time.Hour, "")
	if err != nil {
		tb.Fatal(err)
	}
	w.inviteID, w.inviteToken = inv.ID, tok
	k, _, err := h.store.CreateAPIToken(ctx, h.actor("editor"), fmt.Sprintf("script %d", n), 24*time.Hour)
	if err != nil {
		tb.Fatal(err)
	}
	w.tokenID = k.ID
	email := fmt.Sprintf("member%d@example.org", n)
	u, err := h.store.CreateUser(ctx, store.NewUser{Email: email, Name: fmt.Sprintf("Member %d", n), Password: testPassword})
	if err != nil {
		tb.Fatal(err)
	}
	_, itok, err := h.store.CreateInvitation(ctx, owner, h.teamID, store.RoleViewer, time.Hour, "")
	if err != nil {
		tb.Fatal(err)
	}
	m, err := h.store.AcceptInvitation(ctx, h.actor(fmt.Sprintf("member%d", n)), itok)
	if err != nil {
		tb.Fatal(err)
	}
	w.memberID, w.memberVer = u.ID, m.Version
	if w.linkToken, err = h.store.CreateSignInLink(ctx, email, time.Hour); err != nil {
		tb.Fatal(err)
	}
	return w
}

// planRun plans run runID as a and saves the plan through the optimizer's own code
// path (planRunJob) and returns the run's saved plans, newest first.
func (h *harness) planRun(tb testing.TB, a store.Actor, runID int64) []store.SavedPlan {
	tb.Helper()
	ctx := context.Background()
	in, err := h.srv.loadRun(ctx, a, runID)
	if err != nil {
		tb.Fatal(err)
	}
	if _, err := h.srv.planRunJob(ctx, a, in, 0, &job{}); err != nil {
		tb.Fatal(err)
	}
	plans, err := h.store.ListPlans(ctx, a, runID)
	if err != nil {
		tb.Fatal(err)
	}
	return plans
}

// addAuthzPlan plans w's run through the optimizer's own code path
// (planRunJob, as POST /runs/{id}/optimize does in the background) and
// records the saved plan's id; the plan must have a block to mark.
func (h *harness) addAuthzPlan(tb testing.TB, w *authzWorld) {
	tb.Helper()
	ctx := context.Background()
	owner := h.actor("owner")
	plans := h.planRun(tb, owner, w.run)
	if len(plans) != 1 {
		tb.Fatalf("run %d has %d saved plans, want 1", w.run, len(plans))
	}
	w.plan = plans[0].ID
	_, doc, _, err := h.srv.runPlanDoc(ctx, owner, w.run, w.plan)
	if err != nil {
		tb.Fatal(err)
	}
	if len(doc.Nights) == 0 || len(doc.Nights[0].Blocks) == 0 {
		tb.Fatalf("the saved plan of run %d has no block on its first night", w.run)
	}
}

// followJob waits until the background job that resp redirects to has
// finished and checks that it ended on the run's page with a saved plan.
func followJob(t *testing.T, h *harness, c *http.Client, resp *http.Response) {
	t.Helper()
	loc := resp.Header.Get("Location")
	if !strings.HasPrefix(loc, "/jobs/") {
		return
	}
	for range 600 { // a bound, not a timing: 600 polls of 50 ms
		_, body := h.get(c, loc+"/progress")
		var p struct {
			Done    bool   `json:"done"`
			Next    string `json:"next"`
			Message string `json:"message"`
		}
		if err := json.Unmarshal([]byte(body), &p); err != nil {
			t.Fatalf("progress of %s is not JSON: %.200s", loc, body)
		}
		if p.Done {
			if !strings.Contains(p.Next, "?plan=") {
				t.Errorf("job %s finished at %q: %s", loc, p.Next, p.Message)
			}
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatalf("job %s did not finish", loc)
}

// TestAuthorizationEveryRoute requests every registered route as each of
// authzRoles and checks the status. A route without a row fails the test.
func TestAuthorizationEveryRoute(t *testing.T) {
	h := newHarness(t)
	h.srv.logins = newLimiter(1_000_000, time.Millisecond) // the table signs in many times
	table := authzTable()

	t.Run("EveryRouteHasARow", func(t *testing.T) {
		rows := map[string]bool{}
		for _, r := range table {
			rows[r.method+" "+r.pattern] = true
		}
		var missing []string
		err := chi.Walk(h.srv.router(), func(method, route string, _ http.Handler, _ ...func(http.Handler) http.Handler) error {
			if !rows[method+" "+route] {
				missing = append(missing, method+" "+route)
			}
			delete(rows, method+" "+route)
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		sort.Strings(missing)
		for _, m := range missing {
			t.Errorf("route %s has no row in authzTable", m)
		}
		for r := range rows {
			t.Errorf("row %s matches no registered route", r)
		}
	})

	clients := map[string]*http.Client{}
	for _, role := range []string{"owner", "editor", "viewer", "outsider"} {
		clients[role] = h.client(role)
	}
	for _, role := range []string{"anon", "share", "apiOther", "apiOwn"} {
		clients[role] = h.client("")
	}
	ctx := context.Background()
	_, otherTok, err := h.store.CreateAPIToken(ctx, h.actor("outsider"), "outsider script", 24*time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	_, ownTok, err := h.store.CreateAPIToken(ctx, h.actor("editor"), "editor script", 24*time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	shared := h.newAuthzWorld(t, 0)
	h.addAuthzPlan(t, &shared)
	_, listShareTok, err := h.store.CreateShareLink(ctx, h.actor("owner"), store.ShareInput{ListID: shared.list, Label: "visitor", TTL: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	n, cases := 1, 0
	for _, row := range table {
		for i, role := range authzRoles {
			name := strings.ReplaceAll(row.method+row.pattern, "/", "_") + "/" + role
			t.Run(name, func(t *testing.T) {
				w := shared
				if row.fresh {
					n++
					w = h.newAuthzWorld(t, n)
				}
				if role == "anon" && strings.HasPrefix(row.pattern, "/share/") {
					w.runShareToken = "not-a-share-token"
				}
				path := strings.ReplaceAll(row.path(w), "VERSION", fmt.Sprint(w.targetVersion))
				path = strings.ReplaceAll(path, "TEAM", fmt.Sprint(h.teamID))
				var body io.Reader
				ctype := ""
				switch {
				case row.form != nil:
					f := row.form(w)
					if f.Get("team_id") == "TEAM" {
						f.Set("team_id", fmt.Sprint(h.teamID))
					}
					body, ctype = strings.NewReader(f.Encode()), "application/x-www-form-urlencoded"
				case row.json != nil:
					body, ctype = strings.NewReader(row.json(w)), "application/json"
				case row.method != http.MethodGet:
					body, ctype = strings.NewReader(""), "application/x-www-form-urlencoded"
				}
				req, err := http.NewRequest(row.method, h.ts.URL+path, body)
				if err != nil {
					t.Fatal(err)
				}
				if ctype != "" {
					req.Header.Set("Content-Type", ctype)
				}
				req.Header.Set("Sec-Fetch-Site", "same-origin")
				switch role {
				case "apiOther":
					req.Header.Set("Authorization", "Bearer "+otherTok)
				case "apiOwn":
					req.Header.Set("Authorization", "Bearer "+ownTok)
				case "share":
					// A share link is no API token and no session.
					req.Header.Set("Authorization", "Bearer "+listShareTok)
				}
				c := clients[role]
				if row.pattern == "/logout" || row.method == "POST" && (row.pattern == "/login/link/{token}" || row.pattern == "/invite/{token}") {
					// These end or replace the session: a client of its own.
					if i < 4 {
						c = h.client(role)
					} else {
						c = h.client("")
					}
				}
				resp, err := c.Do(req)
				if err != nil {
					t.Fatal(err)
				}
				b, _ := io.ReadAll(resp.Body)
				resp.Body.Close()
				if row.pattern == "/runs/{id}/optimize" {
					followJob(t, h, c, resp)
				}
				if (role == "outsider" || role == "apiOther") && !strings.HasPrefix(row.pattern, "/share/") && (strings.Contains(string(b), "AZT ") || strings.Contains(string(b), "Ridge ")) {
					t.Errorf("%s %s as %s shows this team's targets or sites", row.method, path, role)
				}
				if got := resp.StatusCode; got != row.want[i] {
					t.Errorf("%s %s as %s = %d, want %d (Location %q) %.200s", row.method, path, role, got, row.want[i], resp.Header.Get("Location"), b)
				}
			})
			cases++
		}
	}
	t.Logf("%d routes × %d callers = %d cases", len(table), len(authzRoles), cases)

	t.Run("CrossSitePostRefused", func(t *testing.T) {
		before, err := h.store.ListLists(ctx, h.actor("owner"), h.teamID)
		if err != nil {
			t.Fatal(err)
		}
		req, _ := http.NewRequest(http.MethodPost, h.ts.URL+"/lists", strings.NewReader("name=Cross+site"))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Sec-Fetch-Site", "cross-site")
		resp, err := clients["owner"].Do(req)
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != http.StatusForbidden {
			t.Errorf("cross-site POST /lists = %d, want 403", resp.StatusCode)
		}
		after, err := h.store.ListLists(ctx, h.actor("owner"), h.teamID)
		if err != nil {
			t.Fatal(err)
		}
		if len(after) != len(before) {
			t.Errorf("lists %d → %d after a refused cross-site POST", len(before), len(after))
		}
	})

	t.Run("NoRoute", func(t *testing.T) {
		tests := []struct {
			name, method, path string
			status             int
			json               bool
		}{
			{"UnknownPage", "GET", "/no-such-page", nf, false},
			{"WrongMethodPage", "DELETE", "/targets", nf, false},
			{"HeadOfGet", "HEAD", "/healthz", ok, false},
			{"UnknownAPI", "GET", "/api/v2/teams", nf, true},
			{"WrongMethodAPI", "DELETE", "/api/v1/teams", nf, true},
		}
		for _, tt := range tests {
			t.Run(tt.name, func(t *testing.T) {
				req, _ := http.NewRequest(tt.method, h.ts.URL+tt.path, nil)
				req.Header.Set("Sec-Fetch-Site", "same-origin")
				req.Header.Set("Authorization", "Bearer "+ownTok)
				resp, err := clients["owner"].Do(req)
				if err != nil {
					t.Fatal(err)
				}
				resp.Body.Close()
				isJSON := strings.HasPrefix(resp.Header.Get("Content-Type"), "application/json")
				if resp.StatusCode != tt.status || isJSON != tt.json {
					t.Errorf("%s %s = %d (JSON %v), want %d (JSON %v)", tt.method, tt.path, resp.StatusCode, isJSON, tt.status, tt.json)
				}
				if resp.Header.Get("Content-Security-Policy") != contentSecurityPolicy {
					t.Error("no Content-Security-Policy header")
				}
			})
		}
	})
}

package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"runtime"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// theirs are the ids of the outsider's team's things (otherTeamPlan).
type theirs struct{ site, list, target, run, plan, timing int64 }

// otherTeamPlan gives the outsider's team a site, a list with one target
// (with a timing) and a run with a saved plan, and returns the run and
// plan ids.
func (h *harness) otherTeamPlan(tb testing.TB) (runID, planID int64) {
	th := h.otherTeam(tb)
	return th.run, th.plan
}

// otherTeam makes the outsider's team's things of otherTeamPlan.
func (h *harness) otherTeam(tb testing.TB) theirs {
	tb.Helper()
	ctx := context.Background()
	a := h.actor("outsider")
	site, err := h.store.CreateSite(ctx, a, h.otherID, store.SiteInput{Name: "Far Hill", Zone: "UTC",
		Site: ephem.Site{LatDeg: 28.7, LonEastDeg: -17.9, ElevM: 2300}, Constraints: planner.DefaultConstraints()})
	if err != nil {
		tb.Fatal(err)
	}
	list, err := h.store.CreateList(ctx, a, h.otherID, store.ListInput{Name: "Their list"})
	if err != nil {
		tb.Fatal(err)
	}
	t0, err := store.ParseEpoch("2460400.223457", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		tb.Fatal(err)
	}
	tg, err := h.store.CreateTarget(ctx, a, list.ID, store.TargetInput{T0: t0, Target: planner.Target{Name: "FAR 01",
		RADeg: 160, DecDeg: 10, Priority: 1, AcquireS: 60,
		Ephem: ephem.Ephemeris{PeriodDays: 0.09, T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}}}})
	if err != nil {
		tb.Fatal(err)
	}
	tms, err := h.store.AddTimings(ctx, a, tg.ID, []store.TimingInput{{T: t0, ErrDays: 1e-5}})
	if err != nil {
		tb.Fatal(err)
	}
	run, err := h.store.CreateRun(ctx, a, h.otherID, store.RunInput{Name: "Their run", SiteID: site.ID, ListID: list.ID,
		Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}}})
	if err != nil {
		tb.Fatal(err)
	}
	plans := h.planRun(tb, a, run.ID)
	if len(plans) != 1 {
		tb.Fatalf("their run has %d plans, want 1", len(plans))
	}
	return theirs{site: site.ID, list: list.ID, target: tg.ID, run: run.ID, plan: plans[0].ID, timing: tms[0].ID}
}

// TestRunPlanParamRefused: ?plan= naming another team's plan, another run's
// plan, an unknown plan or no number at all is refused (404 or 422) on
// the API, the exports and the run page, where it used to answer 200 with
// the newest plan.
func TestRunPlanParamRefused(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	h.addAuthzPlan(t, &w)
	w2 := h.newAuthzWorld(t, 2)
	h.addAuthzPlan(t, &w2)
	_, theirPlan := h.otherTeamPlan(t)
	token := h.token("editor")
	c := h.client("editor")
	cases := []struct {
		name, plan string
		want       int
	}{
		{"Own", fmt.Sprint(w.plan), http.StatusOK},
		{"OtherTeam", fmt.Sprint(theirPlan), http.StatusNotFound},
		{"OtherRun", fmt.Sprint(w2.plan), http.StatusNotFound},
		{"Unknown", "987654", http.StatusNotFound},
		{"NotANumber", "newest", http.StatusUnprocessableEntity},
		{"Negative", "-3", http.StatusUnprocessableEntity},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			for _, path := range []string{"/api/v1/runs/%d/plan?plan=%s", "/api/v1/runs/%d/coverage?plan=%s"} {
				status, body := h.apiCall(token, http.MethodGet, fmt.Sprintf(path, w.run, tc.plan), nil)
				if status != tc.want {
					t.Errorf("%s: %d, want %d: %v", fmt.Sprintf(path, w.run, tc.plan), status, tc.want, body)
				}
			}
			for _, path := range []string{"/runs/%d?plan=%s", "/runs/%d/plan.csv?plan=%s", "/runs/%d/plan.json?plan=%s", "/runs/%d/plan.ics?plan=%s"} {
				resp, _ := h.get(c, fmt.Sprintf(path, w.run, tc.plan))
				if resp.StatusCode != tc.want {
					t.Errorf("%s: %d, want %d", fmt.Sprintf(path, w.run, tc.plan), resp.StatusCode, tc.want)
				}
			}
		})
	}
}

// TestAPIBodyInvalidUTF8: text that is not UTF-8 anywhere in a JSON body is
// 422 naming the member (it used to be stored as U+FFFD), and nothing is
// written.
func TestAPIBodyInvalidUTF8(t *testing.T) {
	h := newHarness(t)
	listID, token := hostileAPISetup(t, h)
	cases := []struct{ name, body, member string }{
		{"Name", strings.Replace(hostileAPITarget, `"PCX API"`, "\"PCX \xff API\"", 1), "name"},
		{"GoalEvent", strings.Replace(hostileAPITarget, `"phase":0.25,`, "\"event\":\"quad\xc3\",", 1), "goals[0].event"},
		{"Ephemeris", strings.Replace(hostileAPITarget, `"BJD_TDB"`, "\"BJD\xed\xa0\x80\"", 1), "ephemeris.t0_standard"},
		{"Tag", strings.Replace(hostileAPITarget, `"priority":2,`, "\"priority\":2,\"tags\":[\"ok\",\"b\xfe\"],", 1), "tags[1]"},
		{"MemberName", strings.Replace(hostileAPITarget, `"priority":2,`, "\"pri\xffority\":2,", 1), "pri"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			status, body := hostileAPIRaw(t, h, token, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), []byte(tc.body))
			if status != http.StatusUnprocessableEntity || !strings.Contains(string(body), "UTF-8") || !strings.Contains(string(body), tc.member) {
				t.Errorf("%d %s, want 422 naming %q and UTF-8", status, body, tc.member)
			}
		})
	}
	status, body := hostileAPIRaw(t, h, token, http.MethodPost, "/api/v1/lists", []byte("{\"name\":\"L\",\"description\":\"caf\xe9\"}"))
	if status != http.StatusUnprocessableEntity || !strings.Contains(string(body), "description") {
		t.Errorf("list: %d %s, want 422 naming description", status, body)
	}
	ts, err := h.store.ListTargets(context.Background(), h.actor("owner"), listID)
	if err != nil || len(ts) != 0 {
		t.Errorf("after refused bodies the list holds %d targets (%v)", len(ts), err)
	}
}

// TestBodyLimits: a JSON API body over 4 MiB and an import over 16 MiB are
// 413 naming the limit (they used to be 400 with a vague message).
func TestBodyLimits(t *testing.T) {
	h := newHarness(t)
	listID, token := hostileAPISetup(t, h)
	big := `{"name":"` + strings.Repeat("x", maxAPIBody) + `"}`
	status, body := hostileAPIRaw(t, h, token, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), []byte(big))
	if status != http.StatusRequestEntityTooLarge || !strings.Contains(string(body), "4 MiB") || !strings.Contains(string(body), codeTooLarge) {
		t.Errorf("API: %d %.300s, want 413 naming 4 MiB", status, body)
	}
	c := h.client("editor")
	file := "name,ra,dec\n" + strings.Repeat("PCX X,10,10\n", maxImportForm/12+10)
	for _, path := range []string{"/lists/%d/import/preview", "/lists/%d/import"} {
		resp, page := h.postBody(c, fmt.Sprintf(path, listID), url.Values{"content": {file}})
		if resp.StatusCode != http.StatusRequestEntityTooLarge || !strings.Contains(page, "16 MiB") {
			t.Errorf("%s: %d, want 413 naming 16 MiB: %.300s", path, resp.StatusCode, page)
		}
	}
}

// TestAPIPutIdentityMembers: "id" and "list_id" in a target body are
// output only; sent back as a GET gave them they are accepted, naming
// another list or target they are 422 and nothing changes.
func TestAPIPutIdentityMembers(t *testing.T) {
	h := newHarness(t)
	listID, token := hostileAPISetup(t, h)
	other, err := h.store.CreateList(context.Background(), h.actor("owner"), h.teamID, store.ListInput{Name: "Elsewhere"})
	if err != nil {
		t.Fatal(err)
	}
	status, created := hostileAPIRaw(t, h, token, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), []byte(hostileAPITarget))
	if status != http.StatusCreated {
		t.Fatalf("create: %d %s", status, created)
	}
	var tj map[string]any
	if err := json.Unmarshal(created, &tj); err != nil {
		t.Fatal(err)
	}
	path := fmt.Sprintf("/api/v1/targets/%v", tj["id"])
	send := func(change func(map[string]any)) (int, string) {
		m := map[string]any{}
		for k, v := range tj {
			m[k] = v
		}
		change(m)
		b, err := json.Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		status, body := hostileAPIRaw(t, h, token, http.MethodPut, path, b)
		return status, string(body)
	}
	if status, body := send(func(m map[string]any) { m["list_id"] = other.ID }); status != http.StatusUnprocessableEntity || !strings.Contains(body, "list_id") {
		t.Errorf("list_id of another list: %d %s, want 422 naming list_id", status, body)
	}
	if status, body := send(func(m map[string]any) { m["id"] = 99999 }); status != http.StatusUnprocessableEntity || !strings.Contains(body, `"id`) {
		t.Errorf("another id: %d %s, want 422 naming id", status, body)
	}
	if status, body := send(func(m map[string]any) { m["notes"] = "round trip" }); status != http.StatusOK {
		t.Errorf("the GET answer sent back: %d %s, want 200", status, body)
	}
	b := strings.Replace(hostileAPITarget, `{"name"`, fmt.Sprintf(`{"list_id":%d,"name"`, other.ID), 1)
	if status, body := hostileAPIRaw(t, h, token, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", listID), []byte(b)); status != http.StatusUnprocessableEntity {
		t.Errorf("create with another list_id: %d %s, want 422", status, body)
	}
	ts, err := h.store.ListTargets(context.Background(), h.actor("owner"), other.ID)
	if err != nil || len(ts) != 0 {
		t.Errorf("the other list holds %d targets (%v)", len(ts), err)
	}
}

// TestErrorPagesSignedIn: a signed-in user's 404, 400 and 422 pages carry
// their header (name, team, sign-out), as every other page does; they used
// to show the signed-out header.
func TestErrorPagesSignedIn(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	c := h.client("editor")
	cases := []struct {
		name, path string
		want       int
	}{
		{"NoRoute", "/no/such/page", http.StatusNotFound},
		{"OtherTeamThing", "/targets/987654", http.StatusNotFound},
		{"BadPlanParam", fmt.Sprintf("/runs/%d?plan=x", w.run), http.StatusUnprocessableEntity},
		{"Malformed", "/night?site=abc", http.StatusBadRequest},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, body := h.get(c, tc.path)
			if resp.StatusCode != tc.want {
				t.Fatalf("%s: %d, want %d", tc.path, resp.StatusCode, tc.want)
			}
			if !strings.Contains(body, `data-testid="whoami"`) || !strings.Contains(body, "Test editor") || !strings.Contains(body, `data-testid="logout"`) {
				t.Errorf("%s: the error page lacks the signed-in header", tc.path)
			}
		})
	}
	resp, body := h.get(h.client(""), "/no/such/page")
	if resp.StatusCode != http.StatusNotFound || strings.Contains(body, `data-testid="whoami"`) {
		t.Errorf("signed out: %d, header of a user shown: %v", resp.StatusCode, strings.Contains(body, "whoami"))
	}
}

// TestCrossOriginRefusalPage: a state-changing request from another site
// is answered with the app's 403 page (or a JSON error under /api/), not
// the standard library's bare text, and changes nothing.
func TestCrossOriginRefusalPage(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	c := h.client("editor")
	req, err := http.NewRequest(http.MethodPost, h.ts.URL+fmt.Sprintf("/lists/%d", w.list),
		strings.NewReader(url.Values{"name": {"Hijacked"}, "version": {fmt.Sprint(w.listVersion)}}.Encode()))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Sec-Fetch-Site", "cross-site")
	req.Header.Set("Origin", "https://evil.example")
	resp, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	b, err := io.ReadAll(resp.Body)
	resp.Body.Close()
	if err != nil {
		t.Fatal(err)
	}
	body := string(b)
	if resp.StatusCode != http.StatusForbidden || !strings.HasPrefix(resp.Header.Get("Content-Type"), "text/html") ||
		!strings.Contains(body, `data-testid="error-heading"`) || !strings.Contains(body, "another site") || !strings.Contains(body, `data-testid="whoami"`) {
		t.Errorf("cross-site POST: %d %s: %.300s", resp.StatusCode, resp.Header.Get("Content-Type"), body)
	}
	lists, err := h.store.ListLists(context.Background(), h.actor("owner"), h.teamID)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range lists {
		if l.Name == "Hijacked" {
			t.Error("the cross-site POST renamed the list")
		}
	}
	token := h.token("editor")
	req, err = http.NewRequest(http.MethodPost, h.ts.URL+"/api/v1/lists", strings.NewReader(`{"name":"Cross"}`))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Authorization", "Bearer "+token)
	req.Header.Set("Sec-Fetch-Site", "cross-site")
	resp, err = http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	b, err = io.ReadAll(resp.Body)
	resp.Body.Close()
	if err != nil {
		t.Fatal(err)
	}
	if resp.StatusCode != http.StatusForbidden || !strings.Contains(string(b), `"EFORBIDDEN"`) {
		t.Errorf("cross-site API POST: %d %s", resp.StatusCode, b)
	}
}

// TestRunPlanObjectiveBounds: a saved plan's objective (API) is never
// above its max_value, and states required_value, what meeting every
// requirement exactly is worth; a plan saved by an older version, whose
// max_value meant required_value, is read as such.
func TestRunPlanObjectiveBounds(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	h.addAuthzPlan(t, &w)
	status, body := h.apiCall(h.token("viewer"), http.MethodGet, fmt.Sprintf("/api/v1/runs/%d/plan", w.run), nil)
	if status != http.StatusOK {
		t.Fatalf("%d %v", status, body)
	}
	o, ok := body["objective"].(map[string]any)
	if !ok {
		t.Fatalf("no objective: %v", body)
	}
	v, req, most := o["value"].(float64), o["required_value"].(float64), o["max_value"].(float64)
	if !(req > 0) || v > most || req > most {
		t.Errorf("objective %v: want 0 < required_value ≤ max_value and value ≤ max_value", o)
	}
	old, err := loadDoc(store.SavedPlan{ID: 1, Output: []byte(`{"objective":{"value":445500000,"max_value":405000000}}`)})
	if err != nil {
		t.Fatal(err)
	}
	if old.Objective.RequiredValue != 405000000 || old.Objective.MaxValue != 0 {
		t.Errorf("an older plan's objective read as %+v", old.Objective)
	}
}

// zeros is an endless reader of the byte 'a'; io.LimitReader bounds it.
type zeros struct{}

func (zeros) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = 'a'
	}
	return len(p), nil
}

// bodiless are the state-changing routes that read no request body (a
// button with no fields, or the id in the address and query): they answer
// as usual and the server discards the body.
var bodiless = map[string]bool{
	"POST /theme": true, "POST /logout": true, "POST /login/link/{token}": true, "POST /account/tokens/{id}/revoke": true,
	"POST /jobs/{id}/cancel": true, "POST /team/invitations/{id}/revoke": true, "POST /team/members/{id}/remove": true,
	"POST /shares/{id}/revoke": true, "DELETE /api/v1/targets/{id}": true, "POST /api/v1/runs/{id}/plan": true,
	// An invitation is refused to a member before its form is read.
	"POST /invite/{token}": true,
}

// TestHugeBodyEveryRoute sends a 60 MB body to every state-changing route
// (every POST, PUT and DELETE of authzTable) as the editor, signed in and
// with an API token: no route answers 5xx, every route that reads a body
// answers 413 naming its limit (the routes of bodiless answer as without
// a body), and no request allocates more than 5 × the 16 MiB upload limit
// (runtime.MemStats.TotalAlloc around each request, client included).
func TestHugeBodyEveryRoute(t *testing.T) {
	if testing.Short() {
		t.Skip("60 MB bodies")
	}
	h := newHarness(t)
	h.srv.logins = newLimiter(1_000_000, time.Millisecond)
	token := h.token("editor")
	const size = 60 << 20
	var peak uint64
	for n, row := range authzTable() {
		if row.method == http.MethodGet {
			continue
		}
		t.Run(strings.ReplaceAll(row.method+row.pattern, "/", "_"), func(t *testing.T) {
			w := h.newAuthzWorld(t, n+1) // a fresh world and session: some rows delete or sign out
			h.addAuthzPlan(t, &w)
			c := h.client("editor")
			path := strings.ReplaceAll(row.path(w), "VERSION", fmt.Sprint(w.targetVersion))
			ctype := "application/x-www-form-urlencoded"
			body := io.LimitReader(zeros{}, size)
			if row.json != nil {
				ctype = "application/json"
			} else if strings.Contains(row.pattern, "/import") || strings.Contains(row.pattern, "/observed") {
				// An upload form: a 60 MB file part.
				ctype = "multipart/form-data; boundary=xyz"
				body = io.MultiReader(strings.NewReader("--xyz\r\nContent-Disposition: form-data; name=\"file\"; filename=\"big.csv\"\r\n"+
					"Content-Type: text/csv\r\n\r\n"), io.LimitReader(zeros{}, size), strings.NewReader("\r\n--xyz--\r\n"))
			}
			req, err := http.NewRequest(row.method, h.ts.URL+path, body)
			if err != nil {
				t.Fatal(err)
			}
			req.Header.Set("Content-Type", ctype)
			req.Header.Set("Sec-Fetch-Site", "same-origin")
			client := c
			if strings.HasPrefix(row.pattern, "/api/") {
				req.Header.Set("Authorization", "Bearer "+token)
				client = http.DefaultClient
			}
			var before runtime.MemStats
			runtime.ReadMemStats(&before)
			resp, err := client.Do(req)
			if err != nil {
				// The server may close the connection once it has refused
				// the body; the answer is then lost to this client.
				t.Logf("%s %s: %v", row.method, path, err)
				return
			}
			b, err := io.ReadAll(resp.Body)
			resp.Body.Close()
			if err != nil {
				t.Fatal(err)
			}
			var m runtime.MemStats
			runtime.ReadMemStats(&m)
			alloc := m.TotalAlloc - before.TotalAlloc
			peak = max(peak, alloc)
			t.Logf("%s: %.1f MB allocated", row.pattern, float64(alloc)/1e6)
			switch {
			case resp.StatusCode >= 500:
				t.Errorf("%s %s: %d %.300s", row.method, path, resp.StatusCode, b)
			case resp.StatusCode == http.StatusRequestEntityTooLarge:
				if !strings.Contains(string(b), "MiB") {
					t.Errorf("%s %s: 413 without the limit: %.300s", row.method, path, b)
				}
			case bodiless[row.method+" "+row.pattern]:
				t.Logf("%s %s: %d (the route reads no body)", row.method, path, resp.StatusCode)
			default:
				t.Errorf("%s %s: %d, want 413: %.300s", row.method, path, resp.StatusCode, b)
			}
		})
	}
	// The refusals read up to the route's limit (16 MiB for uploads), in
	// growing buffers: what they allocate is bounded by the limit, not by
	// the 60 MB sent.
	const bound = 5 * maxImportForm
	t.Logf("at most %.1f MB allocated for one 60 MB request", float64(peak)/1e6)
	if peak > bound {
		t.Errorf("one request allocated %d bytes, above %d (5 × the upload limit)", peak, bound)
	}
}

// Stored markup: every text field a user types, shown back.
const (
	hostileMarkup = `<script>alert("x")</script><img src=x onerror=alert(1)>=HYPERLINK("http://evil.example")`
	// hostileLines adds line breaks that would start iCalendar properties
	// or CSV records if written raw (multi-line fields accept them).
	hostileLines = hostileMarkup + "\r\nSUMMARY:injected\r\nBEGIN:VEVENT\n@SUM(1)"
)

// TestHostileStoredMarkup stores markup, formulas and line breaks in every
// text field of a site, a list, a target, a run and two share links, then
// opens every page, share view, printable sheet and export showing them:
// no page holds the markup unescaped, no CSV cell is a runnable formula,
// no iCalendar line is an injected property.
func TestHostileStoredMarkup(t *testing.T) {
	h := newHarness(t)
	ctx := context.Background()
	owner := h.actor("owner")
	site, err := h.store.CreateSite(ctx, owner, h.teamID, store.SiteInput{Name: "S " + hostileMarkup, Zone: "America/Phoenix",
		Site: ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}, Constraints: planner.DefaultConstraints()})
	if err != nil {
		t.Fatal(err)
	}
	list, err := h.store.CreateList(ctx, owner, h.teamID, store.ListInput{Name: "L " + hostileMarkup, Description: hostileLines})
	if err != nil {
		t.Fatal(err)
	}
	t0, err := store.ParseEpoch("2460400.123457", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		t.Fatal(err)
	}
	tg, err := h.store.CreateTarget(ctx, owner, list.ID, store.TargetInput{T0: t0, EphemNote: hostileLines, Target: planner.Target{
		Name: hostileMarkup, RADeg: 150, DecDeg: 20, Priority: 1, AcquireS: 120, Notes: hostileLines, Tags: []string{"=cmd|' /C calc'!A0", "<b>t</b>"},
		Ephem: ephem.Ephemeris{PeriodDays: 0.08, T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}}}})
	if err != nil {
		t.Fatal(err)
	}
	run, err := h.store.CreateRun(ctx, owner, h.teamID, store.RunInput{Name: "R " + hostileMarkup, SiteID: site.ID, ListID: list.ID,
		Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}}})
	if err != nil {
		t.Fatal(err)
	}
	h.planRun(t, owner, run.ID)
	_, runTok, err := h.store.CreateShareLink(ctx, owner, store.ShareInput{RunID: run.ID, Label: "share " + hostileMarkup, TTL: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	_, listTok, err := h.store.CreateShareLink(ctx, owner, store.ShareInput{ListID: list.ID, Label: "share " + hostileMarkup, TTL: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	night := fmt.Sprintf("?site=%d&list=%d&date=2026-03-14&fill=1", site.ID, list.ID)
	win := fmt.Sprintf("?site=%d&list=%d&from=2026-03-14&to=2026-03-16", site.ID, list.ID)
	pages := []string{fmt.Sprintf("/targets?list=%d", list.ID), fmt.Sprintf("/targets/%d", tg.ID), fmt.Sprintf("/targets/%d/edit", tg.ID),
		"/night" + night, "/night/sheet" + night, fmt.Sprintf("/runs/%d", run.ID), "/runs", "/sites", fmt.Sprintf("/sites/%d", site.ID),
		"/windows" + win, "/share/" + runTok, "/share/" + runTok + "/night?n=0", "/share/" + listTok, "/team", fmt.Sprintf("/lists/%d/import", list.ID)}
	csvs := []string{"/night.csv" + night, "/windows.csv" + win, fmt.Sprintf("/runs/%d/plan.csv", run.ID), fmt.Sprintf("/lists/%d/export.csv", list.ID)}
	icss := []string{"/night.ics" + night, "/windows.ics" + win, fmt.Sprintf("/runs/%d/plan.ics", run.ID)}
	jsons := []string{"/night.json" + night, "/windows.json" + win, fmt.Sprintf("/runs/%d/plan.json", run.ID), fmt.Sprintf("/lists/%d/export.json", list.ID)}
	c := h.client("viewer")
	get := func(t *testing.T, path string) string {
		t.Helper()
		resp, body := h.get(c, path)
		if resp.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d %.300s", path, resp.StatusCode, body)
		}
		return body
	}
	for _, path := range pages {
		t.Run("Page"+strings.SplitN(path, "?", 2)[0], func(t *testing.T) {
			body := get(t, path)
			if strings.Contains(body, "<script>alert") || strings.Contains(body, "<img src=x") || strings.Contains(body, "<b>t</b>") {
				t.Errorf("%s shows stored markup unescaped", path)
			}
		})
	}
	for _, path := range csvs {
		t.Run("CSV"+strings.SplitN(path, "?", 2)[0], func(t *testing.T) {
			body := get(t, path)
			n, bad := hostileCSVCells(t, []byte(body))
			if n < 2 {
				t.Fatalf("%s has no rows: nothing checked", path)
			}
			if len(bad) > 0 {
				t.Errorf("%s: %d runnable cells, e.g. %s", path, len(bad), bad[0])
			}
		})
	}
	for _, path := range icss {
		t.Run("ICS"+strings.SplitN(path, "?", 2)[0], func(t *testing.T) {
			body := get(t, path)
			if !strings.Contains(body, "BEGIN:VEVENT") {
				t.Fatalf("%s has no event: nothing checked", path)
			}
			for _, line := range strings.Split(body, "\r\n") {
				if strings.HasPrefix(line, "SUMMARY:injected") || (strings.HasPrefix(line, "@SUM")) {
					t.Errorf("%s: injected line %q", path, line)
				}
			}
			if strings.Count(body, "BEGIN:VEVENT") != strings.Count(body, "END:VEVENT") {
				t.Errorf("%s: unbalanced events", path)
			}
			if strings.Contains(strings.ReplaceAll(body, "\r\n", ""), "\n") {
				t.Errorf("%s: a bare line feed in the calendar", path)
			}
		})
	}
	for _, path := range jsons {
		t.Run("JSON"+strings.SplitN(path, "?", 2)[0], func(t *testing.T) {
			body := get(t, path)
			var v any
			if err := json.Unmarshal([]byte(body), &v); err != nil {
				t.Errorf("%s is not JSON: %v", path, err)
			}
		})
	}
}

// TestCrossTeamIDsInBodies puts ids of another team's site, list, target,
// timing, run and plan into the forms, queries and JSON bodies of this
// team's routes, as an editor (who may change things of their own team):
// every request is refused (404, or 422 naming the field) and nothing of
// either team changes.
func TestCrossTeamIDsInBodies(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	h.addAuthzPlan(t, &w)
	th := h.otherTeam(t)
	c := h.client("editor")
	token := h.token("editor")
	refused := func(status int) bool {
		return status == http.StatusNotFound || status == http.StatusUnprocessableEntity
	}
	forms := []struct {
		path string
		form url.Values
	}{
		{"/runs", url.Values{"name": {"Stolen"}, "list": {fmt.Sprint(th.list)}, "site": {fmt.Sprint(w.site)}, "nights": {"2026-03-14"}}},
		{"/runs", url.Values{"name": {"Stolen"}, "list": {fmt.Sprint(w.list)}, "site": {fmt.Sprint(th.site)}, "nights": {"2026-03-14"}}},
		{"/targets", url.Values{"list": {fmt.Sprint(th.list)}, "name": {"Planted"}, "ra": {"10"}, "dec": {"10"}}},
		{fmt.Sprintf("/runs/%d/mark", w.run), url.Values{"plan": {fmt.Sprint(th.plan)}, "night": {"0"}, "block": {"0"}, "status": {"done"}}},
		{fmt.Sprintf("/timings/%d/delete", th.timing), url.Values{"target": {fmt.Sprint(w.target)}, "version": {fmt.Sprint(w.targetVersion)}}},
		{"/team/select", url.Values{"team_id": {fmt.Sprint(h.otherID)}}},
	}
	for _, f := range forms {
		resp, body := h.postBody(c, f.path, f.form)
		if !refused(resp.StatusCode) {
			t.Errorf("POST %s %v: %d, want 404 or 422: %.200s", f.path, f.form, resp.StatusCode, body)
		}
	}
	gets := []string{
		fmt.Sprintf("/night?site=%d&list=%d&date=2026-03-14", th.site, w.list),
		fmt.Sprintf("/night?site=%d&list=%d&date=2026-03-14", w.site, th.list),
		fmt.Sprintf("/night.csv?site=%d&list=%d&t=%d&date=2026-03-14", w.site, w.list, th.target),
		fmt.Sprintf("/windows.json?site=%d&list=%d&from=2026-03-14&to=2026-03-15", th.site, th.list),
		fmt.Sprintf("/targets?list=%d", th.list),
		fmt.Sprintf("/runs/%d?plan=%d", w.run, th.plan),
	}
	for _, path := range gets {
		if resp, body := h.get(c, path); !refused(resp.StatusCode) {
			t.Errorf("GET %s: %d, want 404 or 422: %.200s", path, resp.StatusCode, body)
		}
	}
	apis := []struct{ method, path, body string }{
		{"GET", fmt.Sprintf("/api/v1/night?site=%d&list=%d&date=2026-03-14", th.site, th.list), ""},
		{"GET", fmt.Sprintf("/api/v1/windows?site=%d&list=%d&from=2026-03-14&to=2026-03-15", th.site, w.list), ""},
		{"GET", fmt.Sprintf("/api/v1/lists?team=%d", h.otherID), ""},
		{"POST", fmt.Sprintf("/api/v1/lists?team=%d", h.otherID), `{"name":"Planted"}`},
		{"POST", fmt.Sprintf("/api/v1/lists/%d/targets", th.list), hostileAPITarget},
		{"GET", fmt.Sprintf("/api/v1/runs/%d/plan", th.run), ""},
		{"POST", fmt.Sprintf("/api/v1/runs/%d/plan", th.run), ""},
		{"PUT", fmt.Sprintf("/api/v1/targets/%d", w.target), strings.Replace(hostileAPITarget, `{"name"`, fmt.Sprintf(`{"version":%d,"list_id":%d,"name"`, w.targetVersion, th.list), 1)},
	}
	for _, a := range apis {
		if status, body := hostileAPIRaw(t, h, token, a.method, a.path, []byte(a.body)); !refused(status) {
			t.Errorf("%s %s: %d, want 404 or 422: %.200s", a.method, a.path, status, body)
		}
	}
	ctx := context.Background()
	if ts, err := h.store.ListTargets(ctx, h.actor("outsider"), th.list); err != nil || len(ts) != 1 {
		t.Errorf("their list holds %d targets (%v), want 1", len(ts), err)
	}
	if tms, err := h.store.ListTimings(ctx, h.actor("outsider"), th.target); err != nil || len(tms) != 1 {
		t.Errorf("their target has %d timings (%v), want 1", len(tms), err)
	}
	if ps, err := h.store.ListPlans(ctx, h.actor("outsider"), th.run); err != nil || len(ps) != 1 {
		t.Errorf("their run has %d plans (%v), want 1", len(ps), err)
	}
	runs, err := h.store.ListRuns(ctx, h.actor("owner"), h.teamID)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range runs {
		if r.Name == "Stolen" {
			t.Errorf("a run was made on another team's list or site: %+v", r)
		}
	}
}

// TestJobOfAnotherUser: a background computation's page, progress and
// cancel button answer only the user who started it: the team's owner
// and another team's member get 404, and their cancel does not stop it.
func TestJobOfAnotherUser(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	editor := h.client("editor")
	resp := h.post(editor, fmt.Sprintf("/runs/%d/optimize", w.run), url.Values{"past": {"0"}})
	job := resp.Header.Get("Location")
	if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(job, "/jobs/") {
		t.Fatalf("optimize: %d to %q", resp.StatusCode, job)
	}
	for _, name := range []string{"owner", "outsider"} {
		c := h.client(name)
		for _, path := range []string{job, job + "/progress"} {
			if resp, _ := h.get(c, path); resp.StatusCode != http.StatusNotFound {
				t.Errorf("%s GET %s: %d, want 404", name, path, resp.StatusCode)
			}
		}
		if resp := h.post(c, job+"/cancel", nil); resp.StatusCode != http.StatusNotFound {
			t.Errorf("%s POST %s/cancel: %d, want 404", name, job, resp.StatusCode)
		}
	}
	followJob(t, h, editor, resp) // the editor's job ran to its end: a saved plan
}

// TestHostileQueries: out-of-range and malformed query values on the
// heavy pages and the share view are refused (404 or 422), never planned
// and never a 5xx: a share night index negative, huge or not a number, a
// night in the year 99999 or 1000, a century of queue windows, a range
// that ends before it starts, limits of ±1e308, a plan id past int64.
func TestHostileQueries(t *testing.T) {
	h := newHarness(t)
	w := h.newAuthzWorld(t, 1)
	h.addAuthzPlan(t, &w)
	c := h.client("editor")
	q := fmt.Sprintf("site=%d&list=%d", w.site, w.list)
	cases := []struct {
		path string
		want int
	}{
		{"/share/" + w.runShareToken + "/night?n=-1", http.StatusNotFound},
		{"/share/" + w.runShareToken + "/night?n=99999999999999999999", http.StatusNotFound},
		{"/share/" + w.runShareToken + "/night?n=abc", http.StatusNotFound},
		{"/night?" + q + "&date=99999-01-01", http.StatusUnprocessableEntity},
		{"/night?" + q + "&date=1000-01-01", http.StatusUnprocessableEntity},
		{"/windows.json?" + q + "&from=2026-01-01&to=2126-01-01", http.StatusUnprocessableEntity},
		{"/windows.json?" + q + "&from=2026-01-01&to=2025-01-01", http.StatusUnprocessableEntity},
		{"/night?" + q + "&date=2026-03-14&max_airmass=1e308&min_alt=-1e308", http.StatusUnprocessableEntity},
		{fmt.Sprintf("/runs/%d/plan.csv?plan=99999999999999999999", w.run), http.StatusUnprocessableEntity},
	}
	for _, tc := range cases {
		if resp, body := h.get(c, tc.path); resp.StatusCode != tc.want {
			t.Errorf("%s: %d, want %d: %.200s", tc.path, resp.StatusCode, tc.want, body)
		}
	}
}

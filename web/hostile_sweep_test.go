package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// otherTeamPlan gives the outsider's team a site, a list with one target
// and a run with a saved plan, and returns the run and plan ids.
func (h *harness) otherTeamPlan(tb testing.TB) (runID, planID int64) {
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
	if _, err := h.store.CreateTarget(ctx, a, list.ID, store.TargetInput{T0: t0, Target: planner.Target{Name: "FAR 01",
		RADeg: 160, DecDeg: 10, Priority: 1, AcquireS: 60,
		Ephem: ephem.Ephemeris{PeriodDays: 0.09, T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
		Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}}}}); err != nil {
		tb.Fatal(err)
	}
	run, err := h.store.CreateRun(ctx, a, h.otherID, store.RunInput{Name: "Their run", SiteID: site.ID, ListID: list.ID,
		Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}}})
	if err != nil {
		tb.Fatal(err)
	}
	in, err := h.srv.loadRun(ctx, a, run.ID)
	if err != nil {
		tb.Fatal(err)
	}
	if _, err := h.srv.planRunJob(ctx, a, in, 0, &job{}); err != nil {
		tb.Fatal(err)
	}
	plans, err := h.store.ListPlans(ctx, a, run.ID)
	if err != nil || len(plans) != 1 {
		tb.Fatalf("their plans: %v, %v", plans, err)
	}
	return run.ID, plans[0].ID
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

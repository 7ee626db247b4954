package web

import (
	"encoding/csv"
	"encoding/json"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"regexp"
	"strings"
	"testing"
	"time"

	"phasecast/planner/export"
	"phasecast/planner/export/exporttest"
)

// get fetches path with the demo's client (following redirects).
func (d *demo) get(t *testing.T, path string) (*http.Response, string) {
	t.Helper()
	return send(t, d.c, http.MethodGet, d.ts.URL+path, nil, nil)
}

// post submits a form as a same-origin browser would, without following
// a redirect.
func (d *demo) post(t *testing.T, path string, form url.Values) *http.Response {
	t.Helper()
	resp, _ := d.postBody(t, path, form)
	return resp
}

// postBody is post with the response body read.
func (d *demo) postBody(t *testing.T, path string, form url.Values) (*http.Response, string) {
	t.Helper()
	c := *d.c
	c.CheckRedirect = func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }
	return send(t, &c, http.MethodPost, d.ts.URL+path, strings.NewReader(form.Encode()), formHeader())
}

// TestRunPlanMarkReplan plans the demo run in the background, follows the
// progress until it is saved, marks a block done and one lost, replans the
// rest, and downloads the run's exports.
func TestRunPlanMarkReplan(t *testing.T) {
	d := newDemo(t)
	run := "/runs/" + i64s(d.info.Run.ID)
	plan := func(past string) string {
		t.Helper()
		resp := d.post(t, run+"/optimize", url.Values{"past": {past}})
		job := resp.Header.Get("Location")
		if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(job, "/jobs/") {
			t.Fatalf("optimize = %d to %q", resp.StatusCode, job)
		}
		_, body := d.get(t, job)
		if !hasTestID(body, "progress") && !hasTestID(body, "run-name") {
			t.Errorf("the job page shows neither progress nor the run")
		}
		deadline := time.Now().Add(2 * time.Minute)
		for {
			_, js := d.get(t, job+"/progress")
			var p struct {
				Fraction float64 `json:"fraction"`
				Done     bool    `json:"done"`
				Next     string  `json:"next"`
				Message  string  `json:"message"`
			}
			if err := json.Unmarshal([]byte(js), &p); err != nil {
				t.Fatalf("progress is not JSON: %s", js)
			}
			if p.Fraction < 0 || p.Fraction > 1 {
				t.Errorf("fraction %g outside 0..1", p.Fraction)
			}
			if p.Done {
				if !strings.HasPrefix(p.Next, run) {
					t.Fatalf("finished with %q: %s", p.Next, p.Message)
				}
				return p.Next
			}
			if time.Now().After(deadline) {
				t.Fatal("the run was not planned within 2 minutes")
			}
			time.Sleep(50 * time.Millisecond)
		}
	}
	next := plan("0")
	resp, body := d.get(t, next)
	for _, id := range []string{"reach", "coverage", "rings", "run-night", "precision", "precision-chart"} {
		if !hasTestID(body, id) {
			t.Errorf("run page lacks %s", id)
		}
	}
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("run page = %d", resp.StatusCode)
	}
	// The demo site's first instrument sizes the S/N goals' blocks.
	if !regexp.MustCompile(`\(S/N \d+, sky \d+\.\d\d mag/arcsec²\)`).MatchString(body) {
		t.Error("no block of the planned run shows its S/N and sky")
	}
	planID := regexp.MustCompile(`name="plan" value="(\d+)"`).FindStringSubmatch(body)
	if planID == nil {
		t.Fatal("no block to mark in the planned run")
	}
	for i, status := range []string{"done", "lost"} {
		resp := d.post(t, run+"/mark", url.Values{"plan": {planID[1]}, "night": {"0"}, "block": {i64s(int64(i))}, "status": {status}})
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("mark %s = %d", status, resp.StatusCode)
		}
	}
	_, body = d.get(t, run+"?plan="+planID[1])
	if !strings.Contains(body, `data-testid="block-state">done<`) || !strings.Contains(body, `data-testid="block-state">lost<`) {
		t.Error("the marked blocks do not show their outcome")
	}
	// Replan with the first night over: its marked exposures now count.
	next = plan("1")
	_, body = d.get(t, next)
	if !strings.Contains(body, "with the first 1 nights over") {
		t.Error("the replanned run does not say one night is over")
	}
	t.Run("Exports", func(t *testing.T) {
		_, js := d.get(t, run+"/plan.json")
		var doc export.Run
		if err := json.Unmarshal([]byte(js), &doc); err != nil || len(doc.Nights) != len(d.info.Run.Nights) {
			t.Fatalf("plan.json: %v, %d nights", err, len(doc.Nights))
		}
		blocks := 0
		for _, n := range doc.Nights {
			blocks += len(n.Blocks)
		}
		_, cs := d.get(t, run+"/plan.csv")
		rows, err := csv.NewReader(strings.NewReader(cs)).ReadAll()
		if err != nil || len(rows) != blocks+1 {
			t.Errorf("plan.csv: %v, %d rows for %d blocks", err, len(rows), blocks)
		}
		_, ics := d.get(t, run+"/plan.ics")
		cal, err := exporttest.ParseICal(strings.NewReader(ics))
		if err != nil || len(cal.Events) != blocks {
			t.Errorf("plan.ics: %v, %d events for %d blocks", err, len(cal.Events), blocks)
		}
	})
}

func TestRunCreateRejectsBadNights(t *testing.T) {
	d := newDemo(t)
	resp := d.post(t, "/runs", url.Values{"name": {"Bad run"}, "site": {i64s(d.info.Site.ID)}, "list": {i64s(d.info.List.ID)},
		"nights": {"2026-03-15,2026-03-14"}})
	if resp.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("unordered nights = %d, want 422", resp.StatusCode)
	}
	resp = d.post(t, "/runs", url.Values{"name": {"Good run"}, "site": {i64s(d.info.Site.ID)}, "list": {i64s(d.info.List.ID)},
		"nights": {"2026-03-14+3"}})
	if resp.StatusCode != http.StatusSeeOther {
		t.Errorf("three nights = %d, want 303", resp.StatusCode)
	}
}

// TestRunOptimizeCancel starts the optimizer and cancels it: the cancel
// button returns to the run, and the computation ends (cancelled, or
// finished if it was quicker than the click).
func TestRunOptimizeCancel(t *testing.T) {
	d := newDemo(t)
	run := "/runs/" + i64s(d.info.Run.ID)
	resp := d.post(t, run+"/optimize", url.Values{"past": {"0"}})
	job := resp.Header.Get("Location")
	if !strings.HasPrefix(job, "/jobs/") {
		t.Fatalf("optimize = %d to %q", resp.StatusCode, job)
	}
	resp = d.post(t, job+"/cancel", nil)
	if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(resp.Header.Get("Location"), run) {
		t.Fatalf("cancel = %d to %q", resp.StatusCode, resp.Header.Get("Location"))
	}
	deadline := time.Now().Add(time.Minute)
	for {
		_, js := d.get(t, job+"/progress")
		var p struct{ Done bool }
		if err := json.Unmarshal([]byte(js), &p); err != nil {
			t.Fatal(err)
		}
		if p.Done {
			break
		}
		if time.Now().After(deadline) {
			t.Fatal("the cancelled computation did not end within a minute")
		}
		time.Sleep(20 * time.Millisecond)
	}
	// Another member cannot see or cancel it.
	tok, err := d.st.CreateSignInLink(t.Context(), d.info.Editor.Email, time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	jar, _ := cookiejar.New(nil)
	editor := &demo{ts: d.ts, c: &http.Client{Jar: jar}}
	editor.post(t, "/login/link/"+tok, nil)
	if resp, _ := editor.get(t, job); resp.StatusCode != http.StatusNotFound {
		t.Errorf("another member sees the job: %d, want 404", resp.StatusCode)
	}
	if resp := editor.post(t, job+"/cancel", nil); resp.StatusCode != http.StatusNotFound {
		t.Errorf("another member cancels the job: %d, want 404", resp.StatusCode)
	}
}

// TestRunShare shares the demo run and opens it signed out: the run page
// without editing controls, and one of its nights with its chart.
func TestRunShare(t *testing.T) {
	d := newDemo(t)
	run := "/runs/" + i64s(d.info.Run.ID)
	resp, b := send(t, d.c, http.MethodPost, d.ts.URL+run+"/share", strings.NewReader("label=collaborator&ttl_days=7"), formHeader())
	m := regexp.MustCompile(`data-testid="new-share">[^<]*(/share/[^<]+)<`).FindStringSubmatch(string(b))
	if m == nil {
		t.Fatalf("share = %d, no link shown", resp.StatusCode)
	}
	anon := &demo{ts: d.ts, c: &http.Client{}}
	resp, body := anon.get(t, m[1])
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "run-name") || hasTestID(body, "optimize-form") || hasTestID(body, "whoami") {
		t.Errorf("shared run = %d, read-only %v", resp.StatusCode, !hasTestID(body, "optimize-form"))
	}
	resp, body = anon.get(t, m[1]+"/night?n=1")
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "night-chart") || !hasTestID(body, "caution") {
		t.Errorf("shared night = %d, chart %v", resp.StatusCode, hasTestID(body, "night-chart"))
	}
	if resp, _ := anon.get(t, m[1]+"/night?n=99"); resp.StatusCode != http.StatusNotFound {
		t.Errorf("a night the run does not have = %d, want 404", resp.StatusCode)
	}
}

// TestAPIRuns plans the demo run through the API and reads its plan and
// coverage; a viewer's token may read but not plan.
func TestAPIRuns(t *testing.T) {
	d := newDemo(t)
	tok := func(email string) string {
		t.Helper()
		link, err := d.st.CreateSignInLink(t.Context(), email, time.Hour)
		if err != nil {
			t.Fatal(err)
		}
		_, sess, err := d.st.RedeemSignInLink(t.Context(), link)
		if err != nil {
			t.Fatal(err)
		}
		a, err := d.st.SessionActor(t.Context(), sess)
		if err != nil {
			t.Fatal(err)
		}
		_, token, err := d.st.CreateAPIToken(t.Context(), a, "test", time.Hour)
		if err != nil {
			t.Fatal(err)
		}
		return token
	}
	owner, viewer := tok(d.info.Owner.Email), tok(d.info.Viewer.Email)
	call := func(token, method, path string) (int, map[string]any) {
		t.Helper()
		resp, b := send(t, http.DefaultClient, method, d.ts.URL+path, nil, http.Header{"Authorization": {"Bearer " + token}})
		var out map[string]any
		if err := json.Unmarshal([]byte(b), &out); b != "" && err != nil {
			t.Fatalf("%s %s: %v: %s", method, path, err, b)
		}
		return resp.StatusCode, out
	}
	run := "/api/v1/runs/" + i64s(d.info.Run.ID)
	if code, body := call(viewer, "GET", "/api/v1/runs"); code != http.StatusOK || len(body["runs"].([]any)) != 1 {
		t.Errorf("runs = %d, %v", code, body)
	}
	if code, _ := call(viewer, "GET", run+"/plan"); code != http.StatusNotFound {
		t.Errorf("plan before planning = %d, want 404", code)
	}
	if code, _ := call(viewer, "POST", run+"/plan"); code != http.StatusForbidden {
		t.Errorf("viewer plans = %d, want 403", code)
	}
	code, body := call(owner, "POST", run+"/plan?past=1")
	if code != http.StatusCreated || body["past_nights"] != 1.0 || len(body["nights"].([]any)) != len(d.info.Run.Nights) {
		t.Fatalf("plan = %d, past %v", code, body["past_nights"])
	}
	// The demo's three RV targets and its timed target carry a forecast;
	// the RV targets lie about 8 h apart in RA, so on any date at least one
	// is planned enough to measure K.
	prec, _ := body["precision"].([]any)
	rvN, rvDetermined, timingN := 0, 0, 0
	for _, p := range prec {
		m := p.(map[string]any)
		if r, ok := m["rv"].(map[string]any); ok {
			rvN++
			if r["after_plan"].(map[string]any)["determined"] == true {
				rvDetermined++
			}
		}
		if _, ok := m["timing"].(map[string]any); ok {
			timingN++
		}
	}
	if rvN != 3 || rvDetermined == 0 || timingN != 1 {
		t.Errorf("precision: %d RV targets (%d determined), %d timing targets; want 3 (≥ 1) and 1: %v", rvN, rvDetermined, timingN, prec)
	}
	code, body = call(viewer, "GET", run+"/coverage")
	if code != http.StatusOK || len(body["targets"].([]any)) != len(d.info.Targets) {
		t.Errorf("coverage = %d with %d targets", code, len(body["targets"].([]any)))
	}
	if code, _ := call(owner, "POST", run+"/plan?past=9"); code != http.StatusUnprocessableEntity {
		t.Errorf("past beyond the run = %d, want 422", code)
	}
}

// TestRunObservedLog adds an observing log to the demo run: a bad log is
// refused whole with its problems by line, a good one is added.
func TestRunObservedLog(t *testing.T) {
	d := newDemo(t)
	run := "/runs/" + i64s(d.info.Run.ID)
	name := d.info.Targets[0].Target.Name
	night := d.info.Run.Nights[0].Date
	bad := "target,start_utc,exposure_s,n_exposures\n" + name + "," + night + "T05:00:00Z,60,3\nNo such star," + night + "T05:10:00Z,60,1\n" +
		name + ",yesterday,60,1\n"
	post := func(content string) (int, string) {
		resp, b := send(t, d.c, http.MethodPost, d.ts.URL+run+"/observed", strings.NewReader(url.Values{"content": {content}}.Encode()), formHeader())
		return resp.StatusCode, b
	}
	code, body := post(bad)
	if code != http.StatusUnprocessableEntity || !hasTestID(body, "log-errors") || !strings.Contains(body, "line 4") {
		t.Errorf("bad log = %d, errors shown %v", code, hasTestID(body, "log-errors"))
	}
	good := "target,start_utc,exposure_s,n_exposures,overhead_s\n" + name + "," + night + "T05:00:00Z,60,3,5\n"
	code, body = post(good)
	if code != http.StatusOK || !hasTestID(body, "log-ok") || !strings.Contains(body, "3 exposures added") {
		t.Errorf("good log = %d, confirmation shown %v", code, hasTestID(body, "log-ok"))
	}
}

package web

import (
	"context"
	"encoding/json"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
)

// planRunNow plans a run through its optimize form as c, waits for the
// background job and returns the saved plan's document and id.
func (h *harness) planRunNow(t *testing.T, c *http.Client, runID int64, past int) (*export.Run, string) {
	t.Helper()
	resp := h.post(c, "/runs/"+i64s(runID)+"/optimize", url.Values{"past": {i64s(int64(past))}})
	job := resp.Header.Get("Location")
	if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(job, "/jobs/") {
		t.Fatalf("optimize = %d to %q", resp.StatusCode, job)
	}
	deadline := time.Now().Add(2 * time.Minute)
	for {
		_, js := h.get(c, job+"/progress")
		var p struct {
			Done    bool   `json:"done"`
			Next    string `json:"next"`
			Message string `json:"message"`
		}
		if err := json.Unmarshal([]byte(js), &p); err != nil {
			t.Fatalf("progress is not JSON: %s", js)
		}
		if p.Done {
			m := regexp.MustCompile(`plan=(\d+)`).FindStringSubmatch(p.Next)
			if m == nil {
				t.Fatalf("finished with %q: %s", p.Next, p.Message)
			}
			_, doc := h.get(c, "/runs/"+i64s(runID)+"/plan.json?plan="+m[1])
			var d export.Run
			if err := json.Unmarshal([]byte(doc), &d); err != nil {
				t.Fatal(err)
			}
			return &d, m[1]
		}
		if time.Now().After(deadline) {
			t.Fatal("the run was not planned within 2 minutes")
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// runNightsFrom is n full nights from tonight at the test clock, at the
// fixtures' site (America/Phoenix).
func runNightsFrom(t *testing.T, n int) []store.RunNight {
	t.Helper()
	loc, err := time.LoadLocation("America/Phoenix")
	if err != nil {
		t.Fatal(err)
	}
	first, err := time.Parse("2006-01-02", tonight(testNow, loc))
	if err != nil {
		t.Fatal(err)
	}
	out := make([]store.RunNight, n)
	for i := range out {
		out[i] = store.RunNight{Date: first.AddDate(0, 0, i).Format("2006-01-02"), Part: store.NightFull}
	}
	return out
}

// panel returns the text of the element with data-testid=id up to the
// closing tag end.
func panel(body, id, end string) string {
	i := strings.Index(body, `data-testid="`+id+`"`)
	if i < 0 {
		return ""
	}
	j := strings.Index(body[i:], end)
	return body[i : i+j]
}

// TestTonightFollowsRunPlan: with a run holding tonight and a saved plan,
// Tonight shows the saved plan's blocks and skips those marked done or
// lost, and says so; without a run it plans afresh and says that.
func TestTonightFollowsRunPlan(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	c := h.client("editor")
	_, body := h.get(c, "/tonight")
	if !strings.Contains(panel(body, "tonight-source", "</p>"), "planned now") {
		t.Errorf("without a run, Tonight does not say it plans now: %q", panel(body, "tonight-source", "</p>"))
	}
	run, err := h.store.CreateRun(context.Background(), h.actor("owner"), h.teamID, store.RunInput{Name: "Spring run", SiteID: f.siteID, ListID: f.listID,
		Constraints: planner.DefaultConstraints(), Nights: runNightsFrom(t, 2)})
	if err != nil {
		t.Fatal(err)
	}
	_, body = h.get(c, "/tonight")
	if src := panel(body, "tonight-source", "</p>"); !strings.Contains(src, "Spring run") || !strings.Contains(src, "no saved plan") {
		t.Errorf("a run without a plan: source %q", src)
	}
	doc, planID := h.planRunNow(t, c, run.ID, 0)
	var ahead []int // tonight's blocks still to start at the test's clock
	for i, b := range doc.Nights[0].Blocks {
		if time.Time(b.Start).After(testNow) {
			ahead = append(ahead, i)
		}
	}
	if len(ahead) < 2 {
		t.Fatalf("tonight's saved plan has %d blocks after %s, want 2 or more", len(ahead), testNow)
	}
	span := func(b export.RunBlock) string {
		loc, _ := time.LoadLocation("America/Phoenix")
		return time.Time(b.Start).In(loc).Format("15:04") + "–" + time.Time(b.End).In(loc).Format("15:04")
	}
	b0, b1 := doc.Nights[0].Blocks[ahead[0]], doc.Nights[0].Blocks[ahead[1]]
	_, body = h.get(c, "/tonight")
	next := panel(body, "observe-next", "</div>")
	if !strings.Contains(next, b0.Target) || !strings.Contains(next, span(b0)) {
		t.Errorf("Next is not the saved plan's first block %s %s: %q", b0.Target, span(b0), next)
	}
	if src := panel(body, "tonight-source", "</p>"); !strings.Contains(src, "saved plan") || !strings.Contains(src, "Spring run") {
		t.Errorf("Tonight does not say it follows the run's saved plan: %q", src)
	}
	if resp := h.post(c, "/runs/"+i64s(run.ID)+"/mark", url.Values{"plan": {planID}, "night": {"0"}, "block": {i64s(int64(ahead[0]))}, "status": {"lost"}}); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("mark lost = %d", resp.StatusCode)
	}
	for _, path := range []string{"/tonight", "/tonight/body"} {
		_, body = h.get(c, path)
		next = panel(body, "observe-next", "</div>")
		if strings.Contains(next, span(b0)) || !strings.Contains(next, span(b1)) {
			t.Errorf("%s: after marking the first block lost, Next is %q; want %s %s", path, next, b1.Target, span(b1))
		}
		if src := panel(body, "tonight-source", "</p>"); !strings.Contains(src, "1 block marked done or lost") {
			t.Errorf("%s: the marked block is not mentioned: %q", path, src)
		}
	}
}

// TestReplanKeepsNightsOver: a whole night marked lost with one action
// counts as over; after a replan the "Nights already over" box keeps the
// count, so a second replan does not plan the lost night again.
func TestReplanKeepsNightsOver(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	c := h.client("editor")
	run, err := h.store.CreateRun(context.Background(), h.actor("owner"), h.teamID, store.RunInput{Name: "Three nights", SiteID: f.siteID, ListID: f.listID,
		Constraints: planner.DefaultConstraints(), Nights: runNightsFrom(t, 3)})
	if err != nil {
		t.Fatal(err)
	}
	path := "/runs/" + i64s(run.ID)
	pastBox := func(body string) string {
		m := regexp.MustCompile(`name="past"[^>]*value="(\d+)"`).FindStringSubmatch(body)
		if m == nil {
			t.Fatal("no Nights already over box")
		}
		return m[1]
	}
	doc, planID := h.planRunNow(t, c, run.ID, 0)
	nb := len(doc.Nights[0].Blocks)
	if nb < 2 {
		t.Fatalf("night 1 has %d blocks, want 2 or more", nb)
	}
	_, body := h.get(c, path+"?plan="+planID)
	if got := strings.Count(body, `data-testid="mark-night-lost"`); got != 3 {
		t.Errorf("%d whole-night-lost buttons, want one per night (3)", got)
	}
	if resp := h.post(c, path+"/mark", url.Values{"plan": {planID}, "night": {"0"}, "block": {"all"}, "status": {"lost"}}); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("mark the whole night lost = %d", resp.StatusCode)
	}
	_, body = h.get(c, path+"?plan="+planID)
	if got := strings.Count(body, `data-testid="block-state">lost<`); got != nb {
		t.Errorf("%d blocks show lost, want all %d of night 1", got, nb)
	}
	if got := pastBox(body); got != "1" {
		t.Errorf("after losing night 1 the box says %s nights over, want 1", got)
	}
	if resp := h.post(c, path+"/mark", url.Values{"plan": {planID}, "night": {"0"}, "block": {"all"}, "status": {"done"}}); resp.StatusCode != http.StatusBadRequest {
		t.Errorf("marking a whole night done = %d, want 400 (only lost)", resp.StatusCode)
	}
	doc, planID = h.planRunNow(t, c, run.ID, 1)
	if !doc.Nights[0].Past || doc.Past != 1 {
		t.Fatalf("the replan does not count night 1 over: past %d", doc.Past)
	}
	_, body = h.get(c, path+"?plan="+planID)
	box := pastBox(body)
	if box != "1" {
		t.Errorf("after the replan the box says %s nights over, want 1", box)
	}
	n, _ := strconv.Atoi(box)
	doc, _ = h.planRunNow(t, c, run.ID, n)
	if !doc.Nights[0].Past || len(doc.Nights[0].Blocks) != 0 {
		t.Errorf("the second replan plans the lost night again: past %v, %d blocks", doc.Nights[0].Past, len(doc.Nights[0].Blocks))
	}
}

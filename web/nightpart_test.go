package web

import (
	"context"
	"encoding/json"
	"net/http"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
)

// halfWindow is the planner's span of one half of the fixtures' night of
// 2026-03-14 under the site's default constraints.
func halfWindow(tb testing.TB, part planner.NightPart) planner.Interval {
	tb.Helper()
	return halfWindowOn(tb, part, 2026, time.March, 14)
}

// halfWindowOn is halfWindow for the night that begins on the evening of
// y-m-d at the fixtures' site.
func halfWindowOn(tb testing.TB, part planner.NightPart, y int, m time.Month, d int) planner.Interval {
	tb.Helper()
	loc, err := time.LoadLocation("America/Phoenix")
	if err != nil {
		tb.Fatal(err)
	}
	c := planner.DefaultConstraints()
	c.Horizon = []planner.HorizonPoint{{AzDeg: 0, AltDeg: 5}, {AzDeg: 90, AltDeg: 12}, {AzDeg: 200, AltDeg: 8}}
	ws, err := planner.RunNightWindows(ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}, loc, c,
		[]planner.RunNight{{Year: y, Month: m, Day: d, Part: part}})
	if err != nil {
		tb.Fatal(err)
	}
	return ws[0]
}

// nightJSON fetches a night's JSON export and checks its file name.
func nightJSON(tb testing.TB, h *harness, c *http.Client, query, wantName string) export.PlanDoc {
	tb.Helper()
	resp, body := h.get(c, "/night.json?"+query)
	if resp.StatusCode != http.StatusOK {
		tb.Fatalf("GET /night.json?%s = %d: %.300s", query, resp.StatusCode, body)
	}
	if cd := resp.Header.Get("Content-Disposition"); !strings.Contains(cd, `filename="`+wantName+`"`) {
		tb.Errorf("Content-Disposition %q, want file name %q", cd, wantName)
	}
	var doc export.PlanDoc
	if err := json.Unmarshal([]byte(body), &doc); err != nil {
		tb.Fatal(err)
	}
	return doc
}

func TestNightHalfPlansOnlyTheHalf(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 8)
	c := h.client("viewer")
	base := "site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	full := nightJSON(t, h, c, base, "test-ridge-2026-03-14-night.json")
	tests := []struct {
		part     planner.NightPart
		wantName string
	}{
		{planner.PartFirst, "test-ridge-2026-03-14-first-night.json"},
		{planner.PartSecond, "test-ridge-2026-03-14-second-night.json"},
	}
	for _, tt := range tests {
		t.Run(string(tt.part), func(t *testing.T) {
			w := halfWindow(t, tt.part)
			doc := nightJSON(t, h, c, base+"&part="+string(tt.part), tt.wantName)
			if len(doc.Blocks) == 0 {
				t.Fatalf("no block planned in the %s half (full night: %d blocks)", tt.part, len(full.Blocks))
			}
			for _, b := range doc.Blocks {
				start, end := time.Time(b.Start), time.Time(b.End)
				if start.Before(w.Start) || end.After(w.End) {
					t.Errorf("block %s %s–%s outside the %s half %s–%s", b.Target, start, end, tt.part, w.Start, w.End)
				}
			}
			t.Logf("%s half %s–%s: %d blocks (full night %d)", tt.part, w.Start.Format(time.RFC3339), w.End.Format(time.RFC3339), len(doc.Blocks), len(full.Blocks))
			for _, ext := range []string{"csv", "ics"} {
				resp, _ := h.get(c, "/night."+ext+"?"+base+"&part="+string(tt.part))
				want := strings.Replace(tt.wantName, ".json", "."+ext, 1)
				if cd := resp.Header.Get("Content-Disposition"); resp.StatusCode != http.StatusOK || !strings.Contains(cd, want) {
					t.Errorf("%s export = %d, %q; want 200 with %q", ext, resp.StatusCode, cd, want)
				}
			}
		})
	}
}

func TestNightPageOfRunHalf(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 8)
	run, err := h.store.CreateRun(context.Background(), h.actor("owner"), h.teamID, store.RunInput{Name: "Half run", SiteID: f.siteID, ListID: f.listID,
		Constraints: planner.DefaultConstraints(),
		Nights:      []store.RunNight{{Date: "2026-03-14", Part: store.NightSecondHalf}, {Date: "2026-03-15", Part: store.NightFull}}})
	if err != nil {
		t.Fatal(err)
	}
	in, err := h.srv.loadRun(context.Background(), h.actor("viewer"), run.ID)
	if err != nil {
		t.Fatal(err)
	}
	rv := runView(in, &export.Run{Nights: []export.RunNight{{Date: "2026-03-14", Part: "second"}, {Date: "2026-03-15", Part: "full"}}}, nil, 0, testNow)
	link := "/night?date=2026-03-14&run=" + i64s(run.ID)
	if len(rv.Schedules) != 2 || rv.Schedules[0].Href != link {
		t.Fatalf("run page night links %+v, want the first %q", rv.Schedules, link)
	}
	c := h.client("viewer")
	var resp *http.Response
	var body string
	w := halfWindow(t, planner.PartSecond)
	resp, body = h.get(c, "/night?date=2026-03-14&run="+i64s(run.ID))
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("night page = %d", resp.StatusCode)
	}
	loc, _ := time.LoadLocation("America/Phoenix")
	note := "second half of the night: " + w.Start.In(loc).Format("15:04") + "–" + w.End.In(loc).Format("15:04") + " local"
	if !strings.Contains(body, note) || !hasTestID(body, "night-part") {
		t.Errorf("night page lacks %q", note)
	}
	if !strings.Contains(body, `class="unallocated"`) {
		t.Error("chart does not shade the part not allocated")
	}
	doc := nightJSON(t, h, c, "date=2026-03-14&run="+i64s(run.ID), "test-ridge-2026-03-14-second-night.json")
	for _, b := range doc.Blocks {
		if time.Time(b.Start).Before(w.Start) || time.Time(b.End).After(w.End) {
			t.Errorf("block %s %v–%v outside the second half", b.Target, time.Time(b.Start), time.Time(b.End))
		}
	}
	// The run's full night has no half note.
	_, body = h.get(c, "/night?date=2026-03-15&run="+i64s(run.ID))
	if hasTestID(body, "night-part") || strings.Contains(body, `class="unallocated"`) {
		t.Error("a full run night is shown as a half")
	}
}

func TestNightBadPart(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("viewer")
	base := "site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14&part=third"
	for _, path := range []string{"/night?", "/night.csv?", "/night.json?", "/night.ics?"} {
		t.Run(strings.Trim(path, "/?"), func(t *testing.T) {
			resp, body := h.get(c, path+base)
			want := "part: “third” is not accepted; accepted: full, first or second"
			if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, want) {
				t.Errorf("status %d, message shown %v: %.300s", resp.StatusCode, strings.Contains(body, want), body)
			}
		})
	}
}

func TestTonightUsesRunHalf(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 8)
	// Tonight is the night in progress or coming at the server's clock: the
	// evening of today's local date, or of yesterday's before local noon.
	loc, err := time.LoadLocation("America/Phoenix")
	if err != nil {
		t.Fatal(err)
	}
	local := testNow.In(loc)
	if local.Hour() < 12 {
		local = local.AddDate(0, 0, -1)
	}
	run, err := h.store.CreateRun(context.Background(), h.actor("owner"), h.teamID, store.RunInput{Name: "Half run", SiteID: f.siteID, ListID: f.listID,
		Constraints: planner.DefaultConstraints(), Nights: []store.RunNight{{Date: local.Format("2006-01-02"), Part: store.NightFirstHalf}}})
	if err != nil {
		t.Fatal(err)
	}
	u := &user{actor: h.actor("viewer"), team: store.Membership{TeamID: h.teamID, UserID: h.users["viewer"].ID, Role: store.RoleViewer}}
	n, _, got, err := h.srv.tonightNight(context.Background(), u, map[string][]string{"run": {i64s(run.ID)}})
	if err != nil {
		t.Fatal(err)
	}
	if got == nil || got.ID != run.ID || n.plan == nil {
		t.Fatalf("run %v, plan %v", got, n.plan)
	}
	w := halfWindowOn(t, planner.PartFirst, local.Year(), local.Month(), local.Day())
	if !n.req.From.Equal(w.Start) || !n.req.To.Equal(w.End) {
		t.Errorf("tonight planned %s–%s, want the first half %s–%s", n.req.From, n.req.To, w.Start, w.End)
	}
	for _, b := range n.plan.Blocks {
		if b.Start.Before(w.Start) || b.End.After(w.End) {
			t.Errorf("block %s %s–%s outside the first half", b.Target, b.Start, b.End)
		}
	}
	_, body := h.get(h.client("viewer"), "/tonight?run="+i64s(run.ID))
	if !strings.Contains(body, "first half of the night") {
		t.Error("the Tonight page does not say it plans the first half")
	}
}

package web

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"phasecast/planner/export/exporttest"
)

// windowsDocTest is the part of the windows JSON export the goal tests read.
type windowsDocTest struct {
	Goal    int `json:"goal"`
	Windows []struct {
		Target    string  `json:"target"`
		PhaseGoal float64 `json:"phase_goal"`
		Start     string  `json:"start"`
		End       string  `json:"end"`
		Cycle     int64   `json:"cycle"`
	} `json:"windows"`
}

func windowsDocOf(tb testing.TB, body string) windowsDocTest {
	tb.Helper()
	var d windowsDocTest
	if err := json.Unmarshal([]byte(body), &d); err != nil {
		tb.Fatalf("windows JSON: %v: %.200s", err, body)
	}
	return d
}

// TestWindowsGoalFilter lists the windows of one target with every goal,
// then with each goal alone (?goal=N): the page, the three exports and the
// API give exactly the chosen goal's windows, the same ones (same times,
// cycles and iCalendar UIDs) as in the unfiltered list.
func TestWindowsGoalFilter(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2) // two targets, goals φ 0.25 and φ 0.75 each
	c := h.client("viewer")
	tok := h.token("viewer")
	base := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&t=" + i64s(f.targetIDs[1]) + "&from=2026-03-14&to=2026-03-20"

	resp, js := h.get(c, "/windows.json"+base)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("windows.json, every goal = %d", resp.StatusCode)
	}
	all := windowsDocOf(t, js)
	_, icsAll := h.get(c, "/windows.ics"+base)
	calAll, err := exporttest.ParseICal(strings.NewReader(icsAll))
	if err != nil {
		t.Fatal(err)
	}
	uids := map[string]bool{}
	for _, e := range calAll.Events {
		uids[e.UID] = true
	}
	if all.Goal != 0 {
		t.Errorf("every goal: \"goal\" = %d, want absent", all.Goal)
	}

	for i, center := range []float64{0.25, 0.75} {
		k := i + 1
		t.Run(fmt.Sprintf("Goal%d", k), func(t *testing.T) {
			q := base + "&goal=" + fmt.Sprint(k)
			var want []string
			for _, w := range all.Windows {
				if w.PhaseGoal == center {
					want = append(want, fmt.Sprintf("%s %s %s %d", w.Target, w.Start, w.End, w.Cycle))
				}
			}
			if len(want) == 0 {
				t.Fatalf("the unfiltered list has no window of goal φ %g", center)
			}

			resp, js := h.get(c, "/windows.json"+q)
			if resp.StatusCode != http.StatusOK {
				t.Fatalf("windows.json = %d", resp.StatusCode)
			}
			if cd := resp.Header.Get("Content-Disposition"); !strings.Contains(cd, fmt.Sprintf("goal%d", k)) {
				t.Errorf("file name %q does not name goal %d", cd, k)
			}
			d := windowsDocOf(t, js)
			var got []string
			for _, w := range d.Windows {
				got = append(got, fmt.Sprintf("%s %s %s %d", w.Target, w.Start, w.End, w.Cycle))
			}
			if d.Goal != k || strings.Join(got, "\n") != strings.Join(want, "\n") {
				t.Errorf("goal %d: \"goal\" = %d, windows\n%s\nwant\n%s", k, d.Goal, strings.Join(got, "\n"), strings.Join(want, "\n"))
			}

			_, cs := h.get(c, "/windows.csv"+q)
			rows, err := csv.NewReader(strings.NewReader(cs)).ReadAll()
			if err != nil || len(rows) != len(want)+1 {
				t.Fatalf("windows.csv: %v, %d rows for %d windows", err, len(rows), len(want))
			}
			for _, r := range rows[1:] {
				if g, err := strconv.ParseFloat(r[1], 64); err != nil || g != center {
					t.Errorf("windows.csv row %v: phase_goal %s, want %g", r, r[1], center)
				}
			}

			_, ics := h.get(c, "/windows.ics"+q)
			cal, err := exporttest.ParseICal(strings.NewReader(ics))
			if err != nil || len(cal.Events) != len(want) {
				t.Fatalf("windows.ics: %v, %d events for %d windows", err, len(cal.Events), len(want))
			}
			for _, e := range cal.Events {
				if !uids[e.UID] {
					t.Errorf("windows.ics event %s is not in the unfiltered calendar (UIDs must stay stable)", e.UID)
				}
			}

			status, api := h.apiCall(tok, http.MethodGet, "/api/v1/windows"+q, nil)
			if status != http.StatusOK || api["goal"] != float64(k) {
				t.Fatalf("API = %d, goal %v", status, api["goal"])
			}
			if ws, _ := api["windows"].([]any); len(ws) != len(want) {
				t.Errorf("API: %d windows, want %d", len(ws), len(want))
			}

			resp, body := h.get(c, "/windows"+q)
			if resp.StatusCode != http.StatusOK || !hasTestID(body, "field-goal") || !hasTestID(body, "windows") {
				t.Fatalf("windows page = %d, goal field %v", resp.StatusCode, hasTestID(body, "field-goal"))
			}
			if !strings.Contains(body, fmt.Sprintf(`<option value="%d" selected>`, k)) || !strings.Contains(body, fmt.Sprintf("goal %d,", k)) {
				t.Errorf("page does not show goal %d chosen", k)
			}
			if !strings.Contains(body, fmt.Sprintf("goal=%d", k)) {
				t.Errorf("export links do not carry goal=%d", k)
			}
			if got := strings.Count(body, `data-testid="windows"`); got != 1 {
				t.Errorf("page has %d window tables, want 1", got)
			}
		})
	}

	t.Run("EveryGoalPageOffersGoals", func(t *testing.T) {
		_, body := h.get(c, "/windows"+base)
		if !strings.Contains(body, `<option value="" selected>every goal</option>`) || !strings.Contains(body, "2: φ 0.75 ± 0.05") {
			t.Errorf("one target chosen: the goal field does not offer every goal and each goal")
		}
		_, body = h.get(c, "/windows?site="+i64s(f.siteID)+"&list="+i64s(f.listID)+"&from=2026-03-14&to=2026-03-15")
		if hasTestID(body, "field-goal") || !hasTestID(body, "goal-hint") {
			t.Errorf("two targets chosen: want the hint, not the goal field")
		}
	})

	bad := []struct {
		name, query, value, accepted string
	}{
		{"ErrGoalZero", base + "&goal=0", "“0”", "1 to 2"},
		{"ErrGoalTooHigh", base + "&goal=3", "“3”", "1 to 2"},
		{"ErrGoalNotNumber", base + "&goal=quadrature", "“quadrature”", "1 to 2"},
		{"ErrGoalSeveralTargets", "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&from=2026-03-14&to=2026-03-15&goal=1", "“1”", "exactly one target"},
	}
	for _, tt := range bad {
		t.Run(tt.name, func(t *testing.T) {
			for _, path := range []string{"/windows", "/windows.csv", "/windows.json", "/windows.ics"} {
				resp, body := h.get(c, path+tt.query)
				if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, tt.value) || !strings.Contains(body, tt.accepted) {
					t.Errorf("%s = %d, want 422 naming %s and %q: %.300s", path, resp.StatusCode, tt.value, tt.accepted, body)
				}
			}
			status, out := h.apiCall(tok, http.MethodGet, "/api/v1/windows"+tt.query, nil)
			e, _ := out["error"].(map[string]any)
			msg, _ := e["message"].(string)
			if status != http.StatusUnprocessableEntity || !strings.HasPrefix(msg, "goal: "+tt.value) || !strings.Contains(msg, tt.accepted) {
				t.Errorf("API = %d %q, want 422 naming goal, %s and %q", status, msg, tt.value, tt.accepted)
			}
		})
	}
}

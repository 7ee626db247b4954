package web

import (
	"net/http"
	"regexp"
	"strings"
	"testing"
)

// TestNightPageForTheTelescope: the Night page leads with the summary
// line, the current or next block and the lanes chart; blocks are one
// line each (as many as the full table's rows); the Sun-and-Moon table is
// gone; the altitude view is offered as panels; the target page carries
// its own altitude panel.
func TestNightPageForTheTelescope(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	c := h.client("viewer")
	resp, body := h.get(c, "/night?site="+i64s(f.siteID)+"&list="+i64s(f.listID)+"&date=2026-03-14")
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("night page: %d", resp.StatusCode)
	}
	for _, id := range []string{"night-summary", "next-block", "night-chart", "altitude-panels", "blocks"} {
		if !hasTestID(body, id) {
			t.Errorf("the night page has no %s", id)
		}
	}
	if hasTestID(body, "night-events") {
		t.Error("the Sun-and-Moon table is still on the night page")
	}
	order := []string{`data-testid="night-summary"`, `data-testid="next-block"`, `data-testid="night-chart"`, `data-testid="blocks"`}
	for i := 1; i < len(order); i++ {
		if strings.Index(body, order[i-1]) > strings.Index(body, order[i]) {
			t.Errorf("%s comes after %s", order[i-1], order[i])
		}
	}
	if !regexp.MustCompile(`Dark \d\d:\d\d–\d\d:\d\d `).MatchString(body) || !strings.Contains(body, "% lit") {
		t.Error("the summary line lacks the dark time or the Moon")
	}
	lines := strings.Count(body, `data-testid="block-line"`)
	rows := strings.Count(body, `data-testid="block-row"`)
	if lines == 0 || lines != rows {
		t.Errorf("%d block lines for %d table rows", lines, rows)
	}
	if strings.Contains(body, `class="chart night lanes"`) == false {
		t.Error("the night chart is not the lanes chart")
	}
	if n := strings.Count(body, `class="chart altitude"`); n != 4 {
		t.Errorf("%d altitude panels for 4 targets", n)
	}
	_, body = h.get(c, "/targets/"+i64s(f.targetIDs[0]))
	if !hasTestID(body, "altitude-panel") {
		t.Error("the target page has no altitude panel")
	}
}

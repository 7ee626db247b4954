package web

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"phasecast/planner"
	"phasecast/static"
)

// TestLSTShownWithHourAngle: the Night page's block table gives the local
// sidereal time at each block's start beside the hour angle, and Tonight
// gives it now.
func TestLSTShownWithHourAngle(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	c := h.client("viewer")
	site := planner.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}
	q := "site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	_, body := h.get(c, "/night?"+q)
	if !strings.Contains(body, "<th>LST at start</th>") {
		t.Error("the block table has no LST column")
	}
	rows := regexp.MustCompile(`(?s)<tr data-testid="block-row"[^>]*>.*?</tr>`).FindAllString(body, -1)
	if len(rows) == 0 {
		t.Fatal("no block rows")
	}
	loc, _ := time.LoadLocation("America/Phoenix")
	for _, r := range rows {
		cells := regexp.MustCompile(`<td[^>]*>([^<]*)</td>`).FindAllStringSubmatch(r, -1)
		local := strings.SplitN(cells[2][1], "–", 2)[0]
		start, err := time.ParseInLocation("2006-01-02 15:04:05", "2026-03-14 "+local, loc)
		if err != nil {
			t.Fatal(err)
		}
		if start.Hour() < 12 {
			start = start.AddDate(0, 0, 1)
		}
		want := planner.FormatHours(planner.LocalSiderealHours(site, start))
		if !strings.Contains(r, `<td class="num" data-testid="lst">`+want+`</td>`) {
			t.Errorf("block at %s: no LST %s in %s", local, want, r)
		}
	}
	_, body = h.get(c, "/tonight")
	want := "LST " + planner.FormatHours(planner.LocalSiderealHours(site, testNow))
	if !strings.Contains(body, want) {
		t.Errorf("Tonight lacks %q", want)
	}
}

// TestSheetKeepsFigures: the printed sheet keeps the Moon distance,
// parallactic angle, hour angle, LST and the warnings, and no print rule
// sets text below 7 pt.
func TestSheetKeepsFigures(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 12)
	c := h.client("viewer")
	_, body := h.get(c, "/night/sheet?site="+i64s(f.siteID)+"&list="+i64s(f.listID)+"&date=2026-03-14")
	i := strings.Index(body, `class="printonly sheetblocks"`)
	if i < 0 {
		t.Fatal("no printed block table")
	}
	head := body[i : i+strings.Index(body[i:], "</thead>")]
	for _, col := range []string{"Moon", "Par. angle", "HA", "LST"} {
		if !strings.Contains(head, "<th>"+col+"</th>") {
			t.Errorf("the printed block table lacks %s", col)
		}
	}
	if !strings.Contains(body, `data-testid="warnings"`) {
		t.Fatal("this night has no warnings to keep: choose fixtures that give some")
	}
	if regexp.MustCompile(`class="[^"]*leftout[^"]*"[^>]*data-testid="warnings"`).MatchString(body) {
		t.Error("the warnings are marked to be dropped from a dense sheet")
	}
	css, err := static.FS.ReadFile("app.css")
	if err != nil {
		t.Fatal(err)
	}
	print := string(css)[strings.Index(string(css), "@media print"):]
	for _, m := range regexp.MustCompile(`font-size:\s*([0-9.]+)pt`).FindAllStringSubmatch(print, -1) {
		if v, _ := strconv.ParseFloat(m[1], 64); v < 7 {
			t.Errorf("print rule sets %spt text", m[1])
		}
	}
	if regexp.MustCompile(`\.sheet[^{]*\.warnings[^{]*\{[^}]*display:\s*none`).MatchString(print) {
		t.Error("a print rule hides the warnings")
	}
}

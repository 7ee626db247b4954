package page

import (
	"testing"
	"time"

	"phasecast/web/chart"
)

func TestMonths(t *testing.T) {
	g := WindowGroup{Rows: []WindowRow{
		{Night: "2026-11-30", StartUTC: "2026-12-01 03:10:00", EndUTC: "04:01:30"},
		{Night: "2026-11-30", StartUTC: "2026-12-01 06:00:00", EndUTC: "06:40:00"},
		{Night: "2027-01-02", StartUTC: "2027-01-03 01:00:00", EndUTC: "02:00:00"},
		{Night: "not a date"},
	}}
	ms := g.Months()
	if len(ms) != 3 {
		t.Fatalf("%d months, want November, December and January", len(ms))
	}
	if ms[0].Title != "November 2026" || ms[2].Title != "January 2027" {
		t.Errorf("titles %q … %q", ms[0].Title, ms[2].Title)
	}
	// 2026-11-01 is a Sunday: the first week has it in the last column;
	// the 30th, a Monday, opens the sixth week.
	nov := ms[0]
	if len(nov.Weeks) != 6 || nov.Weeks[0][6].Day != 1 || nov.Weeks[0][0].Day != 0 {
		t.Fatalf("November weeks %v", nov.Weeks)
	}
	if d := nov.Weeks[5][0]; d.Day != 30 || len(d.Windows) != 2 || d.Dots() != "●●" {
		t.Errorf("November 30: %+v", d)
	}
	if got := g.Rows[0].UTCSpan(); got != "03:10–04:01" {
		t.Errorf("UTCSpan = %q", got)
	}
	for _, w := range ms[1].Weeks {
		for _, d := range w {
			if len(d.Windows) != 0 {
				t.Errorf("December %d has windows %v", d.Day, d.Windows)
			}
		}
	}
}

func TestNightOfLocalShort(t *testing.T) {
	for _, tt := range []struct{ in, want string }{
		{"21:03:00–21:45:10", "21:03–21:45"},
		{"odd", "odd"},
	} {
		if got := (BlockRow{Local: tt.in}).LocalShort(); got != tt.want {
			t.Errorf("LocalShort(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

func TestNext(t *testing.T) {
	t0 := time.Date(2026, 3, 14, 3, 0, 0, 0, time.UTC)
	v := NightView{Blocks: []BlockRow{{Target: "A"}, {Target: "B"}}}
	v.Chart.Blocks = []chart.Block{{Target: "A", Start: t0, End: t0.Add(30 * time.Minute)}, {Target: "B", Start: t0.Add(2 * time.Hour), End: t0.Add(3 * time.Hour)}}
	for _, tt := range []struct {
		name            string
		now             time.Time
		state, target   string
		countdown, till string
	}{
		{"BeforeFirst", t0.Add(-65 * time.Minute), "next", "A", "starts in 1 h 05 min", "2026-03-14T03:00:00Z"},
		{"During", t0.Add(18 * time.Minute), "now", "A", "ends in 12 min", "2026-03-14T03:30:00Z"},
		{"Between", t0.Add(119*time.Minute + 15*time.Second), "next", "B", "starts in 45 s", "2026-03-14T05:00:00Z"},
		{"Over", t0.Add(4 * time.Hour), "over", "", "", ""},
		{"DaysAhead", t0.Add(-50 * time.Hour), "next", "A", "starts in 2 d 2 h", "2026-03-14T03:00:00Z"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			v.Chart.Now = tt.now
			nb, ok := v.Next()
			if !ok || nb.State != tt.state || nb.Row.Target != tt.target || nb.Countdown != tt.countdown || nb.Until != tt.till {
				t.Errorf("Next() = %+v, %v; want %s %s %q %s", nb, ok, tt.state, tt.target, tt.countdown, tt.till)
			}
		})
	}
	if _, ok := (NightView{}).Next(); ok {
		t.Error("Next() of a night without blocks reports a block")
	}
}

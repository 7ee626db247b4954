package page

import (
	"fmt"
	"strings"
	"time"
)

// blockFold is how many block lines the Night page shows before it folds
// the rest under a count: 40 lines keep a dense night's page within 2.5
// screens at 1,400 × 900 (the browser test checks it).
const blockFold = 40

// NextInfo is the block the Night page puts first: the one being observed
// at the page's "now", or else the next to start.
type NextInfo struct {
	Row       BlockRow
	State     string // "now", "next" or "over"
	Heading   string // "Observing now", "Next block", "The night's blocks are over"
	Countdown string // "ends in 12 min", "starts in 1 h 05 min"; "" when over
	Until     string // the instant the countdown runs to, RFC 3339 UTC; "" when over
}

// Next finds the current or next block from the chart's blocks (in the
// same order as v.Blocks) and the chart's "now". It reports false when the
// night has no block or no "now".
func (v NightView) Next() (NextInfo, bool) {
	now := v.Chart.Now
	if len(v.Blocks) == 0 || len(v.Blocks) != len(v.Chart.Blocks) || now.IsZero() {
		return NextInfo{}, false
	}
	for i, b := range v.Chart.Blocks {
		switch {
		case !now.Before(b.Start) && now.Before(b.End):
			return NextInfo{Row: v.Blocks[i], State: "now", Heading: "Observing now",
				Countdown: "ends in " + Countdown(b.End.Sub(now)), Until: b.End.UTC().Format(time.RFC3339)}, true
		case now.Before(b.Start):
			return NextInfo{Row: v.Blocks[i], State: "next", Heading: "Next block",
				Countdown: "starts in " + Countdown(b.Start.Sub(now)), Until: b.Start.UTC().Format(time.RFC3339)}, true
		}
	}
	return NextInfo{State: "over", Heading: "The night's blocks are over"}, true
}

// Countdown writes a positive duration to the minute: "45 s" under a
// minute, "12 min", "1 h 05 min", "3 d 4 h". static/app.js writes the same
// form as it counts down.
func Countdown(d time.Duration) string {
	switch s := int64(d / time.Second); {
	case s < 60:
		return fmt.Sprintf("%d s", max(s, 0))
	case s < 3600:
		return fmt.Sprintf("%d min", s/60)
	case s < 86400:
		return fmt.Sprintf("%d h %02d min", s/3600, s%3600/60)
	default:
		return fmt.Sprintf("%d d %d h", s/86400, s%86400/3600)
	}
}

// anySerious reports whether any warning is of the serious level.
func anySerious(gs []WarningGroup) bool {
	for _, g := range gs {
		for _, w := range g.Items {
			if w.Level == "serious" {
				return true
			}
		}
	}
	return false
}

// plural picks the singular or plural noun for n.
func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// AsSheet is v for the printed sheet (Sheet set).
func (v NightView) AsSheet() NightView {
	v.Sheet = true
	return v
}

// LocalShort is the block's local times to the minute, "21:03–21:45", for
// the one-line list (Local keeps the seconds).
func (b BlockRow) LocalShort() string {
	from, to, ok := strings.Cut(b.Local, "–")
	if !ok || len(from) < 5 || len(to) < 5 {
		return b.Local
	}
	return from[:5] + "–" + to[:5]
}

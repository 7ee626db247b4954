package web

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/web/page"
)

// warnRank orders warnings by severity, most severe first: a goal that
// cannot be reached and a window the ephemeris cannot place come before
// the search's limits, the Moon and twilight, and smearing last (common
// practice: what loses the goal before what degrades it).
var warnRank = map[planner.WarningCode]int{
	planner.WarnUnreachable:    0,
	planner.WarnPhaseUncertain: 1,
	planner.WarnNotOptimal:     2,
	planner.WarnMoonNear:       3,
	planner.WarnTwilightStart:  4,
	planner.WarnSmear:          5,
}

// warnLevel names a rank for the page: serious, caution or note.
func warnLevel(rank int) string {
	switch {
	case rank <= 1:
		return "serious"
	case rank <= 4:
		return "caution"
	}
	return "note"
}

// wholeNight is the group of warnings about no one target.
const wholeNight = "Whole night"

// warningGroups gathers a plan's warnings, its own and its blocks', per
// target: identical messages once with their count (and, for blocks, when
// they start), the most severe first; targets in the order of their most
// severe warning, then by name. The Sun-avoidance caution is left out (the
// page states it beside the plan).
func warningGroups(p *planner.Plan, loc *time.Location) []page.WarningGroup {
	type item struct {
		page.WarningItem
		rank   int
		starts []time.Time
	}
	byTarget := map[string][]*item{}
	add := func(w planner.Warning, start *time.Time) {
		target := w.Target
		if target == "" {
			target = wholeNight
		}
		rank, ok := warnRank[w.Code]
		if !ok {
			rank = 2 // a code this page does not know: between the two kinds
		}
		for _, it := range byTarget[target] {
			if it.Text == w.Message && it.rank == rank {
				it.Count++
				if start != nil {
					it.starts = append(it.starts, *start)
				}
				return
			}
		}
		it := &item{WarningItem: page.WarningItem{Text: w.Message, Count: 1, Level: warnLevel(rank)}, rank: rank}
		if start != nil {
			it.starts = []time.Time{*start}
		}
		byTarget[target] = append(byTarget[target], it)
	}
	for _, w := range p.Warnings {
		if w.Code == planner.WarnSunAvoidApplied || w.GoalIndex >= 0 && isBlockWarning(w) {
			continue // block warnings are taken from the blocks, with their times
		}
		add(w, nil)
	}
	for _, b := range p.Blocks {
		for _, w := range b.Warnings {
			add(w, &b.Start)
		}
	}
	var out []page.WarningGroup
	best := map[string]int{}
	for target, items := range byTarget {
		slices.SortStableFunc(items, func(a, b *item) int { return cmp.Compare(a.rank, b.rank) })
		g := page.WarningGroup{Target: target}
		for _, it := range items {
			it.When = blockTimes(it.starts, loc)
			g.Items = append(g.Items, it.WarningItem)
		}
		best[target] = items[0].rank
		out = append(out, g)
	}
	slices.SortFunc(out, func(a, b page.WarningGroup) int {
		return cmp.Or(cmp.Compare(best[a.Target], best[b.Target]), strings.Compare(a.Target, b.Target))
	})
	return out
}

// blockTimes lists the local start times of the blocks a warning is about:
// "blocks at 21:03, 21:45 and 6 more" ("" for none).
func blockTimes(ts []time.Time, loc *time.Location) string {
	if len(ts) == 0 {
		return ""
	}
	const shown = 3
	var hm []string
	for i, t := range ts {
		if i == shown {
			break
		}
		hm = append(hm, t.In(loc).Format("15:04"))
	}
	s := "block at " + hm[0]
	if len(ts) > 1 {
		s = "blocks at " + strings.Join(hm, ", ")
	}
	if len(ts) > shown {
		s += fmt.Sprintf(" and %d more", len(ts)-shown)
	}
	return s
}

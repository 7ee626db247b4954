package web

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// targetRow is a table row with the values it sorts by.
type targetRow struct {
	view    page.TargetRow
	ra, dec float64
	period  float64
	next    time.Time
	phase   float64
}

// phaseSite returns the site phases are computed for: the team's first
// site, or the geocentre's surface point (0°, 0°) when it has none. The
// choice moves barycentric times by at most the Earth's light-radius
// (21 ms), invisible at the precision shown.
func phaseSite(sites []store.SiteRecord) (planner.Site, string) {
	if len(sites) == 0 {
		return planner.Site{}, "latitude 0°, longitude 0° (no site chosen)"
	}
	return sites[0].Site, sites[0].Name
}

// buildTargetRow computes what the table shows of one target at now.
func buildTargetRow(t store.StoredTarget, site planner.Site, now time.Time) targetRow {
	tg := t.Target
	e := tg.Ephem
	r := targetRow{ra: tg.RADeg, dec: tg.DecDeg, period: e.PeriodDays, phase: math.Inf(1)}
	r.view = page.TargetRow{ID: t.ID, Name: tg.Name, RA: planner.FormatRAHours(tg.RADeg, 1), Dec: planner.FormatDecDeg(tg.DecDeg, 0),
		Period: fmtPeriod(e.PeriodDays), Tags: tg.Tags, Priority: tg.Priority, Goals: goalSummary(tg.Goals)}
	_, ph, phErr := planner.PhaseNow(site, tg.Star(), e, now)
	if e.PeriodDays > 0 {
		r.phase = ph
		r.view.Phase = strconv.FormatFloat(ph, 'f', 3, 64)
		r.view.PhaseErr = "± " + fmtPhaseErr(phErr)
	}
	if ev, err := planner.EventPhase(e, planner.EventInferiorConjunction, 0); err == nil {
		end := now.Add(time.Duration((e.PeriodDays*1.01)*24*float64(time.Hour)) + time.Hour)
		if ts := planner.UpcomingEvents(site, tg.Star(), e, ev, now, end); len(ts) > 0 {
			r.next = ts[0]
			r.view.NextEvent = "inf. conj. " + ts[0].UTC().Format("01-02 15:04") + " UTC"
			r.view.NextIn = "in " + fmtDuration(ts[0].Sub(now))
		}
	}
	return r
}

// sortRows orders rows by a column key, name as the tie-break.
func sortRows(rows []targetRow, key string, desc bool) {
	by := map[string]func(a, b targetRow) int{
		"ra":       func(a, b targetRow) int { return cmp.Compare(a.ra, b.ra) },
		"dec":      func(a, b targetRow) int { return cmp.Compare(a.dec, b.dec) },
		"period":   func(a, b targetRow) int { return cmp.Compare(a.period, b.period) },
		"next":     func(a, b targetRow) int { return cmpTime(a.next, b.next) },
		"phase":    func(a, b targetRow) int { return cmp.Compare(a.phase, b.phase) },
		"priority": func(a, b targetRow) int { return cmp.Compare(a.view.Priority, b.view.Priority) },
	}
	f, ok := by[key]
	if !ok {
		f = func(a, b targetRow) int { return 0 }
	}
	slices.SortStableFunc(rows, func(a, b targetRow) int {
		c := f(a, b)
		if desc {
			c = -c
		}
		if c == 0 {
			c = cmp.Compare(strings.ToLower(a.view.Name), strings.ToLower(b.view.Name))
			if desc && key == "name" {
				c = -c
			}
		}
		return c
	})
}

// cmpTime orders instants with the zero time (no event) last.
func cmpTime(a, b time.Time) int {
	switch {
	case a.IsZero() && b.IsZero():
		return 0
	case a.IsZero():
		return 1
	case b.IsZero():
		return -1
	}
	return a.Compare(b)
}

// matchFilter reports whether a target passes the text filter q (in its
// name or a tag, case-insensitive) and the exact tag filter.
func matchFilter(t planner.Target, q, tag string) bool {
	if tag != "" && !slices.Contains(t.Tags, tag) {
		return false
	}
	if q == "" {
		return true
	}
	q = strings.ToLower(q)
	if strings.Contains(strings.ToLower(t.Name), q) {
		return true
	}
	for _, g := range t.Tags {
		if strings.Contains(strings.ToLower(g), q) {
			return true
		}
	}
	return false
}

// fmtPeriod writes a period in days, with hours or minutes for short ones.
func fmtPeriod(days float64) string {
	switch {
	case days <= 0:
		return "—"
	case days < 1.0/24:
		return fmt.Sprintf("%.6f d (%.2f min)", days, days*1440)
	case days < 2:
		return fmt.Sprintf("%.7f d (%.3f h)", days, days*24)
	}
	return fmt.Sprintf("%.6f d", days)
}

// fmtPhaseErr writes a phase uncertainty with two significant digits, in
// plain decimals (0.000018).
func fmtPhaseErr(x float64) string {
	if x <= 0 || math.IsNaN(x) {
		return "0"
	}
	return sigFig(x, 2)
}

// fmtDuration writes a duration as "2 d 3 h", "1 h 12 min" or "45 min".
func fmtDuration(d time.Duration) string {
	neg := d < 0
	if neg {
		d = -d
	}
	m := int64(d.Round(time.Minute) / time.Minute)
	var s string
	switch {
	case m >= 48*60:
		s = fmt.Sprintf("%d d %d h", m/1440, (m%1440)/60)
	case m >= 60:
		s = fmt.Sprintf("%d h %d min", m/60, m%60)
	default:
		s = fmt.Sprintf("%d min", m)
	}
	if neg {
		return s + " ago"
	}
	return s
}

// goalSummary writes the goals briefly: "0.25±0.05, quadratures±0.04".
func goalSummary(gs []planner.Goal) string {
	parts := make([]string, 0, len(gs))
	for _, g := range gs {
		c := strconv.FormatFloat(g.Center, 'f', -1, 64)
		if g.Event != "" {
			c = strings.ReplaceAll(g.Event, "_", " ") // the centre is derived from the event
		}
		parts = append(parts, c+"±"+strconv.FormatFloat(g.HalfWidth, 'f', -1, 64))
	}
	return strings.Join(parts, ", ")
}

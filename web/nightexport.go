package web

import (
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
)

// utcString writes an instant as RFC 3339 UTC.
func utcString(t time.Time) string { return t.UTC().Format(time.RFC3339) }

// doc is the night's document (export.Night).
func (n *night) doc() export.Night {
	return export.NewNight(export.NewSite(n.site.Name, n.site.Site), n.q.date, n.site.Zone, n.plan, n.events, largestAcquire(n.req.Targets))
}

// exportJSON is the night as JSON.
func (n *night) exportJSON() ([]byte, error) { return export.JSON(n.doc()) }

// largestAcquire is the largest acquisition overhead per visit of ts, in
// seconds (the constraints' acquire_s; each block shows its target's own).
func largestAcquire(ts []planner.Target) float64 {
	m := 0.0
	for _, t := range ts {
		m = max(m, t.AcquireS)
	}
	return m
}

// exportCSV is the night's blocks as CSV, one row per block.
func (n *night) exportCSV() ([]byte, error) { return export.NightCSV(n.doc(), n.loc) }

// exportICS is the night's blocks as an iCalendar file; DTSTAMP is the time
// the inputs last changed, so exporting the same plan twice gives the same
// file.
func (n *night) exportICS() ([]byte, error) {
	return export.NightICS(n.title(), i64s(n.site.ID), export.NewSite(n.site.Name, n.site.Site), n.lastChange(), n.plan, n.req.Targets)
}

// lastChange is when the night's inputs (the site and the chosen targets)
// last changed: the DTSTAMP of its calendars.
func (n *night) lastChange() time.Time {
	stamp := n.site.UpdatedAt
	for _, t := range n.targets {
		if t.UpdatedAt.After(stamp) {
			stamp = t.UpdatedAt
		}
	}
	return stamp
}

// exportName is the download name of the night: "hill-station-2026-03-14-night.csv".
func (n *night) exportName(ext string) string {
	if n.half() {
		return fileName(n.site.Name+"-"+n.q.date+"-"+string(n.part), "night", ext)
	}
	return fileName(n.site.Name+"-"+n.q.date, "night", ext)
}

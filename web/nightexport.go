package web

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
)

// cautionText goes with every exported plan.
const cautionText = "Times are computed; verify against the observatory's own tools and rules before pointing. Never point near the Sun."

// nightDoc is the JSON export of a night (also GET /api/v1/night): the
// site, date and zone, then the plan command's document, export.PlanDoc.
type nightDoc struct {
	Site siteJSON `json:"site"`
	Date string   `json:"date"`
	Zone string   `json:"zone"`
	export.PlanDoc
}

type siteJSON struct {
	Name       string  `json:"name"`
	LatDeg     float64 `json:"lat_deg"`
	LonEastDeg float64 `json:"lon_east_deg"`
	ElevM      float64 `json:"elev_m"`
}

// utcString writes an instant as RFC 3339 UTC.
func utcString(t time.Time) string { return t.UTC().Format(time.RFC3339) }

// exportJSON is the night as JSON.
func (n *night) exportJSON() ([]byte, error) {
	out := nightDoc{Site: siteJSON{n.site.Name, n.site.Site.LatDeg, n.site.Site.LonEastDeg, n.site.Site.ElevM}, Date: n.q.date, Zone: n.site.Zone,
		PlanDoc: export.NewPlanDoc(n.plan, n.events, largestAcquire(n.req.Targets))}
	out.Caution = cautionText + " " + planner.SafetyCaution
	return json.MarshalIndent(out, "", "  ")
}

// largestAcquire is the largest acquisition overhead per visit of ts, in
// seconds (the constraints' acquire_s; each block shows its target's own).
func largestAcquire(ts []planner.Target) float64 {
	m := 0.0
	for _, t := range ts {
		m = max(m, t.AcquireS)
	}
	return m
}

// nightCSVHeader is the CSV export's header.
var nightCSVHeader = []string{"target", "phase_goal", "event", "start_utc", "end_utc", "start_local", "end_local", "n_exposures", "exposure_s",
	"overhead_s", "phase_start", "phase_end", "phase_mid", "smear", "phase_err", "airmass_min", "airmass_max", "moon_sep_deg",
	"parallactic_deg", "hour_angle_hours", "sun_alt_start_deg", "acquire_s", "priority", "filler", "warnings"}

// exportCSV is the night's blocks as CSV, one row per block; text cells
// that a spreadsheet would run as formulas are neutralised.
func (n *night) exportCSV() ([]byte, error) {
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	if err := cw.Write(nightCSVHeader); err != nil {
		return nil, err
	}
	f := func(x float64, prec int) string { return strconv.FormatFloat(x, 'f', prec, 64) }
	for _, b := range n.plan.Blocks {
		goal := ""
		if !b.Filler {
			goal = num(b.Goal.Center)
		}
		var ws []string
		for _, w := range b.Warnings {
			ws = append(ws, w.Message)
		}
		row := []string{export.SafeCSVCell(b.Target), goal, export.SafeCSVCell(b.Goal.Event), utcString(b.Start), utcString(b.End),
			b.Start.In(n.loc).Format(time.RFC3339), b.End.In(n.loc).Format(time.RFC3339), strconv.Itoa(b.N), num(b.ExposureS),
			num(b.OverheadS), f(b.PhaseStart, 4), f(b.PhaseEnd, 4), f(b.PhaseMid, 4), f(b.Smear, 5), f(b.PhaseErr, 5),
			f(b.AirmassMin, 3), f(b.AirmassMax, 3), f(b.MoonSepDeg, 1), f(b.Parallactic, 1), f(b.HourAngle, 3), f(b.SunAltStart, 2),
			num(b.AcquireS), strconv.Itoa(b.Priority), strconv.FormatBool(b.Filler), export.SafeCSVCell(strings.Join(ws, "; "))}
		if err := cw.Write(row); err != nil {
			return nil, err
		}
	}
	cw.Flush()
	return buf.Bytes(), cw.Error()
}

// exportICS is the night's blocks as an iCalendar file. UIDs are made from
// the site, the target and the block's start, and DTSTAMP is the time the
// inputs last changed, so exporting the same plan twice gives the same file.
func (n *night) exportICS() ([]byte, error) {
	stamp := n.site.UpdatedAt
	for _, t := range n.targets {
		if t.UpdatedAt.After(stamp) {
			stamp = t.UpdatedAt
		}
	}
	cal := export.Calendar{ProdID: "-//phasecast//night plan//EN", Name: n.title()}
	loc := fmt.Sprintf("%s (lat %s, lon %s east, %s m)", n.site.Name, num(n.site.Site.LatDeg), num(n.site.Site.LonEastDeg), num(n.site.Site.ElevM))
	for _, b := range n.plan.Blocks {
		sum := sha256.Sum256([]byte(fmt.Sprintf("%d|%s|%s|%s", n.site.ID, b.Target, num(b.Goal.Center), utcString(b.Start))))
		goal := "filler"
		if !b.Filler {
			goal = goalLabel(b.Goal)
		}
		desc := fmt.Sprintf("%s\n%d × %s s (+%s s readout); phases %.3f → %.3f; airmass %.2f–%.2f; Moon %.0f°; parallactic angle %.0f°; RA %s Dec %s\n%s",
			goal, b.N, num(b.ExposureS), num(b.OverheadS), b.PhaseStart, b.PhaseEnd, b.AirmassMin, b.AirmassMax, b.MoonSepDeg, b.Parallactic,
			planner.FormatRAHours(n.req.Targets[b.TargetIndex].RADeg, 1), planner.FormatDecDeg(n.req.Targets[b.TargetIndex].DecDeg, 0), cautionText)
		cal.Events = append(cal.Events, export.Event{UID: "block-" + hex.EncodeToString(sum[:12]) + "@phasecast", Stamp: stamp,
			Start: b.Start, End: b.End, Summary: b.Target + " — " + goal, Description: desc, Location: loc,
			Categories: []string{"phasecast", "observing block"}})
	}
	var buf bytes.Buffer
	err := export.EncodeICal(&buf, cal)
	return buf.Bytes(), err
}

// exportName is the download name of the night: "hill-station-2026-03-14-night.csv".
func (n *night) exportName(ext string) string {
	if n.half() {
		return fileName(n.site.Name+"-"+n.q.date+"-"+string(n.part), "night", ext)
	}
	return fileName(n.site.Name+"-"+n.q.date, "night", ext)
}

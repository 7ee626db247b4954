package export

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"fmt"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
)

// Night is the document of one planned night, written by `phasecast plan
// --json`, the night page's JSON download and GET /api/v1/night: the site,
// the local date the night begins on (YYYY-MM-DD), the IANA zone of local
// times, then PlanDoc.
type Night struct {
	Site Site   `json:"site"`
	Date string `json:"date"`
	Zone string `json:"zone"`
	PlanDoc
}

// NewNight is the document of plan p made at site for the night beginning
// on the local date date in zone, whose events are ev; acquireS is as for
// NewConstraintsDoc.
func NewNight(site Site, date, zone string, p *planner.Plan, ev planner.NightEvents, acquireS float64) Night {
	return Night{Site: site, Date: date, Zone: zone, PlanDoc: NewPlanDoc(p, ev, acquireS)}
}

// BlockCSVHeader is the header of the block rows of the night CSV; the run
// CSV puts "night" and "part" before it (docs/formats.md).
var BlockCSVHeader = []string{"target", "phase_goal", "event", "start_utc", "end_utc", "start_local", "end_local", "n_exposures", "exposure_s",
	"overhead_s", "phase_start", "phase_end", "phase_mid", "smear", "phase_err", "airmass_min", "airmass_max", "moon_sep_deg",
	"parallactic_deg", "hour_angle_hours", "sun_alt_start_deg", "acquire_s", "priority", "filler", "warnings"}

// blockRow is a block's CSV row (BlockCSVHeader) with local times in loc;
// text cells a spreadsheet would run as formulas are neutralised.
func blockRow(b BlockDoc, loc *time.Location) []string {
	goal := ""
	if b.PhaseGoal != nil {
		goal = num(*b.PhaseGoal)
	}
	start, end := time.Time(b.Start), time.Time(b.End)
	return []string{SafeCSVCell(b.Target), goal, SafeCSVCell(b.Event), start.UTC().Format(time.RFC3339), end.UTC().Format(time.RFC3339),
		start.In(loc).Format(time.RFC3339), end.In(loc).Format(time.RFC3339), strconv.Itoa(b.NExposures), num(b.ExposureS),
		num(b.OverheadS), fixed(b.PhaseStart, 4), fixed(b.PhaseEnd, 4), fixed(b.PhaseMid, 4), fixed(b.Smear, 5), fixed(b.PhaseErr, 5),
		fixed(b.AirmassMin, 3), fixed(b.AirmassMax, 3), fixed(b.MoonSepDeg, 1), fixed(b.ParallacticDeg, 1), fixed(b.HourAngleHours, 3),
		fixed(b.SunAltStartDeg, 2), num(b.AcquireS), strconv.Itoa(b.Priority), strconv.FormatBool(b.Filler),
		SafeCSVCell(strings.Join(b.Warnings, "; "))}
}

// writeCSV writes a header and rows.
func writeCSV(header []string, rows [][]string) ([]byte, error) {
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	if err := cw.Write(header); err != nil {
		return nil, err
	}
	if err := cw.WriteAll(rows); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// NightCSV is the night's blocks as CSV, one row per block (BlockCSVHeader),
// local times in loc.
func NightCSV(d Night, loc *time.Location) ([]byte, error) {
	var rows [][]string
	for _, b := range d.Blocks {
		rows = append(rows, blockRow(b, loc))
	}
	return writeCSV(BlockCSVHeader, rows)
}

// NightICS is the night's blocks as an iCalendar file named title, one
// event per block: the UID is made from siteKey (a stable name of the site),
// the target, the goal and the block's start, and DTSTAMP is stamp (when the
// inputs last changed), so that exporting the same plan twice gives the same
// file. targets are the plan's targets, by the blocks' TargetIndex.
func NightICS(title, siteKey string, site Site, stamp time.Time, p *planner.Plan, targets []planner.Target) ([]byte, error) {
	cal := Calendar{ProdID: "-//phasecast//night plan//EN", Name: title}
	where := fmt.Sprintf("%s (lat %s, lon %s east, %s m)", site.Name, num(site.LatDeg), num(site.LonEastDeg), num(site.ElevM))
	for _, b := range p.Blocks {
		sum := sha256.Sum256([]byte(fmt.Sprintf("%s|%s|%s|%s", siteKey, b.Target, num(b.Goal.Center), b.Start.UTC().Format(time.RFC3339))))
		goal := "filler"
		if !b.Filler {
			goal = GoalLabel(b.Goal)
		}
		t := targets[b.TargetIndex]
		desc := fmt.Sprintf("%s\n%d × %s s (+%s s readout); phases %.3f → %.3f; airmass %.2f–%.2f; Moon %.0f°; parallactic angle %.0f°; RA %s Dec %s\n%s",
			goal, b.N, num(b.ExposureS), num(b.OverheadS), b.PhaseStart, b.PhaseEnd, b.AirmassMin, b.AirmassMax, b.MoonSepDeg, b.Parallactic,
			planner.FormatRAHours(t.RADeg, 1), planner.FormatDecDeg(t.DecDeg, 0), Caution)
		cal.Events = append(cal.Events, Event{UID: "block-" + hex.EncodeToString(sum[:12]) + "@phasecast", Stamp: stamp,
			Start: b.Start, End: b.End, Summary: b.Target + " — " + goal, Description: desc, Location: where,
			Categories: []string{"phasecast", "observing block"}})
	}
	var buf bytes.Buffer
	err := EncodeICal(&buf, cal)
	return buf.Bytes(), err
}

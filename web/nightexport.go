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
	"phasecast/web/ical"
)

// cautionText goes with every exported plan.
const cautionText = "Times are computed; verify against the observatory's own tools and rules before pointing. Never point near the Sun."

// nightJSON is the JSON export of a night; its keys follow the plan
// command's output.
type nightJSON struct {
	Site        siteJSON          `json:"site"`
	Date        string            `json:"date"`
	Zone        string            `json:"zone"`
	Night       nightEventsJSON   `json:"night"`
	Blocks      []blockJSON       `json:"blocks"`
	Unscheduled []unscheduledJSON `json:"unscheduled"`
	Warnings    []warningJSON     `json:"warnings"`
	Constraints constraintsJSON   `json:"constraints"`
	Objective   objectiveJSON     `json:"objective"`
	Caution     string            `json:"caution"`
}

type siteJSON struct {
	Name       string  `json:"name"`
	LatDeg     float64 `json:"lat_deg"`
	LonEastDeg float64 `json:"lon_east_deg"`
	ElevM      float64 `json:"elev_m"`
}

type nightEventsJSON struct {
	Sunset           *string `json:"sunset"`
	CivilDusk        *string `json:"civil_dusk"`
	NauticalDusk     *string `json:"nautical_dusk"`
	AstronomicalDusk *string `json:"astronomical_dusk"`
	AstronomicalDawn *string `json:"astronomical_dawn"`
	NauticalDawn     *string `json:"nautical_dawn"`
	CivilDawn        *string `json:"civil_dawn"`
	Sunrise          *string `json:"sunrise"`
	Moonrise         *string `json:"moonrise"`
	Moonset          *string `json:"moonset"`
	MoonIlluminated  float64 `json:"moon_illuminated"`
}

type blockJSON struct {
	Target         string   `json:"target"`
	PhaseGoal      *float64 `json:"phase_goal"`
	Event          string   `json:"event,omitempty"`
	Start          string   `json:"start"`
	End            string   `json:"end"`
	NExposures     int      `json:"n_exposures"`
	ExposureS      float64  `json:"exposure_s"`
	OverheadS      float64  `json:"overhead_s"`
	PhaseStart     float64  `json:"phase_start"`
	PhaseEnd       float64  `json:"phase_end"`
	PhaseMid       float64  `json:"phase_mid"`
	PhaseFirstMid  float64  `json:"phase_first_exposure_mid"`
	PhaseLastMid   float64  `json:"phase_last_exposure_mid"`
	PhaseHalfWidth *float64 `json:"phase_halfwidth"`
	Smear          float64  `json:"smear"`
	PhaseErr       float64  `json:"phase_err"`
	Cycle          int64    `json:"cycle"`
	AirmassMin     float64  `json:"airmass_min"`
	AirmassMax     float64  `json:"airmass_max"`
	AcquireS       float64  `json:"acquire_s"`
	MoonSepDeg     float64  `json:"moon_sep_deg"`
	MoonUp         bool     `json:"moon_up"`
	ParallacticDeg float64  `json:"parallactic_deg"`
	HourAngleHours float64  `json:"hour_angle_hours"`
	SunAltStartDeg float64  `json:"sun_alt_start_deg"`
	Priority       int      `json:"priority"`
	Filler         bool     `json:"filler"`
	Warnings       []string `json:"warnings"`
}

type unscheduledJSON struct {
	Target    string  `json:"target"`
	PhaseGoal float64 `json:"phase_goal"`
	Reason    string  `json:"reason"`
	Code      string  `json:"reason_code"`
}

type warningJSON struct {
	Code    string `json:"code"`
	Target  string `json:"target,omitempty"`
	Message string `json:"message"`
}

type constraintsJSON struct {
	Twilight      string  `json:"twilight"`
	SunAltMaxDeg  float64 `json:"sun_alt_max_deg"`
	MaxAirmass    float64 `json:"max_airmass"`
	MinAltDeg     float64 `json:"min_alt_deg"`
	MinMoonSepDeg float64 `json:"min_moon_sep_deg"`
	MaxMoonIllum  float64 `json:"max_moon_illum"`
	SunAvoidDeg   float64 `json:"sun_avoid_deg"`
}

type objectiveJSON struct {
	Value       int64 `json:"value"`
	GreedyValue int64 `json:"greedy_value"`
	Optimal     bool  `json:"optimal"`
}

// utcString writes an instant as RFC 3339 UTC.
func utcString(t time.Time) string { return t.UTC().Format(time.RFC3339) }

// exportJSON is the night as JSON.
func (n *night) exportJSON() ([]byte, error) {
	p, ev := n.plan, n.events
	out := nightJSON{
		Site: siteJSON{n.site.Name, n.site.Site.LatDeg, n.site.Site.LonEastDeg, n.site.Site.ElevM}, Date: n.q.date, Zone: n.site.Zone,
		Night: nightEventsJSON{utcp(ev.Sunset), utcp(ev.CivilDusk), utcp(ev.NauticalDusk), utcp(ev.AstronomicalDusk), utcp(ev.AstronomicalDawn),
			utcp(ev.NauticalDawn), utcp(ev.CivilDawn), utcp(ev.Sunrise), utcp(ev.Moonrise), utcp(ev.Moonset), ev.MoonIlluminated},
		Blocks: []blockJSON{}, Unscheduled: []unscheduledJSON{}, Warnings: []warningJSON{},
		Constraints: constraintsJSON{string(p.Constraints.Twilight), p.Constraints.SunAltMaxDeg, p.Constraints.MaxAirmass, p.Constraints.MinAltDeg,
			p.Constraints.MinMoonSepDeg, p.Constraints.MaxMoonIllum, p.Constraints.SunAvoidDeg},
		Objective: objectiveJSON{p.Value, p.GreedyValue, p.Optimal}, Caution: cautionText + " " + planner.SafetyCaution,
	}
	for _, b := range p.Blocks {
		out.Blocks = append(out.Blocks, toBlockJSON(b))
	}
	for _, u := range p.Unscheduled {
		out.Unscheduled = append(out.Unscheduled, unscheduledJSON{u.Target, u.Goal.Center, u.Detail, string(u.Reason)})
	}
	for _, w := range p.Warnings {
		out.Warnings = append(out.Warnings, warningJSON{string(w.Code), w.Target, w.Message})
	}
	return json.MarshalIndent(out, "", "  ")
}

// utcp writes an optional event as RFC 3339 UTC to the second (null when
// the event does not happen).
func utcp(t *time.Time) *string {
	if t == nil {
		return nil
	}
	u := t.UTC().Round(time.Second).Format(time.RFC3339)
	return &u
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
		row := []string{safeCell(b.Target), goal, safeCell(b.Goal.Event), utcString(b.Start), utcString(b.End),
			b.Start.In(n.loc).Format(time.RFC3339), b.End.In(n.loc).Format(time.RFC3339), strconv.Itoa(b.N), num(b.ExposureS),
			num(b.OverheadS), f(b.PhaseStart, 4), f(b.PhaseEnd, 4), f(b.PhaseMid, 4), f(b.Smear, 5), f(b.PhaseErr, 5),
			f(b.AirmassMin, 3), f(b.AirmassMax, 3), f(b.MoonSepDeg, 1), f(b.Parallactic, 1), f(b.HourAngle, 3), f(b.SunAltStart, 2),
			num(b.AcquireS), strconv.Itoa(b.Priority), strconv.FormatBool(b.Filler), safeCell(strings.Join(ws, "; "))}
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
	cal := ical.Calendar{ProdID: "-//phasecast//night plan//EN", Name: n.title()}
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
		cal.Events = append(cal.Events, ical.Event{UID: "block-" + hex.EncodeToString(sum[:12]) + "@phasecast", Stamp: stamp,
			Start: b.Start, End: b.End, Summary: b.Target + " — " + goal, Description: desc, Location: loc,
			Categories: []string{"phasecast", "observing block"}})
	}
	var buf bytes.Buffer
	err := ical.Encode(&buf, cal)
	return buf.Bytes(), err
}

// exportName is the download name of the night: "hill-station-2026-03-14-night.csv".
func (n *night) exportName(ext string) string {
	return fileName(n.site.Name+"-"+n.q.date, "night", ext)
}

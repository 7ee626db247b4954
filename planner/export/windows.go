package export

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
)

// Windows is the document of a list of queue windows, written by `phasecast
// windows --json`, /windows.json and GET /api/v1/windows: the site's name,
// the range searched (UTC), the IANA zone of local dates, the chosen goal
// (its number in the target's goal list from 1; omitted when every goal is
// listed) and every window in target, goal, time order (flat).
type Windows struct {
	Site    string   `json:"site"`
	From    DocTime  `json:"from"`
	To      DocTime  `json:"to"`
	Zone    string   `json:"zone"`
	Goal    int      `json:"goal,omitempty"`
	Windows []Window `json:"windows"`
	Caution string   `json:"caution"`
}

// Window is one queue window: the goal's centre and half-width (phase
// 0..1) and event name (omitted for a goal given by phase), the window's
// edges (UTC) and length in minutes, the orbital cycle of its centre, the
// airmass range over it, the ephemeris' 1σ phase uncertainty at its middle
// (Uncertain: above the half-width), how many whole exposures of ExposureS
// plus OverheadS seconds fit inside.
type Window struct {
	Target         string  `json:"target"`
	PhaseGoal      float64 `json:"phase_goal"`
	PhaseHalfWidth float64 `json:"phase_halfwidth"`
	Event          string  `json:"event,omitempty"`
	Start          DocTime `json:"start"`
	End            DocTime `json:"end"`
	DurationMin    float64 `json:"duration_min"`
	Cycle          int64   `json:"cycle"`
	AirmassMin     float64 `json:"airmass_min"`
	AirmassMax     float64 `json:"airmass_max"`
	PhaseErr       float64 `json:"phase_err"`
	Uncertain      bool    `json:"uncertain"`
	Exposures      int     `json:"whole_exposures"`
	ExposureS      float64 `json:"exposure_s"`
	OverheadS      float64 `json:"overhead_s"`
	// Sizing is the exposure sized for the goal's S/N at the window's
	// middle (only with an instrument and an S/N goal).
	Sizing *WindowSizing `json:"sizing,omitempty"`
}

// WindowSizing is a window's exposure sized for its goal's S/N: the
// exposure in seconds, the S/N it reaches per exposure, the sky brightness
// used (mag/arcsec² in the target's band) and whether the S/N was reached
// (false: the smear limit stopped the exposure short).
type WindowSizing struct {
	ExposureS float64 `json:"exposure_s"`
	SNR       float64 `json:"snr"`
	SkyMag    float64 `json:"sky_mag_arcsec2"`
	Reached   bool    `json:"snr_reached"`
}

// NewWindows is the document of the windows got, searched over [from, to]
// at the site named site with local dates in zone; goal is the chosen
// goal's number (0: every goal).
func NewWindows(site, zone string, from, to time.Time, goal int, got []planner.GoalWindows) Windows {
	d := Windows{Site: site, From: DocTime(from), To: DocTime(to), Zone: zone, Goal: goal, Windows: []Window{}, Caution: Caution}
	for _, g := range got {
		for _, w := range g.Windows {
			d.Windows = append(d.Windows, Window{Target: g.Target, PhaseGoal: g.Goal.Center, PhaseHalfWidth: g.Goal.HalfWidth, Event: g.Goal.Event,
				Start: DocTime(w.Start), End: DocTime(w.End), DurationMin: w.Duration().Minutes(), Cycle: w.Cycle, AirmassMin: w.AirmassMin,
				AirmassMax: w.AirmassMax, PhaseErr: w.PhaseErr, Uncertain: w.Uncertain, Exposures: w.Exposures, ExposureS: g.Goal.ExposureS,
				OverheadS: g.Goal.OverheadS, Sizing: windowSizing(w.Sizing)})
		}
	}
	return d
}

// windowSizing converts a window's sizing (nil stays nil).
func windowSizing(sz *planner.ExposureSizing) *WindowSizing {
	if sz == nil {
		return nil
	}
	return &WindowSizing{ExposureS: sz.ExposureS, SNR: sz.SNR, SkyMag: sz.SkyMag, Reached: sz.Reached}
}

// WindowsCSVHeader is the header of the queue-windows CSV (docs/formats.md).
var WindowsCSVHeader = []string{"target", "phase_goal", "phase_halfwidth", "start_utc", "end_utc", "duration_min", "cycle",
	"phase_err", "uncertain", "airmass_min", "airmass_max", "exposures", "event"}

// WindowsCSVSizing are the columns WindowsCSV adds when the windows were
// sized for an instrument: a window's S/N sizing (empty cells for goals
// without an S/N).
var WindowsCSVSizing = []string{"sized_exposure_s", "snr", "sky_mag_arcsec2", "snr_reached"}

// WindowsCSV is the windows as CSV, one window per row (WindowsCSVHeader,
// then WindowsCSVSizing when sized).
func WindowsCSV(d Windows, sized bool) ([]byte, error) {
	header := WindowsCSVHeader
	if sized {
		header = append(append([]string(nil), header...), WindowsCSVSizing...)
	}
	var rows [][]string
	for _, w := range d.Windows {
		row := []string{SafeCSVCell(w.Target), fixed(w.PhaseGoal, 4), fixed(w.PhaseHalfWidth, 4), w.Start.String(), w.End.String(),
			fixed(w.DurationMin, 2), strconv.FormatInt(w.Cycle, 10), fixed(w.PhaseErr, 5), strconv.FormatBool(w.Uncertain),
			fixed(w.AirmassMin, 3), fixed(w.AirmassMax, 3), strconv.Itoa(w.Exposures), SafeCSVCell(w.Event)}
		switch sz := w.Sizing; {
		case sized && sz != nil:
			row = append(row, num(sz.ExposureS), fixed(sz.SNR, 2), fixed(sz.SkyMag, 3), strconv.FormatBool(sz.Reached))
		case sized:
			row = append(row, "", "", "", "")
		}
		rows = append(rows, row)
	}
	return writeCSV(header, rows)
}

// windowUID is a window's stable iCalendar UID: the same target, goal and
// window always give the same UID (RFC 5545 §3.8.4.7), so a calendar
// updates an imported window instead of duplicating it.
func windowUID(w Window) string {
	name := strings.Map(func(r rune) rune {
		if r < 0x21 || r > 0x7e || r == '@' {
			return '_'
		}
		return r
	}, w.Target)
	return fmt.Sprintf("window-%s-%s-%d-%d@phasecast", name, num(w.PhaseGoal), w.Cycle, time.Time(w.Start).Unix())
}

// WindowsICS is the windows as an iCalendar file, one event per window,
// DTSTAMP stamp (so the same windows and stamp give the same file); the
// site's name, when there is one, is each event's LOCATION.
func WindowsICS(d Windows, stamp time.Time) ([]byte, error) {
	cal := Calendar{ProdID: "-//phasecast//queue windows//EN", Name: "phasecast queue windows"}
	if d.Site != "" {
		cal.Name = "phasecast queue windows at " + d.Site
	}
	for _, w := range d.Windows {
		goal := fmt.Sprintf("%.4f ± %.4f", w.PhaseGoal, w.PhaseHalfWidth)
		if w.Event != "" {
			goal += " (" + EventText(w.Event) + ")"
		}
		desc := fmt.Sprintf("Phase window %s of %s (cycle %d), %.1f min; phase uncertainty 1σ %.4f; airmass %.2f–%.2f; %d exposure(s) of %ss fit. %s",
			goal, w.Target, w.Cycle, w.DurationMin, w.PhaseErr, w.AirmassMin, w.AirmassMax, w.Exposures, shortNum(w.ExposureS), planner.SafetyCaution)
		cal.Events = append(cal.Events, Event{UID: windowUID(w), Stamp: stamp, Start: time.Time(w.Start), End: time.Time(w.End),
			Summary: fmt.Sprintf("%s phase %.3f", w.Target, w.PhaseGoal), Description: desc, Location: d.Site,
			Categories: []string{"phasecast", "queue window"}})
	}
	var buf bytes.Buffer
	err := EncodeICal(&buf, cal)
	return buf.Bytes(), err
}

// shortNum writes x to at most three decimals without trailing zeros.
func shortNum(x float64) string {
	return strings.TrimSuffix(strings.TrimRight(fixed(x, 3), "0"), ".")
}

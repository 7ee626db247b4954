// Package export builds every document phasecast writes — the night plan,
// the run of nights and the queue windows, as JSON, CSV and iCalendar — so
// that `phasecast plan|run|windows`, the web pages' downloads and the JSON
// API write the same bytes for the same input. It also holds the CSV
// formula guard (SafeCSVCell) and the iCalendar encoder (EncodeICal).
//
// export is pure like planner (it takes planner values and plain values
// such as a site's name and returns bytes): it needs no database, so it
// lives under planner and web, cmd/phasecast and store all import it.
// The column sets and keys of each document are described in
// docs/formats.md.
package export

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"phasecast/planner"
)

// Caution goes with every document: a reminder to check the computed
// times, then planner.SafetyCaution.
const Caution = "Times are computed; verify against the observatory's own tools and rules before pointing. Never point near the Sun. " +
	planner.SafetyCaution

// Site is the observing site as the documents name it: Name as the user
// gave it (empty when none was given), latitude and east-positive
// longitude in degrees, elevation in metres.
type Site struct {
	Name       string  `json:"name"`
	LatDeg     float64 `json:"lat_deg"`
	LonEastDeg float64 `json:"lon_east_deg"`
	ElevM      float64 `json:"elev_m"`
}

// NewSite is the document of site s named name.
func NewSite(name string, s planner.Site) Site {
	return Site{Name: name, LatDeg: s.LatDeg, LonEastDeg: s.LonEastDeg, ElevM: s.ElevM}
}

// JSON writes a document as JSON indented by two spaces, ending in a
// newline, with < > & written as themselves (not escaped for HTML).
// encoding/json refuses NaN and infinities, so a non-finite value is an
// error, never output.
func JSON(doc any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(doc); err != nil {
		return nil, fmt.Errorf("writing JSON: %w", err)
	}
	return buf.Bytes(), nil
}

// GoalLabel names a goal: "φ 0.25 ± 0.05" or, for an event goal,
// "max recession, φ 0.25 ± 0.05".
func GoalLabel(g planner.Goal) string { return GoalLabelNamed(g, EventText(g.Event)) }

// GoalLabelNamed is GoalLabel with the goal's event called event (the
// pages name an event for the target's T0 convention).
func GoalLabelNamed(g planner.Goal, event string) string {
	s := fmt.Sprintf("φ %s ± %s", PhaseText(g.Center), PhaseText(g.HalfWidth))
	if g.Event != "" {
		s = event + ", " + s
	}
	return s
}

// EventText is an event name as words: "max_recession" → "max recession".
func EventText(event string) string {
	return strings.ReplaceAll(event, "_", " ")
}

// PhaseText formats a phase: as typed when it has at most four decimals
// ("0.25"), else to four decimals (an event's derived phase such as 0.9773).
func PhaseText(x float64) string {
	if r := math.Round(x*1e4) / 1e4; math.Abs(r-x) < 1e-12 {
		return num(r)
	}
	return strconv.FormatFloat(x, 'f', 4, 64)
}

// num writes a number with as many digits as it needs.
func num(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// fixed writes x with prec decimals.
func fixed(x float64, prec int) string { return strconv.FormatFloat(x, 'f', prec, 64) }

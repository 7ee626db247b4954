package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"phasecast/ephem"
	"phasecast/planner/export"
)

// jdDecimals is the number of decimals of a day printed for Julian dates:
// 1e-9 d = 86 µs, finer than the 1 ms (1.2e-8 d) that timing work needs.
const jdDecimals = 9

// jdValue is a two-part Julian date that marshals as a JSON number with
// jdDecimals decimals, written from its two parts so no digit is lost to a
// single float64 (which resolves only about 40 µs).
type jdValue ephem.JD2

func (j jdValue) String() string { return ephem.FormatEpoch(ephem.JD2(j), ephem.FormJD, jdDecimals) }

func (j jdValue) MarshalJSON() ([]byte, error) {
	if !finite(j.Day) || !finite(j.Frac) {
		return nil, fmt.Errorf("Julian date %v is not finite", ephem.JD2(j))
	}
	return []byte(j.String()), nil
}

// utcMillis is an instant in RFC 3339 UTC with milliseconds.
type utcMillis time.Time

func (t utcMillis) String() string {
	return time.Time(t).UTC().Round(time.Millisecond).Format("2006-01-02T15:04:05.000Z")
}

func (t utcMillis) MarshalJSON() ([]byte, error) { return json.Marshal(t.String()) }

// writeJSON prints v as one indented JSON object (export.JSON: the same
// bytes the web and the API write for a document). encoding/json refuses
// NaN and infinities, so a non-finite value becomes an error, never output.
func writeJSON(w io.Writer, v any) error {
	return writeBytes(w, func() ([]byte, error) { return export.JSON(v) })
}

// writeBytes prints the document make writes.
func writeBytes(w io.Writer, make func() ([]byte, error)) error {
	b, err := make()
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

// outputFormat reads --format (text, json, csv or ics; default text) and
// --json (the same as --format json).
func outputFormat(format *textValue, asJSON bool) (string, error) {
	return outputFormatOf(format, asJSON, "text", "json", "csv", "ics")
}

// outputFormatOf is outputFormat for a command that writes the formats
// accepted only (text first).
func outputFormatOf(format *textValue, asJSON bool, accepted ...string) (string, error) {
	name := strings.ToLower(strings.TrimSpace(format.value))
	if !format.set {
		name = "text"
	}
	if !slices.Contains(accepted, name) {
		last := len(accepted) - 1
		return "", fieldError(format, "not a format", strings.Join(accepted[:last], ", ")+" or "+accepted[last])
	}
	if asJSON {
		if format.set && name != "json" {
			return "", usageErrorf("--json and --format %s: give one output format", shown(format.value))
		}
		name = "json"
	}
	return name, nil
}

// table is a two- or three-column human table.
type table struct{ tw *tabwriter.Writer }

func newTable(w io.Writer) *table { return &table{tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)} }

func (t *table) row(cells ...string) {
	for i, c := range cells {
		if i > 0 {
			fmt.Fprint(t.tw, "\t")
		}
		fmt.Fprint(t.tw, c)
	}
	fmt.Fprintln(t.tw)
}

func (t *table) flush() error { return t.tw.Flush() }

// f formats x with d decimals; the caller guarantees x is finite.
func f(x float64, d int) string { return strconv.FormatFloat(x, 'f', d, 64) }

// signed formats x with d decimals and an explicit sign ("+0.00", never "-0.00").
func signed(x float64, d int) string {
	s := f(x, d)
	if s[0] != '-' {
		return "+" + s
	}
	if strings.Trim(s[1:], "0.") == "" {
		return "+" + s[1:]
	}
	return s
}

// hms formats hours as HH:MM:SS.s (0 ≤ h < 24), for sidereal time.
func hms(hours float64) string { return ephem.FormatRAHours(hours*15, 1) }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// checkFinite returns an internal-looking error naming the first non-finite
// value, so that no NaN ever reaches the output.
func checkFinite(names []string, vals ...float64) error {
	for i, v := range vals {
		if !finite(v) {
			return fmt.Errorf("computed %s is not finite (%v); this is a bug, please report the command line", names[i], v)
		}
	}
	return nil
}

// siteLine describes a site for human output.
func siteLine(s ephem.Site) string {
	ns, ew := "N", "E"
	if s.LatDeg < 0 {
		ns = "S"
	}
	if s.LonEastDeg < 0 {
		ew = "W"
	}
	return fmt.Sprintf("%.4f° %s, %.4f° %s (lon %s east-positive), %.0f m", math.Abs(s.LatDeg), ns, math.Abs(s.LonEastDeg), ew, signed(s.LonEastDeg, 4), s.ElevM)
}

// starLine describes a target for human output.
func starLine(st ephem.Star) string {
	return fmt.Sprintf("RA %s  Dec %s (ICRS; %.5f°, %s°)", ephem.FormatRAHours(st.RADeg, 2), ephem.FormatDecDeg(st.DecDeg, 1), st.RADeg, signed(st.DecDeg, 5))
}

// safetyNote ends every human report that gives times or pointings.
const safetyNote = "Computed values: check them against your observatory's own tools and rules; never point near the Sun."

// printTimeScaleNote prints ephem.TimeScaleNote's sentence, when there is
// one, as a line of its own beginning "note: ".
func printTimeScaleNote(w io.Writer, note string) error {
	if note == "" {
		return nil
	}
	_, err := fmt.Fprintln(w, "note: "+note+".")
	return err
}

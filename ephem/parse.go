package ephem

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// Parsers for user-typed coordinates, instants and dates. Each returns an
// *InputError naming a default field ("ra", "dec", "time", "date"); callers
// that read a flag or a form field set Field to its own name (for example
// "--ra") before showing the error. Parsing is strict: no NaN, no infinity,
// no exponent, no trailing text, minutes and seconds below 60, and values out
// of range are rejected, never clamped or wrapped.

// Accepted forms, quoted in errors.
const (
	acceptedRA = "right ascension as decimal degrees 0 ≤ RA < 360 (148.25) or sexagesimal hours 0h ≤ RA < 24h " +
		"(09:53:00.0, 9 53 00.0, 09h53m00.0s); minutes and seconds below 60"
	acceptedDec = "declination −90..90 as decimal degrees (-6.125) or sexagesimal degrees with the sign in front " +
		"(-06:07:30, −06 07 30, +06d07m30s); minutes and seconds below 60"
	acceptedTime = "RFC 3339 (2026-12-01T20:00:00Z, 2026-12-01T17:00:00-03:00), or 2026-12-01T20:00:00 and " +
		"2026-12-01 20:00:00 taken as UTC; years 1800 to 2199"
	acceptedDate = "a calendar date YYYY-MM-DD (2026-12-01), years 1800 to 2199"
)

// Years accepted by ParseTime and ParseDate: the span over which the time
// scales (ΔT table before 1960, leap-second table, TDB series) are trusted.
const (
	MinYear = 1800
	MaxYear = 2199
)

// ParseRA parses a right ascension and returns it in degrees, 0 ≤ deg < 360.
// A bare number is decimal DEGREES ("148.25"); sexagesimal input is in HOURS
// of right ascension: "09:53:00.0", "9 53 00.0", "09h53m00.0s", "09:53.5",
// "9.8833h". Only the last field may carry a fraction. Errors are
// *InputError with Field "ra".
func ParseRA(s string) (deg float64, err error) {
	bad := func() (float64, error) {
		return 0, &InputError{Field: "ra", Value: shownValue(s), Accepted: acceptedRA}
	}
	sx, ok := splitSexagesimal(s, raMarks)
	if !ok || sx.signed {
		return bad()
	}
	v, ok := sx.value()
	if !ok {
		return bad()
	}
	if sx.hours() {
		if v >= 24 {
			return bad()
		}
		deg = v * 15
	} else {
		deg = v
	}
	if !finite(deg) || deg < 0 || deg >= 360 {
		return bad()
	}
	return deg, nil
}

// ParseDec parses a declination and returns it in degrees, −90 ≤ deg ≤ 90.
// A bare number is decimal degrees ("-6.125"); sexagesimal input is degrees,
// arcminutes, arcseconds: "-06:07:30", "−06 07 30" (U+2212 minus),
// "+06d07m30s", "+06°07′30″". The sign applies to the whole value, so
// "-00:30:00" is −0.5°. Errors are *InputError with Field "dec".
func ParseDec(s string) (deg float64, err error) {
	bad := func() (float64, error) {
		return 0, &InputError{Field: "dec", Value: shownValue(s), Accepted: acceptedDec}
	}
	sx, ok := splitSexagesimal(s, decMarks)
	if !ok || sx.hours() {
		return bad()
	}
	v, ok := sx.value()
	if !ok || v > 90 {
		return bad()
	}
	if sx.neg {
		v = -v
	}
	return v, nil
}

// ParseTime parses an instant and returns it in UTC. Accepted: RFC 3339 with
// a zone ("2026-12-01T20:00:00Z", "2026-12-01T17:00:00-03:00", fractional
// seconds allowed), and, taken as UTC, "2026-12-01T20:00:00" and
// "2026-12-01 20:00:00" (with or without seconds, optional fraction). Years
// MinYear..MaxYear. Errors are *InputError with Field "time".
func ParseTime(s string) (time.Time, error) {
	bad := func() (time.Time, error) {
		return time.Time{}, &InputError{Field: "time", Value: shownValue(s), Accepted: acceptedTime}
	}
	str := strings.TrimSpace(s)
	for _, layout := range timeLayouts {
		t, err := ParseTimeLayout(layout, str)
		if errors.Is(err, ErrNotLeapSecond) {
			return time.Time{}, &InputError{Field: "time", Value: shownValue(s), Accepted: acceptedLeap}
		}
		if err != nil {
			continue
		}
		if t.Year() < MinYear || t.Year() > MaxYear {
			return bad()
		}
		return t, nil
	}
	return bad()
}

// ErrNotLeapSecond is wrapped by ParseTimeLayout's error for a second 60
// that is not a leap second.
var ErrNotLeapSecond = errors.New("second 60 is not a leap second")

// ParseTimeLayout is time.Parse(layout, s) in UTC that also reads second 60,
// which RFC 3339 (§5.6) and RFC 5545 (§3.3.12) allow for a positive leap
// second: accepted only when it is 23:59:60 UTC (in whatever offset s is
// written) on a day that ends with a leap second (IsLeapSecondDay), refused
// elsewhere with an error saying so. time.Time has no leap seconds: the leap
// second is read as the instant it ends, 00:00:00 UTC of the next day plus
// any fraction, as time.Date normalises second 60. The layout's fields
// before its seconds ("05") must be fixed-width, as RFC 3339's are.
func ParseTimeLayout(layout, s string) (time.Time, error) {
	t, err := time.Parse(layout, s)
	if err == nil {
		return t.UTC(), nil
	}
	i := strings.Index(layout, "05")
	if i < 0 || len(s) < i+2 || s[i:i+2] != "60" {
		return time.Time{}, err
	}
	t, err2 := time.Parse(layout, s[:i]+"59"+s[i+2:])
	if err2 != nil {
		return time.Time{}, err
	}
	u := t.UTC()
	if y, m, d := u.Date(); u.Hour() != 23 || u.Minute() != 59 || !IsLeapSecondDay(y, m, d) {
		return time.Time{}, fmt.Errorf("%q: %w; %s", s, ErrNotLeapSecond, acceptedLeap)
	}
	return u.Add(time.Second), nil
}

// acceptedLeap says where second 60 is accepted.
var acceptedLeap = "second 60 only for a leap second, at 23:59:60 UTC on a day that ended with one (the last: " + lastLeapDay() + ")"

// IsLeapSecondDay reports whether the UTC day year-month-day ended with a
// positive leap second (23:59:60 UTC): the day before a line of the
// TAI−UTC table (timescale.go) from 1972-07-01 on, where TAI−UTC steps up
// by one second. After the table's last line none is assumed
// (LeapTableUpdated).
func IsLeapSecondDay(year int, month time.Month, day int) bool {
	next := time.Date(year, month, day+1, 0, 0, 0, 0, time.UTC)
	mjd := float64(next.Unix()/86400) + 40587 // MJD of 1970-01-01 is 40587
	for i := 1; i < len(taiUTC); i++ {
		if taiUTC[i].Start == mjd {
			return taiUTC[i].Rate == 0 && taiUTC[i-1].Rate == 0 && taiUTC[i].Offset-taiUTC[i-1].Offset == 1
		}
	}
	return false
}

// lastLeapDay is the last day of the table that ended with a leap second.
func lastLeapDay() string {
	last := taiUTC[len(taiUTC)-1]
	return time.Unix(int64(last.Start-40587)*86400, 0).UTC().AddDate(0, 0, -1).Format("2006-01-02")
}

// LocalDayStart returns the first instant of the local calendar day
// year-month-day in loc, in UTC. Usually local midnight; when a change of
// offset skips midnight (a daylight-saving gap, as America/Santiago's on
// 2026-09-06, whose day starts at 01:00 −03), the first instant that
// exists on that day, not the instant of the day before that time.Date
// normalises 00:00 to. Every local date that becomes an instant goes
// through here. An out-of-range day is normalised first (day 0 is the last
// of the month before), as time.Date does.
func LocalDayStart(year int, month time.Month, day int, loc *time.Location) time.Time {
	if loc == nil {
		loc = time.UTC
	}
	year, month, day = time.Date(year, month, day, 12, 0, 0, 0, time.UTC).Date() // day 32 is the 1st of the next month
	t := time.Date(year, month, day, 0, 0, 0, 0, loc)
	if y, m, d := t.Date(); y != year || m != month || d != day {
		if _, end := t.ZoneBounds(); !end.IsZero() {
			t = end // the gap's end: the first instant of the new offset
		}
	}
	return t.UTC()
}

// timeLayouts are tried in order. Layouts without a zone parse as UTC.
// time.Parse accepts a fractional second after any seconds field.
var timeLayouts = []string{
	time.RFC3339,
	"2006-01-02 15:04:05Z07:00",
	"2006-01-02T15:04:05",
	"2006-01-02 15:04:05",
	"2006-01-02T15:04Z07:00",
	"2006-01-02 15:04Z07:00",
	"2006-01-02T15:04",
	"2006-01-02 15:04",
}

// ParseDate parses a calendar date "YYYY-MM-DD" (Gregorian), years
// MinYear..MaxYear, checking that the day exists in that month. Errors are
// *InputError with Field "date".
func ParseDate(s string) (year int, month time.Month, day int, err error) {
	t, perr := time.Parse("2006-01-02", strings.TrimSpace(s))
	if perr != nil || t.Year() < MinYear || t.Year() > MaxYear {
		return 0, 0, 0, &InputError{Field: "date", Value: shownValue(s), Accepted: acceptedDate}
	}
	return t.Year(), t.Month(), t.Day(), nil
}

// FormatRAHours formats a right ascension given in degrees as sexagesimal
// hours "HH:MM:SS.sss" with secDecimals (0..9) decimals of a second of time,
// rounding once so that no field shows 60. ParseRA reads the result back.
func FormatRAHours(deg float64, secDecimals int) string {
	secDecimals = min(max(secDecimals, 0), 9)
	scale := math.Pow10(secDecimals)
	perDay := int64(24*3600) * int64(scale)
	n := int64(math.Round(deg / 15 * 3600 * scale))
	n %= perDay
	if n < 0 {
		n += perDay
	}
	return formatSexagesimal(n, secDecimals, 2)
}

// FormatDecDeg formats a declination given in degrees as signed sexagesimal
// degrees "±DD:MM:SS.ss" with secDecimals (0..9) decimals of an arcsecond,
// rounding once so that no field shows 60. ParseDec reads the result back.
func FormatDecDeg(deg float64, secDecimals int) string {
	secDecimals = min(max(secDecimals, 0), 9)
	scale := math.Pow10(secDecimals)
	n := int64(math.Round(math.Abs(deg) * 3600 * scale))
	sign := "+"
	if deg < 0 && n != 0 {
		sign = "-"
	}
	return sign + formatSexagesimal(n, secDecimals, 2)
}

// formatSexagesimal writes n units of 10^−dec of a second as
// "D:MM:SS[.fff]" with the first field zero-padded to width w.
func formatSexagesimal(n int64, dec, w int) string {
	unit := int64(math.Pow10(dec))
	frac := n % unit
	secs := n / unit
	first, mins, sec := secs/3600, secs/60%60, secs%60
	var b strings.Builder
	b.WriteString(padInt(first, w))
	b.WriteByte(':')
	b.WriteString(padInt(mins, 2))
	b.WriteByte(':')
	b.WriteString(padInt(sec, 2))
	if dec > 0 {
		b.WriteByte('.')
		b.WriteString(padInt(frac, dec))
	}
	return b.String()
}

func padInt(v int64, w int) string {
	s := strconv.FormatInt(v, 10)
	for len(s) < w {
		s = "0" + s
	}
	return s
}

// sexagesimal is an angle or time as typed: sign, then one to three numeric
// fields, separated by colons, by blanks, or by unit marks.
type sexagesimal struct {
	neg, signed bool
	fields      []string
	firstMark   string // the unit mark after the first field, "" if none
	raStyle     bool   // parsed with the right-ascension marks (hours)
}

// marks lists the unit marks accepted after each field.
type marks [3][]string

var (
	raMarks  = marks{{"h", "H"}, {"m", "M", "'", "′"}, {"s", "S", "\"", "″"}}
	decMarks = marks{{"d", "D", "°"}, {"m", "M", "'", "′"}, {"s", "S", "\"", "″"}}
)

// hours reports whether the first field was marked as hours (or whether the
// input is sexagesimal without marks, which for RA means hours: the caller
// decides by the mark table it passed).
func (sx sexagesimal) hours() bool {
	if sx.firstMark != "" {
		return sx.firstMark == "h" || sx.firstMark == "H"
	}
	return len(sx.fields) > 1 && sx.raStyle
}

// splitSexagesimal tokenises s. ok is false for anything that is not one of
// the accepted shapes: an optional sign (+, -, U+2212), then fields of ASCII
// digits with an optional fraction on the last one only, separated
// consistently by ':' or blanks or unit marks (the last mark may be omitted).
func splitSexagesimal(s string, mk marks) (sx sexagesimal, ok bool) {
	sx.raStyle = mk[0][0] == "h"
	rest := strings.TrimSpace(s)
	switch {
	case strings.HasPrefix(rest, "+"):
		sx.signed, rest = true, rest[1:]
	case strings.HasPrefix(rest, "-"):
		sx.signed, sx.neg, rest = true, true, rest[1:]
	case strings.HasPrefix(rest, "−"):
		sx.signed, sx.neg, rest = true, true, rest[len("−"):]
	}
	var style byte // ':' colons, ' ' blanks, 'u' unit marks
	for i := 0; ; i++ {
		if i == 3 {
			return sx, false
		}
		n := numberPrefix(rest)
		if n == 0 {
			return sx, false
		}
		sx.fields = append(sx.fields, rest[:n])
		rest = rest[n:]
		if rest == "" {
			break
		}
		sep := byte(0)
		if m := markPrefix(rest, mk[i]); m != "" {
			sep = 'u'
			if i == 0 {
				sx.firstMark = m
			}
			rest = strings.TrimLeft(rest[len(m):], " \t")
		} else if rest[0] == ':' {
			sep, rest = ':', rest[1:]
		} else if rest[0] == ' ' || rest[0] == '\t' {
			sep, rest = ' ', strings.TrimLeft(rest, " \t")
		} else {
			return sx, false
		}
		if style == 0 {
			style = sep
		} else if style != sep {
			return sx, false
		}
		if rest == "" {
			if sep != 'u' {
				return sx, false // a dangling separator
			}
			break
		}
	}
	for _, f := range sx.fields[:len(sx.fields)-1] {
		if strings.Contains(f, ".") {
			return sx, false
		}
	}
	return sx, true
}

// value returns the unsigned total of the fields in units of the first
// field, checking that minutes and seconds are below 60.
func (sx sexagesimal) value() (float64, bool) {
	total := 0.0
	div := 1.0
	for i, f := range sx.fields {
		v, err := strconv.ParseFloat(f, 64)
		if err != nil || !finite(v) {
			return 0, false
		}
		if i > 0 && v >= 60 {
			return 0, false
		}
		total += v / div
		div *= 60
	}
	return total, finite(total)
}

// numberPrefix returns the length of the leading ASCII number in s: one or
// more digits, optionally followed by '.' and more digits.
func numberPrefix(s string) int {
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	if i == 0 {
		return 0
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
	}
	return i
}

// markPrefix returns the unit mark s starts with, or "".
func markPrefix(s string, accepted []string) string {
	for _, m := range accepted {
		if strings.HasPrefix(s, m) {
			return m
		}
	}
	return ""
}

// shownValue returns s as it should appear in an error message: as typed
// when it is short printable text, else quoted and shortened, so that the
// message stays on one line.
func shownValue(s string) string {
	const maxRunes = 64
	plain := s != "" && utf8.ValidString(s)
	if plain {
		for _, r := range s {
			if !unicode.IsPrint(r) {
				plain = false
				break
			}
		}
	}
	if utf8.RuneCountInString(s) > maxRunes {
		r := []rune(s)
		s = string(r[:maxRunes]) + "…"
	}
	if plain {
		return s
	}
	return strconv.Quote(s)
}

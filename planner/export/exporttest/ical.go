// Package exporttest reads back the documents package export writes, for
// tests: ParseICal reads the iCalendar subset export.EncodeICal writes.
package exporttest

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"phasecast/planner"
	"phasecast/planner/export"
)

// icalUTC is the UTC DATE-TIME form of RFC 5545 §3.3.5 (FORM #2).
const icalUTC = "20060102T150405Z"

// ParseICal reads the events of an iCalendar object of the kind export.EncodeICal writes:
// it unfolds lines (RFC 5545 §3.1), requires CRLF line ends, and reads the
// properties export.EncodeICal uses. Unknown properties are ignored.
func ParseICal(r io.Reader) (export.Calendar, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return export.Calendar{}, fmt.Errorf("iCalendar: read: %w", err)
	}
	text := string(data)
	if !strings.HasSuffix(text, "\r\n") {
		return export.Calendar{}, errors.New("iCalendar: the last line does not end in CRLF")
	}
	raw := strings.Split(strings.TrimSuffix(text, "\r\n"), "\r\n")
	// Unfold into a builder per content line: appending to a string would
	// copy it again for every continuation (quadratic in a long value).
	var lines []string
	var cur strings.Builder
	for i, l := range raw {
		if strings.ContainsAny(l, "\r\n") {
			return export.Calendar{}, fmt.Errorf("iCalendar: physical line %d: a bare CR or LF; lines must end in CRLF", i+1)
		}
		if len(l) > 75 {
			return export.Calendar{}, fmt.Errorf("iCalendar: physical line %d is %d octets; at most 75 allowed", i+1, len(l))
		}
		if strings.HasPrefix(l, " ") || strings.HasPrefix(l, "\t") {
			if i == 0 {
				return export.Calendar{}, errors.New("iCalendar: the first line is a continuation")
			}
			cur.WriteString(l[1:])
			continue
		}
		if i > 0 {
			lines = append(lines, cur.String())
			cur.Reset()
		}
		cur.WriteString(l)
	}
	lines = append(lines, cur.String())
	var c export.Calendar
	var ev *export.Event
	for i, l := range lines {
		name, value, ok := strings.Cut(l, ":")
		if !ok {
			return export.Calendar{}, fmt.Errorf("iCalendar: content line %d %q has no colon", i+1, l)
		}
		name, _, _ = strings.Cut(name, ";") // parameters are not used
		switch name {
		case "BEGIN":
			if value == "VEVENT" {
				ev = &export.Event{}
			}
		case "END":
			if value == "VEVENT" && ev != nil {
				if ev.UID == "" || ev.Stamp.IsZero() {
					return export.Calendar{}, fmt.Errorf("iCalendar: event %d lacks UID or DTSTAMP", len(c.Events)+1)
				}
				c.Events = append(c.Events, *ev)
				ev = nil
			}
		case "PRODID":
			c.ProdID = unescapeText(value)
		case "X-WR-CALNAME":
			c.Name = unescapeText(value)
		}
		if ev == nil {
			continue
		}
		var perr error
		switch name {
		case "UID":
			ev.UID = unescapeText(value)
		case "DTSTAMP":
			ev.Stamp, perr = planner.ParseTimeLayout(icalUTC, value)
		case "DTSTART":
			ev.Start, perr = planner.ParseTimeLayout(icalUTC, value)
		case "DTEND":
			ev.End, perr = planner.ParseTimeLayout(icalUTC, value)
		case "SUMMARY":
			ev.Summary = unescapeText(value)
		case "DESCRIPTION":
			ev.Description = unescapeText(value)
		case "LOCATION":
			ev.Location = unescapeText(value)
		case "CATEGORIES":
			for _, p := range splitUnescaped(value) {
				ev.Categories = append(ev.Categories, unescapeText(p))
			}
		}
		if errors.Is(perr, planner.ErrNotLeapSecond) {
			return export.Calendar{}, fmt.Errorf("iCalendar: content line %d: %s %q: %w", i+1, name, value, perr)
		}
		if perr != nil {
			return export.Calendar{}, fmt.Errorf("iCalendar: content line %d: %s %q is not a UTC date-time like 20260314T213000Z", i+1, name, value)
		}
	}
	return c, nil
}

func unescapeText(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] == '\\' && i+1 < len(s) {
			i++
			switch s[i] {
			case 'n', 'N':
				b.WriteByte('\n')
			default:
				b.WriteByte(s[i])
			}
			continue
		}
		b.WriteByte(s[i])
	}
	return b.String()
}

// splitUnescaped splits a list value at commas that are not escaped.
func splitUnescaped(s string) []string {
	var out []string
	start := 0
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case '\\':
			i++
		case ',':
			out = append(out, s[start:i])
			start = i + 1
		}
	}
	return append(out, s[start:])
}

// iCalendar (RFC 5545) files of events, for exporting planned blocks and
// queue windows to calendars.
//
// What it follows from RFC 5545:
//   - §3.1: content lines end in CRLF and are folded so that no line exceeds
//     75 octets, by inserting CRLF followed by one space; a multi-octet UTF-8
//     character is never split.
//   - §3.3.11: TEXT values escape backslash, semicolon, comma and newline.
//   - §3.3.5: times are written in UTC form ("20260314T213000Z").
//   - §3.6: VCALENDAR carries VERSION:2.0 and PRODID.
//   - §3.6.1 and §3.8.7.2, §3.8.4.7: every VEVENT carries UID and DTSTAMP.
//     Callers pass stable UIDs and a stable DTSTAMP (the time the plan was
//     made), so that exporting the same plan twice gives the same file and a
//     calendar updates events instead of duplicating them.
package export

import (
	"bufio"
	"fmt"
	"io"
	"strings"
	"time"
	"unicode/utf8"
)

// Calendar is one iCalendar object.
type Calendar struct {
	ProdID string // e.g. "-//phasecast//night plan//EN"
	Name   string // shown by calendar programs (X-WR-CALNAME); optional
	Events []Event
}

// Event is one VEVENT. Start, End and Stamp are instants, written in UTC.
type Event struct {
	UID         string
	Stamp       time.Time // DTSTAMP
	Start, End  time.Time
	Summary     string
	Description string
	Location    string
	Categories  []string
}

// utcFormat is the UTC DATE-TIME form of RFC 5545 §3.3.5 (FORM #2).
const utcFormat = "20060102T150405Z"

// EncodeICal writes c to w. It refuses an event without UID (once its control
// characters, which TEXT cannot hold, are dropped), without DTSTAMP or
// ending before it starts.
func EncodeICal(w io.Writer, c Calendar) error {
	for i, e := range c.Events {
		switch {
		case strings.TrimSpace(dropControls(e.UID)) == "":
			return fmt.Errorf("iCalendar: event %d (%q): UID is empty once control characters are dropped; a stable unique id is required (RFC 5545 §3.8.4.7)", i+1, e.Summary)
		case e.Stamp.IsZero():
			return fmt.Errorf("iCalendar: event %d (%q): DTSTAMP is zero; required (RFC 5545 §3.8.7.2)", i+1, e.Summary)
		case e.Start.IsZero() || e.End.Before(e.Start):
			return fmt.Errorf("iCalendar: event %d (%q): start %s, end %s: the end must not be before the start", i+1, e.Summary,
				e.Start.UTC().Format(time.RFC3339), e.End.UTC().Format(time.RFC3339))
		}
	}
	bw := bufio.NewWriter(w)
	prod := c.ProdID
	if prod == "" {
		prod = "-//phasecast//EN"
	}
	writeLine(bw, "BEGIN:VCALENDAR")
	writeLine(bw, "VERSION:2.0")
	writeLine(bw, "PRODID:"+escapeText(prod))
	writeLine(bw, "CALSCALE:GREGORIAN")
	if c.Name != "" {
		writeLine(bw, "X-WR-CALNAME:"+escapeText(c.Name))
	}
	for _, e := range c.Events {
		writeLine(bw, "BEGIN:VEVENT")
		writeLine(bw, "UID:"+escapeText(e.UID))
		writeLine(bw, "DTSTAMP:"+e.Stamp.UTC().Format(utcFormat))
		writeLine(bw, "DTSTART:"+e.Start.UTC().Format(utcFormat))
		writeLine(bw, "DTEND:"+e.End.UTC().Format(utcFormat))
		if e.Summary != "" {
			writeLine(bw, "SUMMARY:"+escapeText(e.Summary))
		}
		if e.Description != "" {
			writeLine(bw, "DESCRIPTION:"+escapeText(e.Description))
		}
		if e.Location != "" {
			writeLine(bw, "LOCATION:"+escapeText(e.Location))
		}
		if len(e.Categories) > 0 {
			cats := make([]string, len(e.Categories))
			for i, c := range e.Categories {
				cats[i] = escapeText(c)
			}
			writeLine(bw, "CATEGORIES:"+strings.Join(cats, ","))
		}
		writeLine(bw, "TRANSP:TRANSPARENT")
		writeLine(bw, "END:VEVENT")
	}
	writeLine(bw, "END:VCALENDAR")
	return bw.Flush()
}

// escapeText escapes a TEXT value (RFC 5545 §3.3.11) and drops control
// characters other than newline, which the format cannot carry.
func escapeText(s string) string {
	var b strings.Builder
	b.Grow(len(s))
	for _, r := range strings.ToValidUTF8(s, "\uFFFD") {
		switch {
		case r == '\\':
			b.WriteString(`\\`)
		case r == ';':
			b.WriteString(`\;`)
		case r == ',':
			b.WriteString(`\,`)
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r', r < 0x20 && r != '\t', r == 0x7f:
			// dropped: CONTROL characters are not allowed in TEXT
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// dropControls returns s without the control characters escapeText drops
// (all but TAB and LF, which escapeText keeps or escapes), invalid UTF-8
// replaced as escapeText replaces it.
func dropControls(s string) string {
	return strings.Map(func(r rune) rune {
		if r == '\r' || (r < 0x20 && r != '\t' && r != '\n') || r == 0x7f {
			return -1
		}
		return r
	}, strings.ToValidUTF8(s, "\uFFFD"))
}

// writeLine writes one content line folded at 75 octets (RFC 5545 §3.1):
// the first physical line holds at most 75 octets, each continuation line
// one space plus at most 74 octets, never splitting a UTF-8 character.
func writeLine(w *bufio.Writer, line string) {
	limit := 75
	for len(line) > limit {
		cut := limit
		for cut > 0 && !utf8.RuneStart(line[cut]) {
			cut--
		}
		w.WriteString(line[:cut])
		w.WriteString("\r\n ")
		line = line[cut:]
		limit = 74
	}
	w.WriteString(line)
	w.WriteString("\r\n")
}

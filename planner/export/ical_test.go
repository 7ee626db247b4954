package export_test

import (
	"bytes"
	"fmt"
	"os"
	"reflect"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"phasecast/planner/export"
	"phasecast/planner/export/exporttest"
)

func sample() export.Calendar {
	stamp := time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC)
	start := time.Date(2026, 3, 14, 21, 30, 0, 0, time.UTC)
	return export.Calendar{
		ProdID: "-//phasecast//night plan//EN",
		Name:   "Night 2026-03-14, Hill station",
		Events: []export.Event{{
			UID:   "block-1a2b3c@phasecast",
			Stamp: stamp, Start: start, End: start.Add(42 * time.Minute),
			Summary: "PX-7; quadrature, φ 0.25",
			Description: "12 × 180 s; airmass ≤ 1.43; phases 0.231–0.268\nverify against the observatory's own tools " +
				"and rules before pointing; never point near the Sun — ünïcödé ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓ ✓",
			Location:   "Hill station (lat 31.2, lon −110.9)",
			Categories: []string{"phasecast", "block, filler"},
		}, {
			UID:   "block-4d5e6f@phasecast",
			Stamp: stamp, Start: start.Add(time.Hour), End: start.Add(2 * time.Hour),
			Summary: `back\slash`,
		}},
	}
}

// RFC 5545 §3.1: content lines are delimited by CRLF and folded so that no
// physical line is longer than 75 octets; a fold is CRLF followed by a
// single whitespace. We also check that no fold splits a UTF-8 character.
func TestEncodeLineRules(t *testing.T) {
	var buf bytes.Buffer
	if err := export.EncodeICal(&buf, sample()); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	if !strings.HasSuffix(out, "\r\n") {
		t.Fatal("output does not end in CRLF")
	}
	folds := 0
	for i, line := range strings.Split(strings.TrimSuffix(out, "\r\n"), "\r\n") {
		if strings.ContainsAny(line, "\r\n") {
			t.Errorf("line %d contains a bare CR or LF", i+1)
		}
		if len(line) > 75 {
			t.Errorf("line %d is %d octets, want ≤ 75 (RFC 5545 §3.1)", i+1, len(line))
		}
		if !utf8.ValidString(line) {
			t.Errorf("line %d splits a UTF-8 character", i+1)
		}
		if strings.HasPrefix(line, " ") {
			folds++
		}
	}
	if folds == 0 {
		t.Error("the long description was not folded")
	}
}

// RFC 5545 §3.6 (VERSION, PRODID), §3.6.1 (UID and DTSTAMP in VEVENT),
// §3.3.5 (UTC date-time form).
func TestEncodeRequiredProperties(t *testing.T) {
	var buf bytes.Buffer
	if err := export.EncodeICal(&buf, sample()); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{
		"BEGIN:VCALENDAR\r\n", "VERSION:2.0\r\n", "PRODID:-//phasecast//night plan//EN\r\n",
		"UID:block-1a2b3c@phasecast\r\n", "DTSTAMP:20260314T120000Z\r\n",
		"DTSTART:20260314T213000Z\r\n", "DTEND:20260314T221200Z\r\n", "END:VCALENDAR\r\n",
		`SUMMARY:PX-7\; quadrature\, φ 0.25`, `CATEGORIES:phasecast,block\, filler`, `SUMMARY:back\\slash`,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
}

func TestEncodeIsStable(t *testing.T) {
	var a, b bytes.Buffer
	if err := export.EncodeICal(&a, sample()); err != nil {
		t.Fatal(err)
	}
	if err := export.EncodeICal(&b, sample()); err != nil {
		t.Fatal(err)
	}
	if a.String() != b.String() {
		t.Error("two encodings of the same calendar differ")
	}
}

func TestRoundTrip(t *testing.T) {
	var buf bytes.Buffer
	in := sample()
	if err := export.EncodeICal(&buf, in); err != nil {
		t.Fatal(err)
	}
	got, err := exporttest.ParseICal(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, in) {
		t.Errorf("round trip:\n got %+v\nwant %+v", got, in)
	}
}

func TestEncodeRejects(t *testing.T) {
	base := sample().Events[1]
	tests := []struct {
		name string
		edit func(*export.Event)
		want string
	}{
		{"ErrNoUID", func(e *export.Event) { e.UID = " " }, "UID"},
		{"ErrUIDOnlyControls", func(e *export.Event) { e.UID = "\x01\x7f\r \x00" }, "UID"},
		{"ErrNoStamp", func(e *export.Event) { e.Stamp = time.Time{} }, "DTSTAMP"},
		{"ErrEndBeforeStart", func(e *export.Event) { e.End = e.Start.Add(-time.Minute) }, "end must not be before"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			e := base
			tt.edit(&e)
			err := export.EncodeICal(&bytes.Buffer{}, export.Calendar{Events: []export.Event{e}})
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("Encode error = %v, want one mentioning %q", err, tt.want)
			}
		})
	}
}

func TestParseRejects(t *testing.T) {
	tests := []struct {
		name, in string
	}{
		{"BareLF", "BEGIN:VCALENDAR\nEND:VCALENDAR\n"},
		{"LongLine", "BEGIN:VCALENDAR\r\nX:" + strings.Repeat("a", 80) + "\r\nEND:VCALENDAR\r\n"},
		{"LocalTime", "BEGIN:VCALENDAR\r\nBEGIN:VEVENT\r\nUID:a\r\nDTSTAMP:20260101T000000\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n"},
		{"NoUID", "BEGIN:VCALENDAR\r\nBEGIN:VEVENT\r\nDTSTAMP:20260101T000000Z\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := exporttest.ParseICal(strings.NewReader(tt.in)); err == nil {
				t.Error("Parse accepted a malformed calendar")
			}
		})
	}
}

// RFC 5545 §3.1: "Lines of text SHOULD NOT be longer than 75 octets,
// excluding the line break."
func Example() {
	start := time.Date(2026, 3, 14, 21, 30, 0, 0, time.UTC)
	cal := export.Calendar{ProdID: "-//phasecast//example//EN", Events: []export.Event{{
		UID: "block-1@phasecast", Stamp: start.Add(-10 * time.Hour), Start: start, End: start.Add(30 * time.Minute),
		Summary: "T-3 quadrature; 10 × 150 s",
	}}}
	var buf bytes.Buffer
	if err := export.EncodeICal(&buf, cal); err != nil {
		fmt.Println(err)
		return
	}
	os.Stdout.WriteString(strings.ReplaceAll(buf.String(), "\r\n", "⏎\n"))
	// Output:
	// BEGIN:VCALENDAR⏎
	// VERSION:2.0⏎
	// PRODID:-//phasecast//example//EN⏎
	// CALSCALE:GREGORIAN⏎
	// BEGIN:VEVENT⏎
	// UID:block-1@phasecast⏎
	// DTSTAMP:20260314T113000Z⏎
	// DTSTART:20260314T213000Z⏎
	// DTEND:20260314T220000Z⏎
	// SUMMARY:T-3 quadrature\; 10 × 150 s⏎
	// TRANSP:TRANSPARENT⏎
	// END:VEVENT⏎
	// END:VCALENDAR⏎
}

// RFC 5545 §3.3.12: time-second 60 is a positive leap second. It is read
// on a leap-second day, as the instant it ends, and refused elsewhere.
func TestParseLeapSecond(t *testing.T) {
	cal := func(stamp string) string {
		return "BEGIN:VCALENDAR\r\nPRODID:-//t//t//EN\r\nVERSION:2.0\r\nBEGIN:VEVENT\r\nUID:a\r\nDTSTAMP:" + stamp +
			"\r\nDTSTART:20170101T000000Z\r\nDTEND:20170101T001000Z\r\nSUMMARY:s\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n"
	}
	c, err := exporttest.ParseICal(strings.NewReader(cal("20161231T235960Z")))
	if err != nil {
		t.Fatalf("leap second refused: %v", err)
	}
	if want := time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC); len(c.Events) != 1 || !c.Events[0].Stamp.Equal(want) {
		t.Errorf("events %+v, want DTSTAMP %v", c.Events, want)
	}
	if _, err := exporttest.ParseICal(strings.NewReader(cal("20170630T235960Z"))); err == nil || !strings.Contains(err.Error(), "leap second") {
		t.Errorf("second 60 on an ordinary day: %v", err)
	}
}

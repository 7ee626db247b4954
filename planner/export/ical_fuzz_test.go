package export_test

// Hostile input for the iCalendar encoder and reader (issue "Proof under
// load, faults and hostile input"). Seed corpora are committed under
// testdata/fuzz/ so that `go test ./planner/export/` replays them; run longer with
//
//	go test -run='^$' -fuzz='^FuzzHostileICalRoundTrip$' -fuzztime=60s ./planner/export/

import (
	"bytes"
	"reflect"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"phasecast/planner/export"
	"phasecast/planner/export/exporttest"
)

// hostileText is what a TEXT value becomes on the way through Encode (RFC
// 5545 §3.3.11 cannot carry control characters other than newline and
// tab): invalid UTF-8 replaced by U+FFFD, CR and other controls dropped.
func hostileText(s string) string {
	var b strings.Builder
	for _, r := range strings.ToValidUTF8(s, "\uFFFD") {
		if (r < 0x20 && r != '\n' && r != '\t') || r == 0x7f {
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// checkPhysicalLines fails unless every line of an encoded calendar ends in
// CRLF, holds at most 75 octets, is valid UTF-8 and has no bare CR or LF
// (RFC 5545 §3.1).
func checkPhysicalLines(tb testing.TB, b []byte) {
	tb.Helper()
	if !bytes.HasSuffix(b, []byte("\r\n")) {
		tb.Fatalf("output does not end in CRLF")
	}
	for i, l := range strings.Split(strings.TrimSuffix(string(b), "\r\n"), "\r\n") {
		switch {
		case len(l) > 75:
			tb.Fatalf("line %d is %d octets: %q", i+1, len(l), l)
		case strings.ContainsAny(l, "\r\n"):
			tb.Fatalf("line %d holds a bare CR or LF: %q", i+1, l)
		case !utf8.ValidString(l):
			tb.Fatalf("line %d is not valid UTF-8 (a character split by folding?): %q", i+1, l)
		}
	}
}

// FuzzHostileICalRoundTrip: any texts in an event either make Encode refuse
// the event, or give lines of at most 75 octets ending in CRLF that Parse
// reads back to the same event (texts as hostileText makes them, times to
// the second).
func FuzzHostileICalRoundTrip(f *testing.F) {
	f.Add("block-1@phasecast", "PX-7; quadrature, φ 0.25", "line one\nline two", "Hill, station", "a,b", "c\\d", int64(0), uint32(2520))
	f.Add("u", strings.Repeat("✓", 200), strings.Repeat("\\;,", 100), "\xff\xfe\xfd", "", "", int64(86400*365), uint32(0))
	f.Add("=cmd|' /C calc'!A0", "+1", "-1", "@SUM(A1:A2)", "\t=1", "\r=1", int64(-86400), uint32(60))
	f.Add("\x01", "\x00\x7f\r", "\r\n \t", strings.Repeat("é", 80), "\\", ",", int64(1e9), uint32(1))
	f.Add(" ", "x", "", "", "", "", int64(0), uint32(0))
	f.Fuzz(func(t *testing.T, uid, summary, desc, loc, cat1, cat2 string, offsetS int64, durS uint32) {
		base := time.Date(2026, 3, 14, 21, 30, 0, 0, time.UTC)
		// Keep times within a few centuries of now: the encoder's callers
		// (plans, queue windows) never go further.
		start := base.Add(time.Duration(offsetS%(200*365*86400)) * time.Second)
		ev := export.Event{UID: uid, Stamp: base, Start: start, End: start.Add(time.Duration(durS) * time.Second),
			Summary: summary, Description: desc, Location: loc, Categories: []string{cat1, cat2}}
		in := export.Calendar{ProdID: "-//phasecast//hostile//EN", Name: summary, Events: []export.Event{ev}}
		var buf bytes.Buffer
		if err := export.EncodeICal(&buf, in); err != nil {
			if strings.TrimSpace(hostileText(uid)) != "" {
				t.Fatalf("Encode refused an event with UID %q: %v", uid, err)
			}
			return
		}
		checkPhysicalLines(t, buf.Bytes())
		if strings.TrimSpace(hostileText(uid)) == "" {
			t.Fatalf("Encode wrote an event whose UID %q is empty once escaped (RFC 5545 §3.8.4.7 requires one)", uid)
		}
		got, err := exporttest.ParseICal(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("Parse of Encode's output: %v\n%s", err, buf.String())
		}
		if len(got.Events) != 1 {
			t.Fatalf("%d events read back, want 1", len(got.Events))
		}
		want := export.Event{UID: hostileText(uid), Stamp: base, Start: start.Truncate(time.Second), End: ev.End.Truncate(time.Second),
			Summary: hostileText(summary), Description: hostileText(desc), Location: hostileText(loc),
			Categories: []string{hostileText(cat1), hostileText(cat2)}}
		if !reflect.DeepEqual(got.Events[0], want) {
			t.Fatalf("round trip:\n got %+v\nwant %+v", got.Events[0], want)
		}
		if got.Name != hostileText(summary) {
			t.Fatalf("calendar name %q, want %q", got.Name, hostileText(summary))
		}
	})
}

// FuzzHostileICalParse: Parse reads any bytes without a panic; what it
// returns has a UID and a DTSTAMP on every event, and encodes again (or is
// refused by Encode with an error).
func FuzzHostileICalParse(f *testing.F) {
	var buf bytes.Buffer
	if err := export.EncodeICal(&buf, sample()); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add([]byte("BEGIN:VCALENDAR\r\nBEGIN:VEVENT\r\nUID:x\r\nDTSTAMP:20260314T120000Z\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n"))
	f.Add([]byte("BEGIN:VEVENT\r\n DTSTART:99999999T999999Z\r\n"))
	f.Add([]byte(" first line continued\r\n"))
	f.Add([]byte("BEGIN:VEVENT\nUID:x\n"))
	f.Add([]byte("SUMMARY:\\\r\n"))
	f.Add([]byte("CATEGORIES:a\\,b,\\\r\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := exporttest.ParseICal(bytes.NewReader(data))
		if err != nil {
			if !strings.HasPrefix(err.Error(), "iCalendar: ") {
				t.Fatalf("error %q does not say where it comes from", err)
			}
			return
		}
		for i, e := range c.Events {
			if e.UID == "" || e.Stamp.IsZero() {
				t.Fatalf("event %d read without UID or DTSTAMP: %+v", i+1, e)
			}
		}
		var out bytes.Buffer
		if err := export.EncodeICal(&out, c); err == nil {
			checkPhysicalLines(t, out.Bytes())
		}
	})
}

// TestHostileICalOversize: a 10 MB description folds into lines of at most
// 75 octets and reads back; a 10 MB physical line is refused naming it.
func TestHostileICalOversize(t *testing.T) {
	stamp := time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC)
	desc := strings.Repeat("é✓x", 10<<20/6)
	var buf bytes.Buffer
	err := export.EncodeICal(&buf, export.Calendar{Events: []export.Event{{UID: "u@phasecast", Stamp: stamp, Start: stamp, End: stamp, Description: desc}}})
	if err != nil {
		t.Fatalf("Encode: %v", err)
	}
	checkPhysicalLines(t, buf.Bytes())
	c, err := exporttest.ParseICal(bytes.NewReader(buf.Bytes()))
	if err != nil || len(c.Events) != 1 || c.Events[0].Description != desc {
		t.Fatalf("10 MB description did not read back: %v", err)
	}
	_, err = exporttest.ParseICal(strings.NewReader("BEGIN:VCALENDAR\r\n" + strings.Repeat("X", 10<<20) + "\r\n"))
	if err == nil || !strings.Contains(err.Error(), "physical line 2") || len(err.Error()) > 200 {
		t.Fatalf("a 10 MB line: err = %.300v, want a short error naming physical line 2", err)
	}
}

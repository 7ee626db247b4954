package main

import (
	"strings"
	"testing"
	"time"
)

// TestAtLeapSecond: --at takes second 60 on a leap-second day (RFC 3339
// §5.6) and refuses it elsewhere, naming the flag and why.
func TestAtLeapSecond(t *testing.T) {
	m := runJSON(t, args([]string{"bjd"}, siteArgs, targetArgs, []string{"--at", "2016-12-31T23:59:60Z"})...)
	// Read as the instant the leap second ends: 2017-01-01 00:00 UTC.
	if got := jdOf(t, m, "jd_utc"); got.Float() != 2457754.5 {
		t.Errorf("jd_utc = %v, want 2457754.5", got)
	}
	_, stderr, code := runCmd(t, args([]string{"bjd"}, siteArgs, targetArgs, []string{"--at", "2017-12-31T23:59:60Z"})...)
	if code != 2 || !strings.Contains(stderr, "--at") || !strings.Contains(stderr, "leap second") {
		t.Errorf("second 60 on an ordinary day: exit %d, %q", code, stderr)
	}
}

// TestRangeEndDSTGap: --from with a date starts at the local day's first
// instant; America/Santiago's 2026-09-06 has no midnight (00:00 → 01:00),
// so it starts at 04:00 UTC, not at 03:00 UTC on the day before.
func TestRangeEndDSTGap(t *testing.T) {
	loc, err := time.LoadLocation("America/Santiago")
	if err != nil {
		t.Fatal(err)
	}
	got, err := rangeEnd(&textValue{name: "from", value: "2026-09-06", set: true}, loc)
	if err != nil {
		t.Fatal(err)
	}
	if want := time.Date(2026, 9, 6, 4, 0, 0, 0, time.UTC); !got.Equal(want) {
		t.Errorf("--from 2026-09-06 in America/Santiago = %v, want %v", got, want)
	}
}

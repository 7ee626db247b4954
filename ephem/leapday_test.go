package ephem_test

import (
	"errors"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestIsLeapSecondDay: the days that ended with a positive leap second, as
// the IERS announced them (tai-utc.dat; TAI−UTC rose by 1 s at each), and
// days that did not.
func TestIsLeapSecondDay(t *testing.T) {
	tests := []struct {
		date string
		want bool
	}{
		{"1972-06-30", true}, {"1998-12-31", true}, {"2005-12-31", true}, {"2012-06-30", true},
		{"2015-06-30", true}, {"2016-12-31", true},
		{"1971-12-31", false}, // the 1972 step to whole seconds (0.1077580 s) is not a leap second
		{"2016-12-30", false}, {"2017-12-31", false}, {"2025-12-31", false}, {"2016-06-30", false},
	}
	for _, tt := range tests {
		t.Run(tt.date, func(t *testing.T) {
			y, m, d, err := ephem.ParseDate(tt.date)
			if err != nil {
				t.Fatal(err)
			}
			if got := ephem.IsLeapSecondDay(y, m, d); got != tt.want {
				t.Errorf("IsLeapSecondDay(%s) = %v, want %v", tt.date, got, tt.want)
			}
		})
	}
}

// TestParseTimeLeapSecond: RFC 3339 §5.6 allows second 60 for a leap
// second. It is read on a leap-second day at 23:59:60 UTC (in any offset)
// as the instant it ends, and refused elsewhere with a message saying why.
func TestParseTimeLeapSecond(t *testing.T) {
	ok := []struct {
		in   string
		want time.Time
	}{
		{"2016-12-31T23:59:60Z", time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC)},
		{"2016-12-31T23:59:60.25Z", time.Date(2017, 1, 1, 0, 0, 0, 250_000_000, time.UTC)},
		{"2016-12-31T20:59:60-03:00", time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC)},
		{"2015-06-30 23:59:60", time.Date(2015, 7, 1, 0, 0, 0, 0, time.UTC)},
	}
	for _, tt := range ok {
		t.Run("OK"+tt.in, func(t *testing.T) {
			got, err := ephem.ParseTime(tt.in)
			if err != nil {
				t.Fatalf("ParseTime(%q): %v", tt.in, err)
			}
			if !got.Equal(tt.want) || got.Location() != time.UTC {
				t.Errorf("ParseTime(%q) = %v, want %v", tt.in, got, tt.want)
			}
		})
	}
	for _, in := range []string{"2017-12-31T23:59:60Z", "2016-12-31T23:58:60Z", "2016-12-30T23:59:60Z", "2016-12-31T23:59:60+01:00"} {
		t.Run("Err"+in, func(t *testing.T) {
			_, err := ephem.ParseTime(in)
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("ParseTime(%q) = %v, want an InputError", in, err)
			}
			if !strings.Contains(ie.Accepted, "leap second") || !strings.Contains(ie.Accepted, "2016-12-31") {
				t.Errorf("message %q does not say second 60 is only for leap seconds", err)
			}
		})
	}
	t.Run("Layout", func(t *testing.T) {
		got, err := ephem.ParseTimeLayout("20060102T150405Z", "20161231T235960Z")
		if err != nil || !got.Equal(time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC)) {
			t.Errorf("iCalendar form: %v, %v", got, err)
		}
		if _, err := ephem.ParseTimeLayout("20060102T150405Z", "20170630T235960Z"); err == nil || !strings.Contains(err.Error(), "leap second") {
			t.Errorf("iCalendar form on a day without a leap second: %v", err)
		}
	})
}

// TestLocalDayStart: a local day starts at its first existing instant.
// America/Santiago skipped from 00:00 to 01:00 on 2026-09-06 (−04 to −03;
// tz database, from memory): that day starts at 01:00 −03, 04:00 UTC, not
// at 03:00 UTC, which is 23:00 of the day before.
func TestLocalDayStart(t *testing.T) {
	santiago, err := time.LoadLocation("America/Santiago")
	if err != nil {
		t.Skip("no zoneinfo:", err)
	}
	tests := []struct {
		name string
		y    int
		m    time.Month
		d    int
		loc  *time.Location
		want time.Time
	}{
		{"Gap", 2026, 9, 6, santiago, time.Date(2026, 9, 6, 4, 0, 0, 0, time.UTC)},
		{"DayBefore", 2026, 9, 5, santiago, time.Date(2026, 9, 5, 4, 0, 0, 0, time.UTC)},
		{"DayAfter", 2026, 9, 7, santiago, time.Date(2026, 9, 7, 3, 0, 0, 0, time.UTC)},
		{"UTC", 2026, 9, 6, time.UTC, time.Date(2026, 9, 6, 0, 0, 0, 0, time.UTC)},
		{"DayPastMonthEnd", 2026, 8, 37, santiago, time.Date(2026, 9, 6, 4, 0, 0, 0, time.UTC)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := ephem.LocalDayStart(tt.y, tt.m, tt.d, tt.loc)
			if !got.Equal(tt.want) || got.Location() != time.UTC {
				t.Errorf("LocalDayStart = %v, want %v", got, tt.want)
			}
			_, _, wantDay := tt.want.In(tt.loc).Date()
			if l := got.In(tt.loc); l.Day() != wantDay {
				t.Errorf("%v is on local day %d, not %d", l, l.Day(), wantDay)
			}
			if l := got.Add(-time.Nanosecond).In(tt.loc); l.Day() == wantDay {
				t.Errorf("the instant before, %v, is on the same local day", l)
			}
		})
	}
}

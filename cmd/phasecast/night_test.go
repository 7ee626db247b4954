package main

import (
	"strings"
	"testing"
	"time"
)

var nightKeys = []string{"sunset", "civil_dusk", "nautical_dusk", "astronomical_dusk", "astronomical_dawn",
	"nautical_dawn", "civil_dawn", "sunrise", "moonrise", "moonset", "moon_illuminated"}

var sunKeys = nightKeys[:8]

// instantOf parses a JSON time value: an RFC 3339 UTC string, or nil for null.
func instantOf(tb testing.TB, m map[string]any, key string) *time.Time {
	tb.Helper()
	v, ok := m[key]
	if !ok {
		tb.Fatalf("key %q missing", key)
	}
	if v == nil {
		return nil
	}
	s, ok := v.(string)
	if !ok {
		tb.Fatalf("%s = %v (%T), want a string or null", key, v, v)
	}
	if !strings.HasSuffix(s, "Z") {
		tb.Errorf("%s = %q, want UTC (Z)", key, s)
	}
	t, err := time.Parse(time.RFC3339, s)
	if err != nil {
		tb.Fatalf("%s = %q is not RFC 3339: %v", key, s, err)
	}
	return &t
}

func TestNightJSON(t *testing.T) {
	m := runJSON(t, args([]string{"night"}, siteArgs, []string{"--date", "2026-12-01", "--tz", "America/Santiago"})...)
	hasKeys(t, m, nightKeys...)
	loc, err := time.LoadLocation("America/Santiago")
	if err != nil {
		t.Fatal(err)
	}
	start := time.Date(2026, 12, 1, 12, 0, 0, 0, loc)
	end := time.Date(2026, 12, 2, 12, 0, 0, 0, loc)
	var prev time.Time
	for _, k := range sunKeys {
		tm := instantOf(t, m, k)
		if tm == nil {
			t.Fatalf("%s is null at a mid-latitude site in December", k)
		}
		if tm.Before(start) || tm.After(end) {
			t.Errorf("%s = %v, outside local noon to noon", k, tm)
		}
		if !tm.After(prev) {
			t.Errorf("%s = %v is not after the previous event %v", k, tm, prev)
		}
		prev = *tm
	}
	for _, k := range []string{"moonrise", "moonset"} {
		if tm := instantOf(t, m, k); tm != nil && (tm.Before(start) || tm.After(end)) {
			t.Errorf("%s = %v, outside local noon to noon", k, tm)
		}
	}
	if v := num(t, m, "moon_illuminated"); v < 0 || v > 1 {
		t.Errorf("moon_illuminated = %v, outside 0..1", v)
	}
}

// TestNightMidnightSun: at latitude +70° at the June solstice the Sun never
// sets: every Sun event is null (and still present as a key).
func TestNightMidnightSun(t *testing.T) {
	m := runJSON(t, "night", "--lat", "70.1", "--lon", "24.3", "--elev", "40", "--date", "2026-06-21", "--tz", "Europe/Oslo")
	hasKeys(t, m, nightKeys...)
	for _, k := range sunKeys {
		if tm := instantOf(t, m, k); tm != nil {
			t.Errorf("%s = %v, want null under the midnight sun", k, tm)
		}
	}
}

func TestNightHuman(t *testing.T) {
	stdout, stderr, code := runCmd(t, args([]string{"night"}, siteArgs, []string{"--date", "2026-12-01", "--tz", "America/Santiago"})...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"Night of Tuesday 2026-12-01", "America/Santiago", "sunset", "astronomical dawn", "UTC", "never point near the Sun"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

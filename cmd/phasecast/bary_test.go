package main

import (
	"encoding/json"
	"math"
	"regexp"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

var atArgs = []string{"--at", "2026-12-01T03:00:00Z"}

// jdText matches a Julian date printed with at least 8 decimals.
var jdText = regexp.MustCompile(`^\d{7}\.\d{8,}$`)

// jdOf returns the JSON Julian date under key as a JD2, parsed from its text
// so that no digit is lost, after checking it has at least 8 decimals.
func jdOf(tb testing.TB, m map[string]any, key string) ephem.JD2 {
	tb.Helper()
	n, ok := m[key].(json.Number)
	if !ok {
		tb.Fatalf("%s = %v (%T), want a number", key, m[key], m[key])
	}
	if !jdText.MatchString(n.String()) {
		tb.Errorf("%s = %s, want a Julian date with at least 8 decimals", key, n)
	}
	j, err := ephem.ParseEpoch(n.String(), ephem.StdJDUTC, ephem.FormJD)
	if err != nil {
		tb.Fatalf("%s = %s: %v", key, n, err)
	}
	return j
}

func TestBJDJSON(t *testing.T) {
	m := runJSON(t, args([]string{"bjd"}, siteArgs, targetArgs, atArgs)...)
	hasKeys(t, m, "jd_utc", "jd_tt", "jd_tdb", "hjd_utc", "bjd_tdb", "time_scale_note") // 2026-12-01 is past the leap-second table

	site, _ := ephem.NewSite(-27.85, -69.12, 2650)
	star := ephem.Star{RADeg: 148.25, DecDeg: -6.125}
	b, err := ephem.BarycentricTimes(site, star, time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		key  string
		want ephem.JD2
	}{{"jd_utc", b.JDUTC}, {"jd_tt", b.JDTT}, {"jd_tdb", b.JDTDB}, {"hjd_utc", b.HJDUTC}, {"bjd_tdb", b.BJDTDB}} {
		// Printed to 1e-9 d: the text must agree with ephem to half of that.
		if d := jdOf(t, m, c.key).SubDays(c.want); math.Abs(d) > 0.5e-9 {
			t.Errorf("%s off ephem by %.3g d", c.key, d)
		}
	}
	if d := jdOf(t, m, "jd_utc").SubDays(ephem.JDUTC(time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC))); math.Abs(d) > 0.5e-9 {
		t.Errorf("jd_utc off by %.3g d", d)
	}
	// The Rømer delay is at most about 8.4 minutes (1.017 au of light time).
	if d := jdOf(t, m, "bjd_tdb").SubDays(jdOf(t, m, "jd_tdb")) * 86400; math.Abs(d) > 510 {
		t.Errorf("bjd_tdb − jd_tdb = %.1f s, more than Earth's orbit allows", d)
	}
}

func phaseArgs(extra ...string) []string {
	return args([]string{"phase"}, siteArgs, targetArgs, atArgs,
		[]string{"--t0", "2460700.1234567", "--period", "0.0612345678", "--t0-err", "0.00002", "--period-err", "3e-9"}, extra)
}

func TestPhaseJSON(t *testing.T) {
	m := runJSON(t, phaseArgs()...)
	hasKeys(t, m, "bjd_tdb", "cycle", "phase", "phase_err", "time_scale_note")
	bjd := jdOf(t, m, "bjd_tdb")
	t0, _ := ephem.ParseEpoch("2460700.1234567", ephem.StdBJDTDB, ephem.FormJD)
	const p = 0.0612345678
	e := bjd.SubDays(t0) / p
	cycle, phase, phaseErr := num(t, m, "cycle"), num(t, m, "phase"), num(t, m, "phase_err")
	if cycle != math.Floor(e) {
		t.Errorf("cycle = %v, want floor(%.6f)", cycle, e)
	}
	if phase < 0 || phase >= 1 || math.Abs(phase-(e-math.Floor(e))) > 1e-7 {
		t.Errorf("phase = %v, want %.9f in [0, 1)", phase, e-math.Floor(e))
	}
	// σφ = √(σT0² + E²σP²)/P (Ephemeris.PhaseErr with no covariance).
	want := math.Sqrt(0.00002*0.00002+e*e*3e-9*3e-9) / p
	if math.Abs(phaseErr-want) > 1e-9 {
		t.Errorf("phase_err = %v, want %v", phaseErr, want)
	}
	if s := m["cycle"].(json.Number).String(); strings.ContainsAny(s, ".eE") {
		t.Errorf("cycle = %s, want an integer", s)
	}
}

// TestPhaseT0Forms: one T0 written as JD, MJD and RJD gives one phase.
func TestPhaseT0Forms(t *testing.T) {
	ref := num(t, runJSON(t, phaseArgs()...), "phase")
	for _, c := range []struct{ form, t0 string }{{"MJD", "60699.6234567"}, {"RJD", "60700.1234567"}, {"mjd", "60699.6234567"}} {
		t.Run(c.form, func(t *testing.T) {
			got := num(t, runJSON(t, phaseArgs("--t0", c.t0, "--t0-form", c.form)...), "phase")
			if math.Abs(got-ref) > 1e-9 {
				t.Errorf("phase = %v with T0 %s %s, want %v", got, c.form, c.t0, ref)
			}
		})
	}
}

// TestPhaseT0Standard: T0 given as HJD_UTC is converted to BJD_TDB, which
// for the same number is later by about TT − UTC (69 s) plus a few seconds
// of barycentre–Sun offset; the phase moves back by that over P.
func TestPhaseT0Standard(t *testing.T) {
	ref := num(t, runJSON(t, phaseArgs()...), "phase")
	got := num(t, runJSON(t, phaseArgs("--t0-std", "HJD_UTC")...), "phase")
	shiftS := -math.Remainder(got-ref, 1) * 0.0612345678 * 86400
	if shiftS < 60 || shiftS > 80 {
		t.Errorf("T0 in HJD_UTC moved T0 by %.2f s against BJD_TDB, want about 69 s", shiftS)
	}
	t.Logf("HJD_UTC → BJD_TDB shift of T0: %.3f s", shiftS)
}

func TestPhaseNeverNaN(t *testing.T) {
	// A period uncertainty far too large still gives finite numbers.
	m := runJSON(t, phaseArgs("--period-err", "1e3")...)
	for _, k := range []string{"phase", "phase_err"} {
		if v := num(t, m, k); math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("%s = %v", k, v)
		}
	}
}

func TestJDValueText(t *testing.T) {
	tests := []struct {
		name string
		in   ephem.JD2
		want string
	}{
		{"Midnight", ephem.JD2{Day: 2461010.5, Frac: 0}, "2461010.500000000"},
		{"Noon", ephem.JD2{Day: 2461010.5, Frac: 0.5}, "2461011.000000000"},
		{"Millisecond", ephem.JD2{Day: 2461010.5, Frac: 0.001 / 86400}, "2461010.500000012"},
		{"CarryOnRounding", ephem.JD2{Day: 2461010.5, Frac: 0.4999999999999}, "2461011.000000000"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := jdValue(tc.in).MarshalJSON()
			if err != nil || string(got) != tc.want {
				t.Errorf("MarshalJSON(%v) = %s, %v; want %s", tc.in, got, err, tc.want)
			}
		})
	}
	if _, err := jdValue(ephem.JD2{Day: math.NaN()}).MarshalJSON(); err == nil {
		t.Error("a NaN Julian date marshalled without error")
	}
}

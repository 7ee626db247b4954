package main

import (
	"math"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

var skyKeys = []string{"jd_utc", "jd_tt", "lst_hours", "hour_angle_hours", "alt_deg", "alt_refracted_deg", "az_deg",
	"airmass", "parallactic_deg", "sun_alt_deg", "moon_alt_deg", "moon_illuminated", "moon_sep_deg"}

func TestSkyJSON(t *testing.T) {
	const at = "2026-12-01T03:00:00Z"
	m := runJSON(t, args([]string{"sky"}, siteArgs, targetArgs, []string{"--at", at})...)
	hasKeys(t, m, append(skyKeys, "time_scale_note")...) // 2026-12-01 is past the leap-second table

	// The command shows what ephem computes for the same inputs (this
	// checks the flag plumbing: signs, units, which key holds what).
	site, err := ephem.NewSite(-27.85, -69.12, 2650)
	if err != nil {
		t.Fatal(err)
	}
	star := ephem.Star{RADeg: 148.25, DecDeg: -6.125}
	p := ephem.Observe(site, star, time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC))
	for _, c := range []struct {
		key  string
		want float64
	}{
		{"lst_hours", p.LSTHours}, {"hour_angle_hours", p.HourAngleHours}, {"alt_deg", p.AltDeg},
		{"alt_refracted_deg", p.AltRefractedDeg}, {"az_deg", p.AzDeg}, {"parallactic_deg", p.ParallacticDeg},
		{"sun_alt_deg", p.SunAltDeg}, {"moon_alt_deg", p.MoonAltDeg}, {"moon_illuminated", p.MoonIlluminated},
		{"moon_sep_deg", p.MoonSepDeg}, {"jd_utc", p.JDUTC}, {"jd_tt", p.JDTT},
	} {
		if got := num(t, m, c.key); math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %v, ephem.Observe gives %v", c.key, got, c.want)
		}
	}

	// Ranges of the contract.
	ranges := []struct {
		key    string
		lo, hi float64
	}{
		{"lst_hours", 0, 24}, {"hour_angle_hours", -12, 12}, {"alt_deg", -90, 90}, {"az_deg", 0, 360},
		{"parallactic_deg", -180, 180}, {"moon_illuminated", 0, 1}, {"moon_sep_deg", 0, 180},
	}
	for _, r := range ranges {
		if v := num(t, m, r.key); v < r.lo || v > r.hi {
			t.Errorf("%s = %v, outside %v..%v", r.key, v, r.lo, r.hi)
		}
	}
	// TT − UTC in 2026 is 37 + 32.184 s.
	if d := (num(t, m, "jd_tt") - num(t, m, "jd_utc")) * 86400; math.Abs(d-69.184) > 1e-3 {
		t.Errorf("jd_tt − jd_utc = %.4f s, want 69.184 s", d)
	}
}

// TestSkyLongitudeSign: moving the site east by Δλ moves local sidereal
// time and the hour angle forward by Δλ/15 hours. A sign slip at the flag
// would show as a difference of the opposite sign.
func TestSkyLongitudeSign(t *testing.T) {
	base := []string{"sky", "--lat", "-27.85", "--elev", "2650", "--ra", "148.25", "--dec", "-6.125", "--at", "2026-12-01T03:00:00Z"}
	west := runJSON(t, append(base, "--lon", "-69.12")...)
	east := runJSON(t, append(base, "--lon", "-39.12")...)
	// The hour angle is of the topocentric place, which diurnal aberration
	// moves by up to 0.0213 s of time × sec δ (Meeus ch. 23): allow 1e-5 h.
	for _, c := range []struct {
		key string
		tol float64
	}{{"lst_hours", 1e-9}, {"hour_angle_hours", 1e-5}} {
		d := math.Mod(num(t, east, c.key)-num(t, west, c.key)+36, 24) - 12
		if math.Abs(d-2) > c.tol {
			t.Errorf("%s moved by %.9f h for 30° east, want +2 h", c.key, d)
		}
	}
}

func TestSkyAirmassNull(t *testing.T) {
	tests := []struct {
		name    string
		dec     string
		wantNil bool
	}{
		// From latitude +60°, a star at −80° never rises and one at +80° never sets.
		{"NeverRises", "-80", true},
		{"Circumpolar", "+80", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := runJSON(t, "sky", "--lat", "60", "--lon", "10", "--ra", "0", "--dec", tc.dec, "--at", "2026-06-01T00:00:00Z")
			am, ok := m["airmass"]
			if !ok {
				t.Fatal("key airmass missing")
			}
			alt := num(t, m, "alt_refracted_deg")
			if tc.wantNil {
				if am != nil || alt >= 0 {
					t.Errorf("airmass = %v at refracted altitude %.2f°, want null below the horizon", am, alt)
				}
				return
			}
			if x := num(t, m, "airmass"); x < 1 || x > 1.4 || alt < 45 {
				t.Errorf("airmass = %v at refracted altitude %.2f°, want 1..1.4 above 45°", x, alt)
			}
		})
	}
}

func TestSkyHuman(t *testing.T) {
	stdout, stderr, code := runCmd(t, args([]string{"sky"}, siteArgs, targetArgs, []string{"--at", "2026-12-01T03:00:00Z"})...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"09:53:00.00", "-06:07:30.0", "69.1200° W", "airmass", "parallactic angle", "never point near the Sun"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

package ephem_test

import (
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestLASTHoursLongitudes checks that local apparent sidereal time is GAST
// plus the east longitude, in [0, 24), for sites east and west of Greenwich.
func TestLASTHoursLongitudes(t *testing.T) {
	tm := time.Date(2027, time.March, 14, 3, 17, 0, 0, time.UTC)
	gast := ephem.GASTHours(tm)
	for _, tc := range []struct {
		name string
		lon  float64
	}{
		{"Greenwich", 0},
		{"West70", -70.74},
		{"West179", -179.9},
		{"East149", 149.06},
		{"East180", 180},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := ephem.Site{LonEastDeg: tc.lon}.LASTHours(tm)
			if got < 0 || got >= 24 {
				t.Fatalf("LAST %v out of [0, 24)", got)
			}
			want := math.Mod(gast+tc.lon/15+48, 24)
			if d := math.Abs(math.Remainder(got-want, 24)) * 3600; d > 1e-6 {
				t.Errorf("LAST = %.9f h, want %.9f h (%.2g s off)", got, want, d)
			}
		})
	}
}

// TestGMSTRate checks the sidereal day: one mean solar day later the mean
// sidereal time is 3m56.5554s further on (24 h × 0.00273790935, Meeus ch. 12).
func TestGMSTRate(t *testing.T) {
	for _, tm := range []time.Time{
		time.Date(1987, time.April, 10, 0, 0, 0, 0, time.UTC),
		time.Date(2027, time.September, 1, 18, 30, 0, 0, time.UTC),
	} {
		d := ephem.GMSTHours(tm.Add(24*time.Hour)) - ephem.GMSTHours(tm)
		got := math.Mod(d+24, 24) * 3600
		const want = 86400 * 0.00273790935
		if math.Abs(got-want) > 0.001 {
			t.Errorf("%v: GMST advanced %.4f s in a day, want %.4f s", tm, got, want)
		}
	}
}

// TestSiderealRange checks [0, 24) over instants from 1950 to 2100.
func TestSiderealRange(t *testing.T) {
	site := ephem.Site{LatDeg: -30, LonEastDeg: -70.7}
	for y := 1950; y <= 2100; y += 7 {
		for h := 0; h < 24; h += 5 {
			tm := time.Date(y, time.Month(1+y%12), 1+h, h, 13, 0, 0, time.UTC)
			for _, v := range []float64{ephem.GMSTHours(tm), ephem.GASTHours(tm), site.LASTHours(tm)} {
				if !(v >= 0 && v < 24) {
					t.Fatalf("%v: sidereal time %v out of [0, 24)", tm, v)
				}
			}
		}
	}
}

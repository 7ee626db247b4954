package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestSparseClock checks the queue windows' phase clock (BJD_TDB from
// anchors at the site's mean solar noons, every other one interpolated)
// against ephem.BJDTDB at random instants: within 0.1 s (the notes in
// windows_core.go estimate 0.07 s), over a year and across the leap
// second at the end of 2016.
func TestSparseClock(t *testing.T) {
	site := ephem.Site{LatDeg: -30.2, LonEastDeg: -70.8, ElevM: 2200}
	r := rand.New(rand.NewPCG(11, 3))
	for _, tc := range []struct {
		name     string
		from, to time.Time
	}{
		{"Year2026", time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC), time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC)},
		{"LeapSecond2016", time.Date(2016, 12, 20, 0, 0, 0, 0, time.UTC), time.Date(2017, 1, 10, 0, 0, 0, 0, time.UTC)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			from, to := unixSec(tc.from), unixSec(tc.to)
			bounds := dayBounds(from, to, site.LonEastDeg)
			worst := 0.0
			for range 5 {
				st := ephem.Star{RADeg: 360 * r.Float64(), DecDeg: -80 + 160*r.Float64()}
				clock := newSparseClock(site, st, ephem.Ephemeris{T0: ephem.NewJD2(2461000.5), PeriodDays: 1}, bounds)
				us := []float64{unixSec(time.Date(2016, 12, 31, 23, 59, 59, 500e6, time.UTC)), unixSec(time.Date(2017, 1, 1, 0, 0, 0, 500e6, time.UTC))}
				for range 200 {
					us = append(us, from+(to-from)*r.Float64())
				}
				for _, u := range us {
					if u < from || u > to {
						continue
					}
					d := math.Abs(clock.bjd(u).SubDays(ephem.BJDTDB(site, st, timeOf(u)))) * 86400
					if d > 0.1 {
						t.Errorf("at %v: clock off by %.4f s", timeOf(u), d)
					}
					worst = math.Max(worst, d)
				}
			}
			t.Logf("worst clock error %s s", fmt.Sprintf("%.4f", worst))
		})
	}
}

package ephem_test

import (
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestObserveConsistent checks that Observe assembles the separate
// computations: each field equals the function that defines it.
func TestObserveConsistent(t *testing.T) {
	for _, tc := range []struct {
		name string
		site ephem.Site
		st   ephem.Star
		at   time.Time
	}{
		{"AndesUp", ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700, PressureHPa: 740, TempC: 8},
			ephem.Star{RADeg: 83.8, DecDeg: -5.4, PMRAmasyr: 12, PMDecmasyr: -3}, time.Date(2027, time.January, 10, 3, 0, 0, 0, time.UTC)},
		{"AlpsDown", ephem.Site{LatDeg: 47.3, LonEastDeg: 11.4, ElevM: 2000},
			ephem.Star{RADeg: 250.1, DecDeg: -60.2}, time.Date(2027, time.July, 1, 22, 0, 0, 0, time.UTC)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := ephem.Observe(tc.site, tc.st, tc.at)
			ra, dec := ephem.ApparentPlace(tc.st, tc.at)
			hz := tc.site.Horizontal(ra, dec, tc.at)
			refr := tc.site.RefractedAltDeg(hz.AltDeg)
			x, ok := ephem.Airmass(refr)
			mra, mdec, _ := tc.site.MoonTopocentric(tc.at)
			checks := []struct {
				field     string
				got, want float64
			}{
				{"JDUTC", p.JDUTC, ephem.JDUTC(tc.at).Float()},
				{"JDTT", p.JDTT, ephem.JDTT(tc.at).Float()},
				{"LSTHours", p.LSTHours, tc.site.LASTHours(tc.at)},
				{"HourAngleHours", p.HourAngleHours, hz.HourAngleHours},
				{"AltDeg", p.AltDeg, hz.AltDeg},
				{"AltRefractedDeg", p.AltRefractedDeg, refr},
				{"AzDeg", p.AzDeg, hz.AzDeg},
				{"Airmass", p.Airmass, x},
				{"ParallacticDeg", p.ParallacticDeg, hz.ParallacticDeg},
				{"SunAltDeg", p.SunAltDeg, tc.site.SunAltDeg(tc.at)},
				{"MoonAltDeg", p.MoonAltDeg, tc.site.MoonAltDeg(tc.at)},
				{"MoonIlluminated", p.MoonIlluminated, ephem.MoonIlluminated(tc.at)},
				{"MoonSepDeg", p.MoonSepDeg, ephem.SeparationDeg(ra, dec, mra, mdec)},
			}
			for _, c := range checks {
				if c.got != c.want || math.IsNaN(c.got) {
					t.Errorf("%s = %v, want %v", c.field, c.got, c.want)
				}
			}
			if p.AirmassOK != ok || ok != (p.AltRefractedDeg >= 0) {
				t.Errorf("AirmassOK = %v with refracted altitude %v", p.AirmassOK, p.AltRefractedDeg)
			}
			if !ok && p.Airmass != 0 {
				t.Errorf("Airmass = %v below the horizon, want 0", p.Airmass)
			}
		})
	}
}

// BenchmarkObserve measures one full-precision computation of everything
// the sky command shows (target, Sun and Moon).
func BenchmarkObserve(b *testing.B) {
	site := ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}
	st := ephem.Star{RADeg: 83.8, DecDeg: -5.4, PMRAmasyr: 12, PMDecmasyr: -3}
	tm := time.Date(2027, time.January, 10, 3, 0, 0, 0, time.UTC)
	for b.Loop() {
		ephem.Observe(site, st, tm)
	}
}

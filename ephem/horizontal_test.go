package ephem_test

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

const arcsecDeg = 1.0 / 3600 // degree

// TestHorizontalMeridian checks a star on the meridian (hour angle 0) at
// sites in all four quadrants of latitude and longitude: its altitude is
// 90° − |φ − δ| and it stands due south when δ < φ, due north when δ > φ.
// Diurnal aberration moves it by at most 0.32″, along the east–west line.
func TestHorizontalMeridian(t *testing.T) {
	tm := time.Date(2027, time.October, 2, 4, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		name     string
		lat, lon float64
		dec      float64
	}{
		{"NorthEastSouthOfZenith", 47.3, 11.4, 10},
		{"NorthWestNorthOfZenith", 31.96, -111.6, 60},
		{"SouthWestSouthOfZenith", -30.24, -70.74, -70},
		{"SouthWestNorthOfZenith", -30.24, -70.74, 5},
		{"SouthEastNorthOfZenith", -31.27, 149.06, 20},
		{"HighNorthBelowPole", 78.2, 15.6, 85},
		{"EquatorSouth", 0.3, -78.5, -40},
	} {
		t.Run(tc.name, func(t *testing.T) {
			site := ephem.Site{LatDeg: tc.lat, LonEastDeg: tc.lon}
			ra := site.LASTHours(tm) * 15
			hz := site.Horizontal(ra, tc.dec, tm)
			wantAlt := 90 - math.Abs(tc.lat-tc.dec)
			if d := math.Abs(hz.AltDeg - wantAlt); d > 0.01*arcsecDeg {
				t.Errorf("alt = %.7f°, want %.7f° (%.3f″ off)", hz.AltDeg, wantAlt, d/arcsecDeg)
			}
			wantAz := 180.0
			if tc.dec > tc.lat {
				wantAz = 0
			}
			if d := math.Abs(math.Remainder(hz.AzDeg-wantAz, 360)); d > 1*arcsecDeg {
				t.Errorf("az = %.7f°, want %.0f°", hz.AzDeg, wantAz)
			}
			// Diurnal aberration shifts the hour angle by up to 0.32″ on the sky.
			if d := math.Abs(hz.HourAngleHours) * 15 * math.Cos(tc.dec*math.Pi/180); d > 0.33*arcsecDeg {
				t.Errorf("hour angle = %.3g h (%.3f″ on the sky), want 0 within 0.32″", hz.HourAngleHours, d/arcsecDeg)
			}
		})
	}
}

// TestHorizontalEastPoint checks that a star on the equator six hours east
// of the meridian is on the horizon due east, at sites north and south.
func TestHorizontalEastPoint(t *testing.T) {
	tm := time.Date(2027, time.October, 2, 4, 0, 0, 0, time.UTC)
	for _, lat := range []float64{-60, -30.24, 0, 19.8, 47.3} {
		site := ephem.Site{LatDeg: lat, LonEastDeg: -70}
		ra := math.Mod(site.LASTHours(tm)*15+90, 360)
		hz := site.Horizontal(ra, 0, tm)
		if math.Abs(hz.AltDeg) > 0.01*arcsecDeg || math.Abs(hz.AzDeg-90) > 0.01*arcsecDeg {
			t.Errorf("lat %v: (alt, az) = (%.7f°, %.7f°), want (0°, 90°)", lat, hz.AltDeg, hz.AzDeg)
		}
		if math.Abs(hz.HourAngleHours+6) > 1e-6 {
			t.Errorf("lat %v: hour angle %.7f h, want −6 h", lat, hz.HourAngleHours)
		}
	}
}

// TestHorizontalDiurnalAberration checks the size of the diurnal
// aberration: a star at the zenith of a site on the equator is displaced
// toward the east point by ω·a/c = 0.320″ (the site's speed, 465 m/s, over
// the speed of light).
func TestHorizontalDiurnalAberration(t *testing.T) {
	site := ephem.Site{LatDeg: 0, LonEastDeg: 0}
	tm := time.Date(2027, time.October, 2, 4, 0, 0, 0, time.UTC)
	hz := site.Horizontal(site.LASTHours(tm)*15, 0, tm)
	const want = 7.292114992e-5 * 6378.14 / 299792.458 * 180 / math.Pi * 3600 // 0.31999″
	if got := (90 - hz.AltDeg) * 3600; math.Abs(got-want) > 0.0005 {
		t.Errorf("zenith star displaced %.4f″, want %.4f″", got, want)
	}
	if math.Abs(hz.AzDeg-90) > 1e-6 {
		t.Errorf("displaced toward azimuth %.4f°, want 90° (east)", hz.AzDeg)
	}
}

// TestHorizontalRanges checks the documented ranges, and that no NaN comes
// out, over random directions, sites (poles included) and instants.
func TestHorizontalRanges(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 9))
	lats := []float64{-90, -89.9999, -45, 0, 45, 89.9999, 90}
	decs := []float64{-90, -89.9999999, 0, 89.9999999, 90}
	for i := 0; i < 2000; i++ {
		lat := rng.Float64()*180 - 90
		if i < len(lats) {
			lat = lats[i]
		}
		dec := math.Asin(2*rng.Float64()-1) * 180 / math.Pi
		if i%len(decs) == 0 {
			dec = decs[(i/len(decs))%len(decs)]
		}
		site := ephem.Site{LatDeg: lat, LonEastDeg: rng.Float64()*360 - 180, ElevM: rng.Float64() * 5000}
		tm := time.Unix(rng.Int64N(4e9)-1e9, 0).UTC()
		hz := site.Horizontal(rng.Float64()*360, dec, tm)
		switch {
		case !(hz.AltDeg >= -90 && hz.AltDeg <= 90),
			!(hz.AzDeg >= 0 && hz.AzDeg < 360),
			!(hz.HourAngleHours >= -12 && hz.HourAngleHours < 12),
			!(hz.ParallacticDeg > -180 && hz.ParallacticDeg <= 180):
			t.Fatalf("site %+v dec %v at %v: %+v out of range", site, dec, tm, hz)
		}
	}
}

// BenchmarkHorizontal measures one full-precision Site.Horizontal call.
func BenchmarkHorizontal(b *testing.B) {
	site := ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}
	tm := time.Date(2027, time.March, 14, 3, 0, 0, 0, time.UTC)
	for b.Loop() {
		site.Horizontal(83.8, -5.4, tm)
	}
}

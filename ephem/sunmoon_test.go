package ephem_test

import (
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

// haversineDeg is an independent great-circle distance, degrees (the
// haversine formula; fine away from 180°).
func haversineDeg(ra1, dec1, ra2, dec2 float64) float64 {
	r := math.Pi / 180
	s1 := math.Sin((dec2 - dec1) * r / 2)
	s2 := math.Sin((ra2 - ra1) * r / 2)
	h := s1*s1 + math.Cos(dec1*r)*math.Cos(dec2*r)*s2*s2
	return 2 * math.Asin(math.Sqrt(h)) / r
}

// TestSeparationDeg checks the Vincenty form against the haversine formula
// and known separations, across RA 0, at the poles, tiny and near 180°.
func TestSeparationDeg(t *testing.T) {
	for _, tc := range []struct {
		name                 string
		ra1, dec1, ra2, dec2 float64
		want                 float64 // NaN: compare with haversine
		tolArcsec            float64
	}{
		{"Same", 123.4, -56.7, 123.4, -56.7, 0, 1e-9},
		{"AcrossRA0", 359.9999, 0, 0.0001, 0, 0.0002, 1e-6},
		{"OneMas", 10, 20, 10, 20 + 1e-3/3600, 1e-3 / 3600, 1e-7},
		{"PoleToPole", 0, 90, 180, -90, 180, 1e-6},
		{"Antipodes", 30, 10, 210, -10, 180, 1e-6},
		{"NearlyAntipodal", 30, 10, 210, -10.001, 180 - 0.001, 1e-4},
		{"AroundPole", 0, 89, 180, 89, 2, 1e-6},
		{"Quarter", 0, 0, 90, 0, 90, 1e-9},
		{"Random", 83.8, -5.4, 101.3, -16.7, math.NaN(), 1e-6},
		{"RandomSouth", 250.1, -60.2, 10.7, -75.3, math.NaN(), 1e-6},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := ephem.SeparationDeg(tc.ra1, tc.dec1, tc.ra2, tc.dec2)
			want := tc.want
			if math.IsNaN(want) {
				want = haversineDeg(tc.ra1, tc.dec1, tc.ra2, tc.dec2)
			}
			if d := math.Abs(got-want) * 3600; d > tc.tolArcsec {
				t.Errorf("SeparationDeg = %.10f°, want %.10f° (%.3g″ off)", got, want, d)
			}
			if back := ephem.SeparationDeg(tc.ra2, tc.dec2, tc.ra1, tc.dec1); math.Abs(back-got) > 1e-12 {
				t.Errorf("not symmetric: %v and %v", got, back)
			}
		})
	}
}

// TestSunSolsticeDeclination checks the Sun against the obliquity: at the
// June solstice its apparent declination reaches the true obliquity of the
// ecliptic (Meeus ch. 25 and 22), within the 0.01° of the low-accuracy Sun.
func TestSunSolsticeDeclination(t *testing.T) {
	from := time.Date(2027, time.June, 19, 0, 0, 0, 0, time.UTC)
	maxDec, at := -90.0, from
	for tm := from; tm.Before(from.Add(96 * time.Hour)); tm = tm.Add(10 * time.Minute) {
		if _, dec, _ := ephem.SunApparent(tm); dec > maxDec {
			maxDec, at = dec, tm
		}
	}
	_, _, eps := ephem.Nutation(ephem.JDTT(at).Float())
	if math.Abs(maxDec-eps) > 0.01 {
		t.Errorf("greatest declination %.4f° at %v, true obliquity %.4f°", maxDec, at, eps)
	}
	t.Logf("solstice 2027: δ max %.5f° at %v; ε %.5f°", maxDec, at.Format(time.RFC3339), eps)
}

// TestMoonParallax checks the topocentric Moon against an independent
// vector computation: the site's geocentric position from its geodetic
// latitude, longitude and height on the IAU 1976 ellipsoid (a = 6378.14 km,
// f = 1/298.257, as meeus globe.Earth76), turned by the local apparent
// sidereal time, subtracted from the Moon's geocentric position.
func TestMoonParallax(t *testing.T) {
	const aKm, f = 6378.14, 1 / 298.257
	sites := []ephem.Site{
		{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700},
		{LatDeg: 19.82, LonEastDeg: -155.47, ElevM: 4200},
		{LatDeg: 52.2, LonEastDeg: 0.1, ElevM: 20},
		{LatDeg: -43.99, LonEastDeg: 170.46, ElevM: 1029},
		{LatDeg: 78.2, LonEastDeg: 15.6, ElevM: 10},
	}
	r := math.Pi / 180
	worstAng, worstKm := 0.0, 0.0
	for i, site := range sites {
		e2 := f * (2 - f)
		sphi, cphi := math.Sincos(site.LatDeg * r)
		n := aKm / math.Sqrt(1-e2*sphi*sphi)
		hKm := site.ElevM / 1000
		for h := 0; h < 48; h += 5 {
			tm := time.Date(2027, time.May, 3+i, h, 0, 0, 0, time.UTC)
			gra, gdec, gdist := ephem.MoonGeocentric(tm)
			tra, tdec, tdist := site.MoonTopocentric(tm)

			lst := site.LASTHours(tm) * 15 * r
			obs := [3]float64{(n + hKm) * cphi * math.Cos(lst), (n + hKm) * cphi * math.Sin(lst), (n*(1-e2) + hKm) * sphi}
			m := [3]float64{
				gdist * math.Cos(gdec*r) * math.Cos(gra*r),
				gdist * math.Cos(gdec*r) * math.Sin(gra*r),
				gdist * math.Sin(gdec*r),
			}
			v := [3]float64{m[0] - obs[0], m[1] - obs[1], m[2] - obs[2]}
			dist := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
			ra := math.Mod(math.Atan2(v[1], v[0])/r+360, 360)
			dec := math.Asin(v[2]/dist) / r

			dAng := ephem.SeparationDeg(ra, dec, tra, tdec) * 3600
			dKm := math.Abs(dist - tdist)
			worstAng, worstKm = math.Max(worstAng, dAng), math.Max(worstKm, dKm)
			if dAng > 0.001 || dKm > 0.001 {
				t.Errorf("%+v at %v: topocentric Moon %.3f″ and %.3f km from the vector computation", site, tm, dAng, dKm)
			}
		}
	}
	t.Logf("topocentric Moon vs vector computation: worst %.3f″, %.4f km", worstAng, worstKm)
}

// TestMoonIlluminatedMonth checks the illuminated fraction over two synodic
// months: always in 0..1, nearly 0 at new moon and nearly 1 at full moon
// (the Moon's latitude keeps it from exactly 0 or 1).
func TestMoonIlluminatedMonth(t *testing.T) {
	from := time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC)
	lo, hi := 1.0, 0.0
	for tm := from; tm.Before(from.AddDate(0, 0, 60)); tm = tm.Add(time.Hour) {
		k := ephem.MoonIlluminated(tm)
		if !(k >= 0 && k <= 1) {
			t.Fatalf("%v: k = %v", tm, k)
		}
		lo, hi = math.Min(lo, k), math.Max(hi, k)
	}
	if lo > 0.005 || hi < 0.995 {
		t.Errorf("k ranged %.4f..%.4f over two months, want below 0.005 and above 0.995", lo, hi)
	}
}

// TestMoonSemidiameter checks the Moon's apparent radius: 14.7′–16.8′ from
// the Earth's centre over its orbit (from memory), a few percent more when
// it is overhead.
func TestMoonSemidiameter(t *testing.T) {
	site := ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}
	for d := 0; d < 30; d++ {
		tm := time.Date(2027, time.February, 1+d, 5, 0, 0, 0, time.UTC)
		sd := site.MoonSemidiameterDeg(tm) * 60
		if sd < 14.6 || sd > 17.1 {
			t.Errorf("%v: semidiameter %.2f′", tm, sd)
		}
	}
}

// BenchmarkMoonTopocentric measures one topocentric Moon position.
func BenchmarkMoonTopocentric(b *testing.B) {
	site := ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}
	tm := time.Date(2027, time.March, 14, 3, 0, 0, 0, time.UTC)
	for b.Loop() {
		site.MoonTopocentric(tm)
	}
}

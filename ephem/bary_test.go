package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// eclipticStar returns the ICRS position of ecliptic longitude lamDeg and
// latitude betaDeg (J2000 mean obliquity 23°26′21.448″, Meeus (22.2) at T=0).
func eclipticStar(lamDeg, betaDeg float64) ephem.Star {
	eps := (23 + 26.0/60 + 21.448/3600) * math.Pi / 180
	l, b := lamDeg*math.Pi/180, betaDeg*math.Pi/180
	ra := math.Atan2(math.Sin(l)*math.Cos(eps)-math.Tan(b)*math.Sin(eps), math.Cos(l))
	dec := math.Asin(math.Sin(b)*math.Cos(eps) + math.Cos(b)*math.Sin(eps)*math.Sin(l))
	raDeg := math.Mod(ra*180/math.Pi+360, 360)
	return ephem.Star{RADeg: raDeg, DecDeg: dec * 180 / math.Pi}
}

// TestRoemerAmplitude: over a year the barycentric correction swings through
// ±A·cos β, A = 1 au/c = 499.004784 s (IAU 2012 Resolution B2 au, SI c),
// scaled by the Earth's distance (0.983–1.017 au) and shifted by the Sun's
// offset from the barycentre (≤ 0.0102 au, 5.1 s) and the observatory
// (≤ 21.3 ms); e.g. Eastman, Siverd & Gaudi (2010), PASP 122, 935, §2
// ("up to ±8.3 min", from memory).
func TestRoemerAmplitude(t *testing.T) {
	site := ephem.Site{}
	start := time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC)
	for _, beta := range []float64{0, 30, 60, 89.9} {
		t.Run("", func(t *testing.T) {
			st := eclipticStar(100, beta)
			lo, hi := math.Inf(1), math.Inf(-1)
			for d := range 366 {
				bary, _ := ephem.RoemerDelaySeconds(site, st, start.AddDate(0, 0, d))
				lo, hi = math.Min(lo, bary), math.Max(hi, bary)
			}
			A := ephem.AULightSeconds * math.Cos(beta*math.Pi/180)
			slack := 5.2
			t.Logf("β = %4.1f°: delay %+.2f … %+.2f s, A·cos β = %.2f s", beta, lo, hi, A)
			if hi > A*1.017+slack || hi < A*0.983-slack || lo < -A*1.017-slack || lo > -A*0.983+slack {
				t.Errorf("β = %v°: delay ranged %+.2f … %+.2f s; want ±(%.1f ± %.1f) s", beta, lo, hi, A, 0.017*A+slack)
			}
		})
	}
}

// TestHelioBaryDifference: HJD and BJD of one instant differ by the Sun's
// offset from the barycentre along the line of sight, under 0.0102 au
// (5.1 s) and dominated by Jupiter (about 2.5 s).
func TestHelioBaryDifference(t *testing.T) {
	worst := 0.0
	for _, st := range []ephem.Star{eclipticStar(0, 0), eclipticStar(90, 0), eclipticStar(200, 40)} {
		for d := 0; d < 15*365; d += 7 {
			at := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, d)
			bary, helio := ephem.RoemerDelaySeconds(testSite, st, at)
			worst = math.Max(worst, math.Abs(bary-helio))
		}
	}
	t.Logf("largest |BJD − HJD| delay difference 2020–2035: %.2f s", worst)
	if worst > 5.2 || worst < 2 {
		t.Errorf("largest |bary − helio| = %.2f s, want 2–5.2 s", worst)
	}
}

// TestTDBMinusTTAmplitude: TDB − TT is periodic with amplitude 1.657 ms
// (Fairhead & Bretagnon 1990; Kaplan, USNO Circular 179, 2005, eq. 2.6).
func TestTDBMinusTTAmplitude(t *testing.T) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for d := range 366 {
		b, err := ephem.BarycentricTimes(testSite, testStar, time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, d))
		if err != nil {
			t.Fatal(err)
		}
		ms := b.JDTDB.SubDays(b.JDTT) * 86400e3
		lo, hi = math.Min(lo, ms), math.Max(hi, ms)
	}
	t.Logf("TDB − TT over 2026: %.3f … %.3f ms", lo, hi)
	if hi < 1.60 || hi > 1.72 || lo > -1.60 || lo < -1.72 {
		t.Errorf("TDB − TT ranged %.3f … %.3f ms, want ±1.66 ms", lo, hi)
	}
}

// TestObservatoryTerm: the observatory moves the delay by at most the
// Earth's equatorial radius over c, 6378.14 km / c = 21.27 ms.
func TestObservatoryTerm(t *testing.T) {
	site := ephem.Site{LatDeg: 0, LonEastDeg: 10, ElevM: 0}
	st := ephem.Star{RADeg: 40, DecDeg: 0}
	worst := 0.0
	for m := 0; m < 24*60; m += 10 {
		at := time.Date(2026, 5, 1, 0, m, 0, 0, time.UTC)
		topo := ephem.BJDTDB(site, st, at)
		geo, err := ephem.ConvertEpochGeocentric(ephem.JDUTC(at), ephem.StdJDUTC, ephem.StdBJDTDB, st)
		if err != nil {
			t.Fatal(err)
		}
		worst = math.Max(worst, math.Abs(topo.SubDays(geo))*86400e3)
	}
	t.Logf("largest observatory term %.2f ms", worst)
	if worst > 21.3 || worst < 20 {
		t.Errorf("observatory term reached %.2f ms, want just under 21.3 ms for an equatorial site and target", worst)
	}
}

func TestBaryTimesConsistent(t *testing.T) {
	at := time.Date(2031, 8, 9, 22, 13, 1, 5e8, time.UTC)
	b, err := ephem.BarycentricTimes(testSite, testStar, at)
	if err != nil {
		t.Fatal(err)
	}
	s := func(a, c ephem.JD2) float64 { return a.SubDays(c) * 86400 }
	checks := []struct {
		name      string
		got, want float64
	}{
		{"JDUTC", s(b.JDUTC, ephem.JDUTC(at)), 0},
		{"BJDTDB−JDTDB", s(b.BJDTDB, b.JDTDB), b.BaryDelayS},
		{"BJDUTC−JDUTC", s(b.BJDUTC, b.JDUTC), b.BaryDelayS},
		{"HJDUTC−JDUTC", s(b.HJDUTC, b.JDUTC), b.HelioDelayS},
		{"HJDTT−JDTT", s(b.HJDTT, b.JDTT), b.HelioDelayS},
		{"BJDTDB function", s(ephem.BJDTDB(testSite, testStar, at), b.BJDTDB), 0},
		{"HJDUTC function", s(ephem.HJDUTC(testSite, testStar, at), b.HJDUTC), 0},
		{"HJDTT function", s(ephem.HJDTT(testSite, testStar, at), b.HJDTT), 0},
		{"BJDUTC function", s(ephem.BJDUTC(testSite, testStar, at), b.BJDUTC), 0},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-6 {
			t.Errorf("%s: %.9f s, want %.9f s", c.name, c.got, c.want)
		}
	}
}

// TestUTCFromBJDTDB: the inverse returns the instant within 1 µs, 1950–2100,
// random sites and directions.
func TestUTCFromBJDTDB(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	t0 := time.Date(1950, 1, 1, 0, 0, 0, 0, time.UTC)
	worst := time.Duration(0)
	for range 300 {
		at := t0.Add(time.Duration(rng.Float64() * 150 * 365.25 * 86400 * 1e9))
		site := ephem.Site{LatDeg: rng.Float64()*180 - 90, LonEastDeg: rng.Float64()*360 - 180, ElevM: rng.Float64() * 4000}
		st := ephem.Star{RADeg: rng.Float64() * 360, DecDeg: math.Asin(2*rng.Float64()-1) * 180 / math.Pi}
		back := ephem.UTCFromBJDTDB(site, st, ephem.BJDTDB(site, st, at))
		d := back.Sub(at).Abs()
		worst = max(worst, d)
		if d > time.Microsecond {
			t.Errorf("%v at %+v towards %+v: back at %v (%v off)", at, site, st, back, d)
		}
	}
	t.Logf("worst round trip %v", worst)
}

func TestBarycentricBadInput(t *testing.T) {
	at := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	cases := []struct {
		name  string
		site  ephem.Site
		st    ephem.Star
		field string
	}{
		{"ErrLat", ephem.Site{LatDeg: 95}, testStar, "lat"},
		{"ErrLonNaN", ephem.Site{LonEastDeg: math.NaN()}, testStar, "lon"},
		{"ErrRA", testSite, ephem.Star{RADeg: 400}, "ra"},
		{"ErrRANegative", testSite, ephem.Star{RADeg: -1}, "ra"},
		{"ErrDecNaN", testSite, ephem.Star{DecDeg: math.NaN()}, "dec"},
		{"ErrDecInf", testSite, ephem.Star{DecDeg: math.Inf(1)}, "dec"},
		{"ErrPM", testSite, ephem.Star{PMRAmasyr: math.Inf(-1)}, "pm_ra"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ephem.BarycentricTimes(c.site, c.st, at)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field {
				t.Fatalf("err = %v, want *InputError on %q", err, c.field)
			}
			if b := ephem.BJDTDB(c.site, c.st, at); b != (ephem.JD2{}) {
				t.Errorf("BJDTDB = %v, want the zero JD2", b)
			}
			if u := ephem.UTCFromBJDTDB(c.site, c.st, ephem.JD2{Day: 2460000.5}); !u.IsZero() {
				t.Errorf("UTCFromBJDTDB = %v, want the zero time", u)
			}
			if b, h := ephem.RoemerDelaySeconds(c.site, c.st, at); b != 0 || h != 0 {
				t.Errorf("RoemerDelaySeconds = %v, %v; want zeros", b, h)
			}
		})
	}
}

func BenchmarkBJDTDB(b *testing.B) {
	at := time.Date(2026, 3, 14, 3, 25, 0, 0, time.UTC)
	for b.Loop() {
		ephem.BJDTDB(testSite, testStar, at)
	}
}

func BenchmarkPhase(b *testing.B) {
	e := testEphem()
	at := time.Date(2026, 3, 14, 3, 25, 0, 0, time.UTC)
	for b.Loop() {
		ephem.PhaseAtUTC(testSite, testStar, e, at)
	}
}

package ephem_test

import (
	"math"
	"testing"
	"time"

	"github.com/soniakeys/meeus/v3/globe"
	"github.com/soniakeys/meeus/v3/moonposition"
	"github.com/soniakeys/meeus/v3/rise"
	"github.com/soniakeys/meeus/v3/sidereal"
	"github.com/soniakeys/unit"

	"phasecast/ephem"
)

// TestFindCrossingsSine checks root finding on a curve with known roots:
// sin(2π(t − t0)/P) crosses 0.5 at phases 1/12 (rising) and 5/12 (setting).
func TestFindCrossingsSine(t *testing.T) {
	t0 := time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC)
	const period = 5 * time.Hour
	f := func(tm time.Time) float64 {
		return math.Sin(2 * math.Pi * tm.Sub(t0).Seconds() / period.Seconds())
	}
	got := ephem.FindCrossings(f, 0.5, t0, t0.Add(24*time.Hour), 7*time.Minute)
	var want []ephem.Crossing
	for k := 0; k < 5; k++ {
		base := t0.Add(time.Duration(k) * period)
		want = append(want,
			ephem.Crossing{T: base.Add(period / 12), Rising: true},
			ephem.Crossing{T: base.Add(5 * period / 12), Rising: false})
	}
	if len(got) != len(want) {
		t.Fatalf("got %d crossings, want %d: %v", len(got), len(want), got)
	}
	for i := range want {
		if got[i].Rising != want[i].Rising {
			t.Errorf("crossing %d: Rising = %v, want %v", i, got[i].Rising, want[i].Rising)
		}
		if d := got[i].T.Sub(want[i].T).Seconds(); math.Abs(d) > 0.1 {
			t.Errorf("crossing %d at %v, want %v (%.3f s off)", i, got[i].T, want[i].T, d)
		}
	}
}

// TestFindCrossingsEdges checks the documented corner cases.
func TestFindCrossingsEdges(t *testing.T) {
	t0 := time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC)
	ramp := func(tm time.Time) float64 { return tm.Sub(t0).Hours() } // crosses 1 at t0+1h
	t.Run("EmptySpan", func(t *testing.T) {
		if got := ephem.FindCrossings(ramp, 1, t0, t0, time.Minute); got != nil {
			t.Errorf("got %v, want nil", got)
		}
		if got := ephem.FindCrossings(ramp, 1, t0, t0.Add(-time.Hour), time.Minute); got != nil {
			t.Errorf("got %v, want nil", got)
		}
	})
	t.Run("DefaultStep", func(t *testing.T) {
		got := ephem.FindCrossings(ramp, 1.05, t0, t0.Add(3*time.Hour), 0)
		if len(got) != 1 || !got[0].Rising || math.Abs(got[0].T.Sub(t0.Add(63*time.Minute)).Seconds()) > 0.1 {
			t.Errorf("got %v, want one rising crossing at +63 min", got)
		}
	})
	t.Run("LevelOnGridPoint", func(t *testing.T) {
		// The ramp equals 1 exactly at a grid point: counted once, as rising.
		got := ephem.FindCrossings(ramp, 1, t0, t0.Add(3*time.Hour), 10*time.Minute)
		if len(got) != 1 || !got[0].Rising || !got[0].T.Equal(t0.Add(time.Hour)) {
			t.Errorf("got %v, want one rising crossing at +1 h", got)
		}
	})
	t.Run("LastShortInterval", func(t *testing.T) {
		// The span is not a whole number of steps: the crossing in the
		// short last interval is found.
		got := ephem.FindCrossings(ramp, 2.9, t0, t0.Add(175*time.Minute), time.Hour)
		if len(got) != 1 || math.Abs(got[0].T.Sub(t0.Add(174*time.Minute)).Seconds()) > 0.1 {
			t.Errorf("got %v, want one crossing at +174 min", got)
		}
	})
	t.Run("NaNSkipped", func(t *testing.T) {
		f := func(tm time.Time) float64 {
			h := tm.Sub(t0).Hours()
			if h > 1.5 && h < 2.5 {
				return math.NaN()
			}
			return math.Sin(h * math.Pi / 2) // crosses 0 at 2 h (inside the gap) and 4 h
		}
		got := ephem.FindCrossings(f, 0, t0.Add(30*time.Minute), t0.Add(5*time.Hour), 20*time.Minute)
		if len(got) != 1 || math.Abs(got[0].T.Sub(t0.Add(4*time.Hour)).Seconds()) > 0.1 || !got[0].Rising {
			t.Errorf("got %v, want only the rising crossing at +4 h", got)
		}
	})
}

// nightCase is a site and date with the Sun events expected to happen
// (true) or not (false), in NightEvents field order: sunset, civil,
// nautical, astronomical dusk, then the dawns in reverse.
type nightCase struct {
	name    string
	site    ephem.Site
	zone    string
	date    [3]int
	present [4]bool // sunset/sunrise, civil, nautical, astronomical
}

var nightCases = []nightCase{
	{"AmericasSpring", ephem.Site{LatDeg: 31.96, LonEastDeg: -111.6, ElevM: 2096}, "America/Phoenix", [3]int{2027, 3, 20}, [4]bool{true, true, true, true}},
	{"AndesWinter", ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}, "America/Santiago", [3]int{2027, 6, 21}, [4]bool{true, true, true, true}},
	{"AustraliaSummer", ephem.Site{LatDeg: -31.27, LonEastDeg: 149.06, ElevM: 1165}, "Australia/Sydney", [3]int{2027, 12, 21}, [4]bool{true, true, true, true}},
	{"PacificDST", ephem.Site{LatDeg: 19.82, LonEastDeg: -155.47, ElevM: 4200}, "Pacific/Honolulu", [3]int{2027, 11, 7}, [4]bool{true, true, true, true}},
	// 56°N at midsummer: the Sun's centre bottoms out near −10.6°.
	{"WhiteNight56N", ephem.Site{LatDeg: 56, LonEastDeg: 37.6}, "Europe/Moscow", [3]int{2027, 6, 21}, [4]bool{true, true, false, false}},
	// 69°N in mid-August: the Sun dips to about −5.4°: it sets but no twilight ends.
	{"Summer69N", ephem.Site{LatDeg: 69.65, LonEastDeg: 18.96}, "Europe/Oslo", [3]int{2027, 8, 10}, [4]bool{true, false, false, false}},
	// 69°N in June: midnight Sun, no event at all.
	{"PolarDay69N", ephem.Site{LatDeg: 69.65, LonEastDeg: 18.96}, "Europe/Oslo", [3]int{2027, 6, 21}, [4]bool{false, false, false, false}},
	// 78°N at midwinter: the Sun's centre peaks near −11.4°: only nautical
	// and astronomical twilight end and begin.
	{"PolarNight78N", ephem.Site{LatDeg: 78.2, LonEastDeg: 15.6}, "Arctic/Longyearbyen", [3]int{2027, 12, 21}, [4]bool{false, false, true, true}},
	// 75°S at midsummer (December): polar day.
	{"PolarDaySouth", ephem.Site{LatDeg: -75.1, LonEastDeg: 123.3, ElevM: 3233}, "UTC", [3]int{2027, 12, 20}, [4]bool{false, false, false, false}},
}

// TestNight checks which Sun events happen at a range of sites and seasons,
// and that those that do are in order, inside the window, and put the Sun's
// centre at their level.
func TestNight(t *testing.T) {
	levels := [4]float64{ephem.SunriseAltDeg, ephem.CivilTwilightAltDeg, ephem.NauticalTwilightAltDeg, ephem.AstronomicalTwilightAltDeg}
	names := [4]string{"sunset/sunrise", "civil", "nautical", "astronomical"}
	for _, tc := range nightCases {
		t.Run(tc.name, func(t *testing.T) {
			loc, err := time.LoadLocation(tc.zone)
			if err != nil {
				t.Skipf("zone %s not available: %v", tc.zone, err)
			}
			ev := ephem.Night(tc.site, tc.date[0], time.Month(tc.date[1]), tc.date[2], loc)
			wantStart := time.Date(tc.date[0], time.Month(tc.date[1]), tc.date[2], 12, 0, 0, 0, loc)
			if !ev.Start.Equal(wantStart) || !ev.End.Equal(wantStart.AddDate(0, 0, 1)) || ev.Start.Location() != time.UTC {
				t.Errorf("window %v – %v, want the local noons from %v (in UTC)", ev.Start, ev.End, wantStart)
			}
			dusk := [4]*time.Time{ev.Sunset, ev.CivilDusk, ev.NauticalDusk, ev.AstronomicalDusk}
			dawn := [4]*time.Time{ev.Sunrise, ev.CivilDawn, ev.NauticalDawn, ev.AstronomicalDawn}
			var order []time.Time // sunset … astronomical dusk, astronomical dawn … sunrise
			for i := range levels {
				for _, e := range []struct {
					what string
					at   *time.Time
				}{{"dusk", dusk[i]}, {"dawn", dawn[i]}} {
					if (e.at != nil) != tc.present[i] {
						t.Errorf("%s %s = %v, want present = %v", names[i], e.what, e.at, tc.present[i])
						continue
					}
					if e.at == nil {
						continue
					}
					if e.at.Before(ev.Start) || e.at.After(ev.End) {
						t.Errorf("%s %s %v outside the window", names[i], e.what, e.at)
					}
					if alt := tc.site.SunAltDeg(*e.at); math.Abs(alt-levels[i]) > 0.001 {
						t.Errorf("%s %s at %v: Sun at %.5f°, want %.4f°", names[i], e.what, e.at, alt, levels[i])
					}
				}
			}
			for i := 0; i < 4; i++ {
				if dusk[i] != nil {
					order = append(order, *dusk[i])
				}
			}
			for i := 3; i >= 0; i-- {
				if dawn[i] != nil {
					order = append(order, *dawn[i])
				}
			}
			for i := 1; i < len(order); i++ {
				if !order[i].After(order[i-1]) {
					t.Errorf("events out of order: %v", order)
				}
			}
			if !(ev.MoonIlluminated >= 0 && ev.MoonIlluminated <= 1) {
				t.Errorf("MoonIlluminated = %v", ev.MoonIlluminated)
			}
			for _, m := range []*time.Time{ev.Moonrise, ev.Moonset} {
				if m == nil {
					continue
				}
				limb := tc.site.MoonAltDeg(*m) + tc.site.MoonSemidiameterDeg(*m) + ephem.HorizonRefractionDeg
				if math.Abs(limb) > 0.001 {
					t.Errorf("Moon event at %v: upper limb at %.5f° on the refracted horizon, want 0", m, limb)
				}
			}
		})
	}
}

// TestNightAfternoonSunrise checks the rule for polar winter in a zone whose
// noon comes before the Sun's: at 68.8°S, 100.9°E on 1985 July 12 in UTC+8
// the Sun rises at about 13:02 local and sets 40 minutes later. The rising
// comes before the Sun's lowest point, so it is not this night's sunrise:
// Sunset is set and Sunrise is nil (the next sunrise is after the window).
func TestNightAfternoonSunrise(t *testing.T) {
	site := ephem.Site{LatDeg: -68.772931, LonEastDeg: 100.893854, ElevM: 1746.8}
	loc := time.FixedZone("UTC+8", 8*3600)
	ev := ephem.Night(site, 1985, time.July, 12, loc)
	if ev.Sunset == nil || ev.Sunrise != nil {
		t.Fatalf("sunset %v, sunrise %v; want a sunset and no sunrise", ev.Sunset, ev.Sunrise)
	}
	cs := site.SunCrossings(ephem.SunriseAltDeg, ev.Start, ev.End)
	if len(cs) != 2 || !cs[0].Rising || cs[1].Rising || !cs[1].T.Equal(*ev.Sunset) {
		t.Errorf("crossings %v: want the afternoon rising then the sunset %v", cs, ev.Sunset)
	}
}

// riseSetBook returns the rising and setting instants on UT day day0 by the
// book's method (Meeus ch. 15, meeus rise.Times) from apparent places at 0h TD
// on the days before, of and after, with standard altitude h0. The three
// right ascensions are made continuous first: rise.Times interpolates them
// as given, so a wrap through 0h between the days would spoil it.
func riseSetBook(tb testing.TB, site ephem.Site, day0 time.Time, place func(time.Time) (ra, dec float64), h0 unit.Angle) (rise1, set1 time.Time, ok bool) {
	tb.Helper()
	var ras []unit.RA
	var decs []unit.Angle
	dT := ephem.TTMinusUTC(day0)
	prev := math.NaN()
	for d := -1; d <= 1; d++ {
		tt := day0.AddDate(0, 0, d).Add(-time.Duration(dT * float64(time.Second)))
		a, dd := place(tt)
		if !math.IsNaN(prev) {
			a = prev + math.Remainder(a-prev, 360)
		}
		prev = a
		ras = append(ras, unit.RA(a*math.Pi/180)) // not wrapped to [0, 2π)
		decs = append(decs, unit.AngleFromDeg(dd))
	}
	p := globe.Coord{Lat: unit.AngleFromDeg(site.LatDeg), Lon: unit.AngleFromDeg(-site.LonEastDeg)}
	th0 := sidereal.Apparent0UT(ephem.JDUTC(day0).Float())
	tr, _, ts, err := rise.Times(p, unit.Time(dT), h0, th0, ras, decs)
	if err != nil {
		return time.Time{}, time.Time{}, false
	}
	return day0.Add(time.Duration(tr.Sec() * float64(time.Second))), day0.Add(time.Duration(ts.Sec() * float64(time.Second))), true
}

// closest returns the crossing in cs, in direction rising, nearest to t.
func closest(cs []ephem.Crossing, rising bool, t time.Time) (time.Duration, bool) {
	best, found := time.Duration(math.MaxInt64), false
	for _, c := range cs {
		if c.Rising != rising {
			continue
		}
		d := c.T.Sub(t)
		if d < 0 {
			d = -d
		}
		if d < best {
			best, found = d, true
		}
	}
	return best, found
}

// TestSunRiseSetMatchesBookMethod compares sunrise and sunset found by
// bracketing with the book's interpolation method (Meeus ch. 15, meeus
// rise.Times) at sites north and south, east and west, over half a year:
// within 5 s (the methods differ in interpolation, and the book's Sun is
// geocentric).
func TestSunRiseSetMatchesBookMethod(t *testing.T) {
	sites := []ephem.Site{
		{LatDeg: 31.96, LonEastDeg: -111.6},
		{LatDeg: -30.24, LonEastDeg: -70.74},
		{LatDeg: -31.27, LonEastDeg: 149.06},
		{LatDeg: 47.3, LonEastDeg: 11.4},
	}
	sunPlace := func(tm time.Time) (float64, float64) { ra, dec, _ := ephem.SunApparent(tm); return ra, dec }
	var worst time.Duration
	for i, site := range sites {
		for d := 0; d < 180; d += 9 {
			day0 := time.Date(2027, time.January, 5+d+i, 0, 0, 0, 0, time.UTC)
			r, s, ok := riseSetBook(t, site, day0, sunPlace, unit.AngleFromDeg(ephem.SunriseAltDeg))
			if !ok {
				t.Fatalf("%+v %v: no sunrise by the book", site, day0)
			}
			cs := site.SunCrossings(ephem.SunriseAltDeg, day0.Add(-2*time.Hour), day0.Add(26*time.Hour))
			for _, e := range []struct {
				t      time.Time
				rising bool
			}{{r, true}, {s, false}} {
				dd, found := closest(cs, e.rising, e.t)
				if !found || dd > 5*time.Second {
					t.Errorf("%+v %v: Sun rising=%v by the book at %v, nearest crossing %v away", site, day0, e.rising, e.t, dd)
				}
				worst = max(worst, dd)
			}
		}
	}
	t.Logf("sunrise and sunset vs meeus rise.Times: worst %v", worst)
}

// TestMoonRiseSetMatchesBookMethod compares moonrise and moonset (upper
// limb on the refracted horizon, topocentric) with the book's standard
// altitude for the Moon applied to its GEOCENTRIC altitude, h0 = 0.7275π −
// 0°34′ (Meeus ch. 15, meeus rise.Stdh0Lunar), which stands in for the
// parallax and the semidiameter. The two definitions differ by the site's
// distance from the Earth's centre (ρ < 1 by up to 0.3%) and higher-order
// terms: within 20 s. (meeus rise.Times itself applies the book's
// correction once, which for the Moon leaves errors of several minutes.)
func TestMoonRiseSetMatchesBookMethod(t *testing.T) {
	sites := []ephem.Site{
		{LatDeg: 31.96, LonEastDeg: -111.6, ElevM: 2096},
		{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700},
		{LatDeg: -31.27, LonEastDeg: 149.06},
		{LatDeg: 60.2, LonEastDeg: 24.9},
	}
	var worst time.Duration
	n := 0
	for i, site := range sites {
		from := time.Date(2027, time.February, 3+7*i, 0, 0, 0, 0, time.UTC)
		to := from.AddDate(0, 0, 30)
		book := ephem.FindCrossings(func(tm time.Time) float64 {
			ra, dec, dist := ephem.MoonGeocentric(tm)
			return site.Horizontal(ra, dec, tm).AltDeg - rise.Stdh0Lunar(moonposition.Parallax(dist)).Deg()
		}, 0, from, to, 10*time.Minute)
		ours := site.MoonCrossings(from, to)
		if len(book) != len(ours) {
			t.Fatalf("%+v: %d crossings by the book's h0, %d ours", site, len(book), len(ours))
		}
		for k := range book {
			d := ours[k].T.Sub(book[k].T)
			if d < 0 {
				d = -d
			}
			worst = max(worst, d)
			n++
			if ours[k].Rising != book[k].Rising || d > 20*time.Second {
				t.Errorf("%+v: ours %v, book's h0 %v", site, ours[k], book[k])
			}
		}
	}
	t.Logf("moonrise and moonset vs the book's lunar h0 on the geocentric altitude: %d events, worst %v", n, worst)
}

// BenchmarkNightEvents measures Night: the Sun's four levels both ways and
// the Moon's rise and set over one noon-to-noon window.
func BenchmarkNightEvents(b *testing.B) {
	site := ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}
	loc := time.FixedZone("UTC-4", -4*3600)
	for b.Loop() {
		ephem.Night(site, 2027, time.March, 14, loc)
	}
}

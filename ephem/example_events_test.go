package ephem_test

import (
	"fmt"
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/interp"

	"phasecast/ephem"
)

// Meeus, Astronomical Algorithms (2nd ed.), Example 15.a, p. 103.
// Rising and setting of Venus at Boston (φ = +42°20′, L = 71°05′ WEST) on
// 1988 March 20, from its apparent places at 0h TD on March 19, 20 and 21
// (interpolated as in the book, Meeus (3.3)), with the standard altitude
// h0 = −0°34′ = −0.5667°. The book: rising 12h25m UT, transit 19h41m UT,
// setting 2h55m UT (the setting that ends March 19 local evening); its
// interpolation method, as meeus rise.Times, gives 12h25m26s, 19h40m30s and
// 2h54m40s.
//
// FindCrossings samples the altitude every 10 minutes over the UT day and
// refines each crossing; it lands within 0.6 s of the book's method (which
// takes ΔT = 56 s against 56.184 s here and sidereal time as linear from Θ0
// at 0h). The transit is where sin H crosses 0 upward (H, the hour angle,
// going from east to west of the meridian).
func ExampleFindCrossings() {
	site := ephem.Site{LatDeg: 42 + 20.0/60, LonEastDeg: -(71 + 5.0/60)}
	ra := []float64{ // α of Venus at 0h TD, March 19, 20, 21, degrees
		(2 + 42.0/60 + 43.25/3600) * 15,
		(2 + 46.0/60 + 55.51/3600) * 15,
		(2 + 51.0/60 + 7.69/3600) * 15,
	}
	dec := []float64{
		18 + 2.0/60 + 51.4/3600,
		18 + 26.0/60 + 27.3/3600,
		18 + 49.0/60 + 38.7/3600,
	}
	ra3, _ := interp.NewLen3(-1, 1, ra)
	dec3, _ := interp.NewLen3(-1, 1, dec)
	day0 := ephem.JDFromCalendar(1988, 3, 20) // 0h TD
	venus := func(t time.Time) ephem.Horizontal {
		n := ephem.JDTT(t).Float() - day0
		return site.Horizontal(ra3.InterpolateX(n), dec3.InterpolateX(n), t)
	}
	alt := func(t time.Time) float64 { return venus(t).AltDeg }
	sinH := func(t time.Time) float64 { return math.Sin(venus(t).HourAngleHours * math.Pi / 12) }

	from := time.Date(1988, time.March, 20, 0, 0, 0, 0, time.UTC)
	to := from.Add(24 * time.Hour)
	for _, c := range ephem.FindCrossings(alt, -0.5667, from, to, 10*time.Minute) {
		what := "setting"
		if c.Rising {
			what = "rising "
		}
		fmt.Println(what, c.T.Format("15:04:05.0"))
	}
	for _, c := range ephem.FindCrossings(sinH, 0, from, to, 10*time.Minute) {
		if c.Rising {
			fmt.Println("transit", c.T.Format("15:04:05.0"))
		}
	}
	// Output:
	// setting 02:54:39.9
	// rising  12:25:25.5
	// transit 19:40:30.4
}

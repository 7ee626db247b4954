package ephem_test

import (
	"fmt"
	"math"
	"time"

	"phasecast/ephem"
)

// fromTT returns the UTC instant whose TT reading is the given calendar time
// (the book's examples are in dynamical time, TD ≈ TT).
func fromTT(year int, month time.Month, day, hour, min int, sec float64) time.Time {
	tt := time.Date(year, month, day, hour, min, 0, 0, time.UTC).
		Add(time.Duration(sec * float64(time.Second)))
	return tt.Add(-time.Duration(ephem.TTMinusUTC(tt) * float64(time.Second)))
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 23.a, p. 152.
// Apparent place of θ Persei on 2028 November 13.19 TD from its J2000.0
// catalogue place α = 2h44m11.986s, δ = +49°13′42.48″ and proper motion
// μα = +0.03425 s/yr, μδ = −0.0895″/yr. The book: α = 2h46m14.390s,
// δ = +49°21′07.45″.
//
// We get α 0.002s (0.02″ on the sky) larger; δ agrees. The book applies the first-order
// corrections of the classical aberration formula (23.3) and of nutation
// (23.1); ApparentPlace applies the Earth's barycentric velocity of Ron &
// Vondrák (also Meeus ch. 23) as a relativistic rotation and nutation
// rigorously, which differ by that much.
func ExampleApparentPlace() {
	dec0 := 49 + 13.0/60 + 42.48/3600
	st := ephem.Star{
		RADeg:      (2 + 44.0/60 + 11.986/3600) * 15,
		DecDeg:     dec0,
		PMRAmasyr:  0.03425 * 15 * 1000 * math.Cos(dec0*math.Pi/180), // μα·cos δ
		PMDecmasyr: -89.5,
	}
	t := fromTT(2028, time.November, 13, 4, 33, 36) // 13.19 d
	ra, dec := ephem.ApparentPlace(st, t)
	fmt.Println("α =", hms(ra/15, 3))
	fmt.Println("δ =", dms(dec, 2))
	// Output:
	// α = 02h46m14.392s
	// δ = +49°21′07.45″
}

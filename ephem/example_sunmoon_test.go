package ephem_test

import (
	"fmt"
	"time"

	"phasecast/ephem"
)

// Meeus, Astronomical Algorithms (2nd ed.), Example 25.a, p. 165.
// The Sun on 1992 October 13.0 TD, low-accuracy method: apparent
// α = 13h13m31.4s, δ = −7°47′06″, radius vector R = 0.99766 AU.
func ExampleSunApparent() {
	ra, dec, r := ephem.SunApparent(fromTT(1992, time.October, 13, 0, 0, 0))
	fmt.Println("α =", hms(ra/15, 1))
	fmt.Println("δ =", dms(dec, 0))
	fmt.Printf("R = %.5f AU\n", r)
	// Output:
	// α = 13h13m31.4s
	// δ = -07°47′06″
	// R = 0.99766 AU
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 47.a, p. 342.
// The Moon on 1992 April 12 at 0h TD: apparent α = 134.688470°,
// δ = +13.768368°, distance between centres Δ = 368409.7 km.
//
// We get both angles 0.000001° (0.004″) smaller: the book rounds the
// nutation (Δψ = 0.004610°) and the obliquity (ε = 23.440636°) before
// converting; MoonGeocentric keeps full precision.
func ExampleMoonGeocentric() {
	ra, dec, dist := ephem.MoonGeocentric(fromTT(1992, time.April, 12, 0, 0, 0))
	fmt.Printf("α = %.6f°\n", ra)
	fmt.Printf("δ = %+.6f°\n", dec)
	fmt.Printf("Δ = %.1f km\n", dist)
	// Output:
	// α = 134.688469°
	// δ = +13.768367°
	// Δ = 368409.7 km
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 48.a, p. 347.
// Illuminated fraction of the Moon's disk on 1992 April 12 at 0h TD:
// k = 0.6786.
func ExampleMoonIlluminated() {
	k := ephem.MoonIlluminated(fromTT(1992, time.April, 12, 0, 0, 0))
	fmt.Printf("k = %.4f\n", k)
	// Output:
	// k = 0.6786
}

package ephem_test

import (
	"fmt"
	"math"
	"time"

	"phasecast/ephem"
)

// hms formats hours as "13h10m46.3668s" with the given decimals of seconds.
func hms(hours float64, dec int) string {
	h := math.Floor(hours)
	m := math.Floor((hours - h) * 60)
	s := ((hours-h)*60 - m) * 60
	if math.Round(s*math.Pow10(dec)) >= 60*math.Pow10(dec) { // carry
		s -= 60
		m++
	}
	if m >= 60 {
		m -= 60
		h++
	}
	w := dec + 3
	if dec == 0 {
		w = 2
	}
	return fmt.Sprintf("%02.0fh%02.0fm%0*.*fs", h, m, w, dec, s)
}

// dms formats degrees as "+49°21′07.45″" with the given decimals of seconds.
func dms(deg float64, dec int) string {
	sign := "+"
	if deg < 0 {
		sign = "-"
		deg = -deg
	}
	d := math.Floor(deg)
	m := math.Floor((deg - d) * 60)
	s := ((deg-d)*60 - m) * 60
	if math.Round(s*math.Pow10(dec)) >= 60*math.Pow10(dec) {
		s -= 60
		m++
	}
	if m >= 60 {
		m -= 60
		d++
	}
	w := dec + 3
	if dec == 0 {
		w = 2
	}
	return fmt.Sprintf("%s%02.0f°%02.0f′%0*.*f″", sign, d, m, w, dec, s)
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 7.a, p. 61.
// The launch of Sputnik 1, 1957 October 4.81 (UT), is JD 2436116.31.
func ExampleJDUTC() {
	t := time.Date(1957, time.October, 4, 19, 26, 24, 0, time.UTC) // 0.81 day
	fmt.Printf("JD %.2f\n", ephem.JDUTC(t).Float())
	fmt.Printf("JD %.2f\n", ephem.JDFromCalendar(1957, 10, 4.81))
	// Output:
	// JD 2436116.31
	// JD 2436116.31
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 12.a, p. 88.
// Sidereal time at Greenwich on 1987 April 10 at 0h UT: mean 13h10m46.3668s,
// apparent 13h10m46.1351s.
func ExampleGMSTHours() {
	t := time.Date(1987, time.April, 10, 0, 0, 0, 0, time.UTC)
	fmt.Println("mean    ", hms(ephem.GMSTHours(t), 4))
	fmt.Println("apparent", hms(ephem.GASTHours(t), 4))
	// Output:
	// mean     13h10m46.3668s
	// apparent 13h10m46.1351s
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 12.b, p. 89, and
// Example 13.b, p. 95. Example 12.b is the mean sidereal time at Greenwich on
// 1987 April 10 at 19h21m00s UT, 8h34m57.0896s; the apparent sidereal time at
// that instant, 8h34m56.853s, is the θ0 Example 13.b takes (the mean value
// corrected by the equation of the equinoxes, Δψ cos ε of Example 22.a).
func ExampleGASTHours() {
	t := time.Date(1987, time.April, 10, 19, 21, 0, 0, time.UTC)
	fmt.Println("mean    ", hms(ephem.GMSTHours(t), 4))
	fmt.Println("apparent", hms(ephem.GASTHours(t), 3))
	// Output:
	// mean     08h34m57.0896s
	// apparent 08h34m56.853s
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 22.a, p. 148.
// Nutation on 1987 April 10 at 0h TD (JDE 2446895.5): Δψ = −3.788″,
// Δε = +9.443″, true obliquity ε = 23°26′36.850″.
func ExampleNutation() {
	dPsi, dEps, eps := ephem.Nutation(2446895.5)
	fmt.Printf("Δψ = %+.3f″\n", dPsi)
	fmt.Printf("Δε = %+.3f″\n", dEps)
	fmt.Printf("ε  = %s\n", dms(eps, 3))
	// Output:
	// Δψ = -3.788″
	// Δε = +9.443″
	// ε  = +23°26′36.850″
}

// Meeus, Astronomical Algorithms (2nd ed.), Example 13.b, p. 95.
// Venus seen from the U.S. Naval Observatory in Washington (φ = +38°55′17″,
// L = 77°03′56″ WEST, i.e. −77.0656° east) on 1987 April 10 at 19h21m00s UT,
// at apparent α = 23h09m16.641s, δ = −6°43′11.61″. The book gives azimuth
// A = 68.0337° measured from the SOUTH (248.0337° from north) and altitude
// h = 15.1249°.
//
// We get 68.0336° and 15.1250°. Formulas (13.5), (13.6) evaluated directly on
// the book's own inputs and its θ0 = 8h34m56.853s give 68.033596° and
// 15.124974° (meeus coord.EqToHz agrees), so the last-digit difference comes
// from the book's rounding of intermediate values. The diurnal aberration
// that Site.Horizontal adds moves A and h here by less than 0.00003°.
func ExampleSite_Horizontal() {
	site := ephem.Site{
		LatDeg:     38 + 55.0/60 + 17.0/3600,
		LonEastDeg: -(77 + 3.0/60 + 56.0/3600),
	}
	ra := (23 + 9.0/60 + 16.641/3600) * 15
	dec := -(6 + 43.0/60 + 11.61/3600)
	t := time.Date(1987, time.April, 10, 19, 21, 0, 0, time.UTC)
	hz := site.Horizontal(ra, dec, t)
	fmt.Printf("H = %.4f°\n", hz.HourAngleHours*15)
	fmt.Printf("A = %.4f° from north, %.4f° from south\n", hz.AzDeg, hz.AzDeg-180)
	fmt.Printf("h = %.4f°\n", hz.AltDeg)
	// Output:
	// H = 64.3520°
	// A = 248.0336° from north, 68.0336° from south
	// h = 15.1250°
}

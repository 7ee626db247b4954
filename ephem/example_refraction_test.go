package ephem_test

import (
	"fmt"

	"phasecast/ephem"
)

// Meeus, Astronomical Algorithms (2nd ed.), Example 16.a, p. 107.
// The Sun's lower limb is observed at apparent altitude 0°30′. Bennett's
// formula gives the refraction R = 28.754′, so the true altitude of the lower
// limb is 1.246′ and that of the upper limb (adding the Sun's 32′ diameter)
// 33.246′, for which Saemundsson's formula gives R = 24.618′.
func ExampleRefractionDeg() {
	const p, t = ephem.StandardPressureHPa, ephem.StandardTempC
	r1 := ephem.RefractionFromApparentDeg(0.5, p, t)
	lower := 0.5 - r1
	upper := lower + 32.0/60
	r2 := ephem.RefractionDeg(upper, p, t)
	fmt.Printf("R = %.3f′\n", r1*60)
	fmt.Printf("lower limb true altitude %.3f′\n", lower*60)
	fmt.Printf("upper limb true altitude %.3f′\n", upper*60)
	fmt.Printf("R = %.3f′\n", r2*60)
	// Output:
	// R = 28.754′
	// lower limb true altitude 1.246′
	// upper limb true altitude 33.246′
	// R = 24.618′
}

// Kasten & Young (1989), Applied Optics 28, 4735, eq. 3: airmass at a few
// apparent altitudes. At the zenith the formula gives 0.9997 (1 by
// definition); at 30° 1.994, a little under the plane-parallel sec z = 2; on
// the horizon 37.92, against 38.0868 in their table (from memory).
func ExampleAirmass() {
	for _, h := range []float64{90, 60, 30, 10, 0, -1} {
		x, ok := ephem.Airmass(h)
		fmt.Printf("h = %3.0f°  X = %7.4f  ok = %v\n", h, x, ok)
	}
	// Output:
	// h =  90°  X =  0.9997  ok = true
	// h =  60°  X =  1.1540  ok = true
	// h =  30°  X =  1.9943  ok = true
	// h =  10°  X =  5.5860  ok = true
	// h =   0°  X = 37.9196  ok = true
	// h =  -1°  X =  0.0000  ok = false
}

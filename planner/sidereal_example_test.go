package planner_test

import (
	"fmt"
	"time"

	"phasecast/planner"
)

// Meeus, Astronomical Algorithms, Example 12.a: apparent sidereal time at
// Greenwich on 1987 April 10 at 0h UT is 13h10m46.1351s; 15° east it is an
// hour later.
func ExampleLocalSiderealHours() {
	t := time.Date(1987, 4, 10, 0, 0, 0, 0, time.UTC)
	for _, lon := range []float64{0, 15} {
		h := planner.LocalSiderealHours(planner.Site{LatDeg: 51.5, LonEastDeg: lon}, t)
		s := h * 3600
		fmt.Printf("%+03.0f°: %dh%02dm%07.4fs %s\n", lon, int(s/3600), int(s/60)%60, s-float64(int(s/60)*60), planner.FormatHours(h))
	}
	// Output:
	// +00°: 13h10m46.1351s 13:11
	// +15°: 14h10m46.1351s 14:11
}

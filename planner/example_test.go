package planner_test

import (
	"fmt"

	"phasecast/planner"
)

// Invented dome-slit mask; values by linear interpolation in azimuth,
// checked by hand: 135° is halfway from 20° (at 90°) to 5° (at 180°); 10° is
// a fifth of the way across north from 10° (at 350°) to 20° (at 90°).
func ExampleHorizonAltDeg() {
	mask := []planner.HorizonPoint{{AzDeg: 350, AltDeg: 10}, {AzDeg: 90, AltDeg: 20}, {AzDeg: 180, AltDeg: 5}}
	for _, az := range []float64{90, 135, 10, 265} {
		alt, err := planner.HorizonAltDeg(mask, az)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("az %5.1f°: min altitude %5.2f°\n", az, alt)
	}
	// Output:
	// az  90.0°: min altitude 20.00°
	// az 135.0°: min altitude 12.50°
	// az  10.0°: min altitude 12.00°
	// az 265.0°: min altitude  7.50°
}

// The objective's priority weights, w(p) = 3^(5−p) (this package's own
// definition, see the notes in schedule.go).
func ExamplePriorityWeight() {
	for p := 1; p <= 5; p++ {
		fmt.Printf("priority %d: weight %d\n", p, planner.PriorityWeight(p))
	}
	// Output:
	// priority 1: weight 81
	// priority 2: weight 27
	// priority 3: weight 9
	// priority 4: weight 3
	// priority 5: weight 1
}

package ephem_test

import (
	"fmt"
	"time"

	"phasecast/ephem"
)

// Reference values computed with astropy 5.2.1 (pyerfa 2.0.0.1, built-in
// ERFA epv00 ephemeris, offline, UT1 = UTC) for this invented site and target:
// barycentric delay 280.1925 s, heliocentric 281.0798 s,
// BJD_TDB 2461113.64640484, HJD_UTC 2461113.64561435.
func ExampleBarycentricTimes() {
	site := ephem.Site{LatDeg: 12.345, LonEastDeg: 45.678, ElevM: 1234}
	star := ephem.Star{RADeg: 123.456, DecDeg: -23.456}
	at := time.Date(2026, 3, 14, 3, 25, 0, 0, time.UTC)
	b, err := ephem.BarycentricTimes(site, star, at)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("JD_UTC  %s\n", ephem.FormatEpoch(b.JDUTC, ephem.FormJD, 6))
	fmt.Printf("BJD_TDB %s (delay %.1f s)\n", ephem.FormatEpoch(b.BJDTDB, ephem.FormJD, 6), b.BaryDelayS)
	fmt.Printf("HJD_UTC %s (delay %.1f s)\n", ephem.FormatEpoch(b.HJDUTC, ephem.FormJD, 6), b.HelioDelayS)
	// Output:
	// JD_UTC  2461113.642361
	// BJD_TDB 2461113.646405 (delay 280.2 s)
	// HJD_UTC 2461113.645614 (delay 281.1 s)
}

// The modified Julian date is JD − 2400000.5 (IAU 1973, from memory) and the
// reduced Julian date JD − 2400000 (common practice): one epoch written
// three ways parses to the same two-part Julian date, every digit kept.
func ExampleParseEpoch() {
	for _, in := range []struct {
		text string
		form ephem.EpochForm
	}{
		{"2460123.456789012345", ephem.FormJD},
		{"60122.956789012345", ephem.FormMJD},
		{"60123.456789012345", ephem.FormRJD},
	} {
		v, err := ephem.ParseEpoch(in.text, ephem.StdBJDTDB, in.form)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-4s %s → JD %s\n", in.form, in.text, ephem.FormatEpoch(v, ephem.FormJD, 12))
	}
	_, err := ephem.ParseEpoch("2460123.4567", "", ephem.FormJD)
	fmt.Println(err)
	// Output:
	// JD   2460123.456789012345 → JD 2460123.456789012345
	// MJD  60122.956789012345 → JD 2460123.456789012345
	// RJD  60123.456789012345 → JD 2460123.456789012345
	// standard: "(missing)" is not accepted; accepted: one of JD_UTC, HJD_UTC, HJD_TT, BJD_UTC, BJD_TDB; an epoch is never taken without its time standard
}

// The circular-orbit geometry derived in events_orbit.go from the
// spectroscopic-binary relation v₁ = K₁[cos(ν+ω) + e cos ω] (Hilditch, An
// Introduction to Close Binary Stars, 2001, ch. 2): counted from the
// primary's ascending node (the pulsar-timing convention), the companion
// passes in front at phase 0.25, recedes fastest at 0.5 and passes behind at
// 0.75; a 9-minute eclipse spans 540 s / 5400 s = 0.1 of the orbit about
// phase 0.25. An invented binary with a 90-minute orbit.
func ExampleEphemeris_EventPhase() {
	e := ephem.Ephemeris{
		T0:         ephem.JD2{Day: 2460000.5, Frac: 0.125},
		PeriodDays: 0.0625,
		Convention: ephem.ConvAscendingNode,
	}
	for _, ev := range []ephem.Event{ephem.EventMaxApproach, ephem.EventInferiorConjunction,
		ephem.EventMaxRecession, ephem.EventSuperiorConjunction, ephem.EventEclipseIngress, ephem.EventEclipseEgress} {
		ph, err := e.EventPhase(ev, ephem.SecondsToDays(540)) // a 9-minute eclipse
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-22s %.4f\n", ev, ph)
	}
	// Output:
	// max_approach           0.0000
	// inferior_conjunction   0.2500
	// max_recession          0.5000
	// superior_conjunction   0.7500
	// eclipse_ingress        0.2000
	// eclipse_egress         0.3000
}

// Invented timings of an invented eclipsing binary, generated from
// T0 = 2459000.3000 BJD_TDB, P = 0.0812345 d with no noise: the fit returns
// that ephemeris, its T0 moved to the whole cycle nearest the timings'
// (equally weighted) mean cycle, 5180/6 ≈ 863: 2459000.3 + 863 × 0.0812345 =
// 2459070.4053735.
func ExampleFitEphemeris() {
	truth := ephem.Ephemeris{T0: ephem.JD2{Day: 2458999.5, Frac: 0.8}, PeriodDays: 0.0812345, Convention: ephem.ConvInferiorConjunction}
	var timings []ephem.Timing
	for _, c := range []int64{0, 37, 420, 1013, 1500, 2210} {
		timings = append(timings, ephem.Timing{Value: truth.TimeAt(c, 0), Std: ephem.StdBJDTDB, ErrDays: 0.0001})
	}
	guess := truth
	guess.PeriodDays += 3e-7
	guess.PeriodErr = 1e-6
	res, err := ephem.FitEphemeris(timings, guess, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("T0 = %s ± %.5f BJD_TDB (cycle %d)\n", ephem.FormatEpoch(res.Ephem.T0, ephem.FormJD, 5), res.Ephem.T0ErrDays, res.CycleShift)
	fmt.Printf("P  = %.8f ± %.8f d\n", res.Ephem.PeriodDays, res.Ephem.PeriodErr)
	fmt.Printf("χ² = %.3f for %d degrees of freedom\n", res.ChiSq, len(timings)-2)
	// Output:
	// T0 = 2459070.40537 ± 0.00004 BJD_TDB (cycle 863)
	// P  = 0.08123450 ± 0.00000005 d
	// χ² = 0.000 for 4 degrees of freedom
}

// A 5-minute exposure of an invented 85-minute binary smears over 5/85 of
// the orbit (exposure over period: the definition).
func ExamplePhaseSmear() {
	e := ephem.Ephemeris{T0: ephem.JD2{Day: 2460000.5}, PeriodDays: 85.0 / 1440, Convention: ephem.ConvInferiorConjunction}
	fmt.Printf("%.4f\n", ephem.PhaseSmear(300, e))
	// Output:
	// 0.0588
}

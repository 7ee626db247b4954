package planner

import (
	"math/rand/v2"
	"testing"

	"phasecast/ephem"
)

// BenchmarkRVPredict predicts σK for 1000 exposures of an eccentric orbit,
// half of them smeared over 0.05 in phase (the Gauss–Legendre path).
func BenchmarkRVPredict(b *testing.B) {
	e := ephem.Ephemeris{T0: ephem.JD2{Day: 2461000, Frac: 0.25}, PeriodDays: 0.37, Convention: ephem.ConvInferiorConjunction, Ecc: 0.4, OmegaDeg: 30}
	c, err := NewRVCurve(RVGoal{Model: RVEccentric, KKms: 50, SigmaVKms: 2}, e)
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 1))
	xs := make([]RVExposure, 1000)
	for i := range xs {
		xs[i] = RVExposure{Phase: rng.Float64(), Smear: 0.05 * float64(i%2)}
	}
	b.ReportAllocs()
	for b.Loop() {
		if p := c.Predict(xs, 0.01); !p.Determined {
			b.Fatal("not determined")
		}
	}
}

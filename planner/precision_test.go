package planner

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"phasecast/ephem"
)

// testEphem is a circular orbit in the inferior-conjunction convention.
func testEphem(t *testing.T) ephem.Ephemeris {
	t.Helper()
	return ephem.Ephemeris{T0: ephem.JD2{Day: 2461000, Frac: 0.25}, PeriodDays: 0.37, Convention: ephem.ConvInferiorConjunction}
}

func testCurve(t *testing.T, g RVGoal, e ephem.Ephemeris) RVCurve {
	t.Helper()
	c, err := NewRVCurve(g, e)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func within(t *testing.T, name string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.6g, want %.6g (relative tolerance %g)", name, got, want, rel)
	}
}

// TestRVClosedForms checks the Fisher-matrix errors against closed forms.
//
// Circular orbit, v = γ + K s(φ), s = sin 2π(φ − φ0), equal errors σv, phase
// known (parameters γ, K): F = (1/σv²)·[[N, Σs], [Σs, Σs²]].
//
//   - N exposures split equally between the quadratures (s = +1, −1):
//     Σs = 0, Σs² = N, so F is diagonal and σK² = σv²/N: σK = σv/√N.
//   - N exposures spread uniformly in phase (φᵢ = i/N, N ≥ 3): Σs = 0 and
//     Σs² = N/2 (the mean of sin² over whole cycles), so σK = σv·√(2/N).
//     With the phase free the third derivative −2πK cos 2π(φ − φ0) is
//     orthogonal to 1 and s over such a grid, so σK is unchanged and
//     σδ = σv/(2πK·√(N/2)).
//   - Exposures of length Δ in phase at the quadratures measure the mean
//     ⟨s⟩ = ±sin(πΔ)/(πΔ), so σK = σv/(√N·sin(πΔ)/(πΔ)).
func TestRVClosedForms(t *testing.T) {
	e := testEphem(t)
	const K, sv = 80.0, 3.0
	c := testCurve(t, RVGoal{Model: RVCircular, KKms: K, SigmaVKms: sv}, e)
	if got := c.Phase0; math.Abs(got-0.5) > 1e-12 {
		t.Fatalf("φ0 = %v, want 0.5 in the inferior-conjunction convention", got)
	}
	quad := func(n int, smear float64) []RVExposure {
		var xs []RVExposure
		for i := range n {
			xs = append(xs, RVExposure{Phase: c.Phase0 + 0.25 + 0.5*float64(i%2), Smear: smear})
		}
		return xs
	}
	t.Run("Quadratures", func(t *testing.T) {
		for _, n := range []int{2, 10, 40} {
			p := c.Predict(quad(n, 0), 0)
			if !p.Determined {
				t.Fatalf("N=%d: not determined", n)
			}
			within(t, "σK", p.SigmaK, sv/math.Sqrt(float64(n)), 1e-12)
			within(t, "σγ", p.SigmaGamma, sv/math.Sqrt(float64(n)), 1e-12)
		}
	})
	t.Run("Uniform", func(t *testing.T) {
		for _, n := range []int{3, 12, 50} {
			var xs []RVExposure
			for i := range n {
				xs = append(xs, RVExposure{Phase: float64(i) / float64(n)})
			}
			p := c.Predict(xs, 0)
			within(t, "σK (phase known)", p.SigmaK, sv*math.Sqrt(2/float64(n)), 1e-9)
			q := c.Predict(xs, math.Inf(1))
			within(t, "σK (phase free)", q.SigmaK, sv*math.Sqrt(2/float64(n)), 1e-9)
			within(t, "σφ0", q.SigmaPhase0, sv/(2*math.Pi*K*math.Sqrt(float64(n)/2)), 1e-9)
		}
	})
	t.Run("Smear", func(t *testing.T) {
		for _, d := range []float64{0.01, 0.1, 0.3} {
			p := c.Predict(quad(20, d), 0)
			within(t, "σK", p.SigmaK, sv/math.Sqrt(20)*math.Pi*d/math.Sin(math.Pi*d), 1e-12)
		}
	})
	t.Run("EccentricZeroMatchesCircular", func(t *testing.T) {
		// The eccentric curve at e = 0 is the circular one, and its smear
		// is integrated numerically (Gauss–Legendre): it must agree with
		// the closed form.
		ce := testCurve(t, RVGoal{Model: RVEccentric, KKms: K, SigmaVKms: sv}, e)
		rng := rand.New(rand.NewPCG(1, 2))
		var xs []RVExposure
		for range 25 {
			xs = append(xs, RVExposure{Phase: rng.Float64(), Smear: 0.15 * rng.Float64()})
		}
		for _, ps := range []float64{0, 0.01, math.Inf(1)} {
			a, b := c.Predict(xs, ps), ce.Predict(xs, ps)
			within(t, "σK", b.SigmaK, a.SigmaK, 1e-9)
			within(t, "σγ", b.SigmaGamma, a.SigmaGamma, 1e-9)
			if ps != 0 {
				within(t, "σφ0", b.SigmaPhase0, a.SigmaPhase0, 1e-9)
			}
		}
	})
	t.Run("Undetermined", func(t *testing.T) {
		if p := c.Predict(quad(1, 0), 0); p.Determined {
			t.Errorf("one exposure determines (γ, K): %+v", p)
		}
		// Only quadratures, phase free and no prior: δ has no information.
		if p := c.Predict(quad(10, 0), math.Inf(1)); p.Determined {
			t.Errorf("quadratures alone determine the phase: %+v", p)
		}
	})
}

// TestRVShapeSlope checks ephem.RVShape's slope against a central difference
// and its e = 0 form.
func TestRVShapeSlope(t *testing.T) {
	for _, ecc := range []float64{0, 0.3, 0.8} {
		for _, m := range []float64{0.01, 0.3, 0.77} {
			g, d, err := ephem.RVShape(ecc, 40, m)
			if err != nil {
				t.Fatal(err)
			}
			h := 1e-6
			g1, _, _ := ephem.RVShape(ecc, 40, m+h)
			g0, _, _ := ephem.RVShape(ecc, 40, m-h)
			within(t, "slope", d, (g1-g0)/(2*h), 1e-6)
			if ecc == 0 {
				within(t, "g", g, math.Cos(2*math.Pi*m+40*math.Pi/180), 1e-12)
			}
		}
	}
}

func TestGaussLegendre(t *testing.T) {
	// An n-point rule integrates polynomials up to degree 2n − 1 exactly:
	// ∫₋₁¹ x^k dx = 2/(k+1) for even k, 0 for odd.
	for k := 0; k <= 15; k++ {
		var s float64
		for i, x := range glNodes {
			s += glWeights[i] * math.Pow(x, float64(k))
		}
		want := 0.0
		if k%2 == 0 {
			want = 2 / float64(k+1)
		}
		if math.Abs(s-want) > 1e-14 {
			t.Errorf("∫x^%d = %.16g, want %.16g", k, s, want)
		}
	}
}

// solveNormal solves the n×n normal equations A·x = b by Gaussian
// elimination with partial pivoting (the test's own least squares).
func solveNormal(A [][]float64, b []float64) []float64 {
	n := len(b)
	for i := range n {
		p := i
		for r := i + 1; r < n; r++ {
			if math.Abs(A[r][i]) > math.Abs(A[p][i]) {
				p = r
			}
		}
		A[i], A[p] = A[p], A[i]
		b[i], b[p] = b[p], b[i]
		for r := i + 1; r < n; r++ {
			f := A[r][i] / A[i][i]
			for c := i; c < n; c++ {
				A[r][c] -= f * A[i][c]
			}
			b[r] -= f * b[i]
		}
	}
	x := make([]float64, n)
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for c := i + 1; c < n; c++ {
			s -= A[i][c] * x[c]
		}
		x[i] = s / A[i][i]
	}
	return x
}

// lsq fits y = Σ_k p_k f_k(x) with equal weights and returns p.
func lsq(basis [][]float64, y []float64) []float64 {
	k := len(basis[0])
	A := make([][]float64, k)
	for i := range A {
		A[i] = make([]float64, k)
	}
	b := make([]float64, k)
	for i, f := range basis {
		for a := range k {
			b[a] += f[a] * y[i]
			for c := range k {
				A[a][c] += f[a] * f[c]
			}
		}
	}
	return solveNormal(A, b)
}

func stddev(xs []float64) float64 {
	var m float64
	for _, x := range xs {
		m += x
	}
	m /= float64(len(xs))
	var s float64
	for _, x := range xs {
		s += (x - m) * (x - m)
	}
	return math.Sqrt(s / float64(len(xs)-1))
}

// keplerG is the test's own Keplerian curve cos(ν+ω) + e cos ω at mean
// phase m: Kepler's equation by Newton's method, ν from
// tan(ν/2) = √((1+e)/(1−e)) tan(E/2).
func keplerG(ecc, omegaDeg, m float64) float64 {
	M := 2 * math.Pi * (m - math.Floor(m))
	E := M
	if ecc > 0.8 {
		E = math.Pi
	}
	for range 100 {
		dE := (E - ecc*math.Sin(E) - M) / (1 - ecc*math.Cos(E))
		E -= dE
		if math.Abs(dE) < 1e-15 {
			break
		}
	}
	nu := 2 * math.Atan2(math.Sqrt(1+ecc)*math.Sin(E/2), math.Sqrt(1-ecc)*math.Cos(E/2))
	w := omegaDeg * math.Pi / 180
	return math.Cos(nu+w) + ecc*math.Cos(w)
}

// TestRVMonteCarlo simulates velocities at planned mid-phases with Gaussian
// errors, fits each trial by the test's own linear least squares, and
// compares the scatter of the fitted K over 2000 trials with the predicted
// σK: within 5 % (the scatter's own 1σ sampling error is 1/√(2·2000) ≈ 1.6 %).
func TestRVMonteCarlo(t *testing.T) {
	const trials = 2000
	rng := rand.New(rand.NewPCG(16, 2026))
	e := testEphem(t)
	t.Run("CircularPhaseFree", func(t *testing.T) {
		// Fit v = γ + A sin 2πφ + B cos 2πφ: linear; K = √(A² + B²).
		const K, sv = 45.0, 4.0
		c := testCurve(t, RVGoal{Model: RVCircular, KKms: K, SigmaVKms: sv}, e)
		var xs []RVExposure
		var basis [][]float64
		for range 14 {
			phi := rng.Float64()
			xs = append(xs, RVExposure{Phase: phi})
			s, co := math.Sincos(2 * math.Pi * phi)
			basis = append(basis, []float64{1, s, co})
		}
		pred := c.Predict(xs, math.Inf(1))
		ks := make([]float64, trials)
		y := make([]float64, len(xs))
		for n := range ks {
			for i, x := range xs {
				y[i] = 12 + K*math.Sin(2*math.Pi*(x.Phase-c.Phase0)) + sv*rng.NormFloat64()
			}
			p := lsq(basis, y)
			ks[n] = math.Hypot(p[1], p[2])
		}
		got := stddev(ks)
		t.Logf("circular, 14 exposures: scatter of K %.4f km/s, predicted σK %.4f km/s, ratio %.4f", got, pred.SigmaK, got/pred.SigmaK)
		within(t, "scatter of K", got, pred.SigmaK, 0.05)
	})
	t.Run("EccentricPhaseKnown", func(t *testing.T) {
		ee := e
		ee.Ecc, ee.OmegaDeg = 0.45, 60
		const K, sv = 30.0, 2.5
		c := testCurve(t, RVGoal{Model: RVEccentric, KKms: K, SigmaVKms: sv}, ee)
		var xs []RVExposure
		var basis [][]float64
		for range 9 {
			phi := rng.Float64()
			xs = append(xs, RVExposure{Phase: phi})
			basis = append(basis, []float64{1, keplerG(ee.Ecc, ee.OmegaDeg, phi+c.M0)})
		}
		pred := c.Predict(xs, 0)
		ks := make([]float64, trials)
		y := make([]float64, len(xs))
		for n := range ks {
			for i, b := range basis {
				y[i] = -7 + K*b[1] + sv*rng.NormFloat64()
			}
			ks[n] = lsq(basis, y)[1]
		}
		got := stddev(ks)
		t.Logf("eccentric e=0.45, 9 exposures: scatter of K %.4f km/s, predicted σK %.4f km/s, ratio %.4f", got, pred.SigmaK, got/pred.SigmaK)
		within(t, "scatter of K", got, pred.SigmaK, 0.05)
	})
}

// TestTimingMonteCarlo simulates measured and planned timings with Gaussian
// errors, fits t = T0 + P·E by the test's own weighted least squares (equal
// weights here), and compares the scatter of P over 2000 trials with the
// predicted σP after the plan: within 5 %.
func TestTimingMonteCarlo(t *testing.T) {
	e := testEphem(t)
	e.T0ErrDays, e.PeriodErr = 2e-4, 1e-6
	const sig = 3e-4 // days
	existingCycles := []int64{0, 3, 10, 41}
	plannedCycles := []int64{900, 905, 930}
	var existing []ephem.Timing
	var planned []ephem.JD2
	for _, c := range existingCycles {
		existing = append(existing, ephem.Timing{Value: e.TimeAt(c, 0), Std: ephem.StdBJDTDB, ErrDays: sig})
	}
	for _, c := range plannedCycles {
		planned = append(planned, e.TimeAt(c, 0))
	}
	now, after, err := PredictTimings(existing, planned, sig, e, false)
	if err != nil {
		t.Fatal(err)
	}
	if now.Source != "fit" || after.Source != "fit" || !(after.SigmaPDays < now.SigmaPDays) {
		t.Fatalf("now %+v, after %+v: want fits, σP shrinking", now, after)
	}
	rng := rand.New(rand.NewPCG(7, 16))
	all := append(append([]int64{}, existingCycles...), plannedCycles...)
	var basis [][]float64
	for _, c := range all {
		basis = append(basis, []float64{1, float64(c)})
	}
	ps := make([]float64, 2000)
	y := make([]float64, len(all))
	for n := range ps {
		for i, c := range all {
			y[i] = e.PeriodDays*float64(c) + sig*rng.NormFloat64() // days from T0
		}
		ps[n] = lsq(basis, y)[1]
	}
	got := stddev(ps)
	t.Logf("timings: scatter of P %.4g d, predicted σP %.4g d (now %.4g d), ratio %.4f", got, after.SigmaPDays, now.SigmaPDays, got/after.SigmaPDays)
	within(t, "scatter of P", got, after.SigmaPDays, 0.05)

	// Closed form for the existing four alone: σP² = σ²/Σ(E − Ē)².
	var m, s float64
	for _, c := range existingCycles {
		m += float64(c)
	}
	m /= float64(len(existingCycles))
	for _, c := range existingCycles {
		s += (float64(c) - m) * (float64(c) - m)
	}
	within(t, "σP now", now.SigmaPDays, sig/math.Sqrt(s), 1e-6)

	t.Run("FewTimingsUseEphemeris", func(t *testing.T) {
		n, a, err := PredictTimings(nil, planned[:1], sig, e, false)
		if err != nil {
			t.Fatal(err)
		}
		if n.Source != "ephemeris" || a.Source != "ephemeris" || n.SigmaPDays != e.PeriodErr {
			t.Errorf("now %+v, after %+v: want the ephemeris' own errors", n, a)
		}
	})
	t.Run("Quadratic", func(t *testing.T) {
		n, a, err := PredictTimings(existing, planned, sig, e, true)
		if err != nil {
			t.Fatal(err)
		}
		if !(n.SigmaPdot > 0 && a.SigmaPdot > 0 && a.SigmaPdot < n.SigmaPdot) {
			t.Errorf("σṖ now %g, after %g: want both > 0 and shrinking", n.SigmaPdot, a.SigmaPdot)
		}
	})
}

func TestExposuresNeeded(t *testing.T) {
	// Circular, phase known, nothing observed: n exposures at the
	// quadratures give σK/K = σv/(K√n) (TestRVClosedForms), so the least n
	// reaching `want` is ⌈(σv/(K·want))²⌉.
	e := testEphem(t)
	const K, sv = 50.0, 6.0
	c := testCurve(t, RVGoal{Model: RVCircular, KKms: K, SigmaVKms: sv}, e)
	for _, want := range []float64{0.03, 0.01, 0.2} {
		n, ok := c.ExposuresNeeded(nil, 0, 0, want)
		w := int(math.Ceil((sv / (K * want)) * (sv / (K * want))))
		if w < 2 {
			w = 2 // (γ, K) need two exposures
		}
		if !ok || n != w {
			t.Errorf("want σK/K ≤ %g: got %d (ok %v), want %d", want, n, ok, w)
		}
	}
	// Already reached.
	var xs []RVExposure
	for i := range 400 {
		xs = append(xs, RVExposure{Phase: float64(i) / 400})
	}
	if n, ok := c.ExposuresNeeded(xs, 0, 0, 0.03); !ok || n != 0 {
		t.Errorf("400 exposures: need %d more (ok %v), want 0", n, ok)
	}
	// Eccentric: the extremes are where g is largest and smallest.
	ee := e
	ee.Ecc, ee.OmegaDeg = 0.6, 110
	ce := testCurve(t, RVGoal{Model: RVEccentric, KKms: K, SigmaVKms: sv}, ee)
	hi, lo := ce.extremes()
	gh, _ := ce.shape(hi)
	gl, _ := ce.shape(lo)
	within(t, "g at maximum", gh, 1+ee.Ecc*math.Cos(ee.OmegaDeg*math.Pi/180), 1e-9)
	within(t, "g at minimum", gl, -1+ee.Ecc*math.Cos(ee.OmegaDeg*math.Pi/180), 1e-9)
}

func TestRVGoalBadInput(t *testing.T) {
	e := testEphem(t)
	ok := RVGoal{Model: RVCircular, KKms: 40, SigmaVKms: 2, WantRelK: 0.03}
	ecc := e
	ecc.Ecc = 0.5
	for _, c := range []struct {
		name   string
		g      RVGoal
		field  string
		value  string
		accept string
	}{
		{"KZero", RVGoal{Model: RVCircular, KKms: 0, SigmaVKms: 2}, "rv_k_kms", "0", "K > 0 km/s"},
		{"KNegative", RVGoal{Model: RVCircular, KKms: -5, SigmaVKms: 2}, "rv_k_kms", "-5", "K > 0 km/s"},
		{"SigmaZero", RVGoal{Model: RVCircular, KKms: 5, SigmaVKms: 0}, "rv_sigma_kms", "0", "σv > 0 km/s"},
		{"SigmaNaN", RVGoal{Model: RVCircular, KKms: 5, SigmaVKms: math.NaN()}, "rv_sigma_kms", "NaN", "σv > 0 km/s"},
		{"Model", RVGoal{Model: "spiral", KKms: 5, SigmaVKms: 1}, "rv_model", `"spiral"`, "circular or eccentric"},
		{"Want", RVGoal{Model: RVCircular, KKms: 5, SigmaVKms: 1, WantRelK: 3}, "rv_want_rel_k", "3", "0 < x < 1"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewRVCurve(c.g, e)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field || ie.Value != c.value || !strings.Contains(ie.Accepted, c.accept) {
				t.Fatalf("error %v, want field %s value %s accepted ~%q", err, c.field, c.value, c.accept)
			}
		})
	}
	for _, v := range []float64{-0.1, 1, 1.5} {
		_, _, err := ephem.RVShape(v, 0, 0)
		var ie *ephem.InputError
		if !errors.As(err, &ie) || ie.Field != "ecc" || !strings.Contains(ie.Accepted, "0 ≤ e < 1") {
			t.Errorf("e = %g: error %v, want field ecc, accepted 0 ≤ e < 1", v, err)
		}
	}
	if _, err := NewRVCurve(ok, ecc); err != nil {
		t.Errorf("valid goal: %v", err)
	}
	if _, err := SigmaVFromSNR(30, 0); err == nil || !strings.Contains(err.Error(), "snr") {
		t.Errorf("S/N 0: %v", err)
	}
	if s, err := SigmaVFromSNR(30, 60); err != nil || s != 0.5 {
		t.Errorf("SigmaVFromSNR(30, 60) = %v, %v, want 0.5", s, err)
	}
}

// TestRVSmearEccentric checks the exposure mean of the eccentric curve (the
// Gauss–Legendre rule on parts of the exposure) against a composite Simpson
// rule with 20,000 intervals written here, and the mean slope against the
// end-point difference (exact by the fundamental theorem of calculus).
func TestRVSmearEccentric(t *testing.T) {
	e := testEphem(t)
	e.Ecc, e.OmegaDeg = 0.7, 250
	c := testCurve(t, RVGoal{Model: RVEccentric, KKms: 30, SigmaVKms: 1}, e)
	for _, x := range []struct{ phi, smear float64 }{{0.1, 0.002}, {0.93, 0.05}, {0.5, 0.2}, {0, 0.013}} {
		g, d := c.mean(x.phi, x.smear)
		const n = 20000
		a, h := x.phi-x.smear/2, x.smear/n
		var s float64
		for i := 0; i <= n; i++ {
			v := keplerG(e.Ecc, e.OmegaDeg, a+float64(i)*h+c.M0)
			switch {
			case i == 0 || i == n:
				s += v
			case i%2 == 1:
				s += 4 * v
			default:
				s += 2 * v
			}
		}
		want := s * h / 3 / x.smear
		if math.Abs(g-want) > 1e-9 {
			t.Errorf("φ %.3f Δ %.3f: ⟨g⟩ = %.12f, Simpson %.12f", x.phi, x.smear, g, want)
		}
		ga := keplerG(e.Ecc, e.OmegaDeg, a+c.M0)
		gb := keplerG(e.Ecc, e.OmegaDeg, a+x.smear+c.M0)
		if math.Abs(d-(gb-ga)/x.smear) > 1e-9*math.Max(1, math.Abs(d)) {
			t.Errorf("φ %.3f Δ %.3f: ⟨g′⟩ = %.9f, want %.9f", x.phi, x.smear, d, (gb-ga)/x.smear)
		}
	}
}

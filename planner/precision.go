package planner

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"phasecast/ephem"
)

// Predicted precision of what a set of exposures will measure.
//
// Radial velocities. A target's RV goal fits v(φ) = γ + K·g(φ − δ) to its
// velocities, one per exposure, with g the curve of unit semi-amplitude in
// the target's phase φ and δ a shift of the phase zero point from the
// ephemeris' value:
//
//   - circular: g(φ) = sin 2π(φ − φ0), φ0 the phase at which the primary's
//     velocity rises through γ (the companion's superior conjunction,
//     u = 270°; φ0 = 0.5 in the inferior-conjunction convention), so
//     v = γ + K sin 2π(φ − φ0 − δ);
//   - eccentric: g(φ) = cos(ν + ω) + e cos ω, the Keplerian curve at mean
//     phase φ + m0 (m0 = M/2π at T0) with the ephemeris' e and ω
//     (ephem.RVShape, Kepler's equation by meeus).
//
// The predicted 1σ errors of (γ, K, δ) are the square roots of the diagonal
// of the inverse Fisher information matrix F = Σᵢ dᵢdᵢᵀ/σᵢ², dᵢ the
// derivatives of exposure i's velocity with respect to (γ, K, δ) at the
// nominal values (γ = 0, K the rough K, δ = 0): (1, ⟨g⟩ᵢ, −K⟨g′⟩ᵢ). This
// is the Cramér–Rao bound, which a least-squares fit reaches for Gaussian
// errors and a locally linear model (e.g. Bevington & Robinson, Data
// Reduction and Error Analysis, 3rd ed., ch. 7–8: the covariance of a
// least-squares fit is the inverse of the curvature matrix). The phase zero
// point carries the ephemeris' own phase uncertainty σφ at the exposures'
// mean epoch as a Gaussian prior, 1/σφ² added to F's δδ element; with σφ = 0
// the phase is known and δ is not fitted (F is 2×2).
//
// Smear. An exposure measures the velocity averaged over its length, so ⟨·⟩
// is the mean over the phase interval [φ − Δ/2, φ + Δ/2], Δ the exposure's
// length in phase (ephem.PhaseSmear). Exactly: when Δ ≤ SmearMidpointPhase
// the mid-phase values are used (the relative error of the mid-point rule
// is at most (2π·Δ)²/24 ≈ 1.6e-6 for a sinusoid); above it ⟨g′⟩ is exactly
// (g(φ + Δ/2) − g(φ − Δ/2))/Δ, and ⟨g⟩ is exact for the circular model,
// sin 2π(φ − φ0)·sin(πΔ)/(πΔ), and for the eccentric one the 8-node
// Gauss–Legendre rule on ⌈Δ/0.02⌉ equal parts of the interval (nodes by
// Newton's method on the Legendre polynomial, Press et al., Numerical
// Recipes, 3rd ed., §4.6).
//
// Timings. A timing goal's predicted σT0, σP (and σṖ) are the covariance
// ephem.FitEphemeris reports when the planned timings, at their predicted
// times, join the timings already measured: the fit's covariance depends on
// the cycle numbers and the errors only, not on the measured values.

// RVModel names the radial-velocity model of an RV goal.
type RVModel string

// RV models.
const (
	RVCircular  RVModel = "circular"
	RVEccentric RVModel = "eccentric"
)

// RVModels lists the accepted RV models.
var RVModels = []RVModel{RVCircular, RVEccentric}

// RVGoal is a target's radial-velocity goal: what precision its velocities
// are wanted for.
type RVGoal struct {
	Model RVModel
	// KKms is a rough velocity semi-amplitude, km/s (0 < K ≤ MaxRVKms).
	KKms float64
	// SigmaVKms is the velocity error of one exposure, km/s
	// (0 < σv ≤ MaxRVKms); SigmaVFromSNR gives it from an exposure's S/N.
	SigmaVKms float64
	// WantRelK is the wanted σK/K (0 < x < 1; 0 means none): 0.03 for
	// "σK/K ≤ 3 %".
	WantRelK float64
}

// Limits of the RV goal's fields.
const (
	// MaxRVKms bounds K and σv: 2000 km/s is above the semi-amplitude of any
	// stellar binary (the fastest double white dwarfs reach about 1000 km/s,
	// from memory).
	MaxRVKms = 2000
	// SmearMidpointPhase is the exposure length in phase up to which the
	// mid-phase derivatives stand for the exposure's mean.
	SmearMidpointPhase = 1e-3
	// MaxExposuresNeeded bounds the search for the exposures still needed.
	MaxExposuresNeeded = 100000
)

// Validate reports the first unacceptable field of g as an *ephem.InputError
// naming the field (rv_model, rv_k_kms, rv_sigma_kms, rv_want_rel_k), the
// value and what is accepted.
func (g RVGoal) Validate() error {
	switch {
	case !slices.Contains(RVModels, g.Model):
		return &ephem.InputError{Field: "rv_model", Value: fmt.Sprintf("%q", g.Model), Accepted: "circular or eccentric"}
	case !finite(g.KKms) || g.KKms <= 0 || g.KKms > MaxRVKms:
		return &ephem.InputError{Field: "rv_k_kms", Value: fmtNum(g.KKms), Accepted: "a semi-amplitude K > 0 km/s, at most 2000"}
	case !finite(g.SigmaVKms) || g.SigmaVKms <= 0 || g.SigmaVKms > MaxRVKms:
		return &ephem.InputError{Field: "rv_sigma_kms", Value: fmtNum(g.SigmaVKms), Accepted: "a velocity error of one exposure σv > 0 km/s, at most 2000"}
	case !finite(g.WantRelK) || g.WantRelK < 0 || g.WantRelK >= 1:
		return &ephem.InputError{Field: "rv_want_rel_k", Value: fmtNum(g.WantRelK), Accepted: "a wanted σK/K as a fraction, 0 < x < 1 (0.03 for 3 %), or 0 for none"}
	}
	return nil
}

// SigmaVFromSNR returns the velocity error of one exposure, km/s, from its
// signal-to-noise ratio by the photon-noise scaling σv = c/(S/N), c the
// velocity error at S/N 1 of the instrument and star (km/s; the 1/(S/N)
// law of photon-limited velocities, e.g. Bouchy, Pepe & Queloz 2001, A&A
// 374, 733, cited from memory). Errors name "rv_sigma_at_snr1_kms" or "snr".
func SigmaVFromSNR(cKms, snr float64) (float64, error) {
	if !finite(cKms) || cKms <= 0 || cKms > 1e6 {
		return 0, &ephem.InputError{Field: "rv_sigma_at_snr1_kms", Value: fmtNum(cKms), Accepted: "a velocity error at S/N 1 > 0 km/s, at most 1e6"}
	}
	if !finite(snr) || snr <= 0 {
		return 0, &ephem.InputError{Field: "snr", Value: fmtNum(snr), Accepted: "a signal-to-noise ratio > 0"}
	}
	return cKms / snr, nil
}

// RVCurve is an RV goal made concrete for one target's ephemeris: the pure
// model the predictions use.
type RVCurve struct {
	Model    RVModel
	K        float64 // km/s
	SigmaV   float64 // km/s, one exposure
	Ecc      float64 // eccentric model: 0 ≤ e < 1
	OmegaDeg float64 // eccentric model: primary's argument of periastron
	Phase0   float64 // circular model: φ0, phase at which v rises through γ
	M0       float64 // eccentric model: mean phase M/2π at phase 0
}

// NewRVCurve builds the curve of goal g for ephemeris e (its e, ω and
// convention). Errors name the field, the value and the accepted range.
func NewRVCurve(g RVGoal, e ephem.Ephemeris) (RVCurve, error) {
	if err := g.Validate(); err != nil {
		return RVCurve{}, err
	}
	c := RVCurve{Model: g.Model, K: g.KKms, SigmaV: g.SigmaVKms}
	if g.Model == RVEccentric {
		c.Ecc, c.OmegaDeg, c.M0 = e.Ecc, e.OmegaDeg, e.MeanPhaseAtT0()
		if _, _, err := ephem.RVShape(c.Ecc, c.OmegaDeg, 0); err != nil {
			return RVCurve{}, err
		}
		return c, nil
	}
	ph, err := e.EventPhase(ephem.EventSuperiorConjunction, 0)
	if err != nil {
		return RVCurve{}, err
	}
	c.Phase0 = ph
	return c, nil
}

// shape returns g and dg/dφ at phase phi.
func (c RVCurve) shape(phi float64) (float64, float64) {
	if c.Model == RVEccentric {
		g, d, err := ephem.RVShape(c.Ecc, c.OmegaDeg, phi+c.M0)
		if err != nil { // validated in NewRVCurve; phi finite by construction
			return 0, 0
		}
		return g, d
	}
	s, co := math.Sincos(2 * math.Pi * (phi - c.Phase0))
	return s, 2 * math.Pi * co
}

// mean returns ⟨g⟩ and ⟨dg/dφ⟩ over an exposure centred on phase phi that
// spans smear in phase (notes above).
func (c RVCurve) mean(phi, smear float64) (float64, float64) {
	if smear <= SmearMidpointPhase {
		return c.shape(phi)
	}
	a, b := phi-smear/2, phi+smear/2
	ga, _ := c.shape(a)
	gb, _ := c.shape(b)
	slope := (gb - ga) / smear
	if c.Model != RVEccentric {
		x := math.Pi * smear
		return math.Sin(2*math.Pi*(phi-c.Phase0)) * math.Sin(x) / x, slope
	}
	parts := int(math.Ceil(smear / 0.02))
	h := smear / float64(parts)
	var sum float64
	for p := range parts {
		lo := a + float64(p)*h
		for k, x := range glNodes {
			g, _ := c.shape(lo + h*(x+1)/2)
			sum += glWeights[k] * g * h / 2
		}
	}
	return sum / smear, slope
}

// glNodes and glWeights are the 8-point Gauss–Legendre rule on [−1, 1].
var glNodes, glWeights = gaussLegendre(8)

// gaussLegendre returns the n nodes and weights of the Gauss–Legendre rule
// on [−1, 1]: the roots of Pₙ by Newton's method from the Chebyshev guess
// cos(π(i − ¼)/(n + ½)), weights 2/((1 − x²)Pₙ′(x)²) (Press et al.,
// Numerical Recipes, 3rd ed., §4.6, gauleg).
func gaussLegendre(n int) ([]float64, []float64) {
	x := make([]float64, n)
	w := make([]float64, n)
	for i := range (n + 1) / 2 {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for range 100 {
			p1, p2 := 1.0, 0.0
			for j := 1; j <= n; j++ {
				p1, p2 = ((2*float64(j)-1)*z*p1-(float64(j)-1)*p2)/float64(j), p1
			}
			dp = float64(n) * (z*p1 - p2) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) < 1e-15 {
				break
			}
		}
		x[i], x[n-1-i] = -z, z
		w[i] = 2 / ((1 - z*z) * dp * dp)
		w[n-1-i] = w[i]
	}
	return x, w
}

// RVExposure is one velocity exposure for the precision model.
type RVExposure struct {
	Phase  float64 // mid-exposure phase in the target's convention
	Smear  float64 // the exposure's length in phase, ≥ 0
	SigmaV float64 // its velocity error, km/s; 0 means the curve's SigmaV
}

// RVPrecision is the predicted precision of an RV fit.
type RVPrecision struct {
	N int // exposures
	// Determined is false when the exposures cannot fix (γ, K, δ) (fewer
	// than the parameters, or all at phases that leave F singular): the
	// errors are then 0 and mean "not yet measurable".
	Determined bool
	SigmaK     float64 // km/s
	SigmaGamma float64 // km/s
	// SigmaPhase0 is σ of the phase zero point, cycles (0 when the phase is
	// known, σφ = 0).
	SigmaPhase0 float64
	RelK        float64 // σK/K
}

// fisher is the information matrix of (γ, K, δ).
type fisher [3][3]float64

// add adds weight copies of exposure x's information.
func (c RVCurve) add(f *fisher, x RVExposure, weight float64) {
	g, d := c.mean(x.Phase, x.Smear)
	s := x.SigmaV
	if s <= 0 {
		s = c.SigmaV
	}
	v := [3]float64{1, g, -c.K * d}
	for a := range 3 {
		for b := range 3 {
			f[a][b] += weight * v[a] * v[b] / (s * s)
		}
	}
}

// solve turns F (plus the phase prior σφ, cycles: 0 known, +Inf none) into
// the precision.
func (c RVCurve) solve(f fisher, n int, phaseSigma float64) RVPrecision {
	out := RVPrecision{N: n}
	k := 3
	switch {
	case phaseSigma == 0:
		k = 2
	case !math.IsInf(phaseSigma, 1):
		f[2][2] += 1 / (phaseSigma * phaseSigma)
	}
	cov, ok := invertSPD(f, k)
	if !ok {
		return out
	}
	out.Determined = true
	out.SigmaGamma = math.Sqrt(cov[0][0])
	out.SigmaK = math.Sqrt(cov[1][1])
	if k == 3 {
		out.SigmaPhase0 = math.Sqrt(cov[2][2])
	}
	out.RelK = out.SigmaK / c.K
	return out
}

// Predict returns the predicted precision of the RV fit to exps with the
// phase zero point's prior σφ (phaseSigma, cycles; 0 = known, +Inf = none).
func (c RVCurve) Predict(exps []RVExposure, phaseSigma float64) RVPrecision {
	var f fisher
	for _, x := range exps {
		c.add(&f, x, 1)
	}
	return c.solve(f, len(exps), phaseSigma)
}

// extremes returns the phases of the curve's largest and smallest velocity
// (the quadratures of a circular orbit): where |∂v/∂K| is largest. The
// eccentric curve is scanned on 3600 phases and refined by golden-section
// search between the neighbours.
func (c RVCurve) extremes() (hi, lo float64) {
	if c.Model != RVEccentric {
		return wrap1(c.Phase0 + 0.25), wrap1(c.Phase0 + 0.75)
	}
	const n = 3600
	ih, il := 0, 0
	gs := make([]float64, n)
	for i := range n {
		gs[i], _ = c.shape(float64(i) / n)
		if gs[i] > gs[ih] {
			ih = i
		}
		if gs[i] < gs[il] {
			il = i
		}
	}
	refine := func(i int, sign float64) float64 {
		a, b := float64(i-1)/n, float64(i+1)/n
		r := (math.Sqrt(5) - 1) / 2
		for b-a > 1e-10 {
			x1, x2 := b-r*(b-a), a+r*(b-a)
			g1, _ := c.shape(x1)
			g2, _ := c.shape(x2)
			if sign*g1 > sign*g2 {
				b = x2
			} else {
				a = x1
			}
		}
		return wrap1((a + b) / 2)
	}
	return refine(ih, 1), refine(il, -1)
}

// ExposuresNeeded returns how many more exposures, of the given smear,
// placed alternately at the curve's velocity extremes (the best phases for
// K: a lower bound on what any schedule needs), bring σK/K from exps down to
// want (0 < want < 1): 0 when exps already reach it. ok is false when even
// MaxExposuresNeeded more would not.
func (c RVCurve) ExposuresNeeded(exps []RVExposure, phaseSigma, smear, want float64) (n int, ok bool) {
	if !(want > 0 && want < 1) {
		return 0, false
	}
	var f0 fisher
	for _, x := range exps {
		c.add(&f0, x, 1)
	}
	hi, lo := c.extremes()
	reach := func(m int) bool {
		f := f0
		c.add(&f, RVExposure{Phase: hi, Smear: smear}, float64((m+1)/2))
		c.add(&f, RVExposure{Phase: lo, Smear: smear}, float64(m/2))
		p := c.solve(f, len(exps)+m, phaseSigma)
		return p.Determined && p.RelK <= want
	}
	if reach(0) {
		return 0, true
	}
	if !reach(MaxExposuresNeeded) {
		return 0, false
	}
	a, b := 0, MaxExposuresNeeded // reach(a) false, reach(b) true
	for b-a > 1 {
		m := (a + b) / 2
		if reach(m) {
			b = m
		} else {
			a = m
		}
	}
	return b, true
}

// invertSPD inverts the leading k×k block of the symmetric matrix a by
// Cholesky factorisation; ok is false when it is not positive definite to
// working precision (a pivot below 1e-12 of the largest diagonal element).
func invertSPD(a fisher, k int) (inv fisher, ok bool) {
	var L fisher
	scale := 0.0
	for i := range k {
		scale = math.Max(scale, math.Abs(a[i][i]))
	}
	if !(scale > 0) || !finite(scale) {
		return inv, false
	}
	for i := range k {
		for j := 0; j <= i; j++ {
			s := a[i][j]
			for p := range j {
				s -= L[i][p] * L[j][p]
			}
			if i == j {
				if s <= 1e-12*scale {
					return inv, false
				}
				L[i][i] = math.Sqrt(s)
			} else {
				L[i][j] = s / L[j][j]
			}
		}
	}
	// inv = L⁻ᵀ L⁻¹, column by column.
	for col := range k {
		var y [3]float64
		for i := range k {
			s := 0.0
			if i == col {
				s = 1
			}
			for p := range i {
				s -= L[i][p] * y[p]
			}
			y[i] = s / L[i][i]
		}
		for i := k - 1; i >= 0; i-- {
			s := y[i]
			for p := i + 1; p < k; p++ {
				s -= L[p][i] * inv[p][col]
			}
			inv[i][col] = s / L[i][i]
		}
	}
	return inv, true
}

// wrap1 reduces x to [0, 1).
func wrap1(x float64) float64 {
	y := x - math.Floor(x)
	if y >= 1 {
		y = 0
	}
	return y
}

// TimingPrecision is the precision of an ephemeris fitted to timings.
type TimingPrecision struct {
	N int // timings
	// Source is "fit" (the timings' least-squares fit), "ephemeris" (fewer
	// timings than the fit's parameters: the ephemeris' own stated errors).
	Source      string
	SigmaT0Days float64
	SigmaPDays  float64
	SigmaPdot   float64 // dimensionless; 0 for a linear ephemeris
	RelP        float64 // σP/P
}

// PredictTimings returns the timing precision now (from the measured
// timings, all BJD_TDB) and after the planned timings join them: planned are
// the predicted BJD_TDB times of the reference event the plan will time,
// each with error plannedErrDays (> 0). The covariance is the one
// ephem.FitEphemeris computes (notes above), linear or quadratic; with fewer
// timings than its parameters the ephemeris' own errors stand. Errors: bad
// timings or ephemeris (*ephem.InputError), a cycle count the fit cannot
// make (*ephem.AmbiguityError).
func PredictTimings(existing []ephem.Timing, planned []ephem.JD2, plannedErrDays float64, e ephem.Ephemeris, quadratic bool) (now, after TimingPrecision, err error) {
	if len(planned) > 0 && (!finite(plannedErrDays) || plannedErrDays <= 0) {
		return now, after, &ephem.InputError{Field: "timing_err", Value: fmtNum(plannedErrDays), Accepted: "a 1σ error of a planned timing > 0 days"}
	}
	now, err = timingFit(existing, e, quadratic)
	if err != nil {
		return now, after, err
	}
	all := slices.Clone(existing)
	for _, t := range planned {
		all = append(all, ephem.Timing{Value: t, Std: ephem.StdBJDTDB, ErrDays: plannedErrDays})
	}
	after, err = timingFit(all, e, quadratic)
	return now, after, err
}

// timingFit is the precision of the fit to timings, or e's own.
func timingFit(timings []ephem.Timing, e ephem.Ephemeris, quadratic bool) (TimingPrecision, error) {
	params := 2
	if quadratic {
		params = 3
	}
	p := TimingPrecision{N: len(timings), Source: "ephemeris", SigmaT0Days: e.T0ErrDays, SigmaPDays: e.PeriodErr, SigmaPdot: e.PdotErr}
	cycles := map[int64]bool{}
	for _, t := range timings {
		if c, ph := e.CyclePhase(t.Value); ph < 0.5 {
			cycles[c] = true
		} else {
			cycles[c+1] = true
		}
	}
	if len(cycles) >= params {
		res, err := ephem.FitEphemeris(timings, e, quadratic)
		if err != nil {
			return p, err
		}
		p.Source = "fit"
		p.SigmaT0Days = math.Sqrt(res.Cov[0][0])
		p.SigmaPDays = math.Sqrt(res.Cov[1][1])
		p.SigmaPdot = math.Sqrt(res.Cov[2][2])
	}
	p.RelP = p.SigmaPDays / e.PeriodDays
	return p, nil
}

// FormatRelPercent writes a relative error as a percentage ("2.7 %"), or
// "—" when it is not determined.
func FormatRelPercent(x float64, determined bool) string {
	if !determined || !finite(x) {
		return "—"
	}
	s := fmt.Sprintf("%.2g", 100*x)
	if strings.Contains(s, "e") {
		s = fmt.Sprintf("%.2f", 100*x)
	}
	return s + " %"
}

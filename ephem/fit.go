package ephem

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Refinement of an ephemeris from measured times of its reference event.
//
// Each timing gets a whole cycle number from the guess ephemeris; the cycle
// numbers are then held fixed and t(E) = T0 + P·E (+ Q·E², Q = ½·P·Ṗ) is
// fitted by weighted least squares (weights 1/σ²), the normal equations
// solved in centred and scaled cycle numbers (e.g. Press et al., Numerical
// Recipes, 3rd ed., §15.4: general linear least squares; Bevington &
// Robinson, 3rd ed., ch. 7). The covariance is (AᵀWA)⁻¹, from the stated
// timing errors alone: it is not rescaled by the reduced χ² (the result's Note
// says when that looks too small).
//
// Cycle counting is where refinements go wrong, so it is checked, never
// guessed:
//
//   - a timing may be numbered only when the current ephemeris predicts it to
//     within a quarter cycle and the predicted time's uncertainty (the
//     ephemeris' σ propagated to that epoch, with the timing's own error)
//     excludes the neighbouring cycles at 3σ; timings that cannot be numbered
//     at first are retried after refitting the ones that could (a bootstrap
//     outwards from the guess' epoch); whatever is still left is reported as an
//     *AmbiguityError naming the timing;
//   - a timing whose cycle is given by hand (Timing.Cycle) keeps it: it is
//     numbered from the start and helps number the others;
//   - once all are numbered, the alias one cycle more and one cycle fewer
//     across the whole span (P' = P·N/(N±1)) is refitted: if it fits about as
//     well (Δχ² < 9 after scaling by the reduced χ², with the guess period's
//     uncertainty as a prior when it is given), the count is ambiguous and an
//     *AmbiguityError says so. When two or more timings have distinct
//     cycles given by hand the count across them is the observer's, and the
//     alias check is not made.

// Timing is one measured time of the ephemeris' reference event.
type Timing struct {
	Value   JD2          // the measured time, in Std
	Std     TimeStandard // must be BJD_TDB for FitEphemeris: convert others first with ConvertEpoch
	ErrDays float64      // 1σ, days (> 0)
	// Cycle, when not nil, fixes the timing's whole cycle number by hand,
	// counted from the guess' T0 (cycle 0): FitEphemeris takes it as given
	// instead of numbering the timing itself.
	Cycle *int64
}

// FitResult is a refined ephemeris and what went into it.
type FitResult struct {
	// Ephem is the refined ephemeris. Its T0 is the event of cycle
	// CycleShift of the guess' numbering (the whole cycle nearest the
	// timings' weighted mean epoch), where T0 and P are nearly uncorrelated.
	Ephem Ephemeris
	// Cycles are the timings' cycle numbers counted from the new T0, in
	// the order the timings were given.
	Cycles []int64
	// Residuals are observed minus computed times, days, in the same order.
	Residuals []float64
	// Cov is the covariance of (T0 days, P days, Ṗ dimensionless); the Ṗ row
	// and column are zero for a linear fit.
	Cov [3][3]float64
	// ChiSq is Σ(residual/σ)²; RedChiSq = ChiSq/(n − parameters), 0 when
	// there are no degrees of freedom.
	ChiSq, RedChiSq float64
	Quadratic       bool
	// CycleShift is the cycle, in the guess' numbering, that the new T0
	// marks: cycle E of the guess is cycle E − CycleShift of the result.
	CycleShift int64
	// Note explains the T0 move and anything the numbers alone do not say.
	Note string
}

// AmbiguityError reports timings that cannot be given cycle numbers without
// guessing. Index is the timing concerned (−1 when the whole set is).
type AmbiguityError struct {
	Index  int
	Value  JD2
	Reason string
}

// Error names the timing (or the whole set) and why its cycle is ambiguous.
func (e *AmbiguityError) Error() string {
	if e.Index < 0 {
		return "timings: cycle count is ambiguous: " + e.Reason
	}
	return fmt.Sprintf("timings[%d] (%s): cycle number is ambiguous: %s", e.Index, FormatEpoch(e.Value, FormJD, 6), e.Reason)
}

// fitOut is one weighted least-squares solution in a local numbering.
type fitOut struct {
	ref    JD2           // predicted time of cycle n0 by the anchor model
	n0     int64         // origin cycle (anchor numbering)
	a      float64       // T0 − ref, days
	P, Q   float64       // period at n0, quadratic coefficient
	cov    [3][3]float64 // of (a, P, Q)
	chi2   float64
	resid  []float64
	params int
}

// FitEphemeris refines guess from timings (all BJD_TDB) by weighted least
// squares, linear (T0, P) or quadratic (T0, P, Ṗ). The guess supplies the
// convention, the orbit shape and the cycle counting: its period is needed;
// its T0 may be left zero, in which case the earliest timing stands for it;
// give its uncertainties (σT0, σP) when known, since they decide which
// timings can be numbered. Errors: *InputError for bad timings or guess
// (naming the field, e.g. "timings[3].standard"), *AmbiguityError when cycle
// numbers cannot be assigned without guessing.
func FitEphemeris(timings []Timing, guess Ephemeris, quadratic bool) (FitResult, error) {
	params := 2
	if quadratic {
		params = 3
	}
	if len(timings) < params {
		return FitResult{}, &InputError{"timings", strconv.Itoa(len(timings)) + " timings",
			fmt.Sprintf("at least %d timings on distinct cycles for a %s fit", params, map[bool]string{false: "linear", true: "quadratic"}[quadratic])}
	}
	t := make([]JD2, len(timings))
	sig := make([]float64, len(timings))
	fixed := make([]*int64, len(timings))
	earliest := 0
	for i, tm := range timings {
		field := fmt.Sprintf("timings[%d]", i)
		if tm.Std == "" {
			return FitResult{}, &InputError{field + ".standard", "(missing)", "BJD_TDB; a timing is never taken without its time standard"}
		}
		if tm.Std != StdBJDTDB {
			return FitResult{}, &InputError{field + ".standard", string(tm.Std), "BJD_TDB (convert with ConvertEpoch first)"}
		}
		if v := tm.Value.Float(); !finite(tm.Value.Day) || !finite(tm.Value.Frac) || v < epochMinJD || v > epochMaxJD {
			return FitResult{}, &InputError{field + ".value", fmtNum(v), "a BJD_TDB Julian date between 2299160.5 (1582-10-15) and 2816787.5 (3000-01-01)"}
		}
		if !finite(tm.ErrDays) || tm.ErrDays <= 0 {
			return FitResult{}, &InputError{field + ".err", fmtNum(tm.ErrDays), "a 1σ uncertainty > 0 days"}
		}
		t[i], sig[i] = tm.Value, tm.ErrDays
		if tm.Cycle != nil {
			if c := *tm.Cycle; c < -MaxFixedCycle || c > MaxFixedCycle {
				return FitResult{}, &InputError{field + ".cycle", strconv.FormatInt(c, 10), fmt.Sprintf("a whole cycle number −%d..%d from T0", MaxFixedCycle, MaxFixedCycle)}
			}
			fixed[i] = tm.Cycle
		}
		if tm.Value.SubDays(t[earliest]) < 0 {
			earliest = i
		}
	}
	if guess.T0 == (JD2{}) {
		guess.T0 = t[earliest]
		guess.T0ErrDays = sig[earliest]
		guess.CovT0P, guess.CovT0Pdot = 0, 0
	}
	if err := guess.Validate(); err != nil {
		if ie, ok := err.(*InputError); ok {
			ie.Field = "guess." + ie.Field
		}
		return FitResult{}, err
	}

	cycles, err := fitNumber(t, sig, fixed, guess, quadratic)
	if err != nil {
		return FitResult{}, err
	}
	best, err := fitSolve(t, sig, cycles, quadratic, guess.T0, 0, guess.PeriodDays)
	if err != nil {
		return FitResult{}, err
	}
	var given []int64
	for _, c := range fixed {
		if c != nil {
			given = append(given, *c)
		}
	}
	if fitDistinct(given) < 2 {
		if err := fitCheckAlias(t, sig, cycles, quadratic, best, guess); err != nil {
			return FitResult{}, err
		}
	}

	res := FitResult{Quadratic: quadratic, ChiSq: best.chi2, CycleShift: best.n0, Residuals: best.resid}
	res.Ephem = guess
	res.Ephem.T0 = best.ref.AddDays(best.a)
	res.Ephem.PeriodDays = best.P
	res.Ephem.Pdot = 2 * best.Q / best.P
	// (a, P, Q) → (T0, P, Ṗ): ∂Ṗ/∂P = −2Q/P², ∂Ṗ/∂Q = 2/P.
	J := [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, -2 * best.Q / (best.P * best.P), 2 / best.P}}
	res.Cov = orbitSandwich(J, best.cov)
	res.Ephem.setCov(res.Cov)
	res.Cycles = make([]int64, len(t))
	for i, c := range cycles {
		res.Cycles[i] = c - best.n0
	}
	dof := len(t) - best.params
	var notes []string
	rho := 0.0
	if res.Ephem.T0ErrDays > 0 && res.Ephem.PeriodErr > 0 {
		rho = res.Cov[0][1] / (res.Ephem.T0ErrDays * res.Ephem.PeriodErr)
	}
	notes = append(notes, fmt.Sprintf("T0 moved to cycle %d of the guess numbering, the whole cycle nearest the timings' weighted mean epoch, which decorrelates T0 and P (correlation %.3f).", best.n0, rho))
	switch {
	case dof <= 0:
		notes = append(notes, "No degrees of freedom: the fit passes through every timing, χ² is 0 by construction and tests nothing.")
	default:
		res.RedChiSq = best.chi2 / float64(dof)
		if res.RedChiSq > 2 {
			notes = append(notes, fmt.Sprintf("Reduced χ² is %.2f: the timing errors look underestimated (or the model is too simple); the uncertainties are not rescaled, multiply them by √%.2f = %.2f to be conservative.", res.RedChiSq, res.RedChiSq, math.Sqrt(res.RedChiSq)))
		}
	}
	res.Note = strings.Join(notes, " ")
	for _, v := range []float64{res.Ephem.PeriodDays, res.Ephem.Pdot, res.ChiSq, res.RedChiSq, res.Ephem.T0.Frac} {
		if !finite(v) {
			return FitResult{}, &InputError{"timings", "ill-conditioned set", "timings whose cycle numbers span enough of the orbit to fit the model"}
		}
	}
	if err := res.Ephem.Validate(); err != nil {
		return FitResult{}, fmt.Errorf("refined ephemeris out of range (check the timings): %w", err)
	}
	return res, nil
}

// fitNumber assigns whole cycle numbers (guess numbering) to every timing,
// bootstrapping outwards from the guess epoch, or reports the first timing
// that cannot be numbered. A timing is numbered when the guess or the current
// refit numbers it unambiguously; if both do and disagree, that is reported.
// Timings with a cycle in fixed (non-nil) are numbered with it from the
// start.
func fitNumber(t []JD2, sig []float64, fixed []*int64, guess Ephemeris, quadratic bool) ([]int64, error) {
	type model struct {
		e     Ephemeris
		shift int64 // guess-numbering cycle of e's T0
	}
	models := []model{{guess, 0}}
	n := len(t)
	cycles := make([]int64, n)
	done := make([]bool, n)
	left := n
	given := 0
	for i, c := range fixed {
		if c != nil {
			cycles[i], done[i] = *c, true
			left--
			given++
		}
	}
	if left == 0 {
		return cycles, nil
	}
	for pass := 0; ; pass++ {
		added := 0
		firstBad, badReason := -1, ""
		for i := range n {
			if done[i] {
				continue
			}
			var got []int64
			for j := len(models) - 1; j >= 0; j-- { // the latest refit first
				m := models[j]
				v := fitTryNumber(m.e, t[i], sig[i])
				if v.Why != "" {
					if firstBad < 0 {
						firstBad, badReason = i, v.message(m.shift)
					}
					continue
				}
				got = append(got, v.Cycle+m.shift)
			}
			if len(got) == 0 {
				continue
			}
			if len(got) == 2 && got[0] != got[1] {
				return nil, &AmbiguityError{Index: i, Value: t[i], Reason: fmt.Sprintf(
					"the fit to the timings numbered so far says cycle %d but the guess says %d; the guess ephemeris and the timings disagree", got[0], got[1])}
			}
			cycles[i] = got[0]
			done[i] = true
			added++
			left--
		}
		if left == 0 {
			return cycles, nil
		}
		// On the first pass, timings numbered by hand on two or more
		// cycles give a refit even when the guess numbered nothing more.
		if added == 0 && (pass > 0 || given < 2) {
			return nil, &AmbiguityError{Index: firstBad, Value: t[firstBad], Reason: badReason}
		}
		// Refit the numbered timings and retry the others with it.
		var ti []JD2
		var si []float64
		var ci []int64
		for i := range n {
			if done[i] {
				ti, si, ci = append(ti, t[i]), append(si, sig[i]), append(ci, cycles[i])
			}
		}
		if fitDistinct(ci) < 2 {
			continue // nothing to refit yet; the next pass adds nothing and reports
		}
		f, err := fitSolve(ti, si, ci, quadratic && fitDistinct(ci) >= 4, guess.T0, 0, guess.PeriodDays)
		if err != nil {
			return nil, err
		}
		cur := fitEphem(f, guess)
		// Bootstrap with errors scaled up when the scatter says so.
		if dof := len(ti) - f.params; dof > 0 {
			if s := f.chi2 / float64(dof); s > 1 {
				c := cur.covMatrix()
				for a := range 3 {
					for b := range 3 {
						c[a][b] *= s
					}
				}
				cur.setCov(c)
			}
		}
		models = []model{{guess, 0}, {cur, f.n0}}
	}
}

// MaxFixedCycle bounds a cycle number given by hand (Timing.Cycle).
const MaxFixedCycle = 1_000_000_000

// fitVerdict says whether e can number a timing: Cycle (e's numbering)
// when Why is empty, else why not.
type fitVerdict struct {
	Cycle int64
	Why   string // "" (numbered), "far" (> ¼ cycle off) or "wide" (σ too large)
	D, SE float64
}

// fitTryNumber numbers the timing t ± sig with e, or says why it cannot.
func fitTryNumber(e Ephemeris, t JD2, sig float64) fitVerdict {
	E := e.realCycle(t)
	r := math.Round(E)
	d := math.Abs(E - r)
	pe := e.PeriodDays * (1 + e.Pdot*E)
	sE := math.Hypot(e.timeSigmaAt(E), sig) / pe
	v := fitVerdict{Cycle: int64(r), D: d, SE: sE}
	switch {
	case d > 0.25:
		v.Why = "far"
	case d+3*sE >= 0.5:
		v.Why = "wide"
	}
	return v
}

// message explains a verdict, with cycles in the guess' numbering.
func (v fitVerdict) message(shift int64) string {
	c := v.Cycle + shift
	if v.Why == "far" {
		return fmt.Sprintf("it lies %.3f cycle from the nearest predicted event (cycle %d), more than a quarter cycle off; check the guess period and T0, which event was timed, and the time standard", v.D, c)
	}
	return fmt.Sprintf("the ephemeris predicts it at cycle %d with ±%.3f cycle (1σ, ephemeris and timing errors), so cycle %d or %d cannot be excluded at 3σ; give a better guess (smaller uncertainties, if they are) or timings nearer the guess epoch", c, v.SE, c-1, c+1)
}

// fitEphem turns a solution into an Ephemeris (convention and shape from
// guess) with T0 at the solution's origin.
func fitEphem(f fitOut, guess Ephemeris) Ephemeris {
	e := guess
	e.T0 = f.ref.AddDays(f.a)
	e.PeriodDays = f.P
	e.Pdot = 2 * f.Q / f.P
	J := [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, -2 * f.Q / (f.P * f.P), 2 / f.P}}
	e.setCov(orbitSandwich(J, f.cov))
	return e
}

// fitDistinct counts distinct cycle numbers.
func fitDistinct(c []int64) int {
	s := slices.Clone(c)
	slices.Sort(s)
	return len(slices.Compact(s))
}

// fitSolve fits t = T0 + P·x + Q·x² (Q = 0 unless quadratic), x = cycle − n0,
// with n0 the whole cycle nearest the weighted mean cycle. The anchor model
// t ≈ anchor + pg·(cycle − anchorCycle) is subtracted first so that the
// solved quantities are small corrections, and x is scaled by its largest
// magnitude, which keeps the normal matrix well conditioned.
func fitSolve(t []JD2, sig []float64, cycles []int64, quadratic bool, anchor JD2, anchorCycle int64, pg float64) (fitOut, error) {
	k := 2
	if quadratic {
		k = 3
	}
	if d := fitDistinct(cycles); d < k {
		return fitOut{}, &InputError{"timings", fmt.Sprintf("%d distinct cycle(s)", d),
			fmt.Sprintf("timings on at least %d distinct cycles for this fit", k)}
	}
	var sw, swn float64
	for i, c := range cycles {
		w := 1 / (sig[i] * sig[i])
		sw += w
		swn += w * float64(c-anchorCycle)
	}
	n0 := anchorCycle + int64(math.Round(swn/sw))
	ref := anchor.AddDays(pg * float64(n0-anchorCycle))
	x := make([]float64, len(t))
	y := make([]float64, len(t))
	s := 1.0
	for i, c := range cycles {
		x[i] = float64(c - n0)
		y[i] = t[i].SubDays(ref) - pg*x[i]
		s = math.Max(s, math.Abs(x[i]))
	}
	var A [3][3]float64
	var B [3]float64
	for i := range t {
		w := 1 / (sig[i] * sig[i])
		u := x[i] / s
		f := [3]float64{1, u, u * u}
		for a := range k {
			B[a] += w * f[a] * y[i]
			for b := range k {
				A[a][b] += w * f[a] * f[b]
			}
		}
	}
	inv, ok := fitInvert(A, k)
	if !ok {
		return fitOut{}, &InputError{"timings", "singular normal equations", "timings whose cycle numbers span enough of the orbit to fit the model"}
	}
	var p [3]float64
	for a := range k {
		for b := range k {
			p[a] += inv[a][b] * B[b]
		}
	}
	scale := [3]float64{1, 1 / s, 1 / (s * s)}
	out := fitOut{ref: ref, n0: n0, a: p[0], P: pg + p[1]*scale[1], Q: p[2] * scale[2], params: k}
	for a := range k {
		for b := range k {
			out.cov[a][b] = inv[a][b] * scale[a] * scale[b]
		}
	}
	out.resid = make([]float64, len(t))
	for i := range t {
		r := y[i] - (out.a + (out.P-pg)*x[i] + out.Q*x[i]*x[i])
		out.resid[i] = r
		out.chi2 += (r / sig[i]) * (r / sig[i])
	}
	return out, nil
}

// fitInvert inverts the symmetric positive-definite k×k matrix A by
// Gauss–Jordan elimination with partial pivoting; ok is false when A is
// singular to working precision.
func fitInvert(A [3][3]float64, k int) (inv [3][3]float64, ok bool) {
	var m [3][6]float64
	maxDiag := 0.0
	for i := range k {
		for j := range k {
			m[i][j] = A[i][j]
		}
		m[i][k+i] = 1
		maxDiag = math.Max(maxDiag, math.Abs(A[i][i]))
	}
	for col := range k {
		piv := col
		for r := col + 1; r < k; r++ {
			if math.Abs(m[r][col]) > math.Abs(m[piv][col]) {
				piv = r
			}
		}
		if math.Abs(m[piv][col]) <= 1e-13*maxDiag || maxDiag == 0 {
			return inv, false
		}
		m[col], m[piv] = m[piv], m[col]
		d := m[col][col]
		for j := range 2 * k {
			m[col][j] /= d
		}
		for r := range k {
			if r == col {
				continue
			}
			f := m[r][col]
			for j := range 2 * k {
				m[r][j] -= f * m[col][j]
			}
		}
	}
	for i := range k {
		for j := range k {
			inv[i][j] = m[i][k+j]
		}
	}
	return inv, true
}

// fitCheckAlias refits with one cycle more and one fewer across the span and
// reports an ambiguity when either alias fits about as well as best.
func fitCheckAlias(t []JD2, sig []float64, cycles []int64, quadratic bool, best fitOut, guess Ephemeris) error {
	lo, hi := 0, 0
	for i, c := range cycles {
		if c < cycles[lo] {
			lo = i
		}
		if c > cycles[hi] {
			hi = i
		}
	}
	N := cycles[hi] - cycles[lo]
	prior := func(P float64) float64 {
		if guess.PeriodErr <= 0 {
			return 0
		}
		z := (P - guess.PeriodDays) / guess.PeriodErr
		return z * z
	}
	scale := 1.0
	if dof := len(t) - best.params; dof > 0 {
		scale = math.Max(1, best.chi2/float64(dof))
	}
	bestTot := best.chi2 + prior(best.P)
	for _, k := range []int64{-1, 1} {
		if N+k <= 0 {
			continue
		}
		pAlt := best.P * float64(N) / float64(N+k)
		alt := make([]int64, len(t))
		for i := range t {
			alt[i] = int64(math.Round(t[i].SubDays(t[lo]) / pAlt))
		}
		f, err := fitSolve(t, sig, alt, quadratic, t[lo], 0, pAlt)
		if err != nil {
			continue // the alias cannot even be fitted: not a rival
		}
		if tot := f.chi2 + prior(f.P); (tot-bestTot)/scale < 9 {
			return &AmbiguityError{Index: -1, Reason: fmt.Sprintf(
				"%d cycles between the first and last timing (P = %.10g d, χ² = %.3g) and %d cycles (P = %.10g d, χ² = %.3g) fit about equally well; add timings in between, or give the guess period with its uncertainty",
				N, best.P, best.chi2, N+k, f.P, f.chi2)}
		}
	}
	return nil
}

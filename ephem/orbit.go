package ephem

import (
	"fmt"
	"math"
	"strconv"
)

// TimeStandard names the time scale and reference point of an epoch. Every
// epoch phasecast stores carries one; none is ever guessed.
type TimeStandard string

// Time standards accepted for epochs. HJD_UTC and BJD_TDB differ by up to
// about a minute for the same event, so the difference matters.
const (
	StdJDUTC  TimeStandard = "JD_UTC"  // geocentric, UTC
	StdHJDUTC TimeStandard = "HJD_UTC" // heliocentric, UTC
	StdHJDTT  TimeStandard = "HJD_TT"  // heliocentric, TT
	StdBJDUTC TimeStandard = "BJD_UTC" // barycentric, UTC
	StdBJDTDB TimeStandard = "BJD_TDB" // barycentric, TDB (the recommended standard)
)

// Convention names the orbital event that the reference epoch T0 marks.
type Convention string

// Conventions for T0.
const (
	// ConvInferiorConjunction: T0 is the companion's inferior conjunction
	// (companion between the primary and the observer; mid primary eclipse in
	// most eclipsing systems). Optical observers' usual choice.
	ConvInferiorConjunction Convention = "inferior_conjunction"
	// ConvAscendingNode: T0 is the primary's (pulsar's) passage through the
	// ascending node, the pulsar-timing convention (TASC).
	ConvAscendingNode Convention = "ascending_node"
	// ConvSuperiorConjunction: T0 is the companion's superior conjunction.
	ConvSuperiorConjunction Convention = "superior_conjunction"
	// ConvCustom: T0 is at PhaseOffset of the inferior-conjunction cycle.
	ConvCustom Convention = "custom"
)

// Conventions lists the accepted conventions.
var Conventions = []Convention{ConvInferiorConjunction, ConvAscendingNode, ConvSuperiorConjunction, ConvCustom}

// Ephemeris is a binary's orbital ephemeris: the times of its reference event
// t(E) = T0 + P·E + ½·P·Ṗ·E², with uncertainties. All epochs are BJD_TDB once
// stored here; conversion from other standards happens on input.
//
// E is the (real) cycle count from T0; the phase of an instant is the
// fractional part of its E, so phase 0 is the reference event named by
// Convention. The period at cycle E is P·(1 + Ṗ·E) (dt/dE), and Ṗ = dP/dt.
type Ephemeris struct {
	T0         JD2     // reference epoch, BJD_TDB
	T0ErrDays  float64 // 1σ of T0, days (≥ 0)
	PeriodDays float64 // orbital period P, days (> 0)
	PeriodErr  float64 // 1σ of P, days (≥ 0)
	CovT0P     float64 // covariance of T0 and P, days² (0 if unknown)
	Pdot       float64 // dP/dt, dimensionless (s/s); 0 for a linear ephemeris
	PdotErr    float64 // 1σ of Pdot
	Convention Convention
	// PhaseOffset is the phase, in the inferior-conjunction cycle, of T0 when
	// Convention is ConvCustom (0 ≤ PhaseOffset < 1).
	PhaseOffset float64
	// Ecc and OmegaDeg describe an eccentric orbit (Ecc = 0: circular).
	// OmegaDeg is the primary's argument of periastron, degrees.
	Ecc      float64
	OmegaDeg float64
	// CovT0Pdot and CovPPdot are the covariances of Ṗ with T0 (days) and
	// with P (days), as a quadratic fit gives them (0 if unknown).
	CovT0Pdot float64
	CovPPdot  float64
}

// Limits Validate enforces.
const (
	// MinPeriodDays and MaxPeriodDays bound the accepted period: 0.864 s
	// to about 274 years.
	MinPeriodDays = 1e-5
	MaxPeriodDays = 1e5
	// MaxAbsPdot bounds |Ṗ|. The fastest measured orbital decays of compact
	// binaries are of order 1e-10 (common practice); 1e-8 keeps the
	// quadratic ephemeris' turning point, P/(2|Ṗ|) days from T0, at least
	// 480 years away for periods of 5 minutes or more.
	MaxAbsPdot = 1e-8
	// MaxEcc bounds the eccentricity.
	MaxEcc = 0.99
)

// Validate reports the first unacceptable field of e as an *InputError that
// names the field, the value and what is accepted. NaN and infinities are
// rejected everywhere.
func (e Ephemeris) Validate() error {
	nonNeg := func(field string, v float64, unit string) error {
		if !finite(v) || v < 0 {
			return &InputError{field, fmtNum(v), "a finite uncertainty ≥ 0 " + unit}
		}
		return nil
	}
	if !finite(e.T0.Day) || !finite(e.T0.Frac) || e.T0.Float() < epochMinJD || e.T0.Float() > epochMaxJD {
		return &InputError{"t0", fmtNum(e.T0.Float()), "a BJD_TDB Julian date between 2299160.5 (1582-10-15) and 2816787.5 (3000-01-01)"}
	}
	if err := nonNeg("t0_err", e.T0ErrDays, "days"); err != nil {
		return err
	}
	if !finite(e.PeriodDays) || e.PeriodDays < MinPeriodDays || e.PeriodDays > MaxPeriodDays {
		return &InputError{"period", fmtNum(e.PeriodDays), "a period > 0 days, from 1e-05 (0.864 s) to 1e+05 days"}
	}
	if err := nonNeg("period_err", e.PeriodErr, "days"); err != nil {
		return err
	}
	if !finite(e.Pdot) || math.Abs(e.Pdot) > MaxAbsPdot {
		return &InputError{"pdot", fmtNum(e.Pdot), "a dimensionless dP/dt between −1e-08 and 1e-08"}
	}
	if err := nonNeg("pdot_err", e.PdotErr, "(dimensionless)"); err != nil {
		return err
	}
	for _, c := range []struct {
		field  string
		v      float64
		s1, s2 float64
	}{
		{"cov_t0_p", e.CovT0P, e.T0ErrDays, e.PeriodErr},
		{"cov_t0_pdot", e.CovT0Pdot, e.T0ErrDays, e.PdotErr},
		{"cov_p_pdot", e.CovPPdot, e.PeriodErr, e.PdotErr},
	} {
		if !finite(c.v) || math.Abs(c.v) > c.s1*c.s2*(1+1e-9) {
			return &InputError{c.field, fmtNum(c.v), fmt.Sprintf("a covariance with |cov| ≤ σ·σ = %g (correlation between −1 and 1)", c.s1*c.s2)}
		}
	}
	switch e.Convention {
	case ConvInferiorConjunction, ConvAscendingNode, ConvSuperiorConjunction:
		if e.PhaseOffset != 0 {
			return &InputError{"phase_offset", fmtNum(e.PhaseOffset), "0 unless the convention is custom"}
		}
	case ConvCustom:
		if !finite(e.PhaseOffset) || e.PhaseOffset < 0 || e.PhaseOffset >= 1 {
			return &InputError{"phase_offset", fmtNum(e.PhaseOffset), "0 ≤ offset < 1, the phase of T0 in the inferior-conjunction cycle"}
		}
	default:
		v := string(e.Convention)
		if v == "" {
			v = "(missing)"
		}
		return &InputError{"convention", strconv.Quote(v), "inferior_conjunction, ascending_node, superior_conjunction or custom: the event T0 marks is never guessed"}
	}
	if !finite(e.Ecc) || e.Ecc < 0 || e.Ecc > MaxEcc {
		return &InputError{"ecc", fmtNum(e.Ecc), "an eccentricity 0 ≤ e ≤ 0.99"}
	}
	if !finite(e.OmegaDeg) || e.OmegaDeg < -360 || e.OmegaDeg > 360 {
		return &InputError{"omega", fmtNum(e.OmegaDeg), "the primary's argument of periastron, −360..360 degrees"}
	}
	return nil
}

// usable reports whether the arithmetic of e is defined (a cheap subset of
// Validate used by the methods that return no error).
func (e Ephemeris) usable() bool {
	return finite(e.T0.Day) && finite(e.T0.Frac) && finite(e.PeriodDays) && e.PeriodDays > 0 &&
		finite(e.Pdot) && math.Abs(e.Pdot) <= MaxAbsPdot
}

// quad returns Q = ½·P·Ṗ, days per cycle², the quadratic coefficient.
func (e Ephemeris) quad() float64 { return 0.5 * e.PeriodDays * e.Pdot }

// Locate returns the cycle (floor of the real cycle count E) and the phase
// (0 ≤ phase < 1) of the BJD_TDB instant bjd, measured from T0 in the
// ephemeris' own convention. For a quadratic ephemeris E solves
// Q·E² + P·E = bjd − T0 exactly (the root continuous with the linear case,
// in the cancellation-free form 2Δ/(P + √(P² + 4QΔ))); the instant has no
// cycle beyond the turning point, P/(2|Ṗ|) days from T0 on the side where the
// period shrinks to zero, and Locate returns an *InputError there.
func (e Ephemeris) Locate(bjd JD2) (cycle int64, phase float64, err error) {
	if err := e.Validate(); err != nil {
		return 0, 0, err
	}
	if !finite(bjd.Day) || !finite(bjd.Frac) {
		return 0, 0, &InputError{"bjd", fmtNum(bjd.Float()), "a finite BJD_TDB Julian date"}
	}
	c, ph, ok := e.cyclePhase(bjd)
	if !ok {
		return 0, 0, &InputError{"bjd", fmtNum(bjd.Float()), fmt.Sprintf("an instant before the quadratic ephemeris' turning point, %.0f days from T0", -e.PeriodDays/(2*e.Pdot))}
	}
	return c, ph, nil
}

// CyclePhase returns the cycle (floor of the real cycle count, may be
// negative) and the phase (0 ≤ phase < 1) of the BJD_TDB instant bjd,
// measured from T0 in the ephemeris' own convention; exact for the quadratic
// case (see Locate). e should pass Validate: for an ephemeris whose arithmetic
// is undefined (P ≤ 0, NaN) CyclePhase returns (0, 0), and beyond a quadratic
// ephemeris' turning point (at least 480 years away for P ≥ 5 min) it returns
// the turning point's cycle and phase; Locate reports both as errors.
func (e Ephemeris) CyclePhase(bjd JD2) (cycle int64, phase float64) {
	if !e.usable() || !finite(bjd.Day) || !finite(bjd.Frac) {
		return 0, 0
	}
	c, ph, _ := e.cyclePhase(bjd)
	return c, ph
}

// cyclePhase is CyclePhase without the checks; ok is false beyond the
// turning point.
func (e Ephemeris) cyclePhase(bjd JD2) (int64, float64, bool) {
	P := e.PeriodDays
	Q := e.quad()
	d := bjd.SubDays(e.T0)
	ok := true
	var E float64
	if Q == 0 {
		E = d / P
	} else {
		disc := P*P + 4*Q*d
		if disc < 0 {
			disc, ok = 0, false
			d = -P * P / (4 * Q)
		}
		E = 2 * d / (P + math.Sqrt(disc))
	}
	c := math.Floor(E)
	if math.Abs(c) > 9e15 { // far beyond any accepted epoch; keeps int64 safe
		return 0, 0, false
	}
	// Residual time after t(c), then its phase by the same exact formula
	// with the period at cycle c: P_c·φ + Q·φ² = r.
	r := d - (P*c + Q*c*c)
	if Q == 0 {
		r = math.FMA(-c, P, d)
	}
	Pc := P + 2*Q*c
	var ph float64
	if Q == 0 {
		ph = r / Pc
	} else {
		ph = 2 * r / (Pc + math.Sqrt(math.Max(0, Pc*Pc+4*Q*r)))
	}
	// Rounding can leave φ a hair outside [0, 1).
	for ph < 0 {
		ph++
		c--
	}
	for ph >= 1 {
		ph--
		c++
	}
	return int64(c), ph, ok
}

// TimeAt returns the BJD_TDB instant of cycle and phase, the inverse of
// CyclePhase: t = T0 + P·E + Q·E² with E = cycle + phase and Q = ½·P·Ṗ.
// Phase may lie outside [0, 1) (−0.1 is 0.9 of the cycle before). The cycle
// term and the phase term are added to T0 separately, so a round trip
// TimeAt(CyclePhase(t)) returns t within a few tens of nanoseconds over
// decades. For an ephemeris whose arithmetic is undefined it returns the zero
// JD2.
func (e Ephemeris) TimeAt(cycle int64, phase float64) JD2 {
	if !e.usable() || !finite(phase) {
		return JD2{}
	}
	P, Q := e.PeriodDays, e.quad()
	c := float64(cycle)
	base := P*c + Q*c*c
	frac := (P+2*Q*c)*phase + Q*phase*phase
	return e.T0.AddDays(base).AddDays(frac)
}

// realCycle returns the real cycle count E of bjd (cycle + phase).
func (e Ephemeris) realCycle(bjd JD2) float64 {
	c, ph := e.CyclePhase(bjd)
	return float64(c) + ph
}

// covMatrix returns the covariance of (T0, P, Ṗ).
func (e Ephemeris) covMatrix() [3][3]float64 {
	return [3][3]float64{
		{e.T0ErrDays * e.T0ErrDays, e.CovT0P, e.CovT0Pdot},
		{e.CovT0P, e.PeriodErr * e.PeriodErr, e.CovPPdot},
		{e.CovT0Pdot, e.CovPPdot, e.PdotErr * e.PdotErr},
	}
}

// setCov stores a covariance of (T0, P, Ṗ) in e.
func (e *Ephemeris) setCov(c [3][3]float64) {
	e.T0ErrDays = math.Sqrt(math.Max(0, c[0][0]))
	e.PeriodErr = math.Sqrt(math.Max(0, c[1][1]))
	e.PdotErr = math.Sqrt(math.Max(0, c[2][2]))
	e.CovT0P = c[0][1]
	e.CovT0Pdot = c[0][2]
	e.CovPPdot = c[1][2]
}

// timeSigmaAt returns σ of t(E), days, by linear propagation of the
// covariance of (T0, P, Ṗ): ∂t/∂T0 = 1, ∂t/∂P = E + ½ṖE², ∂t/∂Ṗ = ½PE².
func (e Ephemeris) timeSigmaAt(E float64) float64 {
	j := [3]float64{1, E + 0.5*e.Pdot*E*E, 0.5 * e.PeriodDays * E * E}
	c := e.covMatrix()
	var s float64
	for a := range 3 {
		for b := range 3 {
			s += j[a] * c[a][b] * j[b]
		}
	}
	return math.Sqrt(math.Max(0, s))
}

// PhaseErr returns the 1σ uncertainty of the phase predicted for the BJD_TDB
// instant bjd, in phase units (cycles):
//
//	σφ(E) = √(σT0² + E²σP² + 2E·cov(T0,P) + [Ṗ terms]) / P(E)
//
// by linear propagation of the covariance of (T0, P, Ṗ) through
// t(E) = T0 + P·E + ½·P·Ṗ·E², with P(E) = P·(1 + Ṗ·E) the period at cycle E
// (the standard first-order error propagation; e.g. Bevington & Robinson,
// Data Reduction and Error Analysis, 3rd ed., eq. 3.13). It is 0 for an
// ephemeris whose arithmetic is undefined, never NaN.
func (e Ephemeris) PhaseErr(bjd JD2) float64 {
	if !e.usable() {
		return 0
	}
	E := e.realCycle(bjd)
	pe := e.PeriodDays * (1 + e.Pdot*E)
	if !finite(E) || pe <= 0 {
		return 0
	}
	s := e.timeSigmaAt(E) / pe
	if !finite(s) {
		return 0
	}
	return s
}

// WhenPhaseErrExceeds returns the first BJD_TDB instant at or after `after`
// when PhaseErr exceeds tol (phase units, > 0), to about 1 minute (or 1e-4 of
// the interval searched, whichever is larger), searching up to 1000 years
// ahead: `after` itself if it already does; ok is false if it never does
// within that span (no period uncertainty) or tol is not a positive finite
// number. The search doubles a step until the tolerance is passed and then
// bisects; σφ² is a convex quadratic in E for a linear ephemeris, so the
// crossing found is the first.
func (e Ephemeris) WhenPhaseErrExceeds(tol float64, after JD2) (JD2, bool) {
	if !e.usable() || !finite(tol) || tol <= 0 || !finite(after.Day) || !finite(after.Frac) {
		return JD2{}, false
	}
	over := func(dt float64) bool { return e.PhaseErr(after.AddDays(dt)) > tol }
	if over(0) {
		return after, true
	}
	const horizon = 1000 * 365.25
	lo, hi := 0.0, e.PeriodDays
	for !over(hi) {
		lo = hi
		hi *= 2
		if lo >= horizon {
			return JD2{}, false
		}
	}
	for hi-lo > math.Max(1.0/1440, 1e-4*lo) {
		mid := 0.5 * (lo + hi)
		if over(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return after.AddDays(hi), true
}

// WithConvention returns the same ephemeris with T0 moved to the reference
// event of convention c (and, for ConvCustom, the phase offset in the
// inferior-conjunction cycle): the new T0 is the occurrence of that event
// in the same orbit as the old T0, an orbit counted from half a cycle before
// an inferior conjunction to half a cycle after (less than a cycle away), the period and Ṗ are those at
// the new origin, P' = P(1+ṖE₀), Ṗ' = Ṗ/(1+ṖE₀), and the covariance is
// propagated linearly. Eccentricity and ω are taken as exact.
func (e Ephemeris) WithConvention(c Convention, phaseOffset float64) (Ephemeris, error) {
	if err := e.Validate(); err != nil {
		return Ephemeris{}, err
	}
	n := e
	n.Convention, n.PhaseOffset = c, phaseOffset
	if err := n.Validate(); err != nil {
		return Ephemeris{}, err
	}
	// The new T0 is at phase E0 of the old convention. Both reference
	// events are placed in the cycle centred on the inferior conjunction
	// (−½ ≤ φ_ic < ½), so that moving there and back is the identity.
	ic := orbitMeanPhase(e.Ecc, e.OmegaDeg, 90)
	E0 := orbitWrapHalf(orbitRefPhase(n)-ic) - orbitWrapHalf(orbitRefPhase(e)-ic)
	P, Pd := e.PeriodDays, e.Pdot
	n.T0 = e.TimeAt(0, E0)
	n.PeriodDays = P * (1 + Pd*E0)
	n.Pdot = Pd / (1 + Pd*E0)
	J := [3][3]float64{
		{1, E0 + 0.5*Pd*E0*E0, 0.5 * P * E0 * E0},
		{0, 1 + Pd*E0, P * E0},
		{0, 0, 1 / ((1 + Pd*E0) * (1 + Pd*E0))},
	}
	n.setCov(orbitSandwich(J, e.covMatrix()))
	return n, nil
}

// orbitSandwich returns J·C·Jᵀ.
func orbitSandwich(J, C [3][3]float64) [3][3]float64 {
	var out [3][3]float64
	for i := range 3 {
		for k := range 3 {
			var s float64
			for a := range 3 {
				for b := range 3 {
					s += J[i][a] * C[a][b] * J[k][b]
				}
			}
			out[i][k] = s
		}
	}
	return out
}

// orbitWrapHalf returns x reduced to the interval [−0.5, 0.5).
func orbitWrapHalf(x float64) float64 { return x - math.Floor(x+0.5) }

// orbitWrap1 returns x reduced to the interval [0, 1).
func orbitWrap1(x float64) float64 {
	y := x - math.Floor(x)
	if y >= 1 {
		y = 0
	}
	return y
}

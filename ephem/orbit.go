package ephem

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

// Ephemeris is a binary's orbital ephemeris: the times of its reference event
// t(E) = T0 + P·E + ½·P·Ṗ·E², with uncertainties. All epochs are BJD_TDB once
// stored here; conversion from other standards happens on input.
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
}

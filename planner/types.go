// Package planner turns targets with orbital ephemerides and phase goals,
// a site and observing constraints into exposure blocks: visibility
// intervals, phase windows, night schedules and multi-night runs. It is pure:
// it takes plain values and time.Time instants (UTC) and never a clock, a
// request or a database handle.
package planner

import "phasecast/ephem"

// Target is one binary on a team's list.
type Target struct {
	Name       string
	RADeg      float64 // ICRS right ascension, degrees, 0 ≤ RA < 360
	DecDeg     float64 // ICRS declination, degrees, −90..90
	PMRAmasyr  float64 // proper motion in RA × cos δ, mas/yr
	PMDecmasyr float64 // proper motion in Dec, mas/yr
	// CoordEpochJY is the Julian epoch of RADeg and DecDeg (2016.0 for
	// J2016.0); 0 means J2000.0. Proper motion is applied from it.
	CoordEpochJY float64
	Mag          float64 // brightness, magnitudes in Band (0 = unknown when Band is empty)
	// Band is the photometric band of Mag ("U" "B" "V" "R" "I" "g" "r"
	// "i" "z"; "" = no brightness known). With an Instrument in the
	// request, goals with an SNR size their exposures from it.
	Band string
	// FaintMag and BrightMag, when given (both non-zero), make the target a
	// variable: its magnitude in Band is FaintMag at phase FaintPhase and
	// BrightMag at BrightPhase (0 ≤ φ < 1, in the ephemeris' convention),
	// linear in phase between them (MagAtPhase).
	FaintMag, FaintPhase   float64
	BrightMag, BrightPhase float64
	Ephem                  ephem.Ephemeris
	Goals                  []Goal
	Priority               int     // 1 (highest) to 5
	AcquireS               float64 // acquisition overhead per visit (slew, centring), s
	Tags                   []string
	Notes                  string
	// RV is the target's radial-velocity goal (nil: none): what its
	// velocities are wanted for, and the precision predicted from them.
	RV *RVGoal
}

// Star returns the target's catalogue place for the ephem package.
func (t Target) Star() ephem.Star {
	return ephem.Star{RADeg: t.RADeg, DecDeg: t.DecDeg, PMRAmasyr: t.PMRAmasyr, PMDecmasyr: t.PMDecmasyr, EpochJY: t.CoordEpochJY}
}

// Goal is a wanted orbital-phase window for a target with its exposure setup.
type Goal struct {
	// Event names the orbital event the goal is centred on ("" for a plain
	// phase); see ephem's named events. Center is then derived from it.
	Event     string
	Center    float64 // phase of the window's centre in the target's convention, 0 ≤ c < 1
	HalfWidth float64 // half-width of the window in phase, 0 < w < 0.5
	ExposureS float64 // one exposure, s (> 0)
	OverheadS float64 // readout after each exposure, s (≥ 0)
	// NExposures wanted per night: 1..10000, 0 for enough to cover the
	// window once (Goal.CoverOnce), NAsManyAsFit (−1) for as many as one
	// window holds (Goal.Capacity). See Goal.Wanted.
	NExposures int
	// MinNights asks for the goal to be covered on at least this many
	// different nights over a run (0 or 1: one night is enough).
	MinNights int
	// EclipseDurDays is the eclipse's full duration (first to last
	// contact), days, for the events eclipse_ingress and eclipse_egress.
	EclipseDurDays float64
	// Continuous asks for the whole window, Center ± HalfWidth, in one
	// gap-free block (photometry): the first exposure starts at or before
	// the window's opening, the last ends at or after its close, and the
	// exposures follow each other with only the readout between them.
	Continuous bool
	// MinBlockS is the shortest block worth taking for the goal, seconds
	// (0: no minimum).
	MinBlockS float64
	// ContainEvent, set by ResolveGoals for eclipse, eclipse_ingress and
	// eclipse_egress goals, gives credit to a block only when one of its
	// exposures contains the event's instant (the window's centre).
	ContainEvent bool
	// SNR, when positive, is the wanted signal-to-noise per exposure: with
	// an Instrument in the request and a Band on the target, each block's
	// exposure is sized for its own sky (SizeExposure) and ExposureS is
	// used only without an instrument. 0..100000.
	SNR float64
	// MaxSmear is the most of the orbit one S/N-sized exposure may span,
	// phase, 0 ≤ s < 0.5 (0: DefaultMaxSmear).
	MaxSmear float64
}

// Twilight names the Sun altitude that closes the dark time.
type Twilight string

// Twilights and their Sun-centre altitudes.
const (
	TwilightCivil        Twilight = "civil"        // −6°
	TwilightNautical     Twilight = "nautical"     // −12°
	TwilightAstronomical Twilight = "astronomical" // −18°
	TwilightCustom       Twilight = "custom"       // Constraints.SunAltMaxDeg
)

// HorizonPoint is one vertex of a horizon mask: the lowest usable altitude at
// an azimuth (degrees from north through east).
type HorizonPoint struct {
	AzDeg  float64
	AltDeg float64
}

// Constraints are the observing limits at a site. A zero value of a limit
// means "not applied", except MaxAirmass and Twilight whose defaults are
// given by DefaultConstraints.
type Constraints struct {
	Twilight      Twilight
	SunAltMaxDeg  float64 // Sun centre must be below this (set from Twilight unless custom)
	MaxAirmass    float64 // ≥ 1
	MinAltDeg     float64 // refracted altitude floor, degrees
	MinMoonSepDeg float64
	MaxMoonIllum  float64 // 0..1, applied only while the Moon is up; 0 = not applied
	HAMinHours    float64 // hour-angle limits (equatorial mounts); both 0 = not applied
	HAMaxHours    float64
	Horizon       []HorizonPoint
	ZenithExclDeg float64 // alt-az mounts: no tracking within this distance of the zenith
	SunAvoidDeg   float64 // safety: never point closer than this to the Sun
}

// DefaultConstraints are nautical twilight, airmass 2.0, and a 30° Sun
// avoidance (common practice).
func DefaultConstraints() Constraints {
	return Constraints{Twilight: TwilightNautical, SunAltMaxDeg: -12, MaxAirmass: 2.0, SunAvoidDeg: 30}
}

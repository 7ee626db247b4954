package planner

import (
	"fmt"
	"math"
	"time"

	"phasecast/ephem"
)

// This file is what the layers above planner (web, in particular) need of
// the astronomy to show a target, a site or a night: the types they hold as
// plain data, the parsing and formatting of coordinates and epochs, and the
// few computations (phase now, next events, the night's events, the sky at
// an instant, the refit of an ephemeris from timings). Those layers call
// these and never package ephem, so that all astronomy stays below planner.

// Types of package ephem that the layers above hold as plain data. They are
// aliases: the same types, under planner's name.
type (
	Site           = ephem.Site
	Star           = ephem.Star
	Ephemeris      = ephem.Ephemeris
	InputError     = ephem.InputError
	NightEvents    = ephem.NightEvents
	SkyPoint       = ephem.SkyPoint
	FitResult      = ephem.FitResult
	AmbiguityError = ephem.AmbiguityError
	EphemTiming    = ephem.Timing
	TimeStandard   = ephem.TimeStandard
	EpochForm      = ephem.EpochForm
	Convention     = ephem.Convention
	Event          = ephem.Event
	JD2            = ephem.JD2
)

// Values of ephem's enumerations that forms and defaults use.
const (
	StdBJDTDB                = ephem.StdBJDTDB
	FormJD                   = ephem.FormJD
	ConvInferiorConjunction  = ephem.ConvInferiorConjunction
	ConvAscendingNode        = ephem.ConvAscendingNode
	EventInferiorConjunction = ephem.EventInferiorConjunction
)

// The accepted values of ephem's enumerations, in the order forms list them.
var (
	Events        = ephem.Events
	TimeStandards = ephem.TimeStandards
	EpochForms    = ephem.EpochForms
	Conventions   = ephem.Conventions
)

// FormatRAHours writes a right ascension given in degrees as sexagesimal
// hours with secDecimals decimals of seconds (ephem.FormatRAHours).
func FormatRAHours(deg float64, secDecimals int) string { return ephem.FormatRAHours(deg, secDecimals) }

// FormatDecDeg writes a declination (or latitude) in degrees as signed
// sexagesimal degrees with secDecimals decimals of arcseconds
// (ephem.FormatDecDeg).
func FormatDecDeg(deg float64, secDecimals int) string { return ephem.FormatDecDeg(deg, secDecimals) }

// FormatEpoch writes a two-part Julian date in the given form (JD, MJD,
// RJD) with the given decimals, on whatever time scale v is on
// (ephem.FormatEpoch).
func FormatEpoch(v JD2, form EpochForm, decimals int) string {
	return ephem.FormatEpoch(v, form, decimals)
}

// ParseRA reads a right ascension, decimal degrees or sexagesimal hours, into
// degrees 0 ≤ RA < 360 (ephem.ParseRA); errors are *InputError.
func ParseRA(s string) (float64, error) { return ephem.ParseRA(s) }

// ParseDec reads a declination, decimal or sexagesimal degrees, into degrees
// −90 ≤ Dec ≤ 90 (ephem.ParseDec); errors are *InputError.
func ParseDec(s string) (float64, error) { return ephem.ParseDec(s) }

// ParseDate reads a civil date YYYY-MM-DD (ephem.ParseDate); errors are
// *InputError.
func ParseDate(s string) (year int, month time.Month, day int, err error) {
	return ephem.ParseDate(s)
}

// PhaseNow returns the orbital cycle and phase (0 ≤ phase < 1, in e's
// convention) of the star at UTC instant now, seen from site, and the
// phase's 1σ uncertainty (cycles) propagated from e's uncertainties
// (ephem.PhaseAtUTC: UTC → BJD_TDB, then the ephemeris). All three are zero
// for invalid input.
func PhaseNow(site Site, st Star, e Ephemeris, now time.Time) (cycle int64, phase, phaseErr float64) {
	return ephem.PhaseAtUTC(site, st, e, now)
}

// UpcomingEvents returns the UTC instants in [from, to] at which the star's
// orbit, under e, passes orbital phase phase (e's convention), as seen from
// site: the events in BJD_TDB converted back with the Rømer delay
// (ephem.NextEventsUTC). It is nil for invalid input.
func UpcomingEvents(site Site, st Star, e Ephemeris, phase float64, from, to time.Time) []time.Time {
	return ephem.NextEventsUTC(site, st, e, phase, from, to)
}

// PhaseSigmaAt returns the 1σ uncertainty, in cycles, of the phase e
// predicts for the star at UTC instant t seen from site (ephem.BJDTDB, then
// ephem.Ephemeris.PhaseErr).
func PhaseSigmaAt(site Site, st Star, e Ephemeris, t time.Time) float64 {
	return e.PhaseErr(ephem.BJDTDB(site, st, t))
}

// EventPhase returns the phase (e's convention, 0 ≤ φ < 1) of an orbital
// event under e; eclipseDurDays is the eclipse duration for ingress and
// egress events (ephem.Ephemeris.EventPhase).
func EventPhase(e Ephemeris, ev Event, eclipseDurDays float64) (float64, error) {
	return e.EventPhase(ev, eclipseDurDays)
}

// NightEventsOn returns the events of the night that begins on the civil
// date year-month-day in loc at site (sunset, twilights, sunrise; an event
// not reached, as in polar day or night, is nil; ephem.Night). The site
// must be valid.
func NightEventsOn(site Site, year int, month time.Month, day int, loc *time.Location) NightEvents {
	return ephem.Night(site, year, month, day, loc)
}

// ParseTimeLayout is time.Parse in UTC that reads second 60 on a
// leap-second day as the instant the leap second ends, and refuses it
// elsewhere with an error wrapping ErrNotLeapSecond (ephem.ParseTimeLayout;
// RFC 3339 §5.6, RFC 5545 §3.3.12).
func ParseTimeLayout(layout, s string) (time.Time, error) { return ephem.ParseTimeLayout(layout, s) }

// ErrNotLeapSecond is wrapped by the time parsers' error for a second 60
// that is not a leap second.
var ErrNotLeapSecond = ephem.ErrNotLeapSecond

// LocalSiderealHours returns the local apparent sidereal time at site at
// UTC instant t, in hours, 0 ≤ LST < 24 (Meeus ch. 12, via
// ephem.Site.LASTHours; UT1 = UTC, at most 0.9 s off). The hour angle of a
// star is LST − RA.
func LocalSiderealHours(site Site, t time.Time) float64 { return site.LASTHours(t) }

// FormatHours writes hours 0 ≤ h < 24 as "hh:mm" (rounded to the minute,
// 24:00 written 00:00), the way sidereal time is read at the telescope.
func FormatHours(h float64) string {
	m := int(math.Round(h*60)) % (24 * 60)
	if m < 0 {
		m += 24 * 60
	}
	return fmt.Sprintf("%02d:%02d", m/60, m%60)
}

// SkyAt returns where the star stands at UTC instant t seen from site
// (altitude, azimuth, airmass, hour angle, …; ephem.Observe).
func SkyAt(site Site, st Star, t time.Time) SkyPoint { return ephem.Observe(site, st, t) }

// RefineEphemeris fits a linear (or, with quadratic, a quadratic) ephemeris
// to event timings by weighted least squares, starting from guess to number
// the cycles (ephem.FitEphemeris). An ambiguous cycle count is an
// *AmbiguityError.
func RefineEphemeris(timings []EphemTiming, guess Ephemeris, quadratic bool) (FitResult, error) {
	return ephem.FitEphemeris(timings, guess, quadratic)
}

// TimingResidual returns the cycle and the O−C, seconds, of a measured event
// time bjd (BJD_TDB) against e: bjd minus the time e computes for the same
// event (ev; "" is phase 0 of e's convention) in the nearest cycle
// (Ephemeris.CyclePhase, Ephemeris.TimeAt). ok is false for an event whose
// phase e cannot give (an eclipse contact without a duration).
func TimingResidual(e Ephemeris, bjd JD2, ev Event) (cycle int64, ocS float64, ok bool) {
	phase := 0.0
	if ev != "" {
		p, err := e.EventPhase(ev, 0)
		if err != nil {
			return 0, 0, false
		}
		phase = p
	}
	c, ph := e.CyclePhase(bjd)
	d := ph - phase
	switch {
	case d > 0.5:
		c++
	case d < -0.5:
		c--
	}
	return c, bjd.SubDays(e.TimeAt(c, phase)) * 86400, true
}

// RefinedMinusCurrentS returns, in seconds, the time refined predicts for
// phase 0 of cycle c minus the time cur predicts for it (both BJD_TDB), the
// refined ephemeris' cycles being cur's minus cycleShift (FitResult's
// CycleShift): the line O−C points against cur should follow.
func RefinedMinusCurrentS(refined Ephemeris, cycleShift int64, cur Ephemeris, c int64) float64 {
	return refined.TimeAt(c-cycleShift, 0).SubDays(cur.TimeAt(c, 0)) * 86400
}

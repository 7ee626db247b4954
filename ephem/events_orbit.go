package ephem

import (
	"fmt"
	"math"
	"strconv"
	"time"
)

// Orbital geometry and named events.
//
// Two bodies: the primary (star 1: the pulsar, the accretor, the brighter
// star, the body whose radial velocity K1 is measured) and the companion
// (star 2). Each moves about the binary's centre of mass; the companion is
// always opposite the primary. Take z along the line of sight, positive AWAY
// from the observer, and measure the primary's argument of latitude
// u = ν + ω from its ascending node (ν the true anomaly, ω = OmegaDeg the
// primary's argument of periastron). Then (e.g. Hilditch, An Introduction to
// Close Binary Stars, 2001, ch. 2; the standard spectroscopic-binary
// relations):
//
//	z₁ = r₁ sin u sin i                      (primary's distance behind the centre of mass)
//	v₁ = dz₁/dt = K₁ [cos u + e cos ω]       (primary's radial velocity, positive = receding)
//	v₂ = −(M₁/M₂) v₁                         (companion's, always opposite)
//
// The ascending node is where the primary crosses the plane of the sky moving
// away from the observer (z₁ goes from − to +). So:
//
//	u = 0°    primary at its ascending node: primary at MAXIMUM RECESSION
//	          (v₁ = +K₁(1+e cos ω)), companion at maximum approach.
//	          T0 of the pulsar-timing convention (TASC).
//	u = 90°   primary behind the centre of mass, the companion in front of
//	          it, between the primary and the observer — the companion's
//	          INFERIOR conjunction, mid primary eclipse in eclipsing systems;
//	          v₁ = K₁ e cos ω (0 for e = 0), v₁ falling. The primary is
//	          farthest behind here only for a circular orbit: with
//	          r₁ = a₁(1−e²)/(1 + e cos ν), z₁ peaks where cos u = −e cos ω.
//	u = 180°  primary at its descending node: primary at maximum approach,
//	          companion at MAXIMUM RECESSION.
//	u = 270°  companion behind the primary: its SUPERIOR conjunction.
//
// For a circular orbit the phases follow: in the TASC convention the
// companion's inferior conjunction is at phase 0.25 (the eclipses of
// eclipsing binary pulsars are centred near phase 0.25 for this reason); in
// the inferior-conjunction convention the companion's maximum recession is at
// 0.25, its superior conjunction at 0.5, its maximum approach (the primary's
// ascending node) at 0.75, and v₁ = −K₁ sin 2πφ.
//
// For an eccentric orbit (Ecc > 0) the same values of u define the events
// (conjunctions at u = 90° and 270°, the radial-velocity extremes at the
// nodes u = 0° and 180°, where d(cos u)/dt = 0), and their phases follow from
// the mean anomaly: ν = u − ω, the eccentric anomaly
// E = 2 atan2(√(1−e) sin ν/2, √(1+e) cos ν/2) (Meeus (30.1) inverted) and
// Kepler's equation M = E − e sin E (Meeus (30.5)); phase differences are
// differences of M/2π. For an inclined eccentric orbit the instant of least
// projected separation can differ slightly from u = 90° (by an amount of order
// e·cos ω·cot² i / 2π in phase); phasecast uses u = 90°, the usual definition of
// conjunction. Light-travel time across the binary (≤ a·sin i/c, seconds for
// these orbits) is neglected.
//
// Eclipse ingress and egress are placed symmetrically about the inferior
// conjunction: ±½ of the given eclipse duration (first to last contact).

// Event names an orbital event.
type Event string

// Named orbital events. "Companion" and "primary" are as in the notes above.
const (
	// EventInferiorConjunction: the companion in front of the primary
	// (u = 90°); mid primary eclipse in most eclipsing systems.
	EventInferiorConjunction Event = "inferior_conjunction"
	// EventSuperiorConjunction: the companion behind the primary (u = 270°).
	EventSuperiorConjunction Event = "superior_conjunction"
	// EventMaxRecession: quadrature with the companion receding fastest
	// (the primary approaching fastest; primary's descending node, u = 180°).
	EventMaxRecession Event = "max_recession"
	// EventMaxApproach: quadrature with the companion approaching fastest
	// (the primary receding fastest; primary's ascending node, u = 0°, TASC).
	EventMaxApproach Event = "max_approach"
	// EventAscendingNode: the primary's ascending node (u = 0°), the same
	// instant as EventMaxApproach, under the pulsar timers' name.
	EventAscendingNode Event = "ascending_node"
	// EventEclipseIngress and EventEclipseEgress: first and last contact of
	// the eclipse centred on the inferior conjunction, from its duration.
	EventEclipseIngress Event = "eclipse_ingress"
	EventEclipseEgress  Event = "eclipse_egress"
	// EventPeriastron: the bodies at their closest (mean anomaly 0); eccentric
	// orbits only.
	EventPeriastron Event = "periastron"
)

// Events lists the named events.
var Events = []Event{EventInferiorConjunction, EventSuperiorConjunction, EventMaxRecession,
	EventMaxApproach, EventAscendingNode, EventEclipseIngress, EventEclipseEgress, EventPeriastron}

// orbitEventU gives the primary's argument of latitude, degrees, that defines
// each event (periastron and eclipse contacts are handled apart).
var orbitEventU = map[Event]float64{
	EventInferiorConjunction: 90,
	EventSuperiorConjunction: 270,
	EventMaxRecession:        180,
	EventMaxApproach:         0,
	EventAscendingNode:       0,
}

// orbitMeanPhase returns M/2π, cycles in [0, 1), at which the primary's
// argument of latitude is uDeg, for eccentricity ecc and the primary's
// argument of periastron omegaDeg: ν = u − ω, eccentric anomaly from ν
// (Meeus (30.1) inverted), mean anomaly by Kepler's equation, Meeus (30.5).
func orbitMeanPhase(ecc, omegaDeg, uDeg float64) float64 {
	ν := (uDeg - omegaDeg) * math.Pi / 180
	sν, cν := math.Sincos(ν / 2)
	E := 2 * math.Atan2(math.Sqrt(1-ecc)*sν, math.Sqrt(1+ecc)*cν)
	M := E - ecc*math.Sin(E)
	return orbitWrap1(M / (2 * math.Pi))
}

// orbitRefPhase returns M/2π of the event T0 marks in e's convention (for
// ConvCustom, the inferior conjunction's plus PhaseOffset).
func orbitRefPhase(e Ephemeris) float64 {
	switch e.Convention {
	case ConvAscendingNode:
		return orbitMeanPhase(e.Ecc, e.OmegaDeg, 0)
	case ConvSuperiorConjunction:
		return orbitMeanPhase(e.Ecc, e.OmegaDeg, 270)
	case ConvCustom:
		return orbitMeanPhase(e.Ecc, e.OmegaDeg, 90) + e.PhaseOffset
	}
	return orbitMeanPhase(e.Ecc, e.OmegaDeg, 90)
}

// EventPhase returns the phase (0 ≤ φ < 1) of the named event in the
// ephemeris' own convention, by the geometry in the notes above. Phase is
// time over period, so for eccentric orbits it is the mean anomaly's share.
// eclipseDurDays is the eclipse's full duration (first to last contact),
// days, and is needed only for EventEclipseIngress and EventEclipseEgress
// (0 < duration < P); DaysFromPhase and SecondsToDays convert other units.
// Errors: an invalid ephemeris, an unknown event, a missing or impossible
// eclipse duration, periastron of a circular orbit (*InputError each).
func (e Ephemeris) EventPhase(ev Event, eclipseDurDays float64) (float64, error) {
	if err := e.Validate(); err != nil {
		return 0, err
	}
	ref := orbitRefPhase(e)
	switch ev {
	case EventPeriastron:
		if e.Ecc == 0 {
			return 0, &InputError{"event", string(ev), "an event of a circular orbit (periastron needs ecc > 0)"}
		}
		return orbitWrap1(0 - ref), nil
	case EventEclipseIngress, EventEclipseEgress:
		if !finite(eclipseDurDays) || eclipseDurDays <= 0 || eclipseDurDays >= e.PeriodDays {
			return 0, &InputError{"eclipse_duration", fmtNum(eclipseDurDays),
				fmt.Sprintf("the eclipse's full duration, days, > 0 and shorter than the period (%g d)", e.PeriodDays)}
		}
		half := 0.5 * eclipseDurDays / e.PeriodDays
		if ev == EventEclipseIngress {
			half = -half
		}
		return orbitWrap1(orbitMeanPhase(e.Ecc, e.OmegaDeg, 90) - ref + half), nil
	}
	u, ok := orbitEventU[ev]
	if !ok {
		return 0, &InputError{"event", strconv.Quote(string(ev)), "inferior_conjunction, superior_conjunction, max_recession, max_approach, ascending_node, eclipse_ingress, eclipse_egress, periastron"}
	}
	return orbitWrap1(orbitMeanPhase(e.Ecc, e.OmegaDeg, u) - ref), nil
}

// DaysFromPhase returns the time, days, that a phase interval dphi spans at
// the reference period (dphi·P).
func (e Ephemeris) DaysFromPhase(dphi float64) float64 { return dphi * e.PeriodDays }

// SecondsToDays converts seconds to days (s / 86400).
func SecondsToDays(s float64) float64 { return s / secondsPerDay }

// maxOccurrences caps the number of occurrences or intervals returned by one
// call (a 5-minute orbit over a year has 105,000 cycles).
const maxOccurrences = 200000

// NextEvents returns the BJD_TDB instants in [from, to] at which the phase is
// `phase` (any real; reduced to [0, 1)), in time order, at most 200,000. Nil
// for an unusable ephemeris, a non-finite phase or from after to.
func (e Ephemeris) NextEvents(phase float64, from, to JD2) []JD2 {
	if !e.usable() || !finite(phase) || !finite(from.Float()) || !finite(to.Float()) || to.SubDays(from) < 0 {
		return nil
	}
	phase = orbitWrap1(phase)
	c, _ := e.CyclePhase(from)
	var out []JD2
	for k := c; len(out) < maxOccurrences; k++ {
		t := e.TimeAt(k, phase)
		if t.SubDays(from) < 0 {
			continue
		}
		if t.SubDays(to) > 0 {
			break
		}
		out = append(out, t)
	}
	return out
}

// EventTimes returns the BJD_TDB instants of a named event in [from, to]
// (see EventPhase for eclipseDurDays).
func (e Ephemeris) EventTimes(ev Event, eclipseDurDays float64, from, to JD2) ([]JD2, error) {
	ph, err := e.EventPhase(ev, eclipseDurDays)
	if err != nil {
		return nil, err
	}
	return e.NextEvents(ph, from, to), nil
}

// NextEventsUTC returns the UTC instants, as observed from site, at which the
// target's phase is `phase`, for observed instants in [from, to]: NextEvents
// in BJD_TDB converted back with the Rømer delay (UTCFromBJDTDB). Nil for
// invalid inputs.
func NextEventsUTC(site Site, st Star, e Ephemeris, phase float64, from, to time.Time) []time.Time {
	if site.Validate() != nil || baryValidateStar(st) != nil || !e.usable() || to.Before(from) {
		return nil
	}
	bFrom := baryTimes(&site, st, JDUTC(from))
	bTo := BJDTDB(site, st, to)
	var out []time.Time
	off := bFrom.BJDTDB.SubDays(bFrom.JDUTC)
	for _, b := range e.NextEvents(phase, bFrom.BJDTDB, bTo) {
		u := baryInvertFrom(&site, st, b, StdBJDTDB, b.AddDays(-off))
		off = b.SubDays(u)
		t := baryTimeFromJD(u)
		if t.Before(from) || t.After(to) {
			continue
		}
		out = append(out, t)
	}
	return out
}

// PhaseWindow is a range of orbital phase, Center ± HalfWidth, in the
// ephemeris' convention; it wraps through 0 when needed (Center 0.98,
// HalfWidth 0.05 covers 0.93–1 and 0–0.03). HalfWidth ≥ 0.5 covers all
// phases.
type PhaseWindow struct{ Center, HalfWidth float64 }

// Validate reports a non-finite centre or a half-width that is not > 0.
func (w PhaseWindow) Validate() error {
	if !finite(w.Center) {
		return &InputError{"phase_center", fmtNum(w.Center), "a finite phase (reduced to 0..1)"}
	}
	if !finite(w.HalfWidth) || w.HalfWidth <= 0 {
		return &InputError{"phase_half_width", fmtNum(w.HalfWidth), "a half-width > 0 in phase units (≥ 0.5 means every phase)"}
	}
	return nil
}

// Contains reports whether phase φ lies in the window (ends included).
func (w PhaseWindow) Contains(phi float64) bool {
	return math.Abs(orbitWrapHalf(phi-w.Center)) <= w.HalfWidth
}

// Interval is a span of UTC time.
type Interval struct{ Start, End time.Time }

// WindowOccurrences returns the UTC intervals within [from, to] during which
// the target's phase, as observed from site (barycentric times, BJD_TDB),
// lies in window w, in time order, at most 200,000, touching intervals
// merged. Interval ends are exact to about a microsecond (each is inverted
// with UTCFromBJDTDB). Nil for invalid inputs (Site.Validate, w.Validate,
// Ephemeris.Validate) or from after to.
func WindowOccurrences(site Site, st Star, e Ephemeris, w PhaseWindow, from, to time.Time) []Interval {
	if site.Validate() != nil || baryValidateStar(st) != nil || e.Validate() != nil || w.Validate() != nil || !from.Before(to) {
		return nil
	}
	from, to = from.UTC(), to.UTC()
	if w.HalfWidth >= 0.5 {
		return []Interval{{from, to}}
	}
	bFrom := baryTimes(&site, st, JDUTC(from))
	bTo := BJDTDB(site, st, to)
	off := bFrom.BJDTDB.SubDays(bFrom.JDUTC)
	toUTC := func(b JD2) time.Time {
		u := baryInvertFrom(&site, st, b, StdBJDTDB, b.AddDays(-off))
		off = b.SubDays(u)
		return baryTimeFromJD(u)
	}
	center := orbitWrap1(w.Center)
	c, _ := e.CyclePhase(bFrom.BJDTDB)
	var out []Interval
	for k := c - 1; len(out) < maxOccurrences; k++ {
		sb := e.TimeAt(k, center-w.HalfWidth)
		eb := e.TimeAt(k, center+w.HalfWidth)
		if sb.SubDays(bTo) > 0 {
			break
		}
		if eb.SubDays(bFrom.BJDTDB) < 0 {
			continue
		}
		iv := Interval{from, to}
		if sb.SubDays(bFrom.BJDTDB) > 0 {
			iv.Start = toUTC(sb)
		}
		if eb.SubDays(bTo) < 0 {
			iv.End = toUTC(eb)
		}
		if n := len(out); n > 0 && !iv.Start.After(out[n-1].End) {
			out[n-1].End = iv.End
			continue
		}
		out = append(out, iv)
	}
	return out
}

// PhaseAtUTC returns the cycle, the phase (0 ≤ φ < 1, the ephemeris'
// convention) and its 1σ uncertainty (phase units) of the target at UTC
// instant t observed from site: BJDTDB, then CyclePhase and PhaseErr. Zeros
// for invalid inputs.
func PhaseAtUTC(site Site, st Star, e Ephemeris, t time.Time) (cycle int64, phase, phaseErr float64) {
	if !e.usable() {
		return 0, 0, 0
	}
	b, err := BarycentricTimes(site, st, t)
	if err != nil {
		return 0, 0, 0
	}
	cycle, phase = e.CyclePhase(b.BJDTDB)
	return cycle, phase, e.PhaseErr(b.BJDTDB)
}

// PhaseSmear returns the phase interval an exposure of exposureS seconds
// spans: its length over the period, exposureS/(86400·P). Zero for a
// negative or non-finite exposure or an unusable ephemeris.
func PhaseSmear(exposureS float64, e Ephemeris) float64 {
	if !e.usable() || !finite(exposureS) || exposureS < 0 {
		return 0
	}
	return exposureS / secondsPerDay / e.PeriodDays
}

// PhaseSpan returns the phases at the start and end of a block observed from
// site between UTC instants start and end: phaseStart in [0, 1) and
// phaseEnd = phaseStart + the cycles elapsed (so phaseEnd may exceed 1, and
// phaseEnd − phaseStart is the block's length in phase, Rømer-delay changes
// included). Zeros for invalid inputs.
func PhaseSpan(e Ephemeris, site Site, st Star, start, end time.Time) (phaseStart, phaseEnd float64) {
	if !e.usable() {
		return 0, 0
	}
	bs, err1 := BarycentricTimes(site, st, start)
	be, err2 := BarycentricTimes(site, st, end)
	if err1 != nil || err2 != nil {
		return 0, 0
	}
	cs, ps := e.CyclePhase(bs.BJDTDB)
	ce, pe := e.CyclePhase(be.BJDTDB)
	return ps, float64(ce-cs) + pe
}

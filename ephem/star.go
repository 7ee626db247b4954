package ephem

import "math"

// Star is a catalogue position: ICRS (≈ J2000 mean equator and equinox) right
// ascension and declination at the coordinate epoch EpochJY (J2000.0 when
// zero), with optional proper motion. Modern astrometric catalogues give
// positions at later epochs (J2016.0, say): a star is moved by its proper
// motion from that epoch, never from J2000.0 unless that is its epoch.
type Star struct {
	RADeg      float64 // ICRS right ascension, degrees, 0 ≤ RA < 360
	DecDeg     float64 // ICRS declination, degrees, −90..90
	PMRAmasyr  float64 // proper motion in RA × cos δ, milliarcseconds per Julian year
	PMDecmasyr float64 // proper motion in Dec, milliarcseconds per Julian year
	// EpochJY is the Julian epoch of RADeg and DecDeg in Julian years of TT
	// (2016.0 for J2016.0); 0 means J2000.0. Accepted: 0 or 1800..2200.
	EpochJY float64
}

// Epoch returns the coordinate epoch in Julian years (2000 when EpochJY is 0).
func (st Star) Epoch() float64 {
	if st.EpochJY == 0 {
		return 2000
	}
	return st.EpochJY
}

// PositionAt returns the ICRS direction of st at Julian epoch jy (Julian
// years of TT): the star moves uniformly on a straight line in space with
// its tangential velocity from its coordinate epoch, which without parallax
// and radial velocity is p(t) = p₀ + (t − t₀)·μ renormalised, μ the proper
// motion vector on the tangent plane at the epoch (as in ERFA's eraStarpm
// with zero parallax and radial velocity; from memory). It is well defined
// at the poles.
func (st Star) PositionAt(jy float64) (raDeg, decDeg float64) {
	p := properMotion(st, jy-st.Epoch())
	ra, dec := p.radec()
	return ra * radToDeg, dec * radToDeg
}

// atJ2000 returns st moved by its proper motion to its position at J2000.0,
// with EpochJY 0: what the reductions from the J2000 frame start from.
func (st Star) atJ2000() Star {
	if st.EpochJY == 0 || st.EpochJY == 2000 {
		st.EpochJY = 0
		return st
	}
	st.RADeg, st.DecDeg = st.PositionAt(2000)
	if st.RADeg >= 360 {
		st.RADeg -= 360
	}
	st.EpochJY = 0
	return st
}

// maxProperMotionMasYr bounds accepted proper motions: the fastest known star
// moves about 10.4″ per year (from memory), so 20″/yr rejects no real star
// and catches gross unit mistakes (microarcseconds taken for milliarcseconds).
const maxProperMotionMasYr = 20000

// Validate reports the first out-of-range field of st as an *InputError.
// Every function taking a Star expects a valid one.
func (st Star) Validate() error {
	switch {
	case !finite(st.RADeg) || st.RADeg < 0 || st.RADeg >= 360:
		return &InputError{"ra", fmtNum(st.RADeg), "0 ≤ ra < 360 degrees"}
	case !finite(st.DecDeg) || st.DecDeg < -90 || st.DecDeg > 90:
		return &InputError{"dec", fmtNum(st.DecDeg), "−90..90 degrees"}
	case !finite(st.PMRAmasyr) || math.Abs(st.PMRAmasyr) > maxProperMotionMasYr:
		return &InputError{"pmra", fmtNum(st.PMRAmasyr), "−20000..20000 mas/yr (μα·cos δ)"}
	case !finite(st.PMDecmasyr) || math.Abs(st.PMDecmasyr) > maxProperMotionMasYr:
		return &InputError{"pmdec", fmtNum(st.PMDecmasyr), "−20000..20000 mas/yr"}
	case !finite(st.EpochJY) || st.EpochJY != 0 && (st.EpochJY < 1800 || st.EpochJY > 2200):
		return &InputError{"coord_epoch", fmtNum(st.EpochJY), "a Julian epoch J1800.0..J2200.0 (e.g. J2016.0), or empty for J2000.0"}
	}
	return nil
}

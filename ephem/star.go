package ephem

import "math"

// Star is a catalogue position: ICRS (≈ J2000 mean equator and equinox) right
// ascension and declination at epoch J2000.0, with optional proper motion.
type Star struct {
	RADeg      float64 // ICRS right ascension, degrees, 0 ≤ RA < 360
	DecDeg     float64 // ICRS declination, degrees, −90..90
	PMRAmasyr  float64 // proper motion in RA × cos δ, milliarcseconds per Julian year
	PMDecmasyr float64 // proper motion in Dec, milliarcseconds per Julian year
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
	}
	return nil
}

package ephem

// Star is a catalogue position: ICRS (≈ J2000 mean equator and equinox) right
// ascension and declination at epoch J2000.0, with optional proper motion.
type Star struct {
	RADeg      float64 // ICRS right ascension, degrees, 0 ≤ RA < 360
	DecDeg     float64 // ICRS declination, degrees, −90..90
	PMRAmasyr  float64 // proper motion in RA × cos δ, milliarcseconds per Julian year
	PMDecmasyr float64 // proper motion in Dec, milliarcseconds per Julian year
}

// Package ephem is phasecast's pure astronomy: time scales, the sky seen from
// a site (sidereal time, apparent places, horizontal coordinates, refraction,
// airmass), the Sun and the Moon, barycentric time and orbital phase.
//
// It wraps github.com/soniakeys/meeus/v3 (Meeus, Astronomical Algorithms,
// 2nd ed.) and writes only what that package lacks. Every public function takes
// plain values: time.Time instants (UTC), float64 angles whose names carry
// their unit (Deg, Hours, Rad), and small structs. Longitude is east-positive
// at every edge of this package; the one conversion to the book's
// west-positive convention is Site.globe.
//
// Only this package turns time.Time into Julian dates.
package ephem

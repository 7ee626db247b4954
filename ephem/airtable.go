package ephem

import (
	"math"
	"sync"
)

// AirTable is the refraction and the airmass of one atmosphere tabulated
// against the airless altitude, for the fast path: RefractionDeg and
// Airmass(h + RefractionDeg(h)) cost a tangent, a sine and a math.Pow per
// sample, more than the fast alt/az itself; a table lookup with cubic
// Hermite interpolation costs a few multiplications.
//
// The table holds, every 1/32° of airless altitude h from the refraction
// floor (−1.90°, see refractionFloorDeg) to 90°, the refraction R(h) of
// RefractionDeg and the airmass X(h) = Airmass(h + R(h)) continued below the
// refracted horizon by the same formula, with their exact derivatives
// (differentiated by hand from Saemundsson's formula, Meeus (16.4), and
// Kasten & Young (1989), eq. 3), each interval's two cubics kept as
// polynomial coefficients. Cubic Hermite interpolation between knots
// d apart errs by at most d⁴/384 · max|y⁗|: with d = 1/32° that is below
// 1e-9° (3e-6″) in refraction and below 1e-7 in airmass (the airmass's
// fourth derivative is largest on the horizon, about 22 per degree⁴ at
// X ≈ 38); the test suite compares the table with the full functions over
// the whole range for several atmospheres and checks 0.01″ and 1e-6.
//
// An AirTable is read-only once built and safe for concurrent use; Site's
// AirTable shares one table per atmosphere.
type AirTable struct {
	scale float64 // atmosphereScale
	h0    float64 // first knot, airless degrees
	inv   float64 // knots per degree
	n     int     // knots
	// per interval between knots: the cubic Hermite interpolants of the
	// refraction (degrees) and of the airmass as polynomials in the position
	// t (0..1) inside the interval
	knots []airKnot
}

// airKnot is one interval's two cubics, y(t) = c0 + c1·t + c2·t² + c3·t³.
type airKnot struct{ r, x [4]float64 }

// hermiteCubic returns the coefficients of the cubic Hermite interpolant on
// t ∈ [0, 1] between values y0, y1 with changes m0, m1 over the interval
// (derivatives times the interval's length).
func hermiteCubic(y0, m0, y1, m1 float64) [4]float64 {
	return [4]float64{y0, m0, 3*(y1-y0) - 2*m0 - m1, 2*(y0-y1) + m0 + m1}
}

// horner evaluates cubic c at t.
func horner(c *[4]float64, t float64) float64 {
	return c[0] + t*(c[1]+t*(c[2]+t*c[3]))
}

// airKnotsPerDeg is the table's resolution, knots per degree.
const airKnotsPerDeg = 32

var airTables sync.Map // atmosphere scale (float64) → *AirTable

// AirTable returns the refraction and airmass table of the site's
// atmosphere (the standard 1010 hPa, 10 °C when the site gives none), built
// on first use and shared by every site with the same atmosphere.
func (s Site) AirTable() *AirTable {
	p, t := s.atmosphere()
	scale := atmosphereScale(p, t)
	if v, ok := airTables.Load(scale); ok {
		return v.(*AirTable)
	}
	v, _ := airTables.LoadOrStore(scale, newAirTable(scale))
	return v.(*AirTable)
}

// newAirTable tabulates refraction and airmass for atmosphere scale scale
// (atmosphereScale; 0 for no air).
func newAirTable(scale float64) *AirTable {
	h0 := refractionFloorDeg
	n := int(math.Ceil((90-h0)*airKnotsPerDeg)) + 2
	a := &AirTable{scale: scale, h0: h0, inv: airKnotsPerDeg, n: n, knots: make([]airKnot, n-1)}
	const step = 1.0 / airKnotsPerDeg
	r0, dr0, x0, dx0 := airExact(h0, scale)
	for i := range a.knots {
		r1, dr1, x1, dx1 := airExact(h0+float64(i+1)*step, scale)
		a.knots[i] = airKnot{
			r: hermiteCubic(r0, dr0*step, r1, dr1*step),
			x: hermiteCubic(x0, dx0*step, x1, dx1*step),
		}
		r0, dr0, x0, dx0 = r1, dr1, x1, dx1
	}
	return a
}

// airExact returns, at airless altitude h (degrees, at or above the
// refraction floor), the refraction R (degrees, RefractionDeg with
// atmosphere scale s), dR/dh, the airmass X of Kasten & Young's formula at
// the refracted altitude h + R (continued below the horizon) and dX/dh.
//
// Saemundsson, Meeus (16.4): R = s · (1.02/60) / tan x, x = h + 10.3/(h + 5.11)
// in degrees, so dR/dh = −s · (1.02/60) · (π/180) · x′ / sin² x with
// x′ = 1 − 10.3/(h + 5.11)². Kasten & Young (1989), eq. 3: X = 1/D,
// D = sin h_r + 0.50572 (h_r + 6.07995)^−1.6364, so
// dX/dh = −X² · (cos h_r · π/180 − 1.6364 · f/(h_r + 6.07995)) · (1 + dR/dh),
// f the second term of D.
func airExact(h, s float64) (r, dr, x, dx float64) {
	r = refractionScaled(h, s)
	xa := (h + 10.3/(h+5.11)) * degToRad
	xp := 1 - 10.3/((h+5.11)*(h+5.11))
	sx := math.Sin(xa)
	dr = -s * (1.02 / 60) * degToRad * xp / (sx * sx)
	hr := h + r
	f := 0.50572 * math.Pow(hr+6.07995, -1.6364)
	sh, ch := math.Sincos(hr * degToRad)
	x = 1 / (sh + f)
	dx = -x * x * (ch*degToRad - 1.6364*f/(hr+6.07995)) * (1 + dr)
	return r, dr, x, dx
}

// lookup returns the knot interval and the position in it (0..1) of
// airless altitude h; ok is false outside the table.
func (a *AirTable) lookup(h float64) (i int, t float64, ok bool) {
	p := (h - a.h0) * a.inv
	if !(p >= 0) || p >= float64(a.n-1) { // also NaN
		return 0, 0, false
	}
	i = int(p)
	return i, p - float64(i), true
}

// RefractedAltDeg returns the apparent altitude, degrees, of a body at
// airless altitude altAirlessDeg: Site.RefractedAltDeg of the table's
// atmosphere, to within 1e-9° (the full computation outside the table).
func (a *AirTable) RefractedAltDeg(altAirlessDeg float64) float64 {
	i, t, ok := a.lookup(altAirlessDeg)
	if !ok {
		return altAirlessDeg + refractionScaled(altAirlessDeg, a.scale)
	}
	return altAirlessDeg + horner(&a.knots[i].r, t)
}

// RefractedAirmass returns the apparent altitude (degrees) of a body at
// airless altitude altAirlessDeg and its airmass: Site.RefractedAltDeg and
// Airmass of it, to within 1e-9° and 1e-7 (the full computation outside
// the table). ok is false, and x is 0, when the refracted altitude is below
// the horizon or above 90°, or the input is not a number (as Airmass).
func (a *AirTable) RefractedAirmass(altAirlessDeg float64) (altRefrDeg, x float64, ok bool) {
	i, t, in := a.lookup(altAirlessDeg)
	if !in {
		altRefrDeg = altAirlessDeg + refractionScaled(altAirlessDeg, a.scale)
		x, ok = Airmass(altRefrDeg)
		return altRefrDeg, x, ok
	}
	k := &a.knots[i]
	altRefrDeg = altAirlessDeg + horner(&k.r, t)
	if !(altRefrDeg >= 0 && altRefrDeg <= 90) {
		return altRefrDeg, 0, false
	}
	return altRefrDeg, horner(&k.x, t), true
}

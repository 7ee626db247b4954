package ephem

import (
	"fmt"
	"math"
	"time"
)

// The fast path: altitude and azimuth of many targets at many instants of
// one span (a night) for one site, at a few floating-point operations and
// three trigonometric calls per sample.
//
// What changes slowly is computed once per span by the full reduction
// (ApparentPlace, LASTHours) at the span's ends and interpolated linearly:
//
//   - each target's apparent place, as a unit vector: precession moves it
//     by at most 0.006″ an hour (50″ a year), aberration by 0.015″ an hour,
//     nutation by less; the departure from a straight line over 36 hours is
//     below 0.02″ (the 13.7-day nutation terms, 0.2″ in amplitude,
//     dominate: A·ω²·(T/2)²/2 ≈ 0.012″);
//   - the local apparent sidereal time, linear in time apart from the
//     equation of the equinoxes, which drifts by up to about 0.15″ a day and
//     departs from its chord by less than 0.02″ in 36 hours.
//
// Spans longer than 36 hours are cut into equal segments of at most
// 36 hours, each with its own chords. The diurnal aberration is applied
// exactly at every sample, as in Site.Horizontal. The test suite checks the
// result against Site.Horizontal(ApparentPlace(...)) over whole nights for
// many targets: the worst difference is logged and must stay below 0.1″.

// maxSegment is the longest span over which one chord is used.
const maxSegment = 36 * time.Hour

// siderealRateRadPerSec is the nominal rate of sidereal time, radians per
// second of UT: 2π·1.00273790935/86400 (Meeus ch. 12). It only guides the
// unwrapping of sidereal time between knots.
const siderealRateRadPerSec = 2 * math.Pi * 1.00273790935 / 86400

// SkyFrame is the per-site, per-span precomputation of the fast path.
// It is read-only once built and safe for concurrent use.
type SkyFrame struct {
	site           Site
	from, to       time.Time
	sinLat, cosLat float64
	kd             float64 // diurnal aberration at the site, rad
	t0             float64 // from, Unix seconds
	segSec         float64 // segment length, s
	invSeg         float64
	nseg           int
	theta          []float64 // LAST at the knots, rad, len nseg+1
	omega          []float64 // LAST rate on each segment, rad/s, len nseg
	reducers       []*placeReducer
}

// NewSkyFrame prepares the fast path for the site over [from, to]. Results
// are within 0.1″ of the full computation inside the span; outside it the
// nearest segment is extrapolated and the error grows roughly with the
// square of the distance from the span (0.015″ a day past its end in the
// test suite). When to is not after from, a one-hour span from `from` is
// used. The site must be valid (Site.Validate).
func NewSkyFrame(site Site, from, to time.Time) *SkyFrame {
	span := to.Sub(from)
	if span <= 0 {
		span = time.Hour
	}
	nseg := int((span + maxSegment - 1) / maxSegment)
	segSec := span.Seconds() / float64(nseg)
	f := &SkyFrame{
		site:     site,
		from:     from.UTC(),
		to:       from.UTC().Add(span),
		kd:       site.diurnalK(),
		t0:       unixSeconds(from),
		segSec:   segSec,
		invSeg:   1 / segSec,
		nseg:     nseg,
		theta:    make([]float64, nseg+1),
		omega:    make([]float64, nseg),
		reducers: make([]*placeReducer, nseg+1),
	}
	f.sinLat, f.cosLat = math.Sincos(site.LatDeg * degToRad)
	for k := 0; k <= nseg; k++ {
		tk := f.knot(k)
		f.theta[k] = site.lastRad(tk)
		f.reducers[k] = newPlaceReducer(JDTT(tk).Float())
	}
	for k := 0; k < nseg; k++ {
		nominal := siderealRateRadPerSec * segSec
		f.omega[k] = (nominal + wrapPi(f.theta[k+1]-f.theta[k]-nominal)) / segSec
	}
	return f
}

// knot returns the instant of knot k.
func (f *SkyFrame) knot(k int) time.Time {
	return f.from.Add(time.Duration(math.Round(float64(k) * f.segSec * 1e9)))
}

// Site returns the frame's site.
func (f *SkyFrame) Site() Site { return f.site }

// Span returns the frame's span, UTC.
func (f *SkyFrame) Span() (from, to time.Time) { return f.from, f.to }

// SunAltDeg returns the altitude of the Sun's centre, degrees, airless,
// topocentric, at instant t: the full computation (Site.SunAltDeg), meant
// for a coarse grid.
func (f *SkyFrame) SunAltDeg(t time.Time) float64 { return f.site.SunAltDeg(t) }

// MoonAltDeg returns the altitude of the Moon's centre, degrees, airless,
// topocentric, at instant t: the full computation (Site.MoonAltDeg).
func (f *SkyFrame) MoonAltDeg(t time.Time) float64 { return f.site.MoonAltDeg(t) }

// Track is one target's precomputation in a SkyFrame: its apparent place as
// a unit vector at the frame's knots and the rate of change between them.
// Get one from SkyFrame.Track; the zero Track has no frame and reports every
// direction at altitude −90° (below any horizon), hour angle 0 and
// parallactic angle 0.
type Track struct {
	f    *SkyFrame
	segs []trackSeg
}

type trackSeg struct {
	p, dp vec3 // apparent place at the segment's start; its change per second
}

// Track prepares target st (which must be valid, Star.Validate) for the
// frame: its apparent place at every knot of the span (two for a span of up
// to 36 hours), by the full reduction of ApparentPlace.
func (f *SkyFrame) Track(st Star) Track {
	tr := Track{f: f, segs: make([]trackSeg, f.nseg)}
	prev := f.reducers[0].apparent(st)
	for k := 0; k < f.nseg; k++ {
		next := f.reducers[k+1].apparent(st)
		tr.segs[k] = trackSeg{
			p: prev,
			dp: vec3{
				(next[0] - prev[0]) * f.invSeg,
				(next[1] - prev[1]) * f.invSeg,
				(next[2] - prev[2]) * f.invSeg,
			},
		}
		prev = next
	}
	return tr
}

// hourAngleVec returns the target's direction at Unix time u in the
// hour-angle frame, (cos δ cos H, cos δ sin H, sin δ) with H positive west,
// diurnal aberration included. ok is false for the zero Track.
func (tr Track) hourAngleVec(u float64) (x, y, z float64, ok bool) {
	f := tr.f
	if f == nil {
		return 0, 0, 0, false
	}
	i, tau := f.segment(u)
	s := &tr.segs[i]
	px := s.p[0] + tau*s.dp[0]
	py := s.p[1] + tau*s.dp[1]
	pz := s.p[2] + tau*s.dp[2]
	st, ct := math.Sincos(f.theta[i] + f.omega[i]*tau)
	x, y, z = diurnalAberration(ct*px+st*py, st*px-ct*py, pz, f.kd)
	return x, y, z, true
}

// segment returns the segment holding Unix time u (the first or last one
// outside the span) and the seconds since that segment's start.
func (f *SkyFrame) segment(u float64) (k int, tau float64) {
	dt := u - f.t0
	if dt > 0 {
		k = min(int(dt*f.invSeg), f.nseg-1)
	}
	return k, dt - float64(k)*f.segSec
}

// AltAz returns the target's airless altitude (degrees, −90..90) and azimuth
// (degrees from north through east, [0, 360)) at instant t; within 0.1″ of
// Site.Horizontal(ApparentPlace(st, t), t) inside the frame's span.
func (tr Track) AltAz(t time.Time) (altDeg, azDeg float64) {
	return tr.AltAzUnix(unixSeconds(t))
}

// AltAzUnix is AltAz at Unix time unixSec (seconds since 1970-01-01 UTC,
// leap seconds not counted, as time.Time.Unix), for hot loops.
func (tr Track) AltAzUnix(unixSec float64) (altDeg, azDeg float64) {
	x, y, z, ok := tr.hourAngleVec(unixSec)
	if !ok {
		return -90, 0
	}
	f := tr.f
	up := f.sinLat*z + f.cosLat*x
	north := f.cosLat*z - f.sinLat*x
	altDeg = math.Atan2(up, math.Sqrt(north*north+y*y)) * radToDeg
	azDeg = math.Atan2(-y, north) * radToDeg
	if azDeg < 0 {
		azDeg += 360
	}
	return altDeg, azDeg
}

// HorizonUnix returns the target's airless altitude (degrees, −90..90) and
// its direction as a unit vector in the horizon frame, (north, east,
// zenith) = (cos h cos A, cos h sin A, sin h) with A the azimuth from north
// through east, at Unix time unixSec: AltAzUnix without the azimuth's
// arctangent and without the sines and cosines that rebuild the vector
// from the angles (equal to them to rounding). The zero Track gives −90°
// and the nadir.
func (tr Track) HorizonUnix(unixSec float64) (altDeg float64, dir [3]float64) {
	x, y, z, ok := tr.hourAngleVec(unixSec)
	if !ok {
		return -90, [3]float64{0, 0, -1}
	}
	f := tr.f
	up := f.sinLat*z + f.cosLat*x
	north := f.cosLat*z - f.sinLat*x
	east := -y
	horiz := math.Sqrt(north*north + y*y)
	altDeg = math.Atan2(up, horiz) * radToDeg
	inv := 1 / math.Sqrt(horiz*horiz+up*up)
	return altDeg, [3]float64{north * inv, east * inv, up * inv}
}

// AltUnix returns only the airless altitude, degrees, at Unix time unixSec:
// AltAzUnix without the azimuth's arctangent.
func (tr Track) AltUnix(unixSec float64) float64 {
	x, y, z, ok := tr.hourAngleVec(unixSec)
	if !ok {
		return -90
	}
	f := tr.f
	up := f.sinLat*z + f.cosLat*x
	north := f.cosLat*z - f.sinLat*x
	return math.Atan2(up, math.Sqrt(north*north+y*y)) * radToDeg
}

// HourAngleHours returns the target's local hour angle at instant t, hours,
// [−12, 12), positive west of the meridian.
func (tr Track) HourAngleHours(t time.Time) float64 {
	x, y, _, ok := tr.hourAngleVec(unixSeconds(t))
	if !ok {
		return 0
	}
	return wrapPi(math.Atan2(y, x)) * 12 / math.Pi
}

// ParallacticDeg returns the target's parallactic angle q at instant t,
// degrees, (−180, 180]: Meeus (14.1), tan q = sin H / (tan φ cos δ −
// sin δ cos H), here multiplied through by cos φ cos δ so that it needs no
// tangent.
func (tr Track) ParallacticDeg(t time.Time) float64 {
	x, y, z, ok := tr.hourAngleVec(unixSeconds(t))
	if !ok {
		return 0
	}
	f := tr.f
	return math.Atan2(f.cosLat*y, f.sinLat*(x*x+y*y)-f.cosLat*z*x) * radToDeg
}

// TimeGrid is a uniform grid of instants in a SkyFrame with the rotation of
// the Earth precomputed at each, so that Track.AltAzGrid pays for the
// sidereal rotation once per instant for all targets rather than once per
// target. It is read-only once built and safe for concurrent use.
type TimeGrid struct {
	f         *SkyFrame
	startUnix float64
	stepSec   float64
	seg       []int32   // segment of each instant
	tau       []float64 // seconds since the segment's start
	sinT      []float64 // sine of the local apparent sidereal time
	cosT      []float64
}

// Grid returns the n instants start, start+step, …, start+(n−1)·step of
// the frame (instants outside the frame's span are extrapolated as in
// Track.AltAz). step must be positive and n at least 1 and at most 10⁷;
// otherwise an *InputError names the field.
func (f *SkyFrame) Grid(start time.Time, step time.Duration, n int) (*TimeGrid, error) {
	switch {
	case step <= 0:
		return nil, &InputError{"step", step.String(), "a positive duration"}
	case n < 1 || n > 10_000_000:
		return nil, &InputError{"n", fmt.Sprint(n), "1..10000000 instants"}
	}
	g := &TimeGrid{
		f:         f,
		startUnix: unixSeconds(start),
		stepSec:   step.Seconds(),
		seg:       make([]int32, n),
		tau:       make([]float64, n),
		sinT:      make([]float64, n),
		cosT:      make([]float64, n),
	}
	for i := range n {
		k, tau := f.segment(g.startUnix + float64(i)*g.stepSec)
		g.seg[i] = int32(k)
		g.tau[i] = tau
		g.sinT[i], g.cosT[i] = math.Sincos(f.theta[k] + f.omega[k]*tau)
	}
	return g, nil
}

// Len returns the number of instants in the grid.
func (g *TimeGrid) Len() int { return len(g.tau) }

// Time returns instant i of the grid, UTC (rounded to the nanosecond).
func (g *TimeGrid) Time(i int) time.Time {
	return unixTime(g.startUnix + float64(i)*g.stepSec)
}

// AltAzGrid fills altDeg[i] and azDeg[i] with the target's airless altitude
// and azimuth (as AltAz) at every instant i of the grid, for i below
// g.Len() and below the length of the slices; azDeg may be nil when only
// altitudes are wanted. The results equal AltAzUnix at the same instants to
// rounding. The grid must come from the track's frame; otherwise, and for
// the zero Track, altitudes are −90 and azimuths 0.
func (tr Track) AltAzGrid(g *TimeGrid, altDeg, azDeg []float64) {
	n := min(g.Len(), len(altDeg))
	if azDeg != nil {
		n = min(n, len(azDeg))
	}
	f := tr.f
	if f == nil || g.f != f {
		for i := range n {
			altDeg[i] = -90
			if azDeg != nil {
				azDeg[i] = 0
			}
		}
		return
	}
	segs := tr.segs
	sinLat, cosLat, kd := f.sinLat, f.cosLat, f.kd
	for i := range n {
		s := &segs[g.seg[i]]
		tau := g.tau[i]
		px := s.p[0] + tau*s.dp[0]
		py := s.p[1] + tau*s.dp[1]
		pz := s.p[2] + tau*s.dp[2]
		st, ct := g.sinT[i], g.cosT[i]
		x, y, z := diurnalAberration(ct*px+st*py, st*px-ct*py, pz, kd)
		up := sinLat*z + cosLat*x
		north := cosLat*z - sinLat*x
		altDeg[i] = math.Atan2(up, math.Sqrt(north*north+y*y)) * radToDeg
		if azDeg != nil {
			az := math.Atan2(-y, north) * radToDeg
			if az < 0 {
				az += 360
			}
			azDeg[i] = az
		}
	}
}

// unixTime returns the instant u seconds after 1970-01-01 UTC.
func unixTime(u float64) time.Time {
	sec := math.Floor(u)
	return time.Unix(int64(sec), int64(math.Round((u-sec)*1e9))).UTC()
}

// unixSeconds returns t as seconds since 1970-01-01 UTC (as time.Time.Unix).
func unixSeconds(t time.Time) float64 {
	return float64(t.Unix()) + float64(t.Nanosecond())*1e-9
}

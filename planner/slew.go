package planner

import (
	"fmt"
	"math"

	"phasecast/ephem"
)

// Mount types a Telescope accepts.
const (
	MountAltAz      = "altaz"      // azimuth and altitude axes
	MountEquatorial = "equatorial" // hour-angle and declination axes
)

// Axis is how fast one axis of a mount (or a dome) turns: a top rate and an
// acceleration, the same for speeding up and slowing down.
type Axis struct {
	RateDegS   float64 // top rate, degrees per second, > 0
	AccelDegS2 float64 // acceleration, degrees per second², > 0; 0 means "reaches the top rate at once"
}

// Telescope describes how a telescope moves from one pointing to the next.
// Without a Telescope the planner charges each visit a fixed acquisition time
// (Target.AcquireS, or the run's), as it always did.
type Telescope struct {
	Mount string // MountAltAz or MountEquatorial
	// Axis1 is the azimuth axis (alt-azimuth) or the hour-angle axis
	// (equatorial); Axis2 the altitude or declination axis.
	Axis1, Axis2 Axis
	// Dome, when its RateDegS is above zero, turns with the telescope to the
	// target's azimuth, the short way round; the mount and the dome move at
	// the same time.
	Dome Axis
	// SettleS is the time from the end of the motion to a steady image, s.
	SettleS float64
	// AcquireS is the fixed acquisition and centring time after settling, s.
	AcquireS float64
	// WrapMinDeg and WrapMaxDeg bound the azimuth axis of an alt-azimuth
	// mount in its own unwrapped coordinate (azimuth plus whole turns; e.g.
	// −270..270 for 540° of cable wrap). Both zero means no limit: the
	// azimuth axis turns the short way round.
	WrapMinDeg, WrapMaxDeg float64
}

// Validate reports the first bad field of tel as an *ephem.InputError.
func (tel Telescope) Validate() error {
	bad := func(field, value, accepted string) error {
		return &ephem.InputError{Field: "telescope." + field, Value: value, Accepted: accepted}
	}
	if tel.Mount != MountAltAz && tel.Mount != MountEquatorial {
		return bad("mount", fmt.Sprintf("%q", tel.Mount), MountAltAz+" or "+MountEquatorial)
	}
	axes := []struct {
		name string
		a    Axis
		dome bool
	}{{"axis1", tel.Axis1, false}, {"axis2", tel.Axis2, false}, {"dome", tel.Dome, true}}
	for _, x := range axes {
		switch {
		case !finite(x.a.RateDegS) || x.a.RateDegS < 0 || x.a.RateDegS == 0 && !x.dome || x.a.RateDegS > 90:
			acc := "0 < rate ≤ 90 degrees per second"
			if x.dome {
				acc = "0 (no dome) or 0 < rate ≤ 90 degrees per second"
			}
			return bad(x.name+".rate_deg_s", fmtNum(x.a.RateDegS), acc)
		case !finite(x.a.AccelDegS2) || x.a.AccelDegS2 < 0 || x.a.AccelDegS2 > 1000:
			return bad(x.name+".accel_deg_s2", fmtNum(x.a.AccelDegS2), "0 (at once) or 0 < acceleration ≤ 1000 degrees per second²")
		}
	}
	switch {
	case !finite(tel.SettleS) || tel.SettleS < 0 || tel.SettleS > 3600:
		return bad("settle_s", fmtNum(tel.SettleS), "0..3600 seconds")
	case !finite(tel.AcquireS) || tel.AcquireS < 0 || tel.AcquireS > 3600:
		return bad("acquire_s", fmtNum(tel.AcquireS), "0..3600 seconds")
	case !finite(tel.WrapMinDeg) || !finite(tel.WrapMaxDeg):
		return bad("wrap", fmtNum(tel.WrapMinDeg)+".."+fmtNum(tel.WrapMaxDeg), "finite degrees")
	case tel.Mount == MountAltAz && tel.hasWrap() && (tel.WrapMaxDeg-tel.WrapMinDeg < 360 || tel.WrapMaxDeg-tel.WrapMinDeg > 720):
		return bad("wrap", fmtNum(tel.WrapMinDeg)+".."+fmtNum(tel.WrapMaxDeg), "a range of 360 to 720 degrees (e.g. −270..270), or none")
	}
	return nil
}

func (tel Telescope) hasWrap() bool { return tel.WrapMinDeg != 0 || tel.WrapMaxDeg != 0 }

// Pointing is where the telescope points: the target's azimuth (degrees from
// north through east) and altitude, and its hour angle and declination. An
// alt-azimuth mount uses the first two, an equatorial mount the last two;
// the dome always follows the azimuth.
type Pointing struct {
	AzDeg, AltDeg float64
	HAHours       float64
	DecDeg        float64
	// WrapDeg is the azimuth axis' position in its unwrapped coordinate
	// (alt-azimuth mounts with a cable wrap): AzDeg plus whole turns, known
	// when Wrapped is set. SlewTime sets both for the pointing it arrives
	// at; for a pointing with Wrapped false the position in the wrap nearest
	// 0 is taken.
	WrapDeg float64
	Wrapped bool
}

// Slew is the cost of one move and what it is made of.
type Slew struct {
	Seconds float64 // total: the slowest motion, then settling, then acquisition
	// Axis1S, Axis2S and DomeS are how long each motion takes alone.
	Axis1S, Axis2S, DomeS float64
	// Axis1Deg and Axis2Deg are how far each axis turns (the azimuth axis
	// through its cable wrap, so possibly more than 180°).
	Axis1Deg, Axis2Deg float64
	SettleS, AcquireS  float64
	// Governs names the motion that takes longest: "azimuth", "altitude",
	// "hour angle", "declination" or "dome".
	Governs string
	// To is the pointing arrived at, its WrapDeg set.
	To Pointing
}

// SlewTime returns the time tel needs from pointing from to pointing to:
//
//	T = max(t₁, t₂, t_dome) + settle + acquire,
//
// the axes and the dome moving at once and the slowest governing. Each
// motion, through d degrees from rest to rest with top rate v and
// acceleration a, follows a trapezoidal velocity profile: it speeds up for
// v/a seconds over v²/(2a) degrees, cruises, and slows down the same way, so
//
//	t = d/v + v/a        when d ≥ v²/a,
//	t = 2·√(d/a)         when d < v²/a (the top rate is never reached),
//
// and t = d/v when a is 0 (common practice for a first estimate of slews).
// The hour-angle axis turns through |ΔHA| (the short way, at most 12 h),
// the declination and altitude axes through |Δδ| and |Δalt|, the dome through
// the short angle between the azimuths. An alt-azimuth azimuth axis with a
// cable wrap turns to the position az + k·360° inside [WrapMinDeg,
// WrapMaxDeg] nearest its current one: when the near way round would leave
// the wrap, it unwinds the long way. The sky does not wait for the slew
// (the target's position at the slew's end is what the caller passes); the
// settle and acquisition times are fixed.
func SlewTime(tel Telescope, from, to Pointing) Slew {
	s := Slew{SettleS: tel.SettleS, AcquireS: tel.AcquireS, To: to}
	switch tel.Mount {
	case MountEquatorial:
		s.Axis1Deg = math.Abs(wrap180((to.HAHours - from.HAHours) * 15))
		s.Axis2Deg = math.Abs(to.DecDeg - from.DecDeg)
	default:
		s.To.WrapDeg, s.To.Wrapped = tel.wrapTarget(from, to.AzDeg), true
		if tel.hasWrap() {
			s.Axis1Deg = math.Abs(s.To.WrapDeg - from.wrapOrAz(tel))
		} else {
			s.Axis1Deg = math.Abs(wrap180(to.AzDeg - from.AzDeg))
		}
		s.Axis2Deg = math.Abs(to.AltDeg - from.AltDeg)
	}
	s.Axis1S = moveTime(s.Axis1Deg, tel.Axis1)
	s.Axis2S = moveTime(s.Axis2Deg, tel.Axis2)
	if tel.Dome.RateDegS > 0 {
		s.DomeS = moveTime(math.Abs(wrap180(to.AzDeg-from.AzDeg)), tel.Dome)
	}
	names := map[string][2]string{MountAltAz: {"azimuth", "altitude"}, MountEquatorial: {"hour angle", "declination"}}[tel.Mount]
	longest := s.Axis1S
	s.Governs = names[0]
	if s.Axis2S > longest {
		longest, s.Governs = s.Axis2S, names[1]
	}
	if s.DomeS > longest {
		longest, s.Governs = s.DomeS, "dome"
	}
	s.Seconds = longest + s.SettleS + s.AcquireS
	return s
}

// moveTime is the rest-to-rest time through d degrees on axis x (see
// SlewTime for the profile).
func moveTime(d float64, x Axis) float64 {
	switch {
	case d <= 0:
		return 0
	case x.AccelDegS2 <= 0:
		return d / x.RateDegS
	case d >= x.RateDegS*x.RateDegS/x.AccelDegS2:
		return d/x.RateDegS + x.RateDegS/x.AccelDegS2
	}
	return 2 * math.Sqrt(d/x.AccelDegS2)
}

// wrapOrAz is the azimuth axis' unwrapped position of p: WrapDeg when
// known, else the position in the wrap nearest 0.
func (p Pointing) wrapOrAz(tel Telescope) float64 {
	if p.Wrapped {
		return p.WrapDeg
	}
	return tel.nearestWrap(0, p.AzDeg)
}

// wrapTarget returns the unwrapped azimuth-axis position for azimuth az
// nearest the current position of from, inside the wrap (the short way
// round when there is no wrap).
func (tel Telescope) wrapTarget(from Pointing, az float64) float64 {
	if !tel.hasWrap() {
		cur := from.AzDeg
		return cur + wrap180(az-cur)
	}
	return tel.nearestWrap(from.wrapOrAz(tel), az)
}

// nearestWrap is the position az + k·360° inside [WrapMinDeg, WrapMaxDeg]
// nearest cur (the lower one on a tie).
func (tel Telescope) nearestWrap(cur, az float64) float64 {
	best, found := 0.0, false
	base := az - 360*math.Floor((az-tel.WrapMinDeg)/360)
	for w := base; w <= tel.WrapMaxDeg+1e-9; w += 360 {
		if !found || math.Abs(w-cur) < math.Abs(best-cur) {
			best, found = w, true
		}
	}
	if !found { // a wrap narrower than a turn is refused by Validate
		return az
	}
	return best
}

// wrap180 folds an angle difference into (−180, 180] degrees.
func wrap180(d float64) float64 {
	d = math.Mod(d, 360)
	switch {
	case d > 180:
		d -= 360
	case d <= -180:
		d += 360
	}
	return d
}

package planner

import (
	"math"
	"strings"
	"testing"

	"phasecast/ephem"
)

// The slew times below are worked out by hand from the trapezoidal profile
// (t = d/v + v/a when d ≥ v²/a, else 2√(d/a)), the slowest motion governing,
// then settle and acquisition added.
func TestSlewTimeHandCalculations(t *testing.T) {
	altaz := Telescope{Mount: MountAltAz,
		Axis1:   Axis{RateDegS: 2, AccelDegS2: 0.5},   // v²/a = 8°
		Axis2:   Axis{RateDegS: 1.5, AccelDegS2: 0.5}, // v²/a = 4.5°
		SettleS: 5, AcquireS: 30, WrapMinDeg: -270, WrapMaxDeg: 270}
	noWrap := altaz
	noWrap.WrapMinDeg, noWrap.WrapMaxDeg = 0, 0
	eq := Telescope{Mount: MountEquatorial,
		Axis1:   Axis{RateDegS: 3, AccelDegS2: 1},   // v²/a = 9°
		Axis2:   Axis{RateDegS: 3, AccelDegS2: 1},   // v²/a = 9°
		Dome:    Axis{RateDegS: 1, AccelDegS2: 0.2}, // v²/a = 5°
		SettleS: 10, AcquireS: 60}
	cases := []struct {
		name     string
		tel      Telescope
		from, to Pointing
		want     float64
		governs  string
		wrapTo   float64
	}{
		// Azimuth 90° ≥ 8°: 90/2 + 2/0.5 = 49 s; altitude 20° ≥ 4.5°:
		// 20/1.5 + 1.5/0.5 = 16.33 s; 49 + 5 + 30 = 84 s.
		{"Trapezoid", altaz, Pointing{AzDeg: 10, AltDeg: 40, Wrapped: true, WrapDeg: 10}, Pointing{AzDeg: 100, AltDeg: 60}, 84, "azimuth", 100},
		// Azimuth 2° < 8°: 2√(2/0.5) = 4 s; altitude 1° < 4.5°: 2√2 =
		// 2.83 s; 4 + 35 = 39 s.
		{"Triangle", altaz, Pointing{AzDeg: 10, AltDeg: 40, Wrapped: true, WrapDeg: 10}, Pointing{AzDeg: 12, AltDeg: 41}, 39, "azimuth", 12},
		// Altitude governs: azimuth 4° < 8°: 2√8 = 5.66 s; altitude 30°:
		// 30/1.5 + 3 = 23 s; 23 + 35 = 58 s.
		{"AltitudeGoverns", altaz, Pointing{AzDeg: 200, AltDeg: 30, Wrapped: true, WrapDeg: 200}, Pointing{AzDeg: 204, AltDeg: 60}, 58, "altitude", 204},
		// Cable-wrap unwind: the axis stands at +260° (azimuth 260°); the
		// target at azimuth 280° would need +280°, past the +270° limit, so
		// the axis turns back to −80°: 340°, 340/2 + 4 = 174 s; 174 + 35 =
		// 209 s.
		{"WrapUnwind", altaz, Pointing{AzDeg: 260, AltDeg: 50, Wrapped: true, WrapDeg: 260}, Pointing{AzDeg: 280, AltDeg: 50}, 209, "azimuth", -80},
		// The same move without a wrap limit: 20° the short way, 20/2 + 4 =
		// 14 s; 14 + 35 = 49 s.
		{"NoWrap", noWrap, Pointing{AzDeg: 260, AltDeg: 50}, Pointing{AzDeg: 280, AltDeg: 50}, 49, "azimuth", 280},
		// Through north without a wrap: 350° → 10° is 20°, 49 s as above.
		{"NoWrapThroughNorth", noWrap, Pointing{AzDeg: 350, AltDeg: 50}, Pointing{AzDeg: 10, AltDeg: 50}, 49, "azimuth", 370},
		// With the wrap, from −10° (azimuth 350°) to azimuth 10° is +20°
		// through north, not −340°: 20/2 + 4 = 14 s; 14 + 35 = 49 s.
		{"WrapThroughNorth", altaz, Pointing{AzDeg: 350, AltDeg: 50, Wrapped: true, WrapDeg: -10}, Pointing{AzDeg: 10, AltDeg: 50}, 49, "azimuth", 10},
		// The dome is slower than the mount: dome 80° ≥ 5°: 80/1 + 1/0.2 =
		// 85 s; hour angle 2 h = 30° ≥ 9°: 30/3 + 3 = 13 s; declination
		// 10°: 10/3 + 3 = 6.33 s; 85 + 10 + 60 = 155 s.
		{"DomeSlower", eq, Pointing{AzDeg: 120, HAHours: -1, DecDeg: -20}, Pointing{AzDeg: 200, HAHours: 1, DecDeg: -30}, 155, "dome", 200},
		// Hour angle from +11.5 h to −11.5 h is 1 h = 15° through 12 h:
		// 15/3 + 3 = 8 s; declination 0; dome 10°: 10 + 5 = 15 s;
		// 15 + 70 = 85 s.
		{"HourAngleShortWay", eq, Pointing{AzDeg: 175, HAHours: 11.5, DecDeg: 60}, Pointing{AzDeg: 185, HAHours: -11.5, DecDeg: 60}, 85, "dome", 185},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if err := c.tel.Validate(); err != nil {
				t.Fatal(err)
			}
			s := SlewTime(c.tel, c.from, c.to)
			if math.Abs(s.Seconds-c.want) > 0.01 || s.Governs != c.governs {
				t.Errorf("slew %.3f s governed by %s, want %.2f s by %s (%+v)", s.Seconds, s.Governs, c.want, c.governs, s)
			}
			if c.tel.Mount == MountAltAz && (!s.To.Wrapped || math.Abs(s.To.WrapDeg-c.wrapTo) > 1e-9) {
				t.Errorf("arrives at wrap position %v (known %v), want %v", s.To.WrapDeg, s.To.Wrapped, c.wrapTo)
			}
		})
	}
}

// TestSlewTimeProperties: a longer move never takes less time, the total is
// never below settle + acquire, and slewing there and back costs the same
// both ways without a wrap.
func TestSlewTimeProperties(t *testing.T) {
	tel := Telescope{Mount: MountAltAz, Axis1: Axis{RateDegS: 2.5, AccelDegS2: 0.8}, Axis2: Axis{RateDegS: 1.2, AccelDegS2: 0.3},
		Dome: Axis{RateDegS: 1.8, AccelDegS2: 0.4}, SettleS: 4, AcquireS: 20}
	prev := 0.0
	for d := 0.0; d <= 180; d += 0.25 {
		s := SlewTime(tel, Pointing{AzDeg: 30, AltDeg: 45}, Pointing{AzDeg: 30 + d, AltDeg: 45})
		if s.Seconds < prev-1e-9 || s.Seconds < tel.SettleS+tel.AcquireS {
			t.Fatalf("move of %.2f° takes %.3f s, after %.3f s for a shorter one", d, s.Seconds, prev)
		}
		back := SlewTime(tel, Pointing{AzDeg: 30 + d, AltDeg: 45}, Pointing{AzDeg: 30, AltDeg: 45})
		if math.Abs(back.Seconds-s.Seconds) > 1e-9 {
			t.Fatalf("move of %.2f°: %.3f s there, %.3f s back", d, s.Seconds, back.Seconds)
		}
		prev = s.Seconds
	}
	// The profile is continuous where the triangle becomes a trapezoid
	// (d = v²/a): 2√(d/a) = d/v + v/a = 2v/a there.
	x := Axis{RateDegS: 2, AccelDegS2: 0.5}
	if a, b := moveTime(8-1e-9, x), moveTime(8, x); math.Abs(a-b) > 1e-6 || math.Abs(b-8) > 1e-12 {
		t.Errorf("moveTime at v²/a: %.9f and %.9f, want 8 s both", a, b)
	}
}

func TestTelescopeValidate(t *testing.T) {
	good := Telescope{Mount: MountAltAz, Axis1: Axis{RateDegS: 2, AccelDegS2: 0.5}, Axis2: Axis{RateDegS: 1.5, AccelDegS2: 0.5},
		SettleS: 5, AcquireS: 30, WrapMinDeg: -270, WrapMaxDeg: 270}
	if err := good.Validate(); err != nil {
		t.Fatalf("good telescope refused: %v", err)
	}
	cases := []struct {
		name  string
		edit  func(*Telescope)
		field string
	}{
		{"ErrMount", func(x *Telescope) { x.Mount = "dobsonian" }, "telescope.mount"},
		{"ErrNegativeRate", func(x *Telescope) { x.Axis1.RateDegS = -2 }, "telescope.axis1.rate_deg_s"},
		{"ErrZeroRate", func(x *Telescope) { x.Axis2.RateDegS = 0 }, "telescope.axis2.rate_deg_s"},
		{"ErrNegativeAccel", func(x *Telescope) { x.Axis2.AccelDegS2 = -1 }, "telescope.axis2.accel_deg_s2"},
		{"ErrDomeRate", func(x *Telescope) { x.Dome.RateDegS = -0.5 }, "telescope.dome.rate_deg_s"},
		{"ErrSettle", func(x *Telescope) { x.SettleS = math.NaN() }, "telescope.settle_s"},
		{"ErrAcquire", func(x *Telescope) { x.AcquireS = -1 }, "telescope.acquire_s"},
		{"ErrWrapNarrow", func(x *Telescope) { x.WrapMinDeg, x.WrapMaxDeg = -90, 180 }, "telescope.wrap"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x := good
			c.edit(&x)
			err := x.Validate()
			ie, ok := err.(*ephem.InputError)
			if !ok || ie.Field != c.field || ie.Accepted == "" || ie.Value == "" {
				t.Fatalf("got %v, want an input error naming %s, its value and what is accepted", err, c.field)
			}
			if c.name == "ErrMount" && !strings.Contains(ie.Accepted, "altaz") {
				t.Errorf("accepted %q does not list the mounts", ie.Accepted)
			}
		})
	}
}

package ephem_test

import (
	"math"
	"testing"

	"github.com/soniakeys/meeus/v3/refraction"
	"github.com/soniakeys/unit"

	"phasecast/ephem"
)

const stdP, stdT = ephem.StandardPressureHPa, ephem.StandardTempC

// TestRefractionAtHorizon checks the refraction of a body seen on the
// horizon, standard atmosphere: about 34′ (Meeus ch. 16 and ch. 15's
// h0 = −0°34′; "about 34′–35′" is common practice). The airless altitude
// whose refracted altitude is 0 is found by bisection.
func TestRefractionAtHorizon(t *testing.T) {
	lo, hi := -2.0, 0.0
	for range 60 {
		mid := (lo + hi) / 2
		if mid+ephem.RefractionDeg(mid, stdP, stdT) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	r := ephem.RefractionDeg(lo, stdP, stdT) * 60
	t.Logf("apparent 0°: airless %.4f°, refraction %.3f′ (Saemundsson); Bennett gives %.3f′",
		lo, r, ephem.RefractionFromApparentDeg(0, stdP, stdT)*60)
	if r < 34 || r > 35 {
		t.Errorf("refraction on the horizon %.3f′, want 34′–35′", r)
	}
	if b := ephem.RefractionFromApparentDeg(0, stdP, stdT) * 60; math.Abs(b-r) > 4.0/60 {
		t.Errorf("Bennett %.3f′ and Saemundsson %.3f′ disagree by more than 4″ on the horizon", b, r)
	}
}

// TestRefractionFormulasConsistent checks Meeus' statement that
// Saemundsson's formula (16.4) is consistent with Bennett's (16.3) to about
// 4″: going from an apparent altitude to the airless one with Bennett and
// back with Saemundsson returns within 4″, from the horizon to the zenith.
func TestRefractionFormulasConsistent(t *testing.T) {
	worst := 0.0
	for h0 := 0.0; h0 <= 90; h0 += 0.25 {
		h := h0 - ephem.RefractionFromApparentDeg(h0, stdP, stdT)
		back := h + ephem.RefractionDeg(h, stdP, stdT)
		d := math.Abs(back-h0) * 3600
		worst = math.Max(worst, d)
		if d > 4 {
			t.Errorf("apparent %.2f°: round trip off by %.2f″", h0, d)
		}
	}
	t.Logf("Bennett→Saemundsson round trip: worst %.2f″", worst)
}

// TestRefractionHighAltitudes compares Saemundsson's formula with Meeus
// (16.2), R = 58.276″ tan z − 0.0824″ tan³ z for altitudes above 15° (meeus
// refraction.Gt15Apparent). Meeus gives Bennett's formula an accuracy of
// 0.07′ and Saemundsson's a consistency with it of 4″, so the two may differ
// by up to 8.2″; in fact Saemundsson's runs a few percent high above 15°
// (61″ against 58″ at 45°), harmless for airmass.
func TestRefractionHighAltitudes(t *testing.T) {
	const tol = 0.07*60 + 4
	worst := 0.0
	for h := 15.0; h <= 90; h += 0.5 {
		got := ephem.RefractionDeg(h, stdP, stdT) * 3600
		want := refraction.Gt15Apparent(unit.AngleFromDeg(h)).Sec()
		worst = math.Max(worst, math.Abs(got-want))
		if math.Abs(got-want) > tol {
			t.Errorf("h = %.1f°: R = %.2f″, (16.2) gives %.2f″", h, got, want)
		}
	}
	t.Logf("Saemundsson vs (16.2) above 15°: worst %.3f″", worst)
}

// TestRefractionScaling checks Meeus' pressure and temperature factor
// (P/1010)·(283/(273 + T)).
func TestRefractionScaling(t *testing.T) {
	r0 := ephem.RefractionDeg(10, stdP, stdT)
	for _, tc := range []struct {
		name string
		p, t float64
		want float64
	}{
		{"Standard", 1010, 10, 1},
		{"HalfPressure", 505, 10, 0.5},
		{"HighSite", 740, -5, 740.0 / 1010 * 283 / 268},
		{"Hot", 1010, 40, 283.0 / 313},
		{"NoAir", 0, 10, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := ephem.RefractionDeg(10, tc.p, tc.t) / r0
			if math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("scale = %.12f, want %.12f", got, tc.want)
			}
		})
	}
	site := ephem.Site{LatDeg: 10} // zero pressure: standard atmosphere
	if got, want := site.RefractedAltDeg(10), 10+r0; got != want {
		t.Errorf("RefractedAltDeg(10) = %v, want %v", got, want)
	}
	site.PressureHPa, site.TempC = 505, 10
	if got, want := site.RefractedAltDeg(10), 10+r0/2; math.Abs(got-want) > 1e-12 {
		t.Errorf("RefractedAltDeg(10) at 505 hPa = %v, want %v", got, want)
	}
}

// TestRefractionBelowHorizon checks that the refraction is finite,
// continuous and held constant below the formula's turning point.
func TestRefractionBelowHorizon(t *testing.T) {
	floor := math.Sqrt(10.3) - 5.11
	rFloor := ephem.RefractionDeg(floor, stdP, stdT)
	for h := -90.0; h <= 90; h += 0.01 {
		r := ephem.RefractionDeg(h, stdP, stdT)
		if math.IsNaN(r) || math.IsInf(r, 0) || r > rFloor+1e-12 || r < -0.001 {
			t.Fatalf("R(%.2f°) = %v", h, r)
		}
		if h < floor && r != rFloor {
			t.Fatalf("R(%.2f°) = %v, want the value at the turning point %v", h, r, rFloor)
		}
	}
	if d := math.Abs(ephem.RefractionDeg(floor+1e-6, stdP, stdT)-rFloor) * 3600; d > 1e-3 {
		t.Errorf("jump of %.2g″ at the turning point", d)
	}
	t.Logf("refraction held at %.2f′ below %.4f° airless", rFloor*60, floor)
}

// TestAirmass checks the Kasten & Young (1989) formula: 1 at the zenith to
// 0.03%, close to the plane-parallel sec z high in the sky, decreasing with
// altitude, 37.92 on the horizon (their table: 38.0868, from memory; the
// formula's fit is within 0.5% of it), and ok = false below the horizon.
func TestAirmass(t *testing.T) {
	for _, tc := range []struct {
		name   string
		h      float64
		want   float64
		tolRel float64
		ok     bool
	}{
		{"Zenith", 90, 1, 3e-4, true},
		{"Sec60", 60, 1 / math.Sin(60*math.Pi/180), 1e-3, true},
		{"Sec30", 30, 2, 3e-3, true},
		{"HorizonTable", 0, 38.0868, 5e-3, true},
		{"BelowHorizon", -0.001, 0, 0, false},
		{"AboveZenith", 90.5, 0, 0, false},
		{"NaN", math.NaN(), 0, 0, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			x, ok := ephem.Airmass(tc.h)
			if ok != tc.ok {
				t.Fatalf("ok = %v, want %v", ok, tc.ok)
			}
			if !ok {
				if x != 0 {
					t.Errorf("x = %v with ok = false, want 0", x)
				}
				return
			}
			if math.Abs(x/tc.want-1) > tc.tolRel {
				t.Errorf("X(%v°) = %.5f, want %.5f within %.2g", tc.h, x, tc.want, tc.tolRel)
			}
		})
	}
	prev := math.Inf(1)
	for h := 0.0; h <= 90; h += 0.1 {
		x, _ := ephem.Airmass(h)
		if !(x < prev) {
			t.Fatalf("X(%.1f°) = %v, not below X at the lower altitude %v", h, x, prev)
		}
		prev = x
	}
}

package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestKSFormulas checks the closed forms of Krisciunas & Schaefer (1991,
// PASP 103, 1033) at the points where they give round numbers.
func TestKSFormulas(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// eq. 3: X = 1 at the zenith and (1 − 0.96)^−½ = 5 at the horizon.
		{"X(0)", ephem.KSAirmass(0), 1, 1e-15},
		{"X(90)", ephem.KSAirmass(90), 5, 1e-12},
		// eq. 20 at full Moon: 10^(−0.4 × 3.84).
		{"I*(0)", ephem.MoonIlluminance(0), math.Pow(10, -1.536), 1e-15},
		// eq. 21 at ρ = 90°: 10^5.36 × 1.06 + 10^(6.15 − 2.25).
		{"f(90)", ephem.KSScattering(90), math.Pow(10, 5.36)*1.06 + math.Pow(10, 3.9), 1e-6},
		// eq. 1: their Mauna Kea dark zenith sky, V = 21.587 mag/arcsec²,
		// is 79.0 nL (both values from memory of the paper's §3).
		{"B(21.587)", ephem.NanolambertsFromV(21.587), 79.0, 0.05},
		// eq. 2 at the zenith leaves B_zen unchanged.
		{"B0(0)", ephem.KSDarkSky(79, 0, 0.172), 79, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if math.Abs(c.got-c.want) > c.tol {
				t.Errorf("got %.9g, want %.9g ± %g", c.got, c.want, c.tol)
			}
		})
	}
	for _, v := range []float64{15, 18.2, 21.587, 24} {
		if got := ephem.VFromNanolamberts(ephem.NanolambertsFromV(v)); math.Abs(got-v) > 1e-12 {
			t.Errorf("V(B(%g)) = %.15g", v, got)
		}
	}
}

// TestKSMoonlightShape checks the moonlight term's dependences that follow
// from eq. 15 of Krisciunas & Schaefer (1991): it vanishes with the Moon
// below the horizon, and scales as I*(α) at fixed geometry.
func TestKSMoonlightShape(t *testing.T) {
	if b := ephem.KSMoonlight(0, 40, 95, 30, 0.172); b != 0 {
		t.Errorf("Moon below the horizon: %g nL, want 0", b)
	}
	full := ephem.KSMoonlight(0, 40, 30, 30, 0.172)
	quarter := ephem.KSMoonlight(90, 40, 30, 30, 0.172)
	if got, want := quarter/full, ephem.MoonIlluminance(90)/ephem.MoonIlluminance(0); math.Abs(got-want) > 1e-12 {
		t.Errorf("quarter/full = %g, want I*(90)/I*(0) = %g", got, want)
	}
}

// TestTwilightSlope checks the twilight term's 1 mag per degree of solar
// depression (Schaefer 1998: the Sun's altitude enters the magnitude with
// coefficient 1).
func TestTwilightSlope(t *testing.T) {
	a := ephem.TwilightNanolamberts(-12, 100, 20, 0.15)
	b := ephem.TwilightNanolamberts(-13, 100, 20, 0.15)
	if got := 2.5 * math.Log10(a/b); math.Abs(got-1) > 1e-12 {
		t.Errorf("one degree deeper dims by %g mag, want 1", got)
	}
}

func darkConditions() ephem.SkyConditions {
	return ephem.SkyConditions{
		Band: ephem.BandV, ZenithDeg: 30, MoonZenithDeg: 120, MoonPhaseAngleDeg: 170,
		MoonSepDeg: 100, SunAltDeg: -40, SunSepDeg: 140, Extinction: 0.172, DarkZenithMag: 21.587,
	}
}

func TestSkyBrightnessDark(t *testing.T) {
	c := darkConditions()
	s, err := ephem.SkyBrightness(c)
	if err != nil {
		t.Fatal(err)
	}
	// With no Moon and no twilight the total is eq. 2 alone (through eq. 1,
	// whose 0.92104 is 0.4 ln 10 to 6 digits: 1e-5 mag).
	want := ephem.VFromNanolamberts(ephem.KSDarkSky(ephem.NanolambertsFromV(21.587), 30, 0.172))
	if math.Abs(s.Mag-want) > 1e-5 || s.MoonOK || s.TwilightOK {
		t.Errorf("dark sky = %+v, want Mag %.6f and no Moon or twilight", s, want)
	}
}

// TestSkyBrightnessBands checks the band scaling: the dark sky starts from
// the band's own zenith value, and moonlight takes the Sun's colour.
func TestSkyBrightnessBands(t *testing.T) {
	c := darkConditions()
	c.MoonZenithDeg, c.MoonPhaseAngleDeg, c.MoonSepDeg = 40, 20, 45
	v, err := ephem.SkyBrightness(c)
	if err != nil {
		t.Fatal(err)
	}
	c.Band = ephem.BandB
	b, err := ephem.SkyBrightness(c)
	if err != nil {
		t.Fatal(err)
	}
	// Sun's B − V = 0.65 (Patat et al. 2006, Fig. 8).
	if got := b.MoonMag - v.MoonMag; math.Abs(got-0.65) > 1e-12 {
		t.Errorf("moonlight B − V = %g, want the Sun's 0.65", got)
	}
	if b.DarkMag != v.DarkMag {
		t.Errorf("same dark zenith value gave %g and %g", b.DarkMag, v.DarkMag)
	}
}

// TestSkyBrightnessMonotonic: a brighter Moon (smaller phase angle) or a
// closer Moon (separation within 0..90°, where the Rayleigh and Mie terms of
// eq. 21 both fall with ρ; beyond 90° the Rayleigh term rises again toward
// backscatter) never makes the sky fainter.
func TestSkyBrightnessMonotonic(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 1))
	for range 2000 {
		c := randomConditions(rng)
		base, err := ephem.SkyBrightness(c)
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		brighter := c
		brighter.MoonPhaseAngleDeg = c.MoonPhaseAngleDeg * rng.Float64()
		closer := c
		closer.MoonSepDeg = c.MoonSepDeg * rng.Float64()
		for name, cc := range map[string]ephem.SkyConditions{"brighter Moon": brighter, "closer Moon": closer} {
			s, err := ephem.SkyBrightness(cc)
			if err != nil {
				t.Fatal(err)
			}
			if s.Mag > base.Mag+1e-12 {
				t.Fatalf("%s made the sky fainter: %+v → %.6f, was %.6f", name, cc, s.Mag, base.Mag)
			}
		}
	}
}

func randomConditions(rng *rand.Rand) ephem.SkyConditions {
	bandList := []ephem.Band{ephem.BandU, ephem.BandB, ephem.BandV, ephem.BandR, ephem.BandI, ephem.Bandg, ephem.Bandr, ephem.Bandi, ephem.Bandz}
	b := bandList[rng.IntN(len(bandList))]
	return ephem.SkyConditions{
		Band:              b,
		ZenithDeg:         rng.Float64() * 85,
		MoonZenithDeg:     rng.Float64() * 100,
		MoonPhaseAngleDeg: rng.Float64() * 180,
		MoonSepDeg:        rng.Float64() * 90,
		SunAltDeg:         -12 - rng.Float64()*40,
		SunSepDeg:         20 + rng.Float64()*160,
		Extinction:        b.DefaultExtinction() * (0.5 + rng.Float64()),
		DarkZenithMag:     b.DefaultDarkZenithMag(),
	}
}

func TestSkyBrightnessBadInput(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(*ephem.SkyConditions)
		field string
	}{
		{"unknown band", func(c *ephem.SkyConditions) { c.Band = "X" }, "band"},
		{"below horizon", func(c *ephem.SkyConditions) { c.ZenithDeg = 95 }, "zenith distance"},
		{"daytime", func(c *ephem.SkyConditions) { c.SunAltDeg = 5 }, "sun altitude"},
		{"zero extinction", func(c *ephem.SkyConditions) { c.Extinction = 0 }, "extinction"},
		{"NaN phase", func(c *ephem.SkyConditions) { c.MoonPhaseAngleDeg = math.NaN() }, "moon phase angle"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := darkConditions()
			tc.edit(&c)
			_, err := ephem.SkyBrightness(c)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != tc.field || ie.Value == "" || ie.Accepted == "" {
				t.Fatalf("err = %v, want *InputError on %q", err, tc.field)
			}
		})
	}
	_, err := ephem.ParseBand("H")
	var ie *ephem.InputError
	if !errors.As(err, &ie) || ie.Field != "band" || ie.Value != `"H"` || !strings.Contains(ie.Accepted, "g, r, i or z") {
		t.Errorf("ParseBand(H) = %v", err)
	}
	for _, s := range []string{"U", "B", "V", "R", "I", "g", "r", "i", "z", " V "} {
		if _, err := ephem.ParseBand(s); err != nil {
			t.Errorf("ParseBand(%q) = %v", s, err)
		}
	}
}

// TestSkyConditionsAt checks the geometry against Observe at one instant
// (an invented site and target): zenith distances are 90° − altitude and the
// phase angle reproduces the illuminated fraction, k = (1 + cos i)/2.
func TestSkyConditionsAt(t *testing.T) {
	site := ephem.Site{LatDeg: -29.5, LonEastDeg: -70.7, ElevM: 2400}
	st := ephem.Star{RADeg: 150, DecDeg: -20}
	at := time.Date(2026, 3, 4, 3, 0, 0, 0, time.UTC)
	c, p := ephem.SkyConditionsAt(site, st, at, ephem.BandR, 0.1, 20.9)
	if math.Abs(c.ZenithDeg-(90-p.AltDeg)) > 1e-12 || math.Abs(c.MoonZenithDeg-(90-p.MoonAltDeg)) > 1e-12 {
		t.Errorf("zenith distances %+v against %+v", c, p)
	}
	if k := (1 + math.Cos(c.MoonPhaseAngleDeg*math.Pi/180)) / 2; math.Abs(k-p.MoonIlluminated) > 1e-12 {
		t.Errorf("phase angle %g gives k %g, want %g", c.MoonPhaseAngleDeg, k, p.MoonIlluminated)
	}
	// An angular distance is at least the difference of the altitudes
	// (0.01° for the Sun's parallax and the geocentric direction used).
	if diff := math.Abs((90 - c.ZenithDeg) - c.SunAltDeg); c.SunSepDeg < diff-0.01 {
		t.Errorf("Sun separation %g shorter than the altitude difference %g", c.SunSepDeg, diff)
	}
}

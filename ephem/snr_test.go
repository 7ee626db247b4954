package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"

	"phasecast/ephem"
)

func testDetector() ephem.Detector {
	return ephem.Detector{
		Band: ephem.BandV, ApertureM: 1.0, Throughput: 0.3, ReadNoiseE: 5, DarkEPerSPix: 0.01,
		PixelArcsec: 0.4, RadiusArcsec: 2, SeeingArcsec: 1.2,
	}
}

// TestSNRRoundTrip: the exposure solved from the quadratic gives back the
// wanted S/N through the CCD equation (Howell 2006, eq. 4.4).
func TestSNRRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2))
	for range 1000 {
		r := ephem.CCDRates{
			SourceEPerS:  math.Pow(10, rng.Float64()*8-3),
			SkyEPerSPix:  math.Pow(10, rng.Float64()*6-3),
			DarkEPerSPix: rng.Float64(),
			ReadNoiseE:   rng.Float64() * 20,
			Pixels:       1 + rng.Float64()*500,
		}
		want := 1 + rng.Float64()*500
		tt, err := r.ExposureForSNR(want)
		if err != nil {
			t.Fatal(err)
		}
		if got := r.SNR(tt); math.Abs(got-want) > 1e-9*want {
			t.Fatalf("%+v: S/N(t(%g) = %g) = %.12g", r, want, tt, got)
		}
	}
}

// TestSNRLimits checks the three limiting regimes of the CCD equation
// against their closed forms (Howell 2006, §4.4): source-limited
// S/N = √(N*), so t = S²/R*; sky-limited S/N = N*/√(n N_S), so
// t = S² n R_S / R*²; read-noise-limited S/N = N*/(√n N_R), so
// t = S √n N_R / R*.
func TestSNRLimits(t *testing.T) {
	const s = 50.0
	cases := []struct {
		name string
		r    ephem.CCDRates
		want float64
	}{
		{"source-limited", ephem.CCDRates{SourceEPerS: 1e6, SkyEPerSPix: 1e-6, ReadNoiseE: 1e-3, Pixels: 10}, s * s / 1e6},
		{"sky-limited", ephem.CCDRates{SourceEPerS: 1, SkyEPerSPix: 1e6, ReadNoiseE: 1e-3, Pixels: 10}, s * s * 10 * 1e6 / 1},
		{"read-noise-limited", ephem.CCDRates{SourceEPerS: 1e3, SkyEPerSPix: 1e-9, ReadNoiseE: 1e7, Pixels: 4}, s * 2 * 1e7 / 1e3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := c.r.ExposureForSNR(s)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-c.want) > 1e-4*c.want {
				t.Errorf("t = %.9g s, closed form %.9g s", got, c.want)
			}
		})
	}
}

// TestDetectorRates checks the rates against their definitions: the
// Gaussian enclosed fraction at r = FWHM/2 is exactly 1/2 (common practice:
// the half-light radius of a Gaussian is FWHM/2), and the zero point from a
// throughput is photons × area × τ.
func TestDetectorRates(t *testing.T) {
	d := testDetector()
	d.RadiusArcsec = d.SeeingArcsec / 2
	if got := d.EnclosedFraction(); math.Abs(got-0.5) > 1e-12 {
		t.Errorf("enclosed fraction at FWHM/2 = %g, want 0.5", got)
	}
	zp := ephem.BandV.PhotonsPerSecondCm2() * math.Pi * 50 * 50 * 0.3
	if got := d.ZeroPoint(); math.Abs(got-zp) > 1e-6*zp {
		t.Errorf("zero point %g, want %g", got, zp)
	}
	r, err := d.Rates(15, 1.5, 0.15, 21)
	if err != nil {
		t.Fatal(err)
	}
	if want := zp * math.Pow(10, -0.4*(15+0.15*1.5)) * 0.5; math.Abs(r.SourceEPerS-want) > 1e-9*want {
		t.Errorf("source rate %g, want %g", r.SourceEPerS, want)
	}
	if want := math.Pi * 0.6 * 0.6 / 0.16; math.Abs(r.Pixels-want) > 1e-12 {
		t.Errorf("n_pix %g, want %g", r.Pixels, want)
	}
	slit := testDetector()
	slit.SlitWidthArcsec, slit.SlitLengthArcsec = 1, 4
	if got, want := slit.Pixels(), 4/0.16; math.Abs(got-want) > 1e-12 {
		t.Errorf("slit n_pix %g, want %g", got, want)
	}
}

// TestExposureMonotonic: over random targets and skies, a brighter Moon, a
// closer Moon (separations 0..90°) or a higher airmass never shortens the
// exposure that reaches a given S/N.
func TestExposureMonotonic(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 3))
	d := testDetector()
	exposure := func(c ephem.SkyConditions, mag float64) float64 {
		t.Helper()
		d.Band = c.Band
		s, err := ephem.SkyBrightness(c)
		if err != nil {
			t.Fatal(err)
		}
		r, err := d.Rates(mag, ephem.KSAirmass(c.ZenithDeg), c.Extinction, s.Mag)
		if err != nil {
			t.Fatal(err)
		}
		e, err := r.ExposureForSNR(30)
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	for range 2000 {
		c := randomConditions(rng)
		mag := 10 + rng.Float64()*12
		base := exposure(c, mag)
		edits := map[string]ephem.SkyConditions{}
		e := c
		e.MoonPhaseAngleDeg *= rng.Float64()
		edits["brighter Moon"] = e
		e = c
		e.MoonSepDeg *= rng.Float64()
		edits["closer Moon"] = e
		e = c
		e.ZenithDeg += (85 - c.ZenithDeg) * rng.Float64()
		edits["higher airmass"] = e
		for name, cc := range edits {
			if got := exposure(cc, mag); got < base*(1-1e-12) {
				t.Fatalf("%s shortened the exposure: %+v %.6g s → %+v %.6g s", name, c, base, cc, got)
			}
		}
	}
}

func TestSNRBadInput(t *testing.T) {
	r := ephem.CCDRates{SourceEPerS: 100, SkyEPerSPix: 1, Pixels: 10, ReadNoiseE: 5}
	check := func(t *testing.T, err error, field string) {
		t.Helper()
		var ie *ephem.InputError
		if !errors.As(err, &ie) || ie.Field != field || ie.Value == "" || ie.Accepted == "" {
			t.Fatalf("err = %v, want *InputError on %q", err, field)
		}
	}
	t.Run("negative snr", func(t *testing.T) {
		_, err := r.ExposureForSNR(-5)
		check(t, err, "snr")
	})
	t.Run("zero aperture", func(t *testing.T) {
		d := testDetector()
		d.ApertureM = 0
		_, err := d.Rates(15, 1, 0.15, 21)
		check(t, err, "aperture")
	})
	for _, m := range []float64{-2.5, 30.5, math.Inf(1)} {
		t.Run("magnitude "+strconv.FormatFloat(m, 'g', -1, 64), func(t *testing.T) {
			_, err := testDetector().Rates(m, 1, 0.15, 21)
			check(t, err, "magnitude")
		})
	}
	t.Run("unknown band", func(t *testing.T) {
		d := testDetector()
		d.Band = "Q"
		_, err := d.Rates(15, 1, 0.15, 21)
		check(t, err, "band")
	})
	t.Run("no throughput", func(t *testing.T) {
		d := testDetector()
		d.Throughput = 0
		_, err := d.Rates(15, 1, 0.15, 21)
		check(t, err, "throughput")
	})
}

// BenchmarkExposureAt is the cost of one sizing: the geometry (Observe), the
// sky model and the CCD rates at one instant.
func BenchmarkExposureAt(b *testing.B) {
	site := ephem.Site{LatDeg: -27.85, LonEastDeg: -69.12, ElevM: 2650}
	st := ephem.Star{RADeg: 63.14125, DecDeg: -12.80194}
	at := time.Date(2026, 12, 24, 4, 0, 0, 0, time.UTC)
	d := testDetector()
	for b.Loop() {
		e, err := ephem.ExposureAt(site, st, at, d, 0.15, 21.6, 17.5)
		if err != nil || e.Rates.SourceEPerS <= 0 {
			b.Fatal(err)
		}
	}
}

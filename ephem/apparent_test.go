package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/soniakeys/meeus/v3/apparent"
	"github.com/soniakeys/meeus/v3/base"
	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/unit"

	"phasecast/ephem"
)

// TestApparentPlaceMatchesBookMethod compares ApparentPlace with the book's
// own first-order method (meeus apparent.Position: precession with proper
// motion in α and δ, nutation (23.1), classical aberration (23.3)) for random
// stars and dates 1950–2100. The two differ by the aberration model (the
// Earth's barycentric against heliocentric velocity, ≤ 0.02″) and
// second-order terms; stars are kept below |δ| = 70° and proper motions
// below 0.3″/yr, where the book's linear proper motion in α is good.
func TestApparentPlaceMatchesBookMethod(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 1))
	const tolArcsec = 0.05
	worst := 0.0
	for i := 0; i < 300; i++ {
		st := ephem.Star{
			RADeg:      rng.Float64() * 360,
			DecDeg:     (2*rng.Float64() - 1) * 70,
			PMRAmasyr:  (2*rng.Float64() - 1) * 300,
			PMDecmasyr: (2*rng.Float64() - 1) * 300,
		}
		tm := time.Date(1950+rng.IntN(150), time.Month(1+rng.IntN(12)), 1+rng.IntN(28), rng.IntN(24), 0, 0, 0, time.UTC)
		ra, dec := ephem.ApparentPlace(st, tm)

		jde := ephem.JDTT(tm).Float()
		cosd := math.Cos(st.DecDeg * math.Pi / 180)
		eq := &coord.Equatorial{RA: unit.RAFromDeg(st.RADeg), Dec: unit.AngleFromDeg(st.DecDeg)}
		apparent.Position(eq, eq, 2000, base.JDEToJulianYear(jde),
			unit.HourAngle(unit.AngleFromSec(st.PMRAmasyr/1000/cosd)),
			unit.AngleFromSec(st.PMDecmasyr/1000))
		d := ephem.SeparationDeg(ra, dec, eq.RA.Deg(), eq.Dec.Deg()) * 3600
		worst = math.Max(worst, d)
		if d > tolArcsec {
			t.Errorf("star %+v at %v: %.4f″ from the book's method", st, tm, d)
		}
	}
	t.Logf("ApparentPlace vs meeus apparent.Position, 300 stars 1950–2100: worst %.4f″", worst)
}

// TestApparentPlaceNearPoles checks that the reduction stays finite and
// continuous at and next to the celestial poles, where right-ascension
// corrections of the first-order formulas diverge.
func TestApparentPlaceNearPoles(t *testing.T) {
	tm := time.Date(2031, time.August, 3, 0, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		name string
		st   ephem.Star
	}{
		{"NorthPole", ephem.Star{RADeg: 0, DecDeg: 90}},
		{"NorthPoleMoving", ephem.Star{RADeg: 123, DecDeg: 90, PMRAmasyr: 800, PMDecmasyr: -500}},
		{"SouthPole", ephem.Star{RADeg: 271, DecDeg: -90}},
		{"NearNorth", ephem.Star{RADeg: 45, DecDeg: 89.9999999}},
		{"NearSouth", ephem.Star{RADeg: 300, DecDeg: -89.9999999, PMDecmasyr: 1000}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ra, dec := ephem.ApparentPlace(tc.st, tm)
			if !(ra >= 0 && ra < 360) || !(dec >= -90 && dec <= 90) {
				t.Fatalf("ApparentPlace = (%v, %v), out of range", ra, dec)
			}
			// Precession moves the pole by θ = 2004.3109″ a century (Meeus
			// (21.2)), 10.6′ by this date; nutation, aberration and the
			// proper motions here add well under 1′.
			sep := ephem.SeparationDeg(tc.st.RADeg, tc.st.DecDeg, ra, dec) * 60
			yrs := 31.59
			want := 2004.3109 / 100 * yrs / 60
			if math.Abs(sep-want) > 1.5 {
				t.Errorf("moved %.2f′ from the catalogue place, want about %.2f′", sep, want)
			}
		})
	}
	// A star 0.00036″ from the pole lands 0.00036″ from the pole's own
	// apparent place (give or take the proper-motion-free reduction's rounding).
	r1, d1 := ephem.ApparentPlace(ephem.Star{RADeg: 45, DecDeg: 90}, tm)
	r2, d2 := ephem.ApparentPlace(ephem.Star{RADeg: 45, DecDeg: 89.9999999}, tm)
	if d := ephem.SeparationDeg(r1, d1, r2, d2) * 3600; math.Abs(d-0.00036) > 0.0001 {
		t.Errorf("pole and near-pole apparent places %.6f″ apart, want 0.00036″", d)
	}
}

// TestStarValidate checks the field named in each rejection.
func TestStarValidate(t *testing.T) {
	for _, tc := range []struct {
		name  string
		st    ephem.Star
		field string // "" = valid
	}{
		{"OK", ephem.Star{RADeg: 10, DecDeg: -20, PMRAmasyr: 5, PMDecmasyr: -3}, ""},
		{"OKPole", ephem.Star{RADeg: 0, DecDeg: 90}, ""},
		{"ErrRANegative", ephem.Star{RADeg: -1}, "ra"},
		{"ErrRA360", ephem.Star{RADeg: 360}, "ra"},
		{"ErrRANaN", ephem.Star{RADeg: math.NaN()}, "ra"},
		{"ErrDec", ephem.Star{DecDeg: 90.5}, "dec"},
		{"ErrDecInf", ephem.Star{DecDeg: math.Inf(-1)}, "dec"},
		{"ErrPMRA", ephem.Star{PMRAmasyr: 25000}, "pmra"},
		{"ErrPMDec", ephem.Star{PMDecmasyr: math.NaN()}, "pmdec"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.st.Validate()
			if tc.field == "" {
				if err != nil {
					t.Fatalf("Validate() = %v, want nil", err)
				}
				return
			}
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("Validate() = %v, want *InputError", err)
			}
			if ie.Field != tc.field {
				t.Errorf("field = %q, want %q (%v)", ie.Field, tc.field, err)
			}
		})
	}
}

// BenchmarkApparentPlace measures one full apparent-place reduction.
func BenchmarkApparentPlace(b *testing.B) {
	st := ephem.Star{RADeg: 83.8, DecDeg: -5.4, PMRAmasyr: 100, PMDecmasyr: -40}
	tm := time.Date(2027, time.March, 14, 3, 0, 0, 0, time.UTC)
	for b.Loop() {
		ephem.ApparentPlace(st, tm)
	}
}

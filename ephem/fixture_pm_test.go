package ephem_test

import (
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestFixturePMAstropy checks the proper motion from a coordinate epoch
// (Star.EpochJY, Star.PositionAt) against testdata/pm_astropy.json, made by
// testdata/gen/gen_pm_astropy.py with astropy's SkyCoord.apply_space_motion
// (straight-line motion at 10 pc with zero radial velocity): 240 stars with coordinates at J2016.0,
// J2000.0 and J1991.25, proper motions up to 5″/yr, moved to epochs between
// 1950 and 2080.
func TestFixturePMAstropy(t *testing.T) {
	var fx struct {
		Cases []struct {
			RA, Dec, PMRA, PMDec, Epoch, To float64
			WantRA, WantDec                 float64
		}
	}
	var raw struct {
		Cases []map[string]float64 `json:"cases"`
	}
	fxLoad(t, "../testdata/pm_astropy.json", &raw)
	for _, c := range raw.Cases {
		fx.Cases = append(fx.Cases, struct {
			RA, Dec, PMRA, PMDec, Epoch, To float64
			WantRA, WantDec                 float64
		}{c["ra_deg"], c["dec_deg"], c["pm_ra_masyr"], c["pm_dec_masyr"], c["epoch_jy"], c["to_jy"], c["want_ra_deg"], c["want_dec_deg"]})
	}
	if len(fx.Cases) < 200 {
		t.Fatalf("fixture has %d cases, want 240", len(fx.Cases))
	}
	// Tolerance: 1 mas. Both sides move the star on a straight line in
	// space; what remains is rounding and the third-order term of the
	// renormalisation (below 0.3 mas for 5″/yr over 90 years).
	const tolMas = 1.0
	worst, worstMoved := 0.0, 0.0
	for i, c := range fx.Cases {
		st := ephem.Star{RADeg: c.RA, DecDeg: c.Dec, PMRAmasyr: c.PMRA, PMDecmasyr: c.PMDec, EpochJY: c.Epoch}
		if err := st.Validate(); err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		ra, dec := st.PositionAt(c.To)
		d := sepMas(ra, dec, c.WantRA, c.WantDec)
		worst = math.Max(worst, d)
		worstMoved = math.Max(worstMoved, sepMas(c.RA, c.Dec, c.WantRA, c.WantDec))
		if d > tolMas {
			t.Errorf("case %d (epoch %.2f → %.2f, pm %.0f, %.0f mas/yr): %.3f mas from astropy", i, c.Epoch, c.To, c.PMRA, c.PMDec, d)
		}
	}
	t.Logf("proper motion from the coordinate epoch vs astropy: worst %.4f mas over %d cases (largest motion %.1f″)", worst, len(fx.Cases), worstMoved/1000)
}

// sepMas is the angle between two directions, milliarcseconds (haversine).
func sepMas(ra1, dec1, ra2, dec2 float64) float64 {
	r := math.Pi / 180
	s := math.Sin((dec2-dec1)*r/2)*math.Sin((dec2-dec1)*r/2) + math.Cos(dec1*r)*math.Cos(dec2*r)*math.Sin((ra2-ra1)*r/2)*math.Sin((ra2-ra1)*r/2)
	return 2 * math.Asin(math.Sqrt(s)) / r * 3.6e6
}

// TestCoordinateEpochConsistent: the apparent place and BJD_TDB of a star
// with coordinates at J2016.0 are those of a motionless star at its
// position of the instant (Star.PositionAt), so the reductions move it from
// its own epoch; and a fast star lands 16 years of its motion off when its
// J2016.0 coordinates are taken for J2000.0.
func TestCoordinateEpochConsistent(t *testing.T) {
	s2016 := ephem.Star{RADeg: 201.125, DecDeg: -33.5, PMRAmasyr: 1800, PMDecmasyr: -2400, EpochJY: 2016}
	at := time.Date(2026, 12, 2, 4, 30, 0, 0, time.UTC)
	jy := 2000 + ephem.JDTT(at).SubDays(ephem.JD2{Day: 2451545, Frac: 0})/365.25
	ra0, dec0 := s2016.PositionAt(jy)
	s2000 := ephem.Star{RADeg: ra0, DecDeg: dec0}
	a1, d1 := ephem.ApparentPlace(s2016, at)
	a2, d2 := ephem.ApparentPlace(s2000, at)
	if d := sepMas(a1, d1, a2, d2); d > 0.05 {
		t.Errorf("apparent places differ by %.3f mas between the J2016.0 and the J2000.0 forms", d)
	}
	site, err := ephem.NewSite(-27.85, -69.12, 2650)
	if err != nil {
		t.Fatal(err)
	}
	// BJD_TDB: the barycentric direction comes from meeus precess.Position,
	// which moves the J2000.0 position with linear rates in α and δ (Meeus
	// ch. 21): second order off the straight line, here a few ms of arc. The
	// Rømer delay (≤ 500 s) changes by 500 s × the angle: 10 µs bounds it,
	// four orders below what timing needs.
	if d := ephem.BJDTDB(site, s2016, at).SubDays(ephem.BJDTDB(site, s2000, at)) * 86400; math.Abs(d) > 1e-5 {
		t.Errorf("BJD_TDB differs by %.3g s between the two forms", d)
	}
	// Taking the J2016.0 coordinates for J2000.0 misplaces the star by
	// 16 years of its 3″/yr motion: 48″.
	wrong := s2016
	wrong.EpochJY = 0
	a3, d3 := ephem.ApparentPlace(wrong, at)
	if d := sepMas(a1, d1, a3, d3) / 1000; math.Abs(d-48) > 0.01 {
		t.Errorf("mislabelled epoch moves the star %.3f″, want 48″ (3″/yr × 16 yr)", d)
	}
}

func TestCoordinateEpochValidate(t *testing.T) {
	for _, c := range []struct {
		name  string
		epoch float64
		ok    bool
	}{{"Zero", 0, true}, {"J2016", 2016, true}, {"J1800", 1800, true}, {"J2200", 2200, true},
		{"ErrBefore", 1799.9, false}, {"ErrAfter", 2200.1, false}, {"ErrNaN", math.NaN(), false}} {
		t.Run(c.name, func(t *testing.T) {
			err := ephem.Star{RADeg: 10, DecDeg: 10, EpochJY: c.epoch}.Validate()
			if (err == nil) != c.ok {
				t.Fatalf("EpochJY %v: err %v, want ok %v", c.epoch, err, c.ok)
			}
			if err != nil {
				ie, isInput := err.(*ephem.InputError)
				if !isInput || ie.Field != "coord_epoch" {
					t.Errorf("error %v does not name coord_epoch", err)
				}
			}
		})
	}
}

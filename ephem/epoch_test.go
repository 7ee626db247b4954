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

func TestParseEpoch(t *testing.T) {
	frac := func(s string) float64 {
		f, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	cases := []struct {
		name string
		text string
		form ephem.EpochForm
		want ephem.JD2
	}{
		{"JD", "2460123.456789012345", ephem.FormJD, ephem.JD2{Day: 2460122.5, Frac: frac("0.956789012345")}},
		{"MJD", "60122.956789012345", ephem.FormMJD, ephem.JD2{Day: 2460122.5, Frac: frac("0.956789012345")}},
		{"RJD", "60123.456789012345", ephem.FormRJD, ephem.JD2{Day: 2460122.5, Frac: frac("0.956789012345")}},
		{"JDWhole", "2460123", ephem.FormJD, ephem.JD2{Day: 2460122.5, Frac: 0.5}},
		{"JDMidnight", " 2460123.5 ", ephem.FormJD, ephem.JD2{Day: 2460123.5, Frac: 0}},
		{"MJDWhole", "+60000", ephem.FormMJD, ephem.JD2{Day: 2460000.5, Frac: 0}},
		{"ManyDigits", "2451545.000000000000000001", ephem.FormJD, ephem.JD2{Day: 2451544.5, Frac: 0.5}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := ephem.ParseEpoch(c.text, ephem.StdBJDTDB, c.form)
			if err != nil {
				t.Fatal(err)
			}
			if got.Day != c.want.Day || math.Abs(got.Frac-c.want.Frac) > 1e-16 {
				t.Errorf("ParseEpoch(%q, %s) = %+v, want %+v", c.text, c.form, got, c.want)
			}
		})
	}
	bad := []struct {
		name  string
		text  string
		std   ephem.TimeStandard
		form  ephem.EpochForm
		field string
	}{
		{"ErrStandardMissing", "2460123.5", "", ephem.FormJD, "standard"},
		{"ErrStandardUnknown", "2460123.5", "BJD", ephem.FormJD, "standard"},
		{"ErrFormMissing", "2460123.5", ephem.StdHJDUTC, "", "form"},
		{"ErrText", "yesterday", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrEmpty", "", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrExponent", "2.460123e6", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrFraction", "1/2", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrTwoPoints", "2460123.4.5", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrNaN", "NaN", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrMJDAsJD", "60123.5", ephem.StdHJDUTC, ephem.FormJD, "epoch"},
		{"ErrJDAsMJD", "2460123.5", ephem.StdHJDUTC, ephem.FormMJD, "epoch"},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			_, err := ephem.ParseEpoch(c.text, c.std, c.form)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field {
				t.Fatalf("err = %v, want *InputError on %q", err, c.field)
			}
		})
	}
}

func TestFormatEpoch(t *testing.T) {
	v := ephem.JD2{Day: 2460122.5, Frac: 0.956789012345}
	cases := []struct {
		form ephem.EpochForm
		dec  int
		want string
	}{
		{ephem.FormJD, 12, "2460123.456789012345"},
		{ephem.FormMJD, 12, "60122.956789012345"},
		{ephem.FormRJD, 6, "60123.456789"},
		{ephem.FormJD, 0, "2460123"},
		{ephem.FormMJD, 3, "60122.957"},
	}
	for _, c := range cases {
		if got := ephem.FormatEpoch(v, c.form, c.dec); got != c.want {
			t.Errorf("FormatEpoch(%s, %d) = %q, want %q", c.form, c.dec, got, c.want)
		}
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 1000 {
		x := ephem.JD2{Day: 2400000.5 + float64(rng.IntN(400000)), Frac: rng.Float64()}
		for _, f := range ephem.EpochForms {
			back, err := ephem.ParseEpoch(ephem.FormatEpoch(x, f, 10), ephem.StdBJDTDB, f)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(back.SubDays(x)); d > 0.6e-10 {
				t.Fatalf("%s: %+v → %q → %+v (%.3g d off)", f, x, ephem.FormatEpoch(x, f, 10), back, d)
			}
		}
	}
}

// TestConvertEpoch: each standard converts to every other as BarycentricTimes
// computes them at the same instant, and back, within 1 µs.
func TestConvertEpoch(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	worst := 0.0
	for range 40 {
		at := time.Date(1965, 1, 1, 0, 0, 0, 0, time.UTC).Add(time.Duration(rng.Float64() * 130 * 365.25 * 86400 * 1e9))
		st := ephem.Star{RADeg: rng.Float64() * 360, DecDeg: rng.Float64()*180 - 90}
		b, err := ephem.BarycentricTimes(testSite, st, at)
		if err != nil {
			t.Fatal(err)
		}
		val := map[ephem.TimeStandard]ephem.JD2{
			ephem.StdJDUTC: b.JDUTC, ephem.StdHJDUTC: b.HJDUTC, ephem.StdHJDTT: b.HJDTT,
			ephem.StdBJDUTC: b.BJDUTC, ephem.StdBJDTDB: b.BJDTDB,
		}
		for _, from := range ephem.TimeStandards {
			for _, to := range ephem.TimeStandards {
				got, err := ephem.ConvertEpoch(val[from], from, to, testSite, st)
				if err != nil {
					t.Fatal(err)
				}
				d := math.Abs(got.SubDays(val[to])) * 86400
				worst = math.Max(worst, d)
				if d > 1e-6 {
					t.Errorf("%v: %s → %s off by %.3g s", at, from, to, d)
				}
			}
		}
	}
	t.Logf("worst conversion error %.3g s", worst)
	t.Run("GeocentricWithin21ms", func(t *testing.T) {
		v := ephem.JD2{Day: 2455000.5, Frac: 0.3}
		a, err1 := ephem.ConvertEpoch(v, ephem.StdHJDUTC, ephem.StdBJDTDB, testSite, testStar)
		g, err2 := ephem.ConvertEpochGeocentric(v, ephem.StdHJDUTC, ephem.StdBJDTDB, testStar)
		if err := errors.Join(err1, err2); err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(a.SubDays(g)) * 86400; d > 0.0213 {
			t.Errorf("site and geocentre differ by %.4f s", d)
		}
	})
	t.Run("HJDUTCToBJDTDBAboutAMinute", func(t *testing.T) {
		v := ephem.JD2{Day: 2460000.5, Frac: 0.1}
		got, err := ephem.ConvertEpochGeocentric(v, ephem.StdHJDUTC, ephem.StdBJDTDB, testStar)
		if err != nil {
			t.Fatal(err)
		}
		// TT − UTC = 69.184 s in 2023, plus the Sun's offset (≤ 5.1 s).
		if d := got.SubDays(v) * 86400; math.Abs(d-69.184) > 5.2 {
			t.Errorf("BJD_TDB − HJD_UTC = %.3f s, want 69.2 ± 5.2 s", d)
		}
	})
	bad := []struct {
		name     string
		v        ephem.JD2
		from, to ephem.TimeStandard
		st       ephem.Star
		field    string
	}{
		{"ErrFromMissing", ephem.JD2{Day: 2460000.5}, "", ephem.StdBJDTDB, testStar, "from standard"},
		{"ErrToUnknown", ephem.JD2{Day: 2460000.5}, ephem.StdHJDUTC, "TCB", testStar, "to standard"},
		{"ErrEpochNaN", ephem.JD2{Day: math.NaN()}, ephem.StdHJDUTC, ephem.StdBJDTDB, testStar, "epoch"},
		{"ErrEpochMJD", ephem.JD2{Day: 60000.5}, ephem.StdHJDUTC, ephem.StdBJDTDB, testStar, "epoch"},
		{"ErrStar", ephem.JD2{Day: 2460000.5}, ephem.StdHJDUTC, ephem.StdBJDTDB, ephem.Star{DecDeg: 91}, "dec"},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			_, err := ephem.ConvertEpoch(c.v, c.from, c.to, testSite, c.st)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != c.field {
				t.Fatalf("err = %v, want *InputError on %q", err, c.field)
			}
		})
	}
}

// FuzzParseEpoch: any text either parses to a finite date in range that
// formats and parses back to itself, or gives an *InputError; never a panic.
func FuzzParseEpoch(f *testing.F) {
	for _, s := range []string{"2460123.456789012345", "60122.5", "-1", "", "1e9", "2460123.", ".5", "+-1", "99999999999999999999999999"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, form := range ephem.EpochForms {
			v, err := ephem.ParseEpoch(s, ephem.StdHJDUTC, form)
			if err != nil {
				var ie *ephem.InputError
				if !errors.As(err, &ie) {
					t.Fatalf("%q: error %v is not an *InputError", s, err)
				}
				continue
			}
			if math.IsNaN(v.Frac) || v.Frac < 0 || v.Frac >= 1 || v.Day-math.Floor(v.Day) != 0.5 {
				t.Fatalf("%q (%s) → %+v: not a normalised JD2", s, form, v)
			}
			back, err := ephem.ParseEpoch(ephem.FormatEpoch(v, form, 12), ephem.StdHJDUTC, form)
			if err != nil || math.Abs(back.SubDays(v)) > 1e-12 {
				t.Fatalf("%q (%s) → %+v → %q → %+v, %v", s, form, v, ephem.FormatEpoch(v, form, 12), back, err)
			}
		}
	})
}

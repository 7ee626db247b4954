package ephem_test

// Hostile input for epoch parsing and conversion (issue "Proof under load,
// faults and hostile input"). The seed corpus is committed under
// testdata/fuzz/FuzzHostileEpoch/ so that `go test ./ephem/` replays it; run
// the fuzzer longer with
//
//	go test -run='^$' -fuzz='^FuzzHostileEpoch$' -fuzztime=60s ./ephem/

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"phasecast/ephem"
)

// Limits documented by ParseEpoch: 1582-10-15 to 3000-01-01.
const (
	hostileMinJD = 2299160.5
	hostileMaxJD = 2816787.5
)

// FuzzHostileEpoch: for any text, standard, form and star, ParseEpoch gives
// either an *ephem.InputError naming "epoch", "standard" or "form", or a
// finite, normalised JD2 inside 1582-10-15..3000-01-01 that agrees with a
// float64 reading of the text (to 1e-8 day); and converting a parsed epoch to
// BJD_TDB gives either an *ephem.InputError or a finite date within a day of
// it. Never a panic.
func FuzzHostileEpoch(f *testing.F) {
	for _, s := range []string{
		"2460123.456789012345", "60122.5", "2299160.5", "2299160.4999999", "2816787.5", "2816787.5000001",
		"NaN", "Inf", "-Inf", "1e400", "1e5", "0x1p4", "1/2", "1_0", "\xff\xfe", "２４６０１２３.５", "٢٤٦٠١٢٣",
		"2460000.5\x00", " 2460000.5 ", "=2460000.5", "+2460000.5", "-0", "0000000000000000000000002460000.5",
		strings.Repeat("9", 41), "", ".", "+.", "2460000.5.5",
	} {
		f.Add(s, uint8(4), uint8(0), 10.0, 20.0)
	}
	f.Add("60122.5", uint8(1), uint8(1), 359.999, -89.9)
	f.Add("60123", uint8(0), uint8(2), 0.0, 90.0)
	f.Add("2460000.5", uint8(7), uint8(9), math.NaN(), math.Inf(1))
	f.Fuzz(func(t *testing.T, text string, stdIdx, formIdx uint8, raDeg, decDeg float64) {
		std := ephem.TimeStandard("MJD_WHATEVER")
		if int(stdIdx) < len(ephem.TimeStandards) {
			std = ephem.TimeStandards[stdIdx]
		}
		form := ephem.EpochForm("")
		if int(formIdx) < len(ephem.EpochForms) {
			form = ephem.EpochForms[formIdx]
		}
		v, err := ephem.ParseEpoch(text, std, form)
		if err != nil {
			hostileInputError(t, err, "epoch", "standard", "form")
			return
		}
		jd := v.Float()
		switch {
		case math.IsNaN(v.Day) || math.IsInf(v.Day, 0) || math.IsNaN(v.Frac) || v.Frac < 0 || v.Frac >= 1:
			t.Fatalf("%q (%s): %+v not a normalised JD2", text, form, v)
		case v.Day-math.Floor(v.Day) != 0.5:
			t.Fatalf("%q (%s): Day %v is not a half-integer", text, form, v.Day)
		case jd < hostileMinJD || jd > hostileMaxJD:
			t.Fatalf("%q (%s): JD %v outside 1582-10-15..3000-01-01", text, form, jd)
		}
		x, perr := strconv.ParseFloat(strings.TrimSpace(text), 64)
		if perr != nil {
			t.Fatalf("%q accepted by ParseEpoch but not a decimal number: %v", text, perr)
		}
		off := map[ephem.EpochForm]float64{ephem.FormJD: 0, ephem.FormMJD: 2400000.5, ephem.FormRJD: 2400000}[form]
		if d := math.Abs((v.Day - off) + v.Frac - x); d > 1e-8 {
			t.Fatalf("%q (%s): %+v differs from the float reading %v by %g d", text, form, v, x, d)
		}
		star := ephem.Star{RADeg: raDeg, DecDeg: decDeg}
		bjd, err := ephem.ConvertEpochGeocentric(v, std, ephem.StdBJDTDB, star)
		if err != nil {
			hostileInputError(t, err, "ra", "dec", "star", "epoch", "pm_ra", "pm_dec")
			return
		}
		if d := bjd.SubDays(v); math.IsNaN(d) || math.Abs(d) > 1 {
			t.Fatalf("%q %s → BJD_TDB %+v: moved by %v days", text, std, bjd, d)
		}
	})
}

// hostileInputError fails unless err is an *ephem.InputError on one of the
// fields (or a field starting with one of them) that says what is accepted.
func hostileInputError(tb testing.TB, err error, fields ...string) {
	tb.Helper()
	var ie *ephem.InputError
	if !errors.As(err, &ie) {
		tb.Fatalf("error %v (%T) is not an *ephem.InputError", err, err)
	}
	if ie.Accepted == "" {
		tb.Fatalf("InputError %+v does not say what is accepted", ie)
	}
	for _, f := range fields {
		if strings.HasPrefix(ie.Field, f) {
			return
		}
	}
	tb.Fatalf("InputError on field %q, want one of %q", ie.Field, fields)
}

// TestHostileEpochText: oversize, non-ASCII, non-UTF-8 and formula-like
// epochs are refused naming the field, with a message that stays short.
func TestHostileEpochText(t *testing.T) {
	tests := []struct{ name, in string }{
		{"TenMB", strings.Repeat("9", 10<<20)},
		{"InvalidUTF8", "2460000.5\xff"},
		{"FullwidthDigits", "２４６００００.５"},
		{"ArabicIndicDigits", "٢٤٦٠٠٠٠.٥"},
		{"NUL", "2460000\x00.5"},
		{"Formula", "=2460000.5"},
		{"Exponent", "2.4600005e6"},
		{"Hex", "0x1p21"},
		{"Fraction", "4920001/2"},
		{"NaN", "NaN"},
		{"Inf", "+Inf"},
		{"TwoPoints", "2460000.5.5"},
		{"SignOnly", "-"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			v, err := ephem.ParseEpoch(tc.in, ephem.StdBJDTDB, ephem.FormJD)
			if err == nil {
				t.Fatalf("%.40q accepted as %+v", tc.in, v)
			}
			hostileInputError(t, err, "epoch")
			if n := len(err.Error()); n > 1024 {
				t.Fatalf("error message is %d bytes: it echoes the input", n)
			}
		})
	}
}

// TestHostileParsersEchoBound: a 10 MB value given to any text parser is
// refused with an *ephem.InputError whose message stays short (a web page or
// a log line shows it).
func TestHostileParsersEchoBound(t *testing.T) {
	big := strings.Repeat("1", 10<<20)
	parsers := []struct {
		name  string
		field string
		parse func(string) error
	}{
		{"ParseRA", "ra", func(s string) error { _, err := ephem.ParseRA(s); return err }},
		{"ParseDec", "dec", func(s string) error { _, err := ephem.ParseDec(s); return err }},
		{"ParseTime", "time", func(s string) error { _, err := ephem.ParseTime(s); return err }},
		{"ParseDate", "date", func(s string) error { _, _, _, err := ephem.ParseDate(s); return err }},
		{"ParseEpoch", "epoch", func(s string) error { _, err := ephem.ParseEpoch(s, ephem.StdBJDTDB, ephem.FormJD); return err }},
	}
	for _, p := range parsers {
		t.Run(p.name, func(t *testing.T) {
			err := p.parse(big)
			if err == nil {
				t.Fatalf("a 10 MB value was accepted")
			}
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %.200v (%T) is not an *ephem.InputError", err, err)
			}
			t.Logf("field %q, message %d bytes", ie.Field, len(err.Error()))
			if n := len(err.Error()); n > 1024 {
				t.Fatalf("%s: error message is %d bytes: it echoes the input", p.name, n)
			}
		})
	}
}

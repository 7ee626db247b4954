package ephem_test

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// arcsec converts degrees to arcseconds.
func arcsec(deg float64) float64 { return deg * 3600 }

// wrapDeg returns a−b folded into −180..180 degrees.
func wrapDeg(a, b float64) float64 {
	d := math.Mod(a-b, 360)
	switch {
	case d > 180:
		d -= 360
	case d < -180:
		d += 360
	}
	return d
}

// checkInputError fails unless err is an *ephem.InputError for field whose
// message is one line naming the field.
func checkInputError(tb testing.TB, err error, field string) {
	tb.Helper()
	var ie *ephem.InputError
	if !errors.As(err, &ie) {
		tb.Fatalf("error %v (%T) is not an *ephem.InputError", err, err)
	}
	if ie.Field != field {
		tb.Errorf("Field = %q, want %q", ie.Field, field)
	}
	if ie.Accepted == "" {
		tb.Errorf("error %q does not say what is accepted", err)
	}
	msg := err.Error()
	if strings.ContainsAny(msg, "\n\r") {
		tb.Errorf("error message is not one line: %q", msg)
	}
	if !strings.Contains(msg, field) {
		tb.Errorf("error message %q does not name the field %q", msg, field)
	}
}

func TestParseRA(t *testing.T) {
	tests := []struct {
		name, in string
		want     float64 // degrees
	}{
		{"DecimalDegrees", "148.25", 148.25},
		{"DecimalDegreesInteger", "0", 0},
		{"DecimalDegreesTrailingDot", "12.", 12},
		{"DecimalDegreesPadded", "  359.5 ", 359.5},
		{"ColonHours", "09:53:00.0", 148.25},
		{"ColonHoursNoFraction", "09:53:00", 148.25},
		{"ColonHoursMinutesOnly", "09:53", 148.25},
		{"ColonDecimalMinutes", "09:53.5", 148.375},
		{"BlankHours", "9 53 00", 148.25},
		{"TabsAndBlanks", "9\t53  00.0", 148.25},
		{"UnitHours", "09h53m00.0s", 148.25},
		{"UnitHoursSpaced", "09h 53m 00.0s", 148.25},
		{"UnitHoursLastMarkOmitted", "09h53m00.0", 148.25},
		{"UnitHoursUpper", "09H53M00S", 148.25},
		{"DecimalHours", "9.5h", 142.5},
		{"Seconds", "00:00:01", 15.0 / 3600},
		{"JustBelow24h", "23:59:59.999", 360 - 0.015/3600},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseRA(tc.in)
			if err != nil {
				t.Fatalf("ParseRA(%q): %v", tc.in, err)
			}
			if d := arcsec(got - tc.want); math.Abs(d) > 1e-9 {
				t.Errorf("ParseRA(%q) = %.12f°, want %.12f° (off by %.3g″)", tc.in, got, tc.want, d)
			}
		})
	}
}

func TestParseRAErrors(t *testing.T) {
	tests := []struct{ name, in string }{
		{"Empty", ""},
		{"Blank", "   "},
		{"Negative", "-10"},
		{"Plus", "+10"},
		{"Degrees360", "360"},
		{"DegreesOver", "400.5"},
		{"Hours24", "24:00:00"},
		{"Minutes60", "09:60:00"},
		{"Seconds60", "09:53:60"},
		{"DecimalMinutes60", "09:60.0"},
		{"NaN", "NaN"},
		{"Inf", "Inf"},
		{"Exponent", "1.4825e2"},
		{"Hex", "0x10"},
		{"TrailingJunk", "148.25x"},
		{"TrailingColon", "09:53:"},
		{"LeadingColon", ":53:00"},
		{"FourFields", "09:53:00:00"},
		{"FractionNotLast", "09.5:30"},
		{"MixedSeparators", "09:53 00"},
		{"MixedMarks", "09h53:00"},
		{"DegreeMarkForRA", "148d15m"},
		{"MarksOutOfOrder", "09m53h"},
		{"Comma", "148,25"},
		{"Underscore", "1_48"},
		{"NonASCIIDigits", "١٤٨"},
		{"Newline", "09:53\n00"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseRA(tc.in)
			if err == nil {
				t.Fatalf("ParseRA(%q) = %v, want an error", tc.in, got)
			}
			checkInputError(t, err, "ra")
		})
	}
}

func TestParseDec(t *testing.T) {
	tests := []struct {
		name, in string
		want     float64
	}{
		{"DecimalNegative", "-6.125", -6.125},
		{"DecimalPositive", "45", 45},
		{"DecimalPlus", "+45.5", 45.5},
		{"UnicodeMinusDecimal", "−6.125", -6.125},
		{"Colon", "-06:07:30", -6.125},
		{"ColonPositiveUnsigned", "06:07:30", 6.125},
		{"Blank", "−06 07 30", -6.125},
		{"Units", "+06d07m30s", 6.125},
		{"UnitsSymbols", "-06°07′30″", -6.125},
		{"UnitsASCIIQuotes", "-06°07'30\"", -6.125},
		{"MinutesOnly", "-06:07.5", -6.125},
		{"NegativeZeroDegrees", "-00:30:00", -0.5},
		{"NegativeZeroDegreesUnicode", "−00 30 00", -0.5},
		{"NegativeZeroDegreesUnits", "-00d30m00s", -0.5},
		{"NorthPole", "90", 90},
		{"SouthPoleSexagesimal", "-90:00:00", -90},
		{"Padded", " -6.125 ", -6.125},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseDec(tc.in)
			if err != nil {
				t.Fatalf("ParseDec(%q): %v", tc.in, err)
			}
			if d := arcsec(got - tc.want); math.Abs(d) > 1e-9 {
				t.Errorf("ParseDec(%q) = %.12f°, want %.12f° (off by %.3g″)", tc.in, got, tc.want, d)
			}
		})
	}
}

func TestParseDecErrors(t *testing.T) {
	tests := []struct{ name, in string }{
		{"Empty", ""},
		{"OverNorth", "90.0001"},
		{"OverNorthSexagesimal", "90:00:01"},
		{"OverSouth", "-91"},
		{"Minutes60", "-06:60:00"},
		{"Seconds60", "-06:07:60"},
		{"DoubleSign", "--6"},
		{"SignThenBlank", "- 6"},
		{"SignOnly", "-"},
		{"HoursMark", "06h07m30s"},
		{"NaN", "nan"},
		{"MinusInf", "-Inf"},
		{"Exponent", "6e1"},
		{"TrailingJunk", "-06:07:30N"},
		{"FractionNotLast", "-06.5:07"},
		{"Mixed", "-06:07 30"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseDec(tc.in)
			if err == nil {
				t.Fatalf("ParseDec(%q) = %v, want an error", tc.in, got)
			}
			checkInputError(t, err, "dec")
		})
	}
}

func TestParseTime(t *testing.T) {
	want := time.Date(2026, 12, 1, 20, 0, 0, 0, time.UTC)
	tests := []struct {
		name, in string
		want     time.Time
	}{
		{"RFC3339Z", "2026-12-01T20:00:00Z", want},
		{"RFC3339Offset", "2026-12-01T17:00:00-03:00", want},
		{"RFC3339Fraction", "2026-12-01T20:00:00.250Z", want.Add(250 * time.Millisecond)},
		{"NoZoneIsUTC", "2026-12-01T20:00:00", want},
		{"BlankSeparatorIsUTC", "2026-12-01 20:00:00", want},
		{"BlankSeparatorOffset", "2026-12-01 21:00:00+01:00", want},
		{"NoSeconds", "2026-12-01T20:00", want},
		{"NoSecondsBlank", "2026-12-01 20:00", want},
		{"Padded", " 2026-12-01T20:00:00Z ", want},
		{"Earliest", "1800-01-01T00:00:00Z", time.Date(1800, 1, 1, 0, 0, 0, 0, time.UTC)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseTime(tc.in)
			if err != nil {
				t.Fatalf("ParseTime(%q): %v", tc.in, err)
			}
			if !got.Equal(tc.want) || got.Location() != time.UTC {
				t.Errorf("ParseTime(%q) = %v, want %v in UTC", tc.in, got, tc.want)
			}
		})
	}
}

func TestParseTimeErrors(t *testing.T) {
	tests := []struct{ name, in string }{
		{"Empty", ""},
		{"DateOnly", "2026-12-01"},
		{"Garbage", "tomorrow"},
		{"BadMonth", "2026-13-01T00:00:00Z"},
		{"BadDay", "2026-02-30T00:00:00Z"},
		{"Hour25", "2026-12-01T25:00:00Z"},
		{"Second60", "2026-12-01T23:59:60Z"},
		{"TrailingJunk", "2026-12-01T20:00:00Zjunk"},
		{"TooEarly", "1799-12-31T23:59:59Z"},
		{"TooLate", "2200-01-01T00:00:00Z"},
		{"Unix", "1764619200"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ephem.ParseTime(tc.in)
			if err == nil {
				t.Fatalf("ParseTime(%q) = %v, want an error", tc.in, got)
			}
			checkInputError(t, err, "time")
		})
	}
}

func TestParseDate(t *testing.T) {
	y, m, d, err := ephem.ParseDate("2026-12-01")
	if err != nil {
		t.Fatalf("ParseDate: %v", err)
	}
	if y != 2026 || m != time.December || d != 1 {
		t.Errorf("ParseDate(2026-12-01) = %d-%d-%d", y, m, d)
	}
	for _, in := range []string{"", "2026-02-29", "2026-12-1", "2026/12/01", "01-12-2026", "2026-12-01T00:00:00Z", "1799-12-31", "2200-01-01"} {
		t.Run(fmt.Sprintf("Err%q", in), func(t *testing.T) {
			_, _, _, err := ephem.ParseDate(in)
			if err == nil {
				t.Fatalf("ParseDate(%q) succeeded, want an error", in)
			}
			checkInputError(t, err, "date")
		})
	}
}

func TestFormatRAHours(t *testing.T) {
	tests := []struct {
		name string
		deg  float64
		dec  int
		want string
	}{
		{"Plain", 148.25, 1, "09:53:00.0"},
		{"RoundsUpIntoMinute", 148.25 - 0.00001/3600*15, 2, "09:53:00.00"},
		{"WrapsAt24h", 360 - 1e-12, 3, "00:00:00.000"},
		{"NoDecimals", 15, 0, "01:00:00"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := ephem.FormatRAHours(tc.deg, tc.dec); got != tc.want {
				t.Errorf("FormatRAHours(%v, %d) = %q, want %q", tc.deg, tc.dec, got, tc.want)
			}
		})
	}
}

func TestFormatDecDeg(t *testing.T) {
	tests := []struct {
		name string
		deg  float64
		dec  int
		want string
	}{
		{"Negative", -6.125, 1, "-06:07:30.0"},
		{"NegativeBelowOneDegree", -0.5, 0, "-00:30:00"},
		{"RoundsToZeroIsPositive", -1e-12, 2, "+00:00:00.00"},
		{"Pole", 90, 0, "+90:00:00"},
		{"RoundsUpIntoDegree", 44.9999999, 1, "+45:00:00.0"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := ephem.FormatDecDeg(tc.deg, tc.dec); got != tc.want {
				t.Errorf("FormatDecDeg(%v, %d) = %q, want %q", tc.deg, tc.dec, got, tc.want)
			}
		})
	}
}

// roundTripTol is the largest allowed change of an angle formatted with nine
// decimals and parsed again, arcseconds.
const roundTripTol = 1e-6

func FuzzParseRA(f *testing.F) {
	for _, s := range []string{"148.25", "09:53:00.0", "9 53 00", "09h53m00.0s", "23:59:59.9999999999", "359.999999999999", "0", "9.5h", "09:53.5", "-1", "24:00:00", "NaN"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		deg, err := ephem.ParseRA(s)
		if err != nil {
			checkInputError(t, err, "ra")
			return
		}
		if math.IsNaN(deg) || math.IsInf(deg, 0) || deg < 0 || deg >= 360 {
			t.Fatalf("ParseRA(%q) = %v, outside 0 ≤ RA < 360", s, deg)
		}
		for _, text := range []string{ephem.FormatRAHours(deg, 9), strconv.FormatFloat(deg, 'f', -1, 64)} {
			again, err := ephem.ParseRA(text)
			if err != nil {
				t.Fatalf("ParseRA(%q) = %v; formatted as %q it does not parse: %v", s, deg, text, err)
			}
			if d := arcsec(wrapDeg(again, deg)); math.Abs(d) > roundTripTol {
				t.Fatalf("ParseRA(%q) = %v, via %q = %v: off by %.3g″", s, deg, text, again, d)
			}
		}
	})
}

func FuzzParseDec(f *testing.F) {
	for _, s := range []string{"-6.125", "-06:07:30", "−06 07 30", "+06d07m30s", "-06°07′30″", "-00:30:00", "90", "-90:00:00", "90:00:00.0000001", "+-1", "-0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		deg, err := ephem.ParseDec(s)
		if err != nil {
			checkInputError(t, err, "dec")
			return
		}
		if math.IsNaN(deg) || math.IsInf(deg, 0) || deg < -90 || deg > 90 {
			t.Fatalf("ParseDec(%q) = %v, outside −90..90", s, deg)
		}
		for _, text := range []string{ephem.FormatDecDeg(deg, 9), strconv.FormatFloat(deg, 'f', -1, 64)} {
			again, err := ephem.ParseDec(text)
			if err != nil {
				t.Fatalf("ParseDec(%q) = %v; formatted as %q it does not parse: %v", s, deg, text, err)
			}
			if d := arcsec(again - deg); math.Abs(d) > roundTripTol {
				t.Fatalf("ParseDec(%q) = %v, via %q = %v: off by %.3g″", s, deg, text, again, d)
			}
		}
	})
}

func FuzzParseTime(f *testing.F) {
	for _, s := range []string{"2026-12-01T20:00:00Z", "2026-12-01T17:00:00-03:00", "2026-12-01T20:00:00", "2026-12-01 20:00:00", "2026-12-01T20:00:00.123456789Z", "1800-01-01T00:00:00+14:00", "2199-12-31T23:59:59-12:00", "2026-02-30T00:00:00Z"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		tm, err := ephem.ParseTime(s)
		if err != nil {
			checkInputError(t, err, "time")
			return
		}
		if tm.Location() != time.UTC {
			t.Fatalf("ParseTime(%q) = %v, not in UTC", s, tm)
		}
		if y := tm.Year(); y < ephem.MinYear || y > ephem.MaxYear {
			t.Fatalf("ParseTime(%q) = %v, year outside %d..%d", s, tm, ephem.MinYear, ephem.MaxYear)
		}
		text := tm.Format(time.RFC3339Nano)
		again, err := ephem.ParseTime(text)
		if err != nil {
			t.Fatalf("ParseTime(%q) = %v; formatted as %q it does not parse: %v", s, tm, text, err)
		}
		if !again.Equal(tm) {
			t.Fatalf("ParseTime(%q) = %v, via %q = %v", s, tm, text, again)
		}
	})
}

// Parsing a target position typed in sexagesimal (invented coordinates).
func ExampleParseRA() {
	ra, _ := ephem.ParseRA("09:53:00.0")
	dec, _ := ephem.ParseDec("-06:07:30")
	fmt.Printf("%.4f %.4f\n", ra, dec)
	fmt.Println(ephem.FormatRAHours(ra, 2), ephem.FormatDecDeg(dec, 1))
	_, err := ephem.ParseDec("-06:61:00")
	fmt.Println(err != nil)
	// Output:
	// 148.2500 -6.1250
	// 09:53:00.00 -06:07:30.0
	// true
}

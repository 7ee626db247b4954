package ephem

import (
	"math"
	"math/big"
	"strconv"
	"strings"
)

// Epochs as users write them.
//
// Papers give reference epochs in several standards (JD_UTC, HJD_UTC, HJD_TT,
// BJD_UTC, BJD_TDB) and forms (full JD, MJD, reduced JD). HJD_UTC and BJD_TDB
// of one event differ by up to about a minute (32.184 s + leap seconds + the
// Sun's ±4 s offset from the barycentre along the line of sight), so an epoch
// is never stored or converted without its standard.

// EpochForm is the way an epoch value is written.
type EpochForm string

// Epoch forms.
const (
	// FormJD is the full Julian date, e.g. 2460123.456789.
	FormJD EpochForm = "JD"
	// FormMJD is the modified Julian date, JD − 2400000.5 (IAU 1973,
	// common practice since), e.g. 60122.956789.
	FormMJD EpochForm = "MJD"
	// FormRJD is the reduced Julian date, JD − 2400000 (common practice
	// in variable-star work), e.g. 60123.456789.
	FormRJD EpochForm = "RJD"
)

// EpochForms lists the accepted forms.
var EpochForms = []EpochForm{FormJD, FormMJD, FormRJD}

// TimeStandards lists the accepted time standards.
var TimeStandards = []TimeStandard{StdJDUTC, StdHJDUTC, StdHJDTT, StdBJDUTC, StdBJDTDB}

// Epochs are accepted between these full Julian dates: 1582-10-15 (the first
// Gregorian day) and 3000-01-01. Any value outside is a typing or form error
// (an MJD entered as JD, say).
const (
	epochMinJD = 2299160.5
	epochMaxJD = 2816787.5
)

// offset returns JD − value for the form, as an integer part and a half.
func (f EpochForm) offset() (whole int64, half bool, ok bool) {
	switch f {
	case FormJD:
		return 0, false, true
	case FormMJD:
		return 2400000, true, true
	case FormRJD:
		return 2400000, false, true
	}
	return 0, false, false
}

// Validate reports an unknown standard (including the empty one: an epoch
// without a standard) as an *InputError.
func (s TimeStandard) Validate() error {
	for _, k := range TimeStandards {
		if s == k {
			return nil
		}
	}
	v := string(s)
	if v == "" {
		v = "(missing)"
	}
	return &InputError{"standard", strconv.Quote(v), "one of JD_UTC, HJD_UTC, HJD_TT, BJD_UTC, BJD_TDB; an epoch is never taken without its time standard"}
}

// Validate reports an unknown form as an *InputError.
func (f EpochForm) Validate() error {
	if _, _, ok := f.offset(); ok {
		return nil
	}
	v := string(f)
	if v == "" {
		v = "(missing)"
	}
	return &InputError{"form", strconv.Quote(v), "JD (full Julian date), MJD (JD − 2400000.5) or RJD (JD − 2400000)"}
}

// ParseEpoch parses a decimal epoch value written in form (full JD, MJD or
// reduced JD) and returns the full Julian date, still in the standard std (it
// is checked, not converted: see ConvertEpoch). The integer and fractional
// parts are parsed exactly (math/big) and kept apart, so all the digits given
// survive: a single float64 Julian date would keep only about 40 µs.
// Accepted text: an optional sign, digits, an optional decimal point and
// digits (no exponent), at most 40 characters; the value must fall between
// 1582-10-15 and 3000-01-01.
func ParseEpoch(text string, std TimeStandard, form EpochForm) (JD2, error) {
	if err := std.Validate(); err != nil {
		return JD2{}, err
	}
	if err := form.Validate(); err != nil {
		return JD2{}, err
	}
	s := strings.TrimSpace(text)
	const accepted = "a decimal number such as 2460123.456789 (JD), 60122.956789 (MJD) or 60123.456789 (RJD)"
	if s == "" || len(s) > 40 || strings.IndexFunc(s, func(r rune) bool {
		return !(r >= '0' && r <= '9' || r == '.' || r == '-' || r == '+')
	}) >= 0 {
		return JD2{}, &InputError{"epoch", quotedEpoch(text), accepted}
	}
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		return JD2{}, &InputError{"epoch", quotedEpoch(text), accepted}
	}
	whole, half, _ := form.offset()
	// Full JD = value + offset; split it as Day (half-integer) + Frac.
	jd := new(big.Rat).Add(r, new(big.Rat).SetInt64(whole))
	if half {
		jd.Add(jd, big.NewRat(1, 2))
	}
	// Day = floor(jd − 0.5) + 0.5, Frac = jd − Day.
	shifted := new(big.Rat).Sub(jd, big.NewRat(1, 2))
	fl := new(big.Int).Quo(shifted.Num(), shifted.Denom()) // truncates toward zero
	if shifted.Sign() < 0 && new(big.Rat).SetInt(fl).Cmp(shifted) != 0 {
		fl.Sub(fl, big.NewInt(1))
	}
	frac := new(big.Rat).Sub(shifted, new(big.Rat).SetInt(fl))
	if !fl.IsInt64() {
		return JD2{}, &InputError{"epoch", quotedEpoch(text), "a Julian date between 1582-10-15 (JD 2299160.5) and 3000-01-01 (JD 2816787.5)"}
	}
	f, _ := frac.Float64()
	out := JD2{Day: float64(fl.Int64()) + 0.5, Frac: f}
	if out.Frac >= 1 { // rounding of a fraction within 2⁻⁵³ of 1
		out = JD2{Day: out.Day + 1, Frac: 0}
	}
	if jd := out.Float(); jd < epochMinJD || jd > epochMaxJD {
		return JD2{}, &InputError{"epoch", quotedEpoch(text) + " (" + string(form) + ")",
			"a Julian date between 1582-10-15 (JD 2299160.5) and 3000-01-01 (JD 2816787.5); check the form (JD, MJD, RJD)"}
	}
	return out, nil
}

// quotedEpoch quotes an epoch text for an error message, cut to 64
// characters (an epoch has at most 40), so that a hostile 10 MB value does
// not become a 10 MB message.
func quotedEpoch(text string) string {
	if r := []rune(text); len(r) > 64 {
		text = string(r[:64]) + "…"
	}
	return strconv.Quote(text)
}

// FormatEpoch writes v in form with the given number of decimals (0..12;
// 8 decimals of a day are 0.86 ms), from the two parts separately, so no
// digit is lost to a single float64. An unknown form writes the full JD; a
// non-finite v writes "" (never "NaN").
func FormatEpoch(v JD2, form EpochForm, decimals int) string {
	if !finite(v.Day) || !finite(v.Frac) {
		return ""
	}
	decimals = max(0, min(decimals, 12))
	whole, half, ok := form.offset()
	if !ok {
		whole, half = 0, false
	}
	// value = (Day − whole − half?) + Frac, with Day a half-integer.
	n := v.Day - float64(whole)
	f := v.Frac
	if half {
		n -= 0.5
	} else {
		n -= 0.5
		f += 0.5
	}
	// n is now an integer (for half-integer Day), f in [0, 1.5).
	ip := math.Floor(n)
	f += n - ip
	carry := math.Floor(f)
	ip += carry
	f -= carry
	scale := math.Pow(10, float64(decimals))
	fi := math.Round(f * scale)
	if fi >= scale {
		ip++
		fi -= scale
	}
	neg := ip < 0
	if neg && fi > 0 { // −(|ip|−1) − (1 − f): write the magnitude
		ip++
		fi = scale - fi
	}
	out := strconv.FormatFloat(math.Abs(ip), 'f', 0, 64)
	if neg && (ip != 0 || fi != 0) {
		out = "-" + out
	}
	if decimals > 0 {
		ds := strconv.FormatFloat(fi, 'f', 0, 64)
		out += "." + strings.Repeat("0", decimals-len(ds)) + ds
	}
	return out
}

// ConvertEpoch converts the epoch v of an event on the target st, observed
// from site, from one standard to another (JD_UTC, HJD_UTC, HJD_TT, BJD_UTC,
// BJD_TDB). Between two heliocentric or barycentric standards the site matters
// by at most 21.3 ms (Earth's radius over c): papers rarely say where the
// timing was made, and ConvertEpochGeocentric puts the observer at the
// geocentre. Conversion goes through the UTC instant of observation, inverted
// by iteration to below 1 ns, so converting there and back returns v to
// within a microsecond.
func ConvertEpoch(v JD2, from, to TimeStandard, site Site, st Star) (JD2, error) {
	if err := site.Validate(); err != nil {
		return JD2{}, err
	}
	return epochConvert(v, from, to, &site, st)
}

// ConvertEpochGeocentric is ConvertEpoch for an observer at the Earth's
// centre: what to use when a paper gives a heliocentric or barycentric epoch
// and no observatory. It differs from a topocentric conversion by at most
// 21.3 ms, and not at all between two standards of the same origin (HJD_UTC
// and HJD_TT; BJD_UTC and BJD_TDB). Converting to or from JD_UTC, a geocentric
// time, puts the event at the geocentre too.
func ConvertEpochGeocentric(v JD2, from, to TimeStandard, st Star) (JD2, error) {
	return epochConvert(v, from, to, nil, st)
}

func epochConvert(v JD2, from, to TimeStandard, site *Site, st Star) (JD2, error) {
	if err := from.Validate(); err != nil {
		err.(*InputError).Field = "from standard"
		return JD2{}, err
	}
	if err := to.Validate(); err != nil {
		err.(*InputError).Field = "to standard"
		return JD2{}, err
	}
	if !finite(v.Day) || !finite(v.Frac) || v.Float() < epochMinJD || v.Float() > epochMaxJD {
		return JD2{}, &InputError{"epoch", fmtNum(v.Float()), "a Julian date between JD 2299160.5 (1582-10-15) and 2816787.5 (3000-01-01)"}
	}
	if err := baryValidateStar(st); err != nil {
		return JD2{}, err
	}
	if from == to {
		return v, nil
	}
	u := baryInvert(site, st, v, from)
	return baryPick(baryTimes(site, st, u), to), nil
}

package ephem

import (
	"math"
	"time"

	"github.com/soniakeys/meeus/v3/deltat"
	"github.com/soniakeys/meeus/v3/julian"
)

// Time scales.
//
//	TAI = UTC + (TAI−UTC)                 leap-second table below, 1960 onwards
//	TT  = TAI + 32.184 s                  by definition
//	TT  = UT + ΔT                         before 1960 (Meeus ch. 10, table 10.A)
//	TDB = TT + (TDB−TT)                   periodic series, TDBMinusTT
//	UT1 ≈ UTC                             assumed throughout; |UT1−UTC| ≤ 0.9 s
//
// Assuming UT1 = UTC shifts sidereal time by at most 0.9 s of time (13.5″ of
// hour angle). Observatories that need better must apply DUT1 themselves.

const (
	secondsPerDay = 86400.0
	jdUnixEpoch   = 2440587.5 // JD of 1970-01-01T00:00:00 UTC
	// J2000 is the Julian date of the epoch J2000.0 (2000-01-01T12:00 TT).
	J2000 = 2451545.0
	// MJDOffset is JD − MJD.
	MJDOffset = 2400000.5
	// TTMinusTAI is TT − TAI in seconds, exact by definition (IAU 1991).
	TTMinusTAI = 32.184
)

// LeapTableUpdated is the date of the IERS Bulletin C the leap-second table was
// last checked against. After the table's last entry phasecast assumes no new
// leap second; a leap second announced later shifts TT by one second until the
// table is updated here.
//
// From memory: Bulletin C 70 (July 2025) announced no leap second at the end of
// December 2025; TAI−UTC = 37 s since 2017-01-01.
const LeapTableUpdated = "2025-07 (IERS Bulletin C 70)"

// LeapTableKnownUntil is the last instant for which the leap-second table is
// known to be complete. Leap seconds are inserted only at the end of June or
// of December, each announced in a Bulletin C about six months before; the
// bulletin of LeapTableUpdated settled the end of December 2025, so the next
// possible insertion it leaves open is at the end of June 2026 (from memory).
var LeapTableKnownUntil = time.Date(2026, 6, 30, 23, 59, 59, 0, time.UTC)

// ΔT table 10.A of Meeus is accurate from 1620 to 2010 (the package's own
// statement); earlier ΔT is extrapolated.
var deltaTTableStart = time.Date(1620, 1, 1, 0, 0, 0, 0, time.UTC)

// TimeScaleNote returns one sentence when TT − UTC at instant t rests on an
// assumption beyond phasecast's tables, for printing beside results that
// depend on it, and "" when the tables cover t:
//   - after LeapTableKnownUntil: no leap second after the table's last entry
//     is assumed (TT − UTC stays 69.184 s); a leap second announced later
//     shifts TT, TDB and BJD_TDB by one second until the table is updated;
//   - before 1960: UTC had no atomic definition, TT − UT is ΔT from Meeus
//     table 10.A with UT = UTC;
//   - before 1620: ΔT is extrapolated beyond that table, uncertain by minutes.
func TimeScaleNote(t time.Time) string {
	switch {
	case t.After(LeapTableKnownUntil):
		return "time scales: the leap-second table (checked against IERS Bulletin C 70) is known complete up to " +
			LeapTableKnownUntil.Format("2006-01-02") + "; no leap second after that is assumed (TT − UTC = 69.184 s), and one announced since would shift TT and BJD_TDB by 1 s"
	case t.Before(deltaTTableStart):
		return "time scales: before 1620 ΔT is extrapolated beyond Meeus table 10.A and may be off by minutes; TT, TDB and BJD_TDB carry that error"
	case t.Before(time.Date(1960, 1, 1, 0, 0, 0, 0, time.UTC)):
		return "time scales: before 1960 UTC had no atomic definition; TT − UT is ΔT from Meeus table 10.A with UT taken equal to UTC"
	}
	return ""
}

// taiUTCStep is one line of the TAI−UTC table: from MJD Start (UTC) on,
// TAI−UTC = Offset + (MJD − RefMJD) × Rate seconds. Between 1960 and 1972 UTC
// was steered with frequency offsets ("rubber seconds"); since 1972 Rate is 0
// and Offset whole seconds.
type taiUTCStep struct {
	Start  float64 // MJD (UTC) the line takes effect
	Offset float64 // s
	RefMJD float64
	Rate   float64 // s per day
}

// taiUTC is the published TAI−UTC history (the U.S. Naval Observatory's
// tai-utc.dat; the same numbers as ERFA's eraDat). Entered from memory and
// checked against astropy/ERFA (TT and TDB) by the fixture in testdata/bary_astropy.json.
var taiUTC = []taiUTCStep{
	{36934, 1.4178180, 37300, 0.001296}, // 1960-01-01
	{37300, 1.4228180, 37300, 0.001296}, // 1961-01-01
	{37512, 1.3728180, 37300, 0.001296}, // 1961-08-01
	{37665, 1.8458580, 37665, 0.0011232},
	{38334, 1.9458580, 37665, 0.0011232}, // 1963-11-01
	{38395, 3.2401300, 38761, 0.001296},  // 1964-01-01
	{38486, 3.3401300, 38761, 0.001296},
	{38639, 3.4401300, 38761, 0.001296},
	{38761, 3.5401300, 38761, 0.001296}, // 1965-01-01
	{38820, 3.6401300, 38761, 0.001296},
	{38942, 3.7401300, 38761, 0.001296},
	{39004, 3.8401300, 38761, 0.001296},
	{39126, 4.3131700, 39126, 0.002592}, // 1966-01-01
	{39887, 4.2131700, 39126, 0.002592}, // 1968-02-01
	{41317, 10, 0, 0},                   // 1972-01-01
	{41499, 11, 0, 0},                   // 1972-07-01
	{41683, 12, 0, 0},                   // 1973-01-01
	{42048, 13, 0, 0},                   // 1974-01-01
	{42413, 14, 0, 0},                   // 1975-01-01
	{42778, 15, 0, 0},                   // 1976-01-01
	{43144, 16, 0, 0},                   // 1977-01-01
	{43509, 17, 0, 0},                   // 1978-01-01
	{43874, 18, 0, 0},                   // 1979-01-01
	{44239, 19, 0, 0},                   // 1980-01-01
	{44786, 20, 0, 0},                   // 1981-07-01
	{45151, 21, 0, 0},                   // 1982-07-01
	{45516, 22, 0, 0},                   // 1983-07-01
	{46247, 23, 0, 0},                   // 1985-07-01
	{47161, 24, 0, 0},                   // 1988-01-01
	{47892, 25, 0, 0},                   // 1990-01-01
	{48257, 26, 0, 0},                   // 1991-01-01
	{48804, 27, 0, 0},                   // 1992-07-01
	{49169, 28, 0, 0},                   // 1993-07-01
	{49534, 29, 0, 0},                   // 1994-07-01
	{50083, 30, 0, 0},                   // 1996-01-01
	{50630, 31, 0, 0},                   // 1997-07-01
	{51179, 32, 0, 0},                   // 1999-01-01
	{53736, 33, 0, 0},                   // 2006-01-01
	{54832, 34, 0, 0},                   // 2009-01-01
	{56109, 35, 0, 0},                   // 2012-07-01
	{57204, 36, 0, 0},                   // 2015-07-01
	{57754, 37, 0, 0},                   // 2017-01-01
}

// JD2 is a Julian date held in two parts, Day + Frac, so that differences of
// nearby dates keep sub-microsecond precision (a single float64 Julian date
// resolves only about 40 µs). The scale (UTC, TT, TDB, …) is the caller's to
// name; Day is normally a half-integer (midnight) and 0 ≤ Frac < 1.
type JD2 struct {
	Day  float64
	Frac float64
}

// Float returns the Julian date as one float64 (about 40 µs resolution).
func (j JD2) Float() float64 { return j.Day + j.Frac }

// MJD returns the modified Julian date, JD − 2400000.5, as one float64.
func (j JD2) MJD() float64 { return (j.Day - MJDOffset) + j.Frac }

// AddSeconds returns j shifted by s seconds, renormalised.
func (j JD2) AddSeconds(s float64) JD2 { return j.AddDays(s / secondsPerDay) }

// AddDays returns j shifted by d days, renormalised so that 0 ≤ Frac < 1.
func (j JD2) AddDays(d float64) JD2 {
	whole := math.Floor(d)
	f := j.Frac + (d - whole)
	carry := math.Floor(f)
	return JD2{Day: j.Day + whole + carry, Frac: f - carry}
}

// SubDays returns j − k in days, keeping the precision of both parts.
func (j JD2) SubDays(k JD2) float64 { return (j.Day - k.Day) + (j.Frac - k.Frac) }

// NewJD2 splits a single float64 Julian date into two parts.
func NewJD2(jd float64) JD2 {
	day := math.Floor(jd-0.5) + 0.5
	return JD2{Day: day, Frac: jd - day}
}

// JDUTC returns the Julian date of t on the UTC scale, in two parts.
// t may carry any location; it is converted to UTC.
func JDUTC(t time.Time) JD2 {
	u := t.UTC()
	sec := u.Unix()
	days := math.Floor(float64(sec) / secondsPerDay)
	rem := float64(sec) - days*secondsPerDay + float64(u.Nanosecond())*1e-9
	return JD2{Day: jdUnixEpoch + days, Frac: rem / secondsPerDay}
}

// TimeFromJDUTC returns the UTC instant of a Julian date on the UTC scale,
// rounded to the nearest microsecond.
func TimeFromJDUTC(j JD2) time.Time {
	days := j.Day - jdUnixEpoch
	whole := math.Floor(days)
	frac := (days - whole) + j.Frac
	us := math.Round(frac * secondsPerDay * 1e6)
	return time.Unix(int64(whole)*86400, 0).Add(time.Duration(us) * time.Microsecond).UTC()
}

// TAIMinusUTC returns TAI − UTC in seconds at a UTC Julian date, from the
// published table (1960 onwards). ok is false before 1960-01-01, when UTC was
// not yet defined against TAI.
func TAIMinusUTC(jdUTC JD2) (seconds float64, ok bool) {
	mjd := jdUTC.MJD()
	if mjd < taiUTC[0].Start {
		return 0, false
	}
	i := len(taiUTC) - 1
	for taiUTC[i].Start > mjd {
		i--
	}
	s := taiUTC[i]
	return s.Offset + (mjd-s.RefMJD)*s.Rate, true
}

// TTMinusUTC returns TT − UTC in seconds at instant t: TAI−UTC + 32.184 s from
// 1960 on; before 1960, when UTC had no defined relation to atomic time, ΔT =
// TT − UT from Meeus table 10.A (meeus deltat.Interp10A), taking UT = UTC.
func TTMinusUTC(t time.Time) float64 {
	j := JDUTC(t)
	if d, ok := TAIMinusUTC(j); ok {
		return d + TTMinusTAI
	}
	return deltat.Interp10A(j.Float()).Sec()
}

// JDTT returns the Julian date of t on the TT scale, in two parts.
func JDTT(t time.Time) JD2 { return JDUTC(t).AddSeconds(TTMinusUTC(t)) }

// JDTDB returns the Julian date of t on the TDB scale, in two parts.
func JDTDB(t time.Time) JD2 {
	tt := JDTT(t)
	return tt.AddSeconds(TDBMinusTT(tt.Float()))
}

// TDBMinusTT returns TDB − TT in seconds at a TT Julian date, by the
// abbreviated series of Fairhead & Bretagnon (1990) as given in Kaplan,
// USNO Circular 179 (2005), eq. 2.6: amplitude 1.66 ms, error about 10 µs for
// 1600–2200. The few-microsecond topocentric terms are neglected.
func TDBMinusTT(jdTT float64) float64 {
	T := (jdTT - J2000) / 36525
	return 0.001657*math.Sin(628.3076*T+6.2401) +
		0.000022*math.Sin(575.3385*T+4.2970) +
		0.000014*math.Sin(1256.6152*T+6.1969) +
		0.000005*math.Sin(606.9777*T+4.0212) +
		0.000005*math.Sin(52.9691*T+0.4444) +
		0.000002*math.Sin(21.3299*T+5.5431) +
		0.000010*T*math.Sin(628.3076*T+4.2490)
}

// JDFromCalendar returns the Julian date of a Gregorian calendar date with a
// fractional day (Meeus (7.1), via meeus julian.CalendarGregorianToJD).
func JDFromCalendar(year, month int, day float64) float64 {
	return julian.CalendarGregorianToJD(year, month, day)
}

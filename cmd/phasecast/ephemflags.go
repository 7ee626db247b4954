package main

import (
	"strings"

	"phasecast/ephem"
)

// ephemFlags describe a binary's linear (or quadratic) ephemeris:
// t(E) = T0 + P·E (+ ½·P·Ṗ·E²), with T0 given in any time standard and form
// and converted to BJD_TDB for the target and site.
type ephemFlags struct {
	t0, t0Std, t0Form, t0Err, period, periodErr, pdot *textValue
}

func addEphemFlags(f *flags) ephemFlags {
	return ephemFlags{
		t0:        f.text("t0", "EPOCH", "", "reference epoch T0 of the ephemeris (a Julian date in --t0-std and --t0-form); required"),
		t0Std:     f.text("t0-std", "STD", "BJD_TDB", "time standard of --t0: BJD_TDB, BJD_UTC, HJD_TT, HJD_UTC or JD_UTC"),
		t0Form:    f.text("t0-form", "FORM", "JD", "form of --t0: JD, MJD (JD − 2400000.5) or RJD (JD − 2400000)"),
		t0Err:     f.text("t0-err", "DAYS", "0", "1σ uncertainty of T0, days"),
		period:    f.text("period", "DAYS", "", "orbital period P, days; required"),
		periodErr: f.text("period-err", "DAYS", "0", "1σ uncertainty of P, days"),
		pdot:      f.text("pdot", "S/S", "0", "period derivative dP/dt, dimensionless (0: linear ephemeris)"),
	}
}

// ephemeris parses the flags into an ephemeris with T0 in BJD_TDB, using
// site and star to convert T0 from another standard. The convention is
// inferior conjunction unless the caller sets another one and re-validates.
func (ef ephemFlags) ephemeris(site ephem.Site, star ephem.Star) (ephem.Ephemeris, error) {
	return ef.parse(&site, &star, false)
}

// parse is ephemeris with options: site nil converts T0 for an observer at
// the geocentre (ConvertEpochGeocentric); star nil refuses a T0 that is not
// already BJD_TDB; with t0Optional a missing --t0 leaves T0 zero.
func (ef ephemFlags) parse(site *ephem.Site, star *ephem.Star, t0Optional bool) (ephem.Ephemeris, error) {
	byField := ef.byField()
	if !ef.t0.set && !t0Optional {
		return ephem.Ephemeris{}, missing(ef.t0)
	}
	if !ef.period.set {
		return ephem.Ephemeris{}, missing(ef.period)
	}
	e := ephem.Ephemeris{Convention: ephem.ConvInferiorConjunction}
	if ef.t0.set {
		t0, err := ef.epoch(site, star)
		if err != nil {
			return e, err
		}
		e.T0 = t0
	}
	for _, p := range []struct {
		v   *textValue
		dst *float64
	}{{ef.t0Err, &e.T0ErrDays}, {ef.period, &e.PeriodDays}, {ef.periodErr, &e.PeriodErr}, {ef.pdot, &e.Pdot}} {
		if !p.v.set {
			continue
		}
		x, ok := parseNumber(p.v.value)
		if !ok {
			return ephem.Ephemeris{}, fieldError(p.v, "not a number", "a decimal number such as 0.0123 or 1.5e-9")
		}
		*p.dst = x
	}
	check := e
	if !ef.t0.set {
		check.T0 = ephem.NewJD2(ephem.J2000) // stands in for the T0 the caller will supply
	}
	if err := check.Validate(); err != nil {
		return ephem.Ephemeris{}, fromInputError(err, "out of range", byField)
	}
	return e, nil
}

// epoch reads --t0 in its standard and form and returns it as BJD_TDB.
func (ef ephemFlags) epoch(site *ephem.Site, star *ephem.Star) (ephem.JD2, error) {
	byField := ef.byField()
	std := ephem.StdBJDTDB
	if ef.t0Std.set {
		std = ephem.TimeStandard(strings.ToUpper(strings.TrimSpace(ef.t0Std.value)))
	}
	form := ephem.FormJD
	if ef.t0Form.set {
		form = ephem.EpochForm(strings.ToUpper(strings.TrimSpace(ef.t0Form.value)))
	}
	t0, err := ephem.ParseEpoch(ef.t0.value, std, form)
	if err != nil {
		return t0, fromInputError(err, "not accepted", byField)
	}
	if std == ephem.StdBJDTDB {
		return t0, nil
	}
	if star == nil {
		return t0, usageErrorf("--t0-std %s: converting T0 to BJD_TDB needs the target's position: give --ra and --dec", std)
	}
	if site != nil {
		t0, err = ephem.ConvertEpoch(t0, std, ephem.StdBJDTDB, *site, *star)
	} else {
		t0, err = ephem.ConvertEpochGeocentric(t0, std, ephem.StdBJDTDB, *star)
	}
	if err != nil {
		return t0, fromInputError(err, "cannot be converted", byField)
	}
	return t0, nil
}

// byField maps ephem's field names to these flags.
func (ef ephemFlags) byField() map[string]*textValue {
	return map[string]*textValue{
		"t0": ef.t0, "epoch": ef.t0, "standard": ef.t0Std, "from standard": ef.t0Std, "form": ef.t0Form,
		"t0_err": ef.t0Err, "period": ef.period, "period_err": ef.periodErr, "pdot": ef.pdot,
	}
}

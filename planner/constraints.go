package planner

import (
	"fmt"

	"phasecast/ephem"
)

// TwilightAltDeg returns the Sun-centre altitude (degrees, airless) that ends
// the twilight tw: civil −6°, nautical −12°, astronomical −18° (the standard
// definitions; e.g. Explanatory Supplement to the Astronomical Almanac, 3rd
// ed., ch. 1). TwilightCustom has no fixed altitude: ok is false.
func TwilightAltDeg(tw Twilight) (altDeg float64, ok bool) {
	switch tw {
	case TwilightCivil:
		return -6, true
	case TwilightNautical:
		return -12, true
	case TwilightAstronomical:
		return -18, true
	}
	return 0, false
}

// ParseTwilight accepts "civil", "nautical", "astronomical" (and "custom").
func ParseTwilight(s string) (Twilight, error) {
	switch tw := Twilight(s); tw {
	case TwilightCivil, TwilightNautical, TwilightAstronomical, TwilightCustom:
		return tw, nil
	}
	return "", &ephem.InputError{Field: "twilight", Value: fmt.Sprintf("%q", s), Accepted: "civil, nautical, astronomical or custom"}
}

// Resolved returns c with SunAltMaxDeg set from Twilight (unless custom) and
// a zero Twilight read as nautical (the default), after validating every
// field. The error is an *ephem.InputError naming the first bad field.
func (c Constraints) Resolved() (Constraints, error) {
	if c.Twilight == "" {
		c.Twilight = TwilightNautical
	}
	if alt, ok := TwilightAltDeg(c.Twilight); ok {
		c.SunAltMaxDeg = alt
	} else if c.Twilight != TwilightCustom {
		return c, &ephem.InputError{Field: "twilight", Value: fmt.Sprintf("%q", string(c.Twilight)), Accepted: "civil, nautical, astronomical or custom"}
	}
	return c, c.validate()
}

func (c Constraints) validate() error {
	bad := func(field string, v float64, accepted string) error {
		return &ephem.InputError{Field: field, Value: fmtNum(v), Accepted: accepted}
	}
	switch {
	case !finite(c.SunAltMaxDeg) || c.SunAltMaxDeg < -30 || c.SunAltMaxDeg > 0:
		return bad("sun_alt_max", c.SunAltMaxDeg, "−30..0 degrees (Sun centre, airless)")
	case !finite(c.MaxAirmass) || (c.MaxAirmass != 0 && c.MaxAirmass < 1) || c.MaxAirmass > 40:
		return bad("max_airmass", c.MaxAirmass, "1..40, or 0 for no airmass limit")
	case !finite(c.MinAltDeg) || c.MinAltDeg < -5 || c.MinAltDeg >= 90:
		return bad("min_alt", c.MinAltDeg, "−5 ≤ altitude < 90 degrees (refracted), 0 = horizon")
	case !finite(c.MinMoonSepDeg) || c.MinMoonSepDeg < 0 || c.MinMoonSepDeg >= 180:
		return bad("min_moon_sep", c.MinMoonSepDeg, "0 ≤ separation < 180 degrees (0 = not applied)")
	case !finite(c.MaxMoonIllum) || c.MaxMoonIllum < 0 || c.MaxMoonIllum > 1:
		return bad("max_moon_illum", c.MaxMoonIllum, "0..1 (0 = not applied)")
	case !finite(c.HAMinHours) || c.HAMinHours < -12 || c.HAMinHours > 12:
		return bad("ha_min", c.HAMinHours, "−12..12 hours")
	case !finite(c.HAMaxHours) || c.HAMaxHours < -12 || c.HAMaxHours > 12:
		return bad("ha_max", c.HAMaxHours, "−12..12 hours")
	case c.haApplied() && c.HAMinHours >= c.HAMaxHours:
		return bad("ha_max", c.HAMaxHours, fmt.Sprintf("greater than ha_min (%s hours)", fmtNum(c.HAMinHours)))
	case !finite(c.ZenithExclDeg) || c.ZenithExclDeg < 0 || c.ZenithExclDeg > 30:
		return bad("zenith_excl", c.ZenithExclDeg, "0..30 degrees (0 = not applied)")
	case !finite(c.SunAvoidDeg) || c.SunAvoidDeg < 0 || c.SunAvoidDeg > 90:
		return bad("sun_avoid", c.SunAvoidDeg, "0..90 degrees (0 = not applied)")
	}
	return ValidateHorizon(c.Horizon)
}

func (c Constraints) haApplied() bool { return c.HAMinHours != 0 || c.HAMaxHours != 0 }

package ephem

import (
	"math"
	"time"
)

// SkyPoint is everything the sky command shows for one target at one instant
// from one site.
type SkyPoint struct {
	JDUTC, JDTT float64 // Julian dates of the instant, UTC and TT (single float64, ≈ 40 µs resolution)

	LSTHours       float64 // local apparent sidereal time, hours, [0, 24)
	HourAngleHours float64 // target's hour angle, hours, [−12, 12), positive west

	AltDeg          float64 // target's airless altitude, degrees
	AltRefractedDeg float64 // target's apparent (refracted) altitude, degrees, site's atmosphere
	AzDeg           float64 // target's azimuth, degrees from north through east, [0, 360)
	Airmass         float64 // Kasten & Young (1989) from AltRefractedDeg; 0 when AirmassOK is false
	AirmassOK       bool    // false when the target is below the horizon
	ParallacticDeg  float64 // parallactic angle, degrees, (−180, 180]

	SunAltDeg       float64 // Sun's centre, airless, topocentric, degrees
	MoonAltDeg      float64 // Moon's centre, airless, topocentric, degrees
	MoonIlluminated float64 // illuminated fraction of the Moon, 0..1 (geocentric)
	MoonSepDeg      float64 // target (apparent place) to the topocentric Moon, degrees, 0..180
}

// Observe computes a SkyPoint for target st seen from site at instant t
// (UTC), with the full reductions: ApparentPlace, Site.Horizontal,
// Site.RefractedAltDeg, Airmass, Site.SunAltDeg, Site.MoonTopocentric,
// MoonIlluminated. The site and the star must be valid (Site.Validate,
// Star.Validate).
func Observe(site Site, st Star, t time.Time) SkyPoint {
	lstHours := site.LASTHours(t)
	lst := lstHours * math.Pi / 12
	ra, dec := ApparentPlace(st, t)
	hz := site.horizontalAt(ra, dec, lst)
	refr := site.RefractedAltDeg(hz.AltDeg)
	x, ok := Airmass(refr)
	moon := site.moonTopocentric(t, lst)
	moonRA, moonDec := moon.ra*radToDeg, moon.dec*radToDeg
	return SkyPoint{
		JDUTC:           JDUTC(t).Float(),
		JDTT:            JDTT(t).Float(),
		LSTHours:        lstHours,
		HourAngleHours:  hz.HourAngleHours,
		AltDeg:          hz.AltDeg,
		AltRefractedDeg: refr,
		AzDeg:           hz.AzDeg,
		Airmass:         x,
		AirmassOK:       ok,
		ParallacticDeg:  hz.ParallacticDeg,
		SunAltDeg:       site.sunAltAt(t, lst),
		MoonAltDeg:      site.horizontalAt(moonRA, moonDec, lst).AltDeg,
		MoonIlluminated: MoonIlluminated(t),
		MoonSepDeg:      SeparationDeg(ra, dec, moonRA, moonDec),
	}
}

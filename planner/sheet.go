package planner

import (
	"fmt"
	"time"

	"phasecast/ephem"
)

// SheetPoint is where a block's target stands at one instant of the block:
// the instant (UTC), the local apparent sidereal time (hours, 0..24), the
// hour angle (hours, −12..12, west positive), the altitude with refraction
// (the site's model, ephem.Site.RefractedAltDeg) and without it (airless),
// degrees, the azimuth (degrees from north through east) and the
// parallactic angle (degrees, −180..180; Meeus (14.1)).
type SheetPoint struct {
	Label          string // "start", "mid" or "end"
	At             time.Time
	LSTHours       float64
	HourAngleHours float64
	AltDeg         float64
	AltAirlessDeg  float64
	AzDeg          float64
	ParallacticDeg float64
}

// SheetRow is one block of the telescope sheet: the target and goal, the
// exposures, the coordinates (ICRS at the block's middle, proper motion
// applied from the coordinate epoch; apparent of date, true equator and
// equinox, at the middle), the magnitude (0 = unknown), the target at the
// block's start, middle and end, the airmass and phase ranges over the
// block, and the smallest distance from the Moon during it (degrees; the
// night planner's, Block.MoonSepDeg).
type SheetRow struct {
	Block                 Block
	RAICRSDeg, DecICRSDeg float64
	RADateDeg, DecDateDeg float64
	Mag                   float64
	Points                [3]SheetPoint
}

// TelescopeSheet returns the sheet rows of a night's blocks at site, the
// targets those of the request the blocks were planned from (by
// Block.TargetIndex). Each point's place is computed on the full path
// (ephem.ApparentPlace, Site.Horizontal), not interpolated. A block whose
// target index is out of range gives an *ephem.InputError.
func TelescopeSheet(site ephem.Site, targets []Target, blocks []Block) ([]SheetRow, error) {
	out := make([]SheetRow, 0, len(blocks))
	for i, b := range blocks {
		if b.TargetIndex < 0 || b.TargetIndex >= len(targets) {
			return nil, &ephem.InputError{Field: fmt.Sprintf("blocks[%d].target_index", i), Value: fmt.Sprint(b.TargetIndex),
				Accepted: fmt.Sprintf("0..%d (a target of the request)", len(targets)-1)}
		}
		t := targets[b.TargetIndex]
		st := t.Star()
		mid := b.Start.Add(b.End.Sub(b.Start) / 2)
		row := SheetRow{Block: b, Mag: t.Mag}
		row.RAICRSDeg, row.DecICRSDeg = st.PositionAt(julianEpochTT(mid))
		row.RADateDeg, row.DecDateDeg = ephem.ApparentPlace(st, mid)
		for k, p := range []struct {
			label string
			at    time.Time
		}{{"start", b.Start}, {"mid", mid}, {"end", b.End}} {
			row.Points[k] = SheetPointAt(site, st, p.label, p.at)
		}
		out = append(out, row)
	}
	return out, nil
}

// SheetPointAt is where star st stands from site at t (see SheetPoint).
func SheetPointAt(site ephem.Site, st ephem.Star, label string, t time.Time) SheetPoint {
	ra, dec := ephem.ApparentPlace(st, t)
	h := site.Horizontal(ra, dec, t)
	return SheetPoint{Label: label, At: t.UTC(), LSTHours: site.LASTHours(t), HourAngleHours: h.HourAngleHours,
		AltDeg: site.RefractedAltDeg(h.AltDeg), AltAirlessDeg: h.AltDeg, AzDeg: h.AzDeg, ParallacticDeg: h.ParallacticDeg}
}

// julianEpochTT is the Julian epoch of t on TT: 2000.0 + (JD_TT −
// 2451545.0)/365.25 (IAU 1976 definition of the Julian epoch).
func julianEpochTT(t time.Time) float64 {
	jd := ephem.JDTT(t)
	return 2000 + ((jd.Day-2451545)+jd.Frac)/365.25
}

package planner

// This file was added by the web worker: the night chart needs the sky of a
// night sampled on a grid (the planner's decisions do not use it).

import (
	"fmt"
	"time"

	"phasecast/ephem"
)

// NightSamples is a night sampled on a uniform time grid, for drawing: the
// Sun's and the Moon's altitudes, the twilight bands, and every target's
// altitude, orbital phase and goal windows.
type NightSamples struct {
	Times      []time.Time // UTC, From + i·step
	SunAltDeg  []float64   // the Sun's centre, airless, topocentric, degrees
	MoonAltDeg []float64   // the Moon's centre, airless, topocentric, degrees
	// MoonIllum is the Moon's illuminated fraction (0..1) at the middle of
	// the span.
	MoonIllum float64
	// Bands split the span by the Sun's altitude: "day" (above the
	// sunrise altitude ephem.SunriseAltDeg), "civil" (down to −6°),
	// "nautical" (−12°), "astronomical" (−18°) and "night" (below −18°).
	// Edges are interpolated linearly between samples: good to a few
	// seconds at a 2-minute step, for drawing only.
	Bands   []SkyBand
	Targets []TargetSamples // in request order
}

// SkyBand is a stretch of time with the Sun in one altitude range.
type SkyBand struct {
	Interval
	Kind string
}

// TargetSamples is one target over the sampled night.
type TargetSamples struct {
	Name    string
	AltDeg  []float64 // refracted altitude (site's atmosphere), degrees, at Times
	Phase   []float64 // orbital phase 0 ≤ φ < 1 in the target's convention, at Times
	Windows []GoalWindow
}

// GoalWindow is one occurrence of a goal window: the UTC interval in which
// the phase lies within centre ± half-width.
type GoalWindow struct {
	GoalIndex int // index in the target's ResolveGoals
	Center    float64
	Interval
}

// maxSamples bounds the grid of SampleNight.
const maxSamples = 20000

// SampleNight samples the sky of [from, to] (at most 48 hours) at site
// every step, for each target: altitude on ephem's fast path (within 0.1″
// of the full computation, then refracted with the site's atmosphere),
// orbital phase through the planner's phase clock (BJD_TDB to about 1 ms),
// and the goal windows overlapping the span (at most MaxOccurrences' default
// per goal). The Sun and the Moon come from the same interpolated series
// PlanNight uses. Bad input gives an *ephem.InputError naming the field.
func SampleNight(site ephem.Site, from, to time.Time, targets []Target, step time.Duration) (*NightSamples, error) {
	if err := site.Validate(); err != nil {
		return nil, err
	}
	if !to.After(from) || to.Sub(from) > 48*time.Hour {
		return nil, &ephem.InputError{Field: "to", Value: to.UTC().Format(time.RFC3339),
			Accepted: "an instant after from (" + from.UTC().Format(time.RFC3339) + "), at most 48 hours later"}
	}
	if step <= 0 || to.Sub(from)/step+1 > maxSamples {
		return nil, &ephem.InputError{Field: "step", Value: step.String(),
			Accepted: fmt.Sprintf("a positive step giving at most %d samples over the span", maxSamples)}
	}
	n := int(to.Sub(from)/step) + 1
	for i, t := range targets {
		if err := validateTarget(i, t); err != nil {
			return nil, err
		}
	}
	fu, tu := unixSec(from), unixSec(to)
	sky := newNightSky(site, fu, tu)
	frame := ephem.NewSkyFrame(site, from, to)
	grid, err := frame.Grid(from.UTC(), step, n)
	if err != nil {
		return nil, err
	}
	out := &NightSamples{
		Times:      make([]time.Time, n),
		SunAltDeg:  make([]float64, n),
		MoonAltDeg: make([]float64, n),
		MoonIllum:  sky.at(0.5 * (fu + tu)).illum,
	}
	for i := range n {
		out.Times[i] = grid.Time(i)
		ev := sky.at(unixSec(out.Times[i]))
		out.SunAltDeg[i], out.MoonAltDeg[i] = ev.sunAlt, ev.moonAlt
	}
	out.Bands = skyBands(out.Times, out.SunAltDeg)
	for _, t := range targets {
		goals, err := t.ResolveGoals()
		if err != nil {
			return nil, err
		}
		ts := TargetSamples{Name: t.Name, AltDeg: make([]float64, n), Phase: make([]float64, n)}
		frame.Track(t.Star()).AltAzGrid(grid, ts.AltDeg, nil)
		clock := newPhaseClock(site, t.Star(), t.Ephem, fu, tu)
		for i := range n {
			ts.AltDeg[i] = site.RefractedAltDeg(ts.AltDeg[i])
			_, ts.Phase[i] = clock.phase(unixSec(out.Times[i]))
		}
		for gi, g := range goals {
			for _, o := range clock.occurrences(g.Center, g.HalfWidth, fu, tu, 2000) {
				ts.Windows = append(ts.Windows, GoalWindow{GoalIndex: gi, Center: g.Center,
					Interval: Interval{Start: timeOf(max(o.lo, fu)), End: timeOf(min(o.hi, tu))}})
			}
		}
		out.Targets = append(out.Targets, ts)
	}
	return out, nil
}

// AirmassAltDeg returns the refracted altitude, degrees, at which the airmass
// (ephem.Airmass, Kasten & Young 1989) equals x; 90 for x at or below the
// zenith value. For the airmass scale of charts.
func AirmassAltDeg(x float64) float64 { return altForAirmass(x) }

// skyBands splits the samples into bands by the Sun's altitude.
func skyBands(ts []time.Time, sunAlt []float64) []SkyBand {
	kind := func(alt float64) string {
		switch {
		case alt > ephem.SunriseAltDeg:
			return "day"
		case alt > -6:
			return "civil"
		case alt > -12:
			return "nautical"
		case alt > -18:
			return "astronomical"
		}
		return "night"
	}
	levels := []float64{ephem.SunriseAltDeg, -6, -12, -18}
	var out []SkyBand
	if len(ts) == 0 {
		return nil
	}
	cur := SkyBand{Interval: Interval{Start: ts[0]}, Kind: kind(sunAlt[0])}
	for i := 1; i < len(ts); i++ {
		k := kind(sunAlt[i])
		if k == cur.Kind {
			continue
		}
		// The edge: where the altitude crosses the level between the kinds
		// (the level nearest the previous sample, on the way to the next).
		a, b := sunAlt[i-1], sunAlt[i]
		edge := ts[i]
		for _, l := range levels {
			if (a-l)*(b-l) <= 0 && a != b {
				f := (l - a) / (b - a)
				edge = ts[i-1].Add(time.Duration(f * float64(ts[i].Sub(ts[i-1]))))
				break
			}
		}
		cur.End = edge
		out = append(out, cur)
		cur = SkyBand{Interval: Interval{Start: edge}, Kind: k}
	}
	cur.End = ts[len(ts)-1]
	return append(out, cur)
}

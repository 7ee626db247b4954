package planner

import (
	"fmt"
	"strings"

	"phasecast/ephem"
)

// Goal event names the planner accepts in Goal.Event besides ephem's named
// events (ephem.Events).
const (
	// EventQuadratures expands to the two quadratures, maximum recession
	// and maximum approach of the companion: one goal each.
	EventQuadratures = "quadratures"
	// EventEclipse is mid-eclipse: the companion's inferior conjunction
	// (mid primary eclipse in most eclipsing systems).
	EventEclipse = "eclipse"
)

// ResolveGoals returns the target's goals with every named event turned into
// its phase centre in the target's convention (ephem.Ephemeris.EventPhase):
// "quadratures" becomes two goals (max_recession, max_approach), "eclipse"
// is the inferior conjunction, eclipse_ingress/eclipse_egress need
// Goal.EclipseDurDays. Goals without an event are returned as they are. The
// error names the goal and the event.
func (t Target) ResolveGoals() ([]Goal, error) {
	var out []Goal
	for i, g := range t.Goals {
		if g.Event == "" {
			out = append(out, g)
			continue
		}
		events := []ephem.Event{ephem.Event(g.Event)}
		switch g.Event {
		case EventQuadratures:
			events = []ephem.Event{ephem.EventMaxRecession, ephem.EventMaxApproach}
		case EventEclipse:
			events = []ephem.Event{ephem.EventInferiorConjunction}
		}
		for _, ev := range events {
			ph, err := t.Ephem.EventPhase(ev, g.EclipseDurDays)
			if err != nil {
				return nil, fmt.Errorf("target %q goal %d (event %q): %w", t.Name, i+1, g.Event, err)
			}
			r := g
			r.Event = string(ev)
			r.Center = ph
			out = append(out, r)
		}
	}
	return out, nil
}

// EventNames lists the goal events accepted in Goal.Event.
func EventNames() []string {
	names := []string{EventQuadratures, EventEclipse}
	for _, e := range ephem.Events {
		names = append(names, string(e))
	}
	return names
}

// validateTarget checks the fields the night planner reads. Field names in
// errors are prefixed with the target's position and name.
func validateTarget(i int, t Target) error {
	pre := fmt.Sprintf("targets[%d]", i)
	if strings.TrimSpace(t.Name) != "" {
		pre = fmt.Sprintf("targets[%d] %q", i, t.Name)
	}
	bad := func(field, value, accepted string) error {
		return &ephem.InputError{Field: pre + "." + field, Value: value, Accepted: accepted}
	}
	switch {
	case strings.TrimSpace(t.Name) == "":
		return bad("name", `""`, "a non-empty name")
	case !finite(t.RADeg) || t.RADeg < 0 || t.RADeg >= 360:
		return bad("ra", fmtNum(t.RADeg), "0 ≤ RA < 360 degrees")
	case !finite(t.DecDeg) || t.DecDeg < -90 || t.DecDeg > 90:
		return bad("dec", fmtNum(t.DecDeg), "−90..90 degrees")
	case !finite(t.PMRAmasyr) || !finite(t.PMDecmasyr):
		return bad("proper_motion", fmtNum(t.PMRAmasyr)+", "+fmtNum(t.PMDecmasyr), "finite values, mas/yr")
	case t.Priority < 1 || t.Priority > 5:
		return bad("priority", fmt.Sprint(t.Priority), "an integer 1 (highest) to 5")
	case !finite(t.AcquireS) || t.AcquireS < 0 || t.AcquireS > 3600:
		return bad("acquire_s", fmtNum(t.AcquireS), "0..3600 seconds")
	case len(t.Goals) == 0:
		return bad("goals", "none", "at least one phase goal")
	}
	if err := t.Ephem.Validate(); err != nil {
		return fmt.Errorf("%s: %w", pre, err)
	}
	if err := validateBrightness(pre, t); err != nil {
		return err
	}
	for k, g := range t.Goals {
		gp := fmt.Sprintf("goals[%d].", k)
		switch {
		case g.Event == "" && (!finite(g.Center) || g.Center < 0 || g.Center >= 1):
			return bad(gp+"center", fmtNum(g.Center), "0 ≤ phase < 1")
		case !finite(g.HalfWidth) || g.HalfWidth <= 0 || g.HalfWidth >= 0.5:
			return bad(gp+"half_width", fmtNum(g.HalfWidth), "0 < half-width < 0.5 (phase)")
		case !finite(g.ExposureS) || g.ExposureS <= 0 || g.ExposureS > 86400:
			return bad(gp+"exposure_s", fmtNum(g.ExposureS), "0 < exposure ≤ 86400 seconds")
		case !finite(g.OverheadS) || g.OverheadS < 0 || g.OverheadS > 86400:
			return bad(gp+"overhead_s", fmtNum(g.OverheadS), "0 ≤ overhead ≤ 86400 seconds")
		case g.NExposures < 0 || g.NExposures > 10000:
			return bad(gp+"n_exposures", fmt.Sprint(g.NExposures), "0 (as many as fit) to 10000")
		case !finite(g.EclipseDurDays) || g.EclipseDurDays < 0:
			return bad(gp+"eclipse_duration_days", fmtNum(g.EclipseDurDays), "a duration ≥ 0 days")
		}
	}
	return nil
}

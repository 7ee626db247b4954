package planner

import (
	"fmt"
	"math"
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
			r.ContainEvent = g.Event == EventEclipse || ev == ephem.EventEclipseIngress || ev == ephem.EventEclipseEgress
			out = append(out, r)
		}
	}
	return out, nil
}

// NExposuresAccepted is what Goal.NExposures accepts, for error messages.
const NExposuresAccepted = "0 (enough to cover the window once), −1 (as many as fit) or 1..10000"

// NAsManyAsFit in Goal.NExposures asks for as many exposures as one window
// holds; 0 (the default) asks for enough to cover the window once.
const NAsManyAsFit = -1

// WindowS returns the goal window's length in time, seconds: 2 × HalfWidth
// × the period (periodDays, days).
func (g Goal) WindowS(periodDays float64) float64 { return 2 * g.HalfWidth * periodDays * 86400 }

// Capacity returns C, the most exposures whose mid-times fit in one window
// of the goal: ⌊W/L⌋ + 1, W = WindowS, L = ExposureS + OverheadS (mid-times
// L apart, the first at the window's opening).
func (g Goal) Capacity(periodDays float64) int {
	return int(math.Floor(g.WindowS(periodDays)/(g.ExposureS+g.OverheadS))) + 1
}

// CoverOnce returns the exposures that cover the window once: the fewest n
// with (n−1)·L + E ≥ W (from the first exposure's start to the last one's
// end), at least 1, at most Capacity.
func (g Goal) CoverOnce(periodDays float64) int {
	L, E, W := g.ExposureS+g.OverheadS, g.ExposureS, g.WindowS(periodDays)
	n := 1
	if W > E {
		n = int(math.Ceil((W-E)/L-1e-9)) + 1
	}
	return min(n, g.Capacity(periodDays))
}

// Wanted returns N, the exposures the goal wants per night: NExposures when
// set (1..10000), CoverOnce for 0, Capacity for NAsManyAsFit.
func (g Goal) Wanted(periodDays float64) int {
	switch {
	case g.NExposures > 0:
		return g.NExposures
	case g.NExposures == NAsManyAsFit:
		return g.Capacity(periodDays)
	}
	return g.CoverOnce(periodDays)
}

// WantedLabel describes the goal's wanted count in words ("3 wanted",
// "enough to cover the window once", "as many as fit").
func (g Goal) WantedLabel() string {
	switch {
	case g.NExposures > 0:
		return fmt.Sprintf("%d wanted", g.NExposures)
	case g.NExposures == NAsManyAsFit:
		return "as many as fit"
	}
	return "enough to cover the window once"
}

// EventNames lists the goal events accepted in Goal.Event.
func EventNames() []string {
	names := []string{EventQuadratures, EventEclipse}
	for _, e := range ephem.Events {
		names = append(names, string(e))
	}
	return names
}

// validateTarget checks a target before planning: a name, at least one
// goal, a valid ephemeris, and the rules of TargetProblems (the first one
// broken is the error). Field names in errors are prefixed with the
// target's position and name.
func validateTarget(i int, t Target) error {
	pre := fmt.Sprintf("targets[%d]", i)
	if strings.TrimSpace(t.Name) != "" {
		pre = fmt.Sprintf("targets[%d] %q", i, t.Name)
	}
	bad := func(field, value, accepted string) error {
		return &ephem.InputError{Field: pre + "." + field, Value: value, Accepted: accepted}
	}
	ps := TargetProblems(t)
	switch {
	case strings.TrimSpace(t.Name) == "":
		return bad("name", `""`, "a non-empty name")
	case len(ps) > 0 && !strings.HasPrefix(ps[0].Field, "goals"):
		return bad(ps[0].Field, ps[0].Value, ps[0].Accepted)
	case len(t.Goals) == 0:
		return bad("goals", "none", "at least one phase goal")
	}
	if err := t.Ephem.Validate(); err != nil {
		return fmt.Errorf("%s: %w", pre, err)
	}
	if err := validateBrightness(pre, t); err != nil {
		return err
	}
	if len(ps) > 0 {
		return bad(ps[0].Field, ps[0].Value, ps[0].Accepted)
	}
	return nil
}

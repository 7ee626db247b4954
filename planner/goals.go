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

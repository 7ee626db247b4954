package planner

import "fmt"

// PhaseTrust is what a goal's ephemeris is worth on a night, by one rule
// used by the night planner, the run planner, the queue windows and the
// pages that show a phase (UncertaintyRule).
type PhaseTrust int

// Phase trust levels.
const (
	PhaseTrusted     PhaseTrust = iota // 3σ within the window's half-width
	PhaseFlagged                       // 3σ beyond the half-width: the window may be elsewhere
	PhaseRefused                       // 1σ beyond the limit: the window's place is unknown, not scheduled
	PhaseMeaningless                   // 1σ of a whole cycle or more: the cycle count itself is lost
)

// MeaninglessSigma is the 1σ phase uncertainty, in cycles, from which the
// phase carries no information at all (a third of a cycle: the 3σ range is
// the whole orbit).
const MeaninglessSigma = 1.0 / 3

// UncertaintyRule classifies a 1σ phase uncertainty sigma (phase units,
// ephem.Ephemeris.PhaseErr) for a goal window of half-width halfWidth
// (phase) under the refusal limit maxErr (Options.MaxPhaseErr, default
// 0.25): refused when sigma > maxErr, meaningless when sigma ≥
// MeaninglessSigma (also refused), flagged when 3·sigma > halfWidth, else
// trusted. halfWidth 0 (no window, e.g. a bare phase) is never flagged.
func UncertaintyRule(sigma, halfWidth, maxErr float64) PhaseTrust {
	switch {
	case sigma >= MeaninglessSigma:
		return PhaseMeaningless
	case sigma > maxErr:
		return PhaseRefused
	case halfWidth > 0 && 3*sigma > halfWidth:
		return PhaseFlagged
	}
	return PhaseTrusted
}

// UncertaintyNote says in words what the rule found ("" when trusted), for
// a warning or a page.
func UncertaintyNote(sigma, halfWidth, maxErr float64) string {
	switch UncertaintyRule(sigma, halfWidth, maxErr) {
	case PhaseMeaningless:
		return fmt.Sprintf("the 1σ phase uncertainty %.3f is a third of a cycle or more: the phase and the cycle count are meaningless; refine T0 and P from new timings", sigma)
	case PhaseRefused:
		return fmt.Sprintf("the 1σ phase uncertainty %.3f is above the limit %.3f: the window's place on the orbit is unknown, so it is not scheduled; refine T0 and P first", sigma, maxErr)
	case PhaseFlagged:
		return fmt.Sprintf("3σ of the phase (%.4f) exceeds the window's half-width %.4f: the window may be elsewhere", 3*sigma, halfWidth)
	}
	return ""
}

package planner

import (
	"fmt"
	"math"
	"sort"
	"time"

	"phasecast/ephem"
)

// The coverage model of a run.
//
// An exposure covers a goal when its mid-time phase lies in the goal's window
// (centre ± half-width, wrapping through 0, ends included, with a tolerance
// of coverageTolS of time so that a block laid to the planner's second on a
// window edge still counts), and covers phase bin b of B when
// b = ⌊φ·B⌋. Phases are computed on the full path (ephem.PhaseAtUTC:
// BJD_TDB, then the ephemeris). Failed exposures are not counted.
//
// Requirement. A goal wants N exposures (Goal.Wanted: NExposures, by default
// the exposures that cover its window once, for "as many as fit" the
// window's capacity) on each of M different nights (Goal.MinNights, at
// least 1). A night's credit for the goal, from its n exposures in the
// window that night, is
//
//	c(n) = 0 for n = 0,   ½ + ½·min(n, N)/N otherwise   (1 for N = 0, n ≥ 1)
//
// (the night planner's value shape: reaching the window at all is worth
// half). With the nights' credits sorted c₁ ≥ c₂ ≥ …, the goal's value is
//
//	u = (c₁ + … + c_M)/M + SurplusValue·(c_{M+1} + …)/M
//
// so u = 1 exactly when M nights hold N exposures each, and coverage beyond
// the requirement keeps a diminishing value (SurplusValue of a required
// night's). The run's objective is J = Σ_targets w(priority) Σ_goals u, with
// w = PriorityWeight, reported in millionths as an integer.

// SurplusValue is the value of a night's coverage beyond a goal's
// requirement, relative to a required night's (see the notes above).
const SurplusValue = 0.1

// coverageTolS is the tolerance, seconds of time, of the mid-time phase
// test at a window's edges.
const coverageTolS = 0.002

// nightCredit is c(n) of the notes above, N the exposures wanted (0: as
// many as fit).
func nightCredit(n, N int) float64 {
	switch {
	case n <= 0:
		return 0
	case N <= 0:
		return 1
	}
	return 0.5 + 0.5*float64(min(n, N))/float64(N)
}

// goalUtility is u of the notes above for the nights' credits (any order;
// not modified) and M required nights.
func goalUtility(credits []float64, M int) float64 {
	c := append([]float64(nil), credits...)
	sort.Sort(sort.Reverse(sort.Float64Slice(c)))
	u := 0.0
	for i, x := range c {
		if i < M {
			u += x
		} else {
			u += SurplusValue * x
		}
	}
	return u / float64(M)
}

// runGoal is one goal of one target in the run's objective.
type runGoal struct {
	ti, gi int
	g      Goal
	N, M   int   // exposures per night (Goal.Wanted, ≥ 1) and nights wanted
	w      int64 // PriorityWeight of the target
	tolPh  float64
}

func newRunGoal(ti, gi int, t Target, g Goal) runGoal {
	return runGoal{ti: ti, gi: gi, g: g, N: g.Wanted(t.Ephem.PeriodDays), M: max(g.MinNights, 1), w: PriorityWeight(t.Priority),
		tolPh: coverageTolS / (t.Ephem.PeriodDays * 86400)}
}

// need is the exposures a night needs to count toward the requirement.
func (rg runGoal) need() int { return max(rg.N, 1) }

// utility is u for exposure counts per night.
func (rg runGoal) utility(counts []int) float64 {
	credits := make([]float64, 0, len(counts))
	for _, n := range counts {
		if n > 0 {
			credits = append(credits, nightCredit(n, rg.N))
		}
	}
	return goalUtility(credits, rg.M)
}

// value is the goal's share of J, millionths.
func (rg runGoal) value(counts []int) int64 {
	return int64(math.Round(1e6 * float64(rg.w) * rg.utility(counts)))
}

// covers reports whether phase φ lies in the goal's window.
func (rg runGoal) covers(phi float64) bool {
	return inWindow(phi, rg.g.Center, rg.g.HalfWidth, rg.tolPh)
}

// CoverageStatus summarises a goal's coverage.
type CoverageStatus string

// Coverage states.
const (
	CoverageMet         CoverageStatus = "met"         // M nights with N exposures each
	CoveragePartial     CoverageStatus = "partial"     // some exposures, requirement not met
	CoverageNone        CoverageStatus = "none"        // no exposure, though some night can reach it
	CoverageUnreachable CoverageStatus = "unreachable" // no exposure, and no night of the run can reach it
)

// NightCount is a goal's exposures on one night of a run.
type NightCount struct {
	Observed int // taken (not failed)
	Planned  int // in the night's plan
}

// GoalCoverage is one goal's coverage over a run: observed and planned
// exposures in its window, night by night, against its requirement.
type GoalCoverage struct {
	GoalIndex     int  // index in the target's ResolveGoals
	Goal          Goal // resolved
	NeedExposures int  // per night (Goal.Wanted)
	NeedNights    int  // Goal.MinNights, at least 1
	// PerNight has one entry per night of the run.
	PerNight []NightCount
	// Observed and Planned are the totals; NightsMet the nights whose
	// observed plus planned exposures reach NeedExposures, NightsObserved
	// those whose observed exposures alone do.
	Observed, Planned         int
	NightsMet, NightsObserved int
	Status                    CoverageStatus
	// Value is u of the coverage notes (0..1, above 1 with surplus), Share
	// its part of the run objective (millionths).
	Value float64
	Share int64
	// ReachableNights counts the nights still to be planned on which the
	// best-night search finds room for at least one exposure.
	ReachableNights int
	// Shortfall says in numbers why a goal not met falls short ("" when
	// met): see coverageShortfall.
	Shortfall string
}

// coverageShortfall explains, in numbers, why a goal's requirement is not
// met: the window too short for N exposures ((N − 1) × L of mid-times
// against the window W), no night holding N in one block (bestCap, the
// most the best-night search finds on a night still to plan, from
// GoalNight.Capacity), or the nights that can hold N taken by goals worth
// more.
func coverageShortfall(gc GoalCoverage, periodDays float64, bestCap, fullNights int) string {
	if gc.Status == CoverageMet {
		return ""
	}
	g, N := gc.Goal, gc.NeedExposures
	L := g.ExposureS + g.OverheadS
	need := fmt.Sprintf("%d exposures of %s s + %s s readout have mid-times over %s s", N, fmtNum(g.ExposureS), fmtNum(g.OverheadS), fmtSeconds(float64(N-1)*L))
	switch W := g.WindowS(periodDays); {
	case gc.Status == CoverageUnreachable:
		return "no night of the run can reach the window"
	case bestCap == 0 && float64(N-1)*L <= W:
		return "no night still to plan can reach the window (those that could are over, or none exists)"
	case float64(N-1)*L > W:
		return fmt.Sprintf("%s; the window is %s s (±%s in phase): at most %d fit one window", need, fmtSeconds(W), fmtNum(g.HalfWidth), g.Capacity(periodDays))
	case bestCap < N:
		return fmt.Sprintf("%s; the window is %s s, but on the nights still to plan at most %d fit in its observable part", need, fmtSeconds(W), bestCap)
	}
	return fmt.Sprintf("%d of the %d nights wanted hold %d exposures; %d nights still to plan could hold them: their time went to goals worth more",
		gc.NightsMet, gc.NeedNights, N, fullNights)
}

// BinCoverage is one phase bin of a target's orbit: [Lo, Hi) in phase.
type BinCoverage struct {
	Lo, Hi            float64
	Observed, Planned int
	// Nights counts the nights with at least one exposure in the bin.
	Nights int
}

// TargetCoverage is one target's coverage over a run.
type TargetCoverage struct {
	Target      string
	TargetIndex int
	Priority    int
	Goals       []GoalCoverage
	Bins        []BinCoverage // when RunRequest.Bins > 0
}

// RunExposure is one exposure of a run, observed or planned, with its
// phase: what the coverage counts (and a phase ring draws).
type RunExposure struct {
	Target      string
	TargetIndex int
	Night       int // index in RunRequest.Nights
	Mid         time.Time
	ExposureS   float64
	Phase       float64 // at the mid-time, full path
	Planned     bool    // false: observed
	Failed      bool    // observed but unusable; not counted
	GoalIndex   int     // the goal the planned block serves (−1 for observed exposures and fillers)
}

// phaseOf returns the phase at t of target st (full path).
func phaseOf(site ephem.Site, t Target, mid time.Time) float64 {
	_, phi, _ := ephem.PhaseAtUTC(site, t.Star(), t.Ephem, mid)
	return phi
}

// countCoverage builds the coverage report from the run's exposures.
func countCoverage(targets []*targetState, goals [][]runGoal, nNights, bins int, exps []RunExposure) []TargetCoverage {
	out := make([]TargetCoverage, len(targets))
	binNights := make([][]map[int]bool, len(targets))
	for ti, ts := range targets {
		tc := TargetCoverage{Target: ts.t.Name, TargetIndex: ti, Priority: ts.t.Priority}
		for _, rg := range goals[ti] {
			tc.Goals = append(tc.Goals, GoalCoverage{GoalIndex: rg.gi, Goal: rg.g, NeedExposures: rg.need(), NeedNights: rg.M,
				PerNight: make([]NightCount, nNights)})
		}
		if bins > 0 {
			tc.Bins = make([]BinCoverage, bins)
			binNights[ti] = make([]map[int]bool, bins)
			for b := range tc.Bins {
				tc.Bins[b] = BinCoverage{Lo: float64(b) / float64(bins), Hi: float64(b+1) / float64(bins)}
				binNights[ti][b] = map[int]bool{}
			}
		}
		out[ti] = tc
	}
	for _, e := range exps {
		if e.Failed {
			continue
		}
		tc := &out[e.TargetIndex]
		for k, rg := range goals[e.TargetIndex] {
			if !rg.covers(e.Phase) {
				continue
			}
			gc := &tc.Goals[k]
			if e.Planned {
				gc.PerNight[e.Night].Planned++
				gc.Planned++
			} else {
				gc.PerNight[e.Night].Observed++
				gc.Observed++
			}
		}
		if bins > 0 {
			b := min(int(math.Floor(e.Phase*float64(bins))), bins-1)
			if e.Planned {
				tc.Bins[b].Planned++
			} else {
				tc.Bins[b].Observed++
			}
			binNights[e.TargetIndex][b][e.Night] = true
		}
	}
	for ti := range out {
		tc := &out[ti]
		for b := range tc.Bins {
			tc.Bins[b].Nights = len(binNights[ti][b])
		}
		for k := range tc.Goals {
			gc := &tc.Goals[k]
			rg := goals[ti][k]
			counts := make([]int, nNights)
			for j, nc := range gc.PerNight {
				counts[j] = nc.Observed + nc.Planned
				if counts[j] >= rg.need() {
					gc.NightsMet++
				}
				if nc.Observed >= rg.need() {
					gc.NightsObserved++
				}
			}
			gc.Value = rg.utility(counts)
			gc.Share = rg.value(counts)
			switch {
			case gc.NightsMet >= rg.M:
				gc.Status = CoverageMet
			case gc.Observed+gc.Planned > 0:
				gc.Status = CoveragePartial
			default:
				gc.Status = CoverageNone
			}
		}
	}
	return out
}

// PhaseBinGoals returns n goals that tile the orbit, for a light curve: bin
// b centred at phase (b + ½)/n with half-width 1/(2n), 2 ≤ n ≤ MaxBins,
// each with the exposure setup and requirement of g (its Center and Event
// are not used). Neighbouring bins share their edges.
func PhaseBinGoals(n int, g Goal) ([]Goal, error) {
	if n < 2 || n > MaxBins {
		return nil, &ephem.InputError{Field: "bins", Value: fmt.Sprint(n), Accepted: fmt.Sprintf("2..%d phase bins", MaxBins)}
	}
	out := make([]Goal, n)
	for b := range out {
		x := g
		x.Event, x.EclipseDurDays = "", 0
		x.Center = (float64(b) + 0.5) / float64(n)
		x.HalfWidth = 0.5 / float64(n)
		out[b] = x
	}
	return out, nil
}

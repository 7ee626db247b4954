package planner

// The night planner's exact scheduler, shared by PlanNight and the run
// planner. PlanNight values a block as PriorityWeight(target) × v(goal, n)
// on its priority's level of the objective (strict, see the notes in
// schedule.go); the run optimizer needs the same scheduler
// with its own weight per goal (what covering the goal tonight is worth to
// the run). nightModel builds a night's engine and candidate blocks once
// (newEngine, buildProblem: every rule of the night planner), and solves it
// for any weights by rescaling the candidates' values:
// value(b) = W(target, goal) × v(goal, n), W an integer ≥ 1 so that sums
// stay exact, all on one level (the run's J ranks goals by weight alone).
// PlanNight is solve with W = PriorityWeight (priorityWeights) and strict
// levels, followed by plan.

import (
	"fmt"
	"sort"
)

// nightModel is one night's scheduling problem, ready to be solved for
// different goal weights.
type nightModel struct {
	// strict solves with PlanNight's objective: each priority its own
	// level, compared in order (score). Otherwise every goal is on one
	// level and only the weights rank them, as the run planner's J does.
	strict  bool
	req     NightRequest
	en      *engine
	targets []*targetState
	occs    []occMeta
	pr      *problem
	base    []int64 // v(goal, n) of each candidate, millionths
}

// newNightModel validates and builds a night's problem. Unlike PlanNight it
// does not reject a goal with more than Options.MaxOccurrences windows in
// the night (buildProblem then considers the first ones).
func newNightModel(req NightRequest) (*nightModel, error) {
	en, targets, err := newEngine(req)
	if err != nil {
		return nil, err
	}
	return buildNightModel(req, en, targets), nil
}

// buildNightModel builds the candidate blocks of a validated night (en and
// targets from newEngine) and their values v(goal, n) without weights.
func buildNightModel(req NightRequest, en *engine, targets []*targetState) *nightModel {
	occs, pr := en.buildProblem(targets)
	m := &nightModel{req: req, en: en, targets: targets, occs: occs, pr: pr, base: make([]int64, len(pr.cands))}
	for i := range pr.cands {
		c := &pr.cands[i]
		m.base[i] = c.val.total() / PriorityWeight(targets[c.target].t.Priority)
	}
	return m
}

// setWeights rescales the candidates' values for goal weights w: val =
// W × v(goal, n) at the target's priority level.
func (m *nightModel) setWeights(w [][]int64) {
	for i := range m.pr.cands {
		c := &m.pr.cands[i]
		om := m.occs[c.occ]
		l := 0
		if m.strict {
			l = priorityLevel(m.targets[om.target].t.Priority)
		}
		tie := c.val.tie[c.val.tieLevel()]
		c.val = at(l, m.base[i]*w[om.target][om.goal], tie)
	}
}

// priorityWeights returns PlanNight's weights: w[target][goal] =
// PriorityWeight of the target's priority.
func (m *nightModel) priorityWeights() [][]int64 {
	w := make([][]int64, len(m.targets))
	for ti, ts := range m.targets {
		w[ti] = make([]int64, len(ts.goals))
		for gi := range w[ti] {
			w[ti][gi] = PriorityWeight(ts.t.Priority)
		}
	}
	return w
}

// nightSolution is a solved night: the chosen candidates in time order and
// whether the solver proved them optimal for the weights.
type nightSolution struct {
	sol         solution
	greedy      int64
	greedyScore score
	weights     [][]int64 // the weights it was solved for
	tried       [][]int64 // weights since tried without a better result (nil: none)
}

// solve schedules the night for goal weights w[target][goal] (each ≥ 1):
// it maximises Σ w[target][goal] × v(goal, n) over the blocks. The greedy
// start (Plan.GreedyValue) takes the occurrences by weight, heaviest first,
// then by window opening; with the priority weights that is PlanNight's
// first-fit by priority.
func (m *nightModel) solve(w [][]int64) nightSolution {
	greedy := m.weigh(w)
	gs := m.pr.value(greedy)
	// The exact optimum, with the candidates no optimum can use removed
	// first (solvePruned, proof in prune.go).
	sol := m.pr.solvePruned(greedy, m.en.opt.MaxStates)
	return nightSolution{sol: sol, greedy: gs.total(), greedyScore: gs, weights: w}
}

// weigh sets the candidates' values for goal weights w and returns the
// greedy schedule (see solve).
func (m *nightModel) weigh(w [][]int64) []int {
	m.setWeights(w)
	order := make([]int, len(m.occs))
	for k := range order {
		order[k] = k
	}
	sort.SliceStable(order, func(a, b int) bool {
		oa, ob := m.occs[order[a]], m.occs[order[b]]
		wa, wb := w[oa.target][oa.goal], w[ob.target][ob.goal]
		if wa != wb {
			return wa > wb
		}
		return oa.occ.lo < ob.occ.lo
	})
	return m.pr.greedy(order)
}

// plan turns a solved night into the Plan PlanNight returns: blocks with
// their details and warnings, the reason for every goal left out, optional
// fillers. Plan.Value, Plan.GreedyValue and Block.Value are in the weights'
// units.
func (m *nightModel) plan(ns nightSolution) *Plan {
	en, targets, pr, occs, sol := m.en, m.targets, m.pr, m.occs, ns.sol
	// The candidates hold the values of the last solve; restore ns's.
	m.setWeights(ns.weights)
	req := m.req
	p := &Plan{Site: req.Site, From: req.From.UTC(), To: req.To.UTC(), Constraints: en.c, Options: en.opt, Dark: toIntervals(en.dark)}
	if en.c.SunAvoidDeg > 0 {
		p.Warnings = append(p.Warnings, Warning{Code: WarnSunAvoidApplied, GoalIndex: -1,
			Message: fmt.Sprintf("targets closer than %s° to the Sun are excluded; %s", fmtNum(en.c.SunAvoidDeg), SafetyCaution)})
	}
	for _, ts := range targets {
		p.Visibility = append(p.Visibility, en.visibility(ts))
	}
	p.Candidates = len(pr.cands)
	p.GreedyValue = ns.greedy
	p.Value, p.Optimal, p.Rounds, p.States = sol.value.total(), sol.optimal, sol.nodes, sol.states
	p.Objective, p.GreedyObjective = sol.value.objective(), ns.greedyScore.objective()
	if !sol.optimal {
		msg := fmt.Sprintf("the optimiser reached its state limit (%d) in round %d: the schedule is feasible but may fall short of the optimum", en.opt.MaxStates, sol.nodes)
		if l, v := sol.gap.leading(); l >= 0 && v > 0 {
			msg += fmt.Sprintf(" by up to %d value units at priority %d", v, l+1)
		}
		p.Warnings = append(p.Warnings, Warning{Code: WarnNotOptimal, GoalIndex: -1, Message: msg})
	}
	var prev *candidate
	for _, i := range sol.chosen {
		c := &pr.cands[i]
		om := occs[c.occ]
		ts := targets[c.target]
		acq := 0.0
		if prev == nil || prev.target != c.target {
			acq = ts.t.AcquireS
		}
		b := en.block(ts, om.goal, om.exposureS, om.sized, c.start, c.n, acq, false)
		b.Cycle = om.occ.cycle
		b.Value = c.val.total()
		p.Blocks = append(p.Blocks, b)
		prev = c
	}
	p.Unscheduled, p.Warnings = en.explain(targets, occs, pr, sol.chosen, p.Warnings)
	p.Warnings = append(p.Warnings, en.shortfalls(targets, occs, p.Blocks)...)
	if en.opt.Fill {
		p.Blocks = en.fill(targets, p.Blocks)
	}
	for _, b := range p.Blocks {
		p.Warnings = append(p.Warnings, b.Warnings...)
	}
	return p
}

// counts returns, for each target and goal, the exposures of the chosen
// candidates whose mid-time phase (on the night's phase clock) lies in the
// goal's window: what the night adds to the run's coverage (fillers, added
// only when the plan is built, are not in it).
func (m *nightModel) counts(ns nightSolution, goals [][]runGoal) [][]int {
	out := make([][]int, len(goals))
	for ti := range goals {
		out[ti] = make([]int, len(goals[ti]))
	}
	for _, i := range ns.sol.chosen {
		c := &m.pr.cands[i]
		ts := m.targets[c.target]
		om := m.occs[c.occ]
		g := ts.goals[om.goal]
		E, L := om.exposureS, om.exposureS+g.OverheadS
		for j := range c.n {
			_, phi := ts.clock.phase(c.start + float64(j)*L + E/2)
			for gi, rg := range goals[c.target] {
				if rg.covers(phi) {
					out[c.target][gi]++
				}
			}
		}
	}
	return out
}

package planner

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sync"
	"time"

	"phasecast/ephem"
)

// NightPlan is one night of a planned run.
type NightPlan struct {
	Night    RunNight
	From, To time.Time // the planning window, UTC (a half night ends or starts at the middle of the dark time)
	// Past nights are over: not planned (Plan nil); their coverage is the
	// observed exposures.
	Past bool
	Plan *Plan
}

// RunPlan is a planned run: every night's schedule, the exposures (observed
// and planned) with their phases, the coverage against each goal's
// requirement, and the best-night search.
type RunPlan struct {
	Request   RunRequest // as given, for Replan
	Nights    []NightPlan
	Exposures []RunExposure // observed first (in request order), then planned by night and time
	Coverage  []TargetCoverage
	Reach     []TargetReach
	// Value is the run objective J (see the coverage notes), millionths.
	// RequiredValue is J when every goal's requirement is met exactly and
	// nothing more (the sum of the targets' priority weights over their
	// goals): J exceeds it by the value of coverage beyond the requirements
	// (SurplusValue of a required night's for each night more), so J above
	// RequiredValue does not mean that every requirement is met (see
	// Coverage). MaxValue is the largest J the run's nights allow, every
	// goal full on every night: Value ≤ MaxValue always.
	Value, RequiredValue, MaxValue int64
	// GreedyValue is J after the greedy pass over the nights, before the
	// improvement rounds; IndependentValue (with CompareIndependent) is J
	// when every remaining night is planned on its own, as PlanNight does.
	GreedyValue, IndependentValue int64
	// Rounds is the number of improvement rounds run, Solves the number of
	// night schedules solved.
	Rounds, Solves int
}

// modelBudget bounds the candidate blocks of the night models kept in
// memory between solves (about 100 bytes each, with the engine's share:
// about 150 MB); nights beyond it are rebuilt when solved again, so the
// memory of a run does not grow with its nights beyond its output.
const modelBudget = 1_500_000

// PlanRun plans a run of nights so that the run's coverage requirements are
// met as far as possible, and reports the coverage and the best nights.
//
// Objective. Maximise J = Σ_targets w(priority) Σ_goals u(goal), u the
// goal's value from its exposures night by night (notes in coverage.go):
// each goal wants N exposures on each of M nights, a night's credit is ½
// for reaching the window and the rest in proportion to the exposures up to
// N, and nights beyond the M best count at SurplusValue (diminishing value
// once a goal is met). Every night's schedule obeys every rule of the night
// planner, because it is the night planner's exact scheduler (nightModel)
// that makes it, with a weight per goal in place of the priority weight.
//
// Method: a greedy pass over the nights in time order with look-ahead, then
// improvement rounds.
//
//   - Best-night search first: for every goal and night, the capacity (the
//     most exposures one block can hold) from the lean sky path.
//   - Greedy pass. For night k, given the coverage S already observed or
//     planned on earlier nights, the potential of night j for a goal is the
//     credit of min(capacity_j, N) exposures. G is what tonight's potential
//     adds to u over S; I is the part of G that the later nights' potentials
//     F cannot give (u(S+tonight+F) − u(S+F): tonight is one of the last
//     chances); R the later nights' summed potential. The goal's weight
//     tonight is w(p)·(I + (G − I)/(1 + R)) per unit of night credit: a goal
//     with many later chances is worth less tonight, one whose last chance
//     is tonight its full gain. The night is then solved exactly for these
//     weights.
//   - Improvement rounds (ascent on J): every night's weights become the
//     exact marginal gains G given every other night's plan (no look-ahead
//     needed); the nights whose weights changed are solved again, in
//     parallel; then, night by night in time order, a new schedule replaces
//     the current one only if J strictly increases. Rounds stop when one
//     changes nothing, or after RunRequest.Rounds (default 2).
//
// J never decreases in the rounds, and with CompareIndependent the run also
// reports J for nights planned on their own (PlanNight's own values), which
// the greedy pass beats on runs where a goal's only chances conflict with
// goals that have others (TestRunBeatsNightByNight). The result is
// deterministic: the greedy pass solves the nights in time order, and
// parallel work (best-night search, night set-up, improvement proposals,
// final plans) is put back in night order before anything depends on it.
//
// Progress (may be nil) is called with (done, total) as work completes,
// from one goroutine at a time; done never decreases and ends at total. A
// cancelled ctx stops the work between nights and returns ctx.Err().
//
// Bad input gives an *ephem.InputError naming the field, or for observed
// exposures a *TableError listing every bad one by log line.
func PlanRun(ctx context.Context, req RunRequest, progress func(done, total int)) (*RunPlan, error) {
	r, err := newRunState(req)
	if err != nil {
		return nil, err
	}
	return r.plan(ctx, progress)
}

// runState is a run being planned.
type runState struct {
	req     RunRequest
	loc     *time.Location
	base    *leanBase
	targets []*targetState
	goals   [][]runGoal
	nights  []RunNight
	from    []float64 // planning windows (Unix seconds)
	to      []float64
	past    int
	obsN    []int     // night of each observed exposure
	obs     [][][]int // [night][target][goal] observed counts
	reach   [][][]goalNightReach
	sized   []map[occKey]ExposureSizing // per night: S/N-sized exposures by occurrence (reach and models share them)
	models  modelCache
	planned [][][]int // [night][target][goal] planned counts (future nights)
	sols    []nightSolution
	solves  int
}

func newRunState(req RunRequest) (*runState, error) {
	if err := ValidateRunNights(req.Nights); err != nil {
		return nil, err
	}
	if req.Past < 0 || req.Past > len(req.Nights) {
		return nil, &ephem.InputError{Field: "past", Value: fmt.Sprint(req.Past), Accepted: fmt.Sprintf("0..%d (the nights already over)", len(req.Nights))}
	}
	if req.Bins != 0 && (req.Bins < 2 || req.Bins > MaxBins) {
		return nil, &ephem.InputError{Field: "bins", Value: fmt.Sprint(req.Bins), Accepted: fmt.Sprintf("0 (none) or 2..%d phase bins", MaxBins)}
	}
	if req.Rounds > 100 {
		return nil, &ephem.InputError{Field: "rounds", Value: fmt.Sprint(req.Rounds), Accepted: "at most 100 (0 = default 2, negative = none)"}
	}
	base, err := newLeanBase(req.Site, req.Constraints, req.Options)
	if err != nil {
		return nil, err
	}
	targets, err := checkTargets(req.Targets)
	if err != nil {
		return nil, err
	}
	if req.Instrument != nil {
		if err := req.Instrument.Validate(); err != nil {
			return nil, err
		}
	}
	loc := req.Zone
	if loc == nil {
		loc = time.UTC
	}
	r := &runState{req: req, loc: loc, base: base, targets: targets, nights: req.Nights, past: req.Past}
	r.goals = make([][]runGoal, len(targets))
	for ti, ts := range targets {
		for gi, g := range ts.goals {
			r.goals[ti] = append(r.goals[ti], newRunGoal(ti, gi, ts.t, g))
		}
	}
	r.from, r.to = base.nightBounds(req.Nights, loc)
	return r, nil
}

// future returns the indices of the nights still to be planned.
func (r *runState) future() []int {
	var ks []int
	for k := r.past; k < len(r.nights); k++ {
		ks = append(ks, k)
	}
	return ks
}

func (r *runState) rounds() int {
	switch {
	case r.req.Rounds < 0:
		return 0
	case r.req.Rounds == 0:
		return 2
	}
	return r.req.Rounds
}

func (r *runState) plan(ctx context.Context, progress func(done, total int)) (*RunPlan, error) {
	K, fut := len(r.nights), r.future()
	F := len(fut)
	pc := &progressCounter{fn: progress, total: K + F + r.rounds()*F + F + 1}
	if r.req.CompareIndependent {
		pc.total += F
	}
	// 1. The sky and the best-night search, night by night.
	if err := r.computeReach(ctx, pc); err != nil {
		return nil, err
	}
	// 2. Observed exposures.
	obsExp, err := r.observed()
	if err != nil {
		return nil, err
	}
	// 3. Greedy pass with look-ahead, night by night; each night's model is
	// built (or taken from the cache) on another goroutine while the night
	// before it is solved.
	r.models.init(len(r.nights))
	r.planned = make([][][]int, K)
	r.sols = make([]nightSolution, K)
	var next <-chan modelResult
	if F > 0 {
		next = r.buildAsync(fut[0])
	}
	for i, k := range fut {
		res := <-next
		if res.err != nil {
			return nil, res.err
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if i+1 < F {
			next = r.buildAsync(fut[i+1])
		}
		m := res.m
		ns := m.solve(r.weights(k, true))
		r.solves++
		r.sols[k], r.planned[k] = ns, m.counts(ns, r.goals)
		pc.tick()
	}
	out := &RunPlan{Request: r.req}
	out.GreedyValue = r.objective(nil)
	// 4. Improvement rounds.
	for round := 1; round <= r.rounds(); round++ {
		out.Rounds = round
		changed, err := r.improve(ctx, fut, pc)
		if err != nil {
			return nil, err
		}
		if !changed {
			pc.done += (r.rounds() - round) * F
			break
		}
	}
	// 5. Nights planned on their own, for comparison.
	if r.req.CompareIndependent {
		w := make([][]int64, len(r.targets))
		for ti, ts := range r.targets {
			w[ti] = make([]int64, len(ts.goals))
			for gi := range w[ti] {
				w[ti][gi] = PriorityWeight(ts.t.Priority)
			}
		}
		cnt := make([][][]int, F)
		err := forEach(ctx, F, func(i int) error {
			m, err := r.model(fut[i])
			if err != nil {
				return err
			}
			cnt[i] = m.counts(m.solve(w), r.goals)
			return nil
		}, pc.tick)
		if err != nil {
			return nil, err
		}
		indep := map[int][][]int{}
		for i, k := range fut {
			indep[k] = cnt[i]
		}
		r.solves += F
		out.IndependentValue = r.objective(indep)
	}
	out.Solves = r.solves
	// 6. The nights' plans, in parallel; each model is released once its
	// plan is made.
	out.Nights = make([]NightPlan, K)
	for k, nt := range r.nights {
		out.Nights[k] = NightPlan{Night: nt, From: timeOf(r.from[k]), To: timeOf(r.to[k]), Past: k < r.past}
	}
	err = forEach(ctx, F, func(i int) error {
		k := fut[i]
		m, err := r.model(k)
		if err != nil {
			return err
		}
		out.Nights[k].Plan = m.plan(r.sols[k])
		r.models.release(k)
		return nil
	}, pc.tick)
	if err != nil {
		return nil, err
	}
	// 7. Exposures, coverage, reach.
	out.Exposures = append(obsExp, r.plannedExposures(out.Nights)...)
	out.Coverage = countCoverage(r.targets, r.goals, K, r.req.Bins, out.Exposures)
	out.Reach = buildReach(r.targets, r.goals, r.reach)
	for ti := range out.Coverage {
		for gi := range out.Coverage[ti].Goals {
			gc := &out.Coverage[ti].Goals[gi]
			bestCap, fullNights := 0, 0
			for _, gn := range out.Reach[ti].Goals[gi].Nights {
				if gn.Night >= r.past {
					gc.ReachableNights++
					bestCap = max(bestCap, gn.Capacity)
					if gn.Capacity >= gc.NeedExposures {
						fullNights++
					}
				}
			}
			if gc.Status == CoverageNone && len(out.Reach[ti].Goals[gi].Nights) == 0 {
				gc.Status = CoverageUnreachable
			}
			gc.Shortfall = coverageShortfall(*gc, r.targets[ti].t.Ephem.PeriodDays, bestCap, fullNights)
			out.Value += gc.Share
			rg := r.goals[ti][gi]
			out.RequiredValue += 1e6 * rg.w
			full := make([]int, K)
			for k := range full {
				full[k] = max(rg.need(), 1)
			}
			out.MaxValue += rg.value(full)
		}
	}
	pc.tick()
	return out, nil
}

// computeReach computes every night's reach, in parallel over nights.
func (r *runState) computeReach(ctx context.Context, pc *progressCounter) error {
	K := len(r.nights)
	lo, hi := r.from[0], r.to[K-1]
	frame := ephem.NewSkyFrame(r.req.Site, timeOf(lo-3600), timeOf(hi+3600))
	for _, ts := range r.targets {
		ts.track = frame.Track(ts.star)
	}
	pad := make([]float64, len(r.targets))
	for ti, ts := range r.targets {
		for _, g := range ts.goals {
			e := g.ExposureS
			if r.req.Instrument != nil && SizesBySNR(ts.t, g) {
				e = math.Max(e, g.maxSmear()*ts.t.Ephem.PeriodDays*86400) // a sized exposure never exceeds its smear limit
			}
			pad[ti] = math.Max(pad[ti], e+g.OverheadS)
		}
		pad[ti] += ts.t.AcquireS + 2*guardS + 1
	}
	r.reach = make([][][]goalNightReach, K)
	r.sized = make([]map[occKey]ExposureSizing, K)
	return forEach(ctx, K, func(k int) error {
		en := r.base.night(r.from[k], r.to[k])
		clocks := make([]phaseClock, len(r.targets))
		for ti, ts := range r.targets {
			clocks[ti] = newSparseClock(r.req.Site, ts.star, ts.t.Ephem, []float64{r.from[k], 0.5 * (r.from[k] + r.to[k]), r.to[k]})
		}
		r.sized[k] = map[occKey]ExposureSizing{}
		rn, err := reachNight(en, r.targets, clocks, pad, r.req.Instrument, r.sized[k])
		if err != nil {
			return err
		}
		r.reach[k] = rn
		return nil
	}, pc.tick)
}

// observed checks the observed exposures, counts them by night and goal,
// and returns them as run exposures.
func (r *runState) observed() ([]RunExposure, error) {
	names := map[string]int{}
	for ti, ts := range r.targets {
		names[ts.t.Name] = ti
	}
	bounds := make([][2]float64, len(r.nights))
	for k := range bounds {
		bounds[k] = [2]float64{r.from[k], r.to[k]}
	}
	nightOf, err := checkObserved(r.req.Observed, names, bounds, r.past, r.nights)
	if err != nil {
		return nil, err
	}
	r.obs = make([][][]int, len(r.nights))
	for k := range r.obs {
		r.obs[k] = r.zeroCounts()
	}
	var out []RunExposure
	for i, e := range r.req.Observed {
		ti := names[e.Target]
		ts := r.targets[ti]
		phi := phaseOf(r.req.Site, ts.t, e.Mid)
		out = append(out, RunExposure{Target: e.Target, TargetIndex: ti, Night: nightOf[i], Mid: e.Mid.UTC(), ExposureS: e.ExposureS,
			Phase: phi, Failed: e.Failed, GoalIndex: -1})
		if e.Failed {
			continue
		}
		for gi, rg := range r.goals[ti] {
			if rg.covers(phi) {
				r.obs[nightOf[i]][ti][gi]++
			}
		}
	}
	return out, nil
}

func (r *runState) zeroCounts() [][]int {
	c := make([][]int, len(r.targets))
	for ti := range c {
		c[ti] = make([]int, len(r.goals[ti]))
	}
	return c
}

// nightRequest is the night planner's request for night k.
func (r *runState) nightRequest(k int) NightRequest {
	var sized map[occKey]ExposureSizing
	if r.sized != nil {
		sized = r.sized[k]
	}
	return NightRequest{Site: r.req.Site, From: timeOf(r.from[k]), To: timeOf(r.to[k]), Targets: r.req.Targets,
		Constraints: r.req.Constraints, Options: r.req.Options, Instrument: r.req.Instrument, presized: sized}
}

// modelCache keeps night models between solves, up to modelBudget
// candidate blocks in all; it is safe for concurrent use (one goroutine per
// night at a time, as forEach hands them out).
type modelCache struct {
	mu     sync.Mutex
	models []*nightModel
	kept   int // candidates in models
}

func (c *modelCache) init(n int) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.models, c.kept = make([]*nightModel, n), 0
}

// get returns night k's model when it is kept.
func (c *modelCache) get(k int) *nightModel {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.models[k]
}

// offer keeps m as night k's model while the budget allows.
func (c *modelCache) offer(k int, m *nightModel) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if n := len(m.pr.cands); c.models[k] == nil && c.kept+n <= modelBudget {
		c.models[k] = m
		c.kept += n
	}
}

// release drops night k's model.
func (c *modelCache) release(k int) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if m := c.models[k]; m != nil {
		c.kept -= len(m.pr.cands)
		c.models[k] = nil
	}
}

// model returns night k's problem: the kept one, or a new one (kept while
// the budget allows). Models are built lazily, so that at most the budget
// and the models being solved are in memory at once, whatever the number
// of nights.
func (r *runState) model(k int) (*nightModel, error) {
	if m := r.models.get(k); m != nil {
		return m, nil
	}
	m, err := newNightModel(r.nightRequest(k))
	if err != nil {
		return nil, err
	}
	r.models.offer(k, m)
	return m, nil
}

type modelResult struct {
	m   *nightModel
	err error
}

// buildAsync returns night k's model (r.model) on a channel, built on its
// own goroutine.
func (r *runState) buildAsync(k int) <-chan modelResult {
	ch := make(chan modelResult, 1)
	go func() {
		m, err := r.model(k)
		ch <- modelResult{m, err}
	}()
	return ch
}

// totals returns the exposure counts per night of goal (ti, gi): observed,
// plus planned on the future nights (override replaces some nights'
// planned counts; skip leaves night skip out, −1 for none).
func (r *runState) totals(ti, gi int, override map[int][][]int, skip int) []int {
	c := make([]int, len(r.nights))
	for k := range c {
		if k == skip {
			continue
		}
		c[k] = r.obs[k][ti][gi]
		if p, ok := override[k]; ok {
			c[k] += p[ti][gi]
		} else if r.planned[k] != nil {
			c[k] += r.planned[k][ti][gi]
		}
	}
	return c
}

// objective returns J for the planned counts (with override).
func (r *runState) objective(override map[int][][]int) int64 {
	var j int64
	for ti := range r.goals {
		for gi, rg := range r.goals[ti] {
			j += rg.value(r.totals(ti, gi, override, -1))
		}
	}
	return j
}

// potential is the exposures night k can give goal (ti, gi): its capacity,
// up to what a night needs.
func (r *runState) potential(k, ti, gi int) int {
	return min(r.reach[k][ti][gi].capacity, r.goals[ti][gi].need())
}

// weights returns the goal weights for night k (see PlanRun): with
// lookAhead, from the nights before k and the later nights' potentials;
// otherwise the exact marginal gains given every other night's plan.
func (r *runState) weights(k int, lookAhead bool) [][]int64 {
	w := make([][]int64, len(r.targets))
	for ti := range r.targets {
		w[ti] = make([]int64, len(r.goals[ti]))
		for gi, rg := range r.goals[ti] {
			pot := r.potential(k, ti, gi)
			if pot == 0 {
				w[ti][gi] = 1000 * rg.w
				continue
			}
			var S []int
			if lookAhead {
				S = make([]int, len(r.nights))
				for j := range k {
					S[j] = r.obs[j][ti][gi]
					if r.planned[j] != nil {
						S[j] += r.planned[j][ti][gi]
					}
				}
			} else {
				S = r.totals(ti, gi, nil, k)
			}
			base := rg.utility(S)
			S[k] = pot
			G := rg.utility(S) - base
			f := G
			if lookAhead {
				R := 0.0
				for j := k + 1; j < len(r.nights); j++ {
					if p := r.potential(j, ti, gi); p > 0 {
						S[j] = p
						R += nightCredit(p, rg.N)
					}
				}
				with := rg.utility(S)
				S[k] = 0
				I := math.Max(0, with-rg.utility(S))
				f = I + math.Max(0, G-I)/(1+R)
			}
			w[ti][gi] = max(1, int64(math.Round(1000*float64(rg.w)*f/nightCredit(pot, rg.N))))
		}
	}
	return w
}

// improve runs one improvement round: every future night's weights become
// the exact marginal gains given the other nights' current plans; the
// nights whose weights changed are solved again in parallel; then, in night
// order, each new schedule replaces the night's current one if that
// strictly increases J (given the replacements already made). It reports
// whether any night changed.
func (r *runState) improve(ctx context.Context, fut []int, pc *progressCounter) (bool, error) {
	type proposal struct {
		ns  nightSolution
		cnt [][]int
		ok  bool
	}
	ws := make([][][]int64, len(fut))
	var todo []int
	for i, k := range fut {
		ws[i] = r.weights(k, false)
		if equalWeights(ws[i], r.sols[k].weights) || equalWeights(ws[i], r.sols[k].tried) {
			pc.tick()
			continue
		}
		todo = append(todo, i)
	}
	props := make([]proposal, len(fut))
	err := forEach(ctx, len(todo), func(j int) error {
		i := todo[j]
		m, err := r.model(fut[i])
		if err != nil {
			return err
		}
		ns := m.solve(ws[i])
		props[i] = proposal{ns: ns, cnt: m.counts(ns, r.goals), ok: true}
		return nil
	}, pc.tick)
	if err != nil {
		return false, err
	}
	r.solves += len(todo)
	changed := false
	for i, k := range fut {
		if !props[i].ok {
			continue
		}
		if r.objective(map[int][][]int{k: props[i].cnt}) > r.objective(nil) {
			r.sols[k], r.planned[k] = props[i].ns, props[i].cnt
			changed = true
		} else {
			// Keep the schedule; remember the weights tried, so that an
			// unchanged neighbourhood is not solved again.
			r.sols[k].tried = ws[i]
		}
	}
	return changed, nil
}

// equalWeights reports whether two weight tables are the same.
func equalWeights(a, b [][]int64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !slices.Equal(a[i], b[i]) {
			return false
		}
	}
	return true
}

// plannedExposures lists the exposures of the nights' plans (fillers
// included) with their phases on the full path.
func (r *runState) plannedExposures(nights []NightPlan) []RunExposure {
	var out []RunExposure
	for k, np := range nights {
		if np.Plan == nil {
			continue
		}
		for _, b := range np.Plan.Blocks {
			ts := r.targets[b.TargetIndex]
			L := b.ExposureS + b.OverheadS
			gi := b.GoalIndex
			if b.Filler {
				gi = -1
			}
			for j := range b.N {
				mid := b.Start.Add(durationOf(float64(j)*L + b.ExposureS/2))
				out = append(out, RunExposure{Target: b.Target, TargetIndex: b.TargetIndex, Night: k, Mid: mid, ExposureS: b.ExposureS,
					Phase: phaseOf(r.req.Site, ts.t, mid), Planned: true, GoalIndex: gi})
			}
		}
	}
	return out
}

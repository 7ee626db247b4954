package planner

// Proposal sizing: how many nights, and which dates of a semester or a date
// range, a list of goals needs, with the weather taken into account.
//
// The model, stated exactly:
//
//  1. Each candidate night k of the range is planned on its own by the night
//     planner's exact scheduler, with PlanNight's priority weights and every
//     goal still wanting its full N exposures (Goal.NExposures, N ≥ 1; a
//     night's block holds at most N). c[k][g] is the number of that plan's
//     exposures whose mid-time phase lies in goal g's window (the run's
//     coverage test). These plans are fixed before any night is chosen: a
//     chosen night gives each goal c[k][g] exposures if it is clear, none if
//     it is lost.
//  2. Weather: each chosen night is clear independently with probability
//     p = 1 − loss (loss the weather-loss fraction, 0 ≤ loss < 1). For a set
//     S of chosen nights, goal g's exposures are X_g = Σ_{k∈S} B_k·c[k][g],
//     B_k independent Bernoulli(p). Its coverage is min(X_g, N_g)/N_g; the
//     expected coverage E[min(X_g, N_g)]/N_g and the probability
//     P(X_g ≥ N_g) are computed exactly by dynamic programming over the
//     nights of S on the distribution of min(X_g, N_g) (N_g + 1 states; a
//     night moves probability p from state s to min(s + c, N_g) and leaves
//     1 − p in place), not by sampling. The joint probability that every
//     goal reaches N is the same dynamic programming on the vector of the
//     goals' capped counts, computed while at most MaxJointStates vectors
//     have non-zero probability (otherwise reported as not computed); the
//     goals that all the candidate nights together cannot bring to N are
//     left out of it.
//  3. Choosing the nights, greedily, one at a time, best first:
//     - the goals that all the candidate nights together cannot bring to N
//       are left out of the choice (they are reported, with what the range
//       offers them);
//     - while some goal still lacks exposures on clear nights, the night
//       adding the most Σ_g w_g·(min(C_g + c[k][g], N_g) − C_g)/N_g, C_g the
//       exposures of the nights already chosen and w_g = PriorityWeight of
//       the target's priority; ties go to the night with more exposures in
//       all, then the earlier. The number of nights chosen when every goal
//       that can be met is met is the minimum number of nights with a clear
//       sky (a greedy set multi-cover: never below the true minimum and
//       usually equal to it; TestProposalGreedyAgainstOptimum compares it
//       with an exhaustive search);
//     - then, while loss > 0 and some goal's probability of reaching N is
//       below the confidence asked, the night adding the most
//       Σ_g w_g·ΔE[min(X_g, N_g)]/N_g (same ties): the margin for weather.
//       The number of nights chosen when every goal that can be met reaches
//       its N with at least that probability is the number of nights to ask
//       for.
//
// Nights are the local dates of the evenings, each from local noon to the
// next local noon in the site's zone (NightWindow).

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
)

// MaxJointStates bounds the vectors of capped counts the joint probability
// (every goal reaches N) keeps; beyond it the joint probability is not
// computed (ProposalPick.AllReachProb is then −1).
const MaxJointStates = 200_000

// MaxProposalLoss is the highest weather-loss fraction accepted: at 0.95 a
// goal needs on average twenty nights for one clear one.
const MaxProposalLoss = 0.95

// DefaultProposalConfidence is the probability of reaching each goal's N
// that the weather margin is sized for when none is given (common practice
// for a proposal's margin).
const DefaultProposalConfidence = 0.9

// ProposalRequest is the proposal question: a site, the candidate nights (a
// semester or a date range, full nights), the targets with their goals (each
// wanting Goal.NExposures ≥ 1 exposures in all), the constraints and the
// night planner's options, the weather-loss fraction and the confidence.
type ProposalRequest struct {
	Site ephem.Site
	// Zone is the site's time zone (nil: UTC); the nights are its local
	// dates.
	Zone        *time.Location
	Nights      []RunNight
	Targets     []Target
	Constraints Constraints
	Options     Options
	// Loss is the fraction of nights lost to weather, 0 ≤ loss ≤
	// MaxProposalLoss: each night is clear with probability 1 − Loss.
	Loss float64
	// Confidence is the probability with which every goal should reach its
	// N, 0.5 ≤ c ≤ 0.999; 0 means DefaultProposalConfidence.
	Confidence float64
}

// ProposalGoal is one goal of the proposal.
type ProposalGoal struct {
	Target      string
	TargetIndex int
	GoalIndex   int  // in the target's ResolveGoals
	Goal        Goal // resolved
	Need        int  // N, exposures in all
	// NightsOffering is the number of candidate nights whose plan gives
	// the goal at least one exposure, Available the exposures all the
	// candidate nights' plans give it together.
	NightsOffering, Available int
}

// ProposalPick is one chosen night, in the order chosen, with the state of
// the proposal once it and every night chosen before it are in.
type ProposalPick struct {
	Night int      // index in ProposalRequest.Nights
	Date  RunNight // the night's local date
	// Gives is c[k][g] for each goal of Proposal.Goals.
	Gives []int
	// Margin is true for a night chosen for the weather margin (after every
	// goal that can be met was met on clear nights).
	Margin bool
	// Clear is each goal's exposures, capped at N, if every night chosen so
	// far is clear; ClearCoverage the mean over goals of Clear/N.
	Clear         []int
	ClearCoverage float64
	// Expected is each goal's E[min(X, N)]/N, ReachProb its P(X ≥ N), under
	// the weather model; ExpectedCoverage is the mean of Expected.
	Expected         []float64
	ReachProb        []float64
	ExpectedCoverage float64
	// AllReachProb is the probability that every goal the range can meet
	// reaches its N; −1 when the joint distribution grew past
	// MaxJointStates.
	AllReachProb float64
}

// Proposal is the answer: the goals, the chosen nights in the order chosen,
// and the two counts of nights.
type Proposal struct {
	Request ProposalRequest
	Goals   []ProposalGoal
	Picks   []ProposalPick
	// ClearNights is the number of nights (the first picks) after which
	// every goal that can be met is met when no night is lost.
	ClearNights int
	// WeatherNights is the number of picks after which every goal that can
	// be met reaches its N with probability ≥ Confidence (equal to
	// ClearNights when Loss is 0); WeatherMet is false when the candidate
	// nights ran out first (WeatherNights is then every night chosen).
	WeatherNights int
	WeatherMet    bool
	// Unmet lists, by index in Goals, the goals that all the candidate
	// nights together cannot bring to N even with a clear sky.
	Unmet []int
	// Solves is the number of night schedules solved.
	Solves int
}

// Dates returns the dates of the first n picks in calendar order.
func (p *Proposal) Dates(n int) []RunNight {
	n = min(n, len(p.Picks))
	picks := append([]ProposalPick(nil), p.Picks[:n]...)
	sort.Slice(picks, func(a, b int) bool { return picks[a].Night < picks[b].Night })
	out := make([]RunNight, n)
	for i, pk := range picks {
		out[i] = pk.Date
	}
	return out
}

// Semester returns the nights of an observing semester named like "2027A"
// or "2027B": A from 1 February to 31 July, B from 1 August to 31 January of
// the next year (a common split into half years; observatories differ, so
// give the dates when yours does). The error names the value and what is
// accepted.
func Semester(name string) ([]RunNight, error) {
	s := strings.ToUpper(strings.TrimSpace(name))
	bad := &ephem.InputError{Field: "semester", Value: fmt.Sprintf("%q", ClipValue(name)),
		Accepted: fmt.Sprintf("a year %d..%d followed by A (1 February–31 July) or B (1 August–31 January)", ephem.MinYear, ephem.MaxYear-1)}
	if len(s) != 5 || (s[4] != 'A' && s[4] != 'B') {
		return nil, bad
	}
	y, err := strconv.Atoi(s[:4])
	if err != nil || y < ephem.MinYear || y >= ephem.MaxYear {
		return nil, bad
	}
	first, last := time.Date(y, time.February, 1, 12, 0, 0, 0, time.UTC), time.Date(y, time.July, 31, 12, 0, 0, 0, time.UTC)
	if s[4] == 'B' {
		first, last = time.Date(y, time.August, 1, 12, 0, 0, 0, time.UTC), time.Date(y+1, time.January, 31, 12, 0, 0, 0, time.UTC)
	}
	return NightsBetween(first.Year(), first.Month(), first.Day(), last.Year(), last.Month(), last.Day())
}

// NightsBetween returns the full nights whose evenings fall on the local
// dates from (y0, m0, d0) to (y1, m1, d1), both included: 1..MaxRunNights
// nights. The error names the last date when the range is empty or too long.
func NightsBetween(y0 int, m0 time.Month, d0, y1 int, m1 time.Month, d1 int) ([]RunNight, error) {
	a := time.Date(y0, m0, d0, 12, 0, 0, 0, time.UTC)
	b := time.Date(y1, m1, d1, 12, 0, 0, 0, time.UTC)
	n := int(math.Round(b.Sub(a).Hours()/24)) + 1
	if n < 1 || n > MaxRunNights {
		return nil, &ephem.InputError{Field: "to", Value: b.Format("2006-01-02"),
			Accepted: fmt.Sprintf("a date from %s to %d days after it", a.Format("2006-01-02"), MaxRunNights-1)}
	}
	return NightsFrom(y0, m0, d0, n)
}

// checkProposal validates what PlanRun does not: the loss, the confidence,
// full nights only, and every goal's N.
func checkProposal(req ProposalRequest) (float64, error) {
	if !finite(req.Loss) || req.Loss < 0 || req.Loss > MaxProposalLoss {
		return 0, &ephem.InputError{Field: "loss", Value: fmtNum(req.Loss), Accepted: fmt.Sprintf("a fraction of nights lost to weather, 0..%s", fmtNum(MaxProposalLoss))}
	}
	conf := req.Confidence
	if conf == 0 {
		conf = DefaultProposalConfidence
	}
	if !finite(conf) || conf < 0.5 || conf > 0.999 {
		return 0, &ephem.InputError{Field: "confidence", Value: fmtNum(req.Confidence), Accepted: "a probability 0.5..0.999 (0 = 0.9)"}
	}
	for i, n := range req.Nights {
		if n.part() != PartFull {
			return 0, &ephem.InputError{Field: fmt.Sprintf("nights[%d]", i), Value: n.String(), Accepted: "full nights (a proposal asks for whole nights)"}
		}
	}
	for ti, t := range req.Targets {
		for gi, g := range t.Goals {
			if g.NExposures < 1 || g.NExposures > 10000 {
				return 0, &ephem.InputError{Field: fmt.Sprintf("targets[%d].goals[%d].n_exposures", ti, gi), Value: strconv.Itoa(g.NExposures),
					Accepted: "a whole number of exposures 1..10000 (the proposal needs a count)"}
			}
		}
	}
	return conf, nil
}

// Propose answers the proposal question by the model in the notes above.
// A cancelled ctx stops the work between nights and returns ctx.Err(). Bad
// input gives an *ephem.InputError naming the field, the value and what is
// accepted.
func Propose(ctx context.Context, req ProposalRequest) (*Proposal, error) {
	conf, err := checkProposal(req)
	if err != nil {
		return nil, err
	}
	r, err := newRunState(RunRequest{Site: req.Site, Zone: req.Zone, Nights: req.Nights, Targets: req.Targets,
		Constraints: req.Constraints, Options: req.Options})
	if err != nil {
		return nil, err
	}
	out := &Proposal{Request: req}
	out.Request.Confidence = conf
	var flat []runGoal
	for ti, ts := range r.targets {
		for gi, rg := range r.goals[ti] {
			flat = append(flat, rg)
			out.Goals = append(out.Goals, ProposalGoal{Target: ts.t.Name, TargetIndex: ti, GoalIndex: gi, Goal: rg.g, Need: rg.need()})
		}
	}
	K := len(req.Nights)
	c := make([][]int, K) // c[k][flat goal]
	err = forEach(ctx, K, func(k int) error {
		m, err := newNightModel(r.nightRequest(k))
		if err != nil {
			return err
		}
		cnt := m.counts(m.solve(m.priorityWeights()), r.goals)
		row := make([]int, 0, len(flat))
		for ti := range cnt {
			row = append(row, cnt[ti]...)
		}
		c[k] = row
		return nil
	}, nil)
	if err != nil {
		return nil, err
	}
	out.Solves = K
	for k := range c {
		for g, n := range c[k] {
			if n > 0 {
				out.Goals[g].NightsOffering++
				out.Goals[g].Available += n
			}
		}
	}
	for g, pg := range out.Goals {
		if pg.Available < pg.Need {
			out.Unmet = append(out.Unmet, g)
		}
	}
	choose(out, c, flat, conf)
	return out, nil
}

// choose runs the greedy choice of nights (step 3 of the notes).
func choose(out *Proposal, c [][]int, flat []runGoal, conf float64) {
	G := len(flat)
	p := 1 - out.Request.Loss
	clear := make([]int, G)
	dists := make([][]float64, G)
	for g := range dists {
		dists[g] = make([]float64, flat[g].need()+1)
		dists[g][0] = 1
	}
	joint := map[string]jointState{jointKey(make([]int, G)): {counts: make([]int, G), p: 1}}
	used := make([]bool, len(c))
	unmet := map[int]bool{}
	for _, g := range out.Unmet {
		unmet[g] = true
	}
	weatherDone := func(probs []float64) bool {
		for g, pr := range probs {
			if !unmet[g] && pr < conf {
				return false
			}
		}
		return true
	}
	margin := false
	for {
		best, bestGain, bestTotal := -1, 0.0, 0
		for k := range c {
			if used[k] {
				continue
			}
			gain, total := 0.0, 0
			for g, n := range c[k] {
				if unmet[g] {
					continue
				}
				total += n
				N := flat[g].need()
				if !margin {
					gain += float64(flat[g].w) * float64(min(clear[g]+n, N)-clear[g]) / float64(N)
				} else {
					gain += float64(flat[g].w) * expectedGain(dists[g], n, p) / float64(N)
				}
			}
			if gain > bestGain+1e-12 || (best >= 0 && math.Abs(gain-bestGain) <= 1e-12 && total > bestTotal) {
				best, bestGain, bestTotal = k, gain, total
			}
		}
		if best < 0 {
			if margin {
				out.WeatherNights = len(out.Picks) // the nights ran out first
				return
			}
			// Every goal that can be met is met on clear nights.
			out.ClearNights = len(out.Picks)
			if out.Request.Loss == 0 || len(out.Picks) == 0 || weatherDone(out.Picks[len(out.Picks)-1].ReachProb) {
				out.WeatherNights, out.WeatherMet = out.ClearNights, true
				return
			}
			margin = true
			continue
		}
		used[best] = true
		pk := ProposalPick{Night: best, Date: out.Request.Nights[best], Gives: c[best], Margin: margin,
			Clear: make([]int, G), Expected: make([]float64, G), ReachProb: make([]float64, G)}
		for g, n := range c[best] {
			N := flat[g].need()
			clear[g] = min(clear[g]+n, N)
			dists[g] = addNight(dists[g], n, p)
			pk.Clear[g] = clear[g]
			pk.ClearCoverage += float64(clear[g]) / float64(N) / float64(G)
			e := 0.0
			for s, pr := range dists[g] {
				e += float64(s) * pr
			}
			pk.Expected[g] = e / float64(N)
			pk.ExpectedCoverage += pk.Expected[g] / float64(G)
			pk.ReachProb[g] = dists[g][N]
		}
		pk.AllReachProb = -1
		if joint != nil {
			joint = addJointNight(joint, c[best], flat, p)
			if joint != nil {
				pk.AllReachProb = allReach(joint, flat, unmet)
			}
		}
		out.Picks = append(out.Picks, pk)
		if margin && weatherDone(pk.ReachProb) {
			out.WeatherNights, out.WeatherMet = len(out.Picks), true
			return
		}
	}
}

// addNight returns the distribution of min(X + B·n, N) from that of
// min(X, N) (dist, N + 1 states), B Bernoulli(p): exact.
func addNight(dist []float64, n int, p float64) []float64 {
	N := len(dist) - 1
	out := make([]float64, len(dist))
	for s, pr := range dist {
		out[s] += (1 - p) * pr
		out[min(s+n, N)] += p * pr
	}
	return out
}

// expectedGain is E[min(X + B·n, N)] − E[min(X, N)] for dist the
// distribution of min(X, N): p·Σ_s P(s)·(min(s + n, N) − s).
func expectedGain(dist []float64, n int, p float64) float64 {
	N := len(dist) - 1
	g := 0.0
	for s, pr := range dist {
		g += pr * float64(min(s+n, N)-s)
	}
	return p * g
}

// jointState is one vector of capped counts with its probability.
type jointState struct {
	counts []int
	p      float64
}

func jointKey(counts []int) string {
	var b strings.Builder
	for _, n := range counts {
		b.WriteString(strconv.Itoa(n))
		b.WriteByte(',')
	}
	return b.String()
}

// addJointNight adds a night giving n[g] exposures, clear with probability
// p, to the joint distribution; nil when it would hold more than
// MaxJointStates vectors.
func addJointNight(joint map[string]jointState, n []int, flat []runGoal, p float64) map[string]jointState {
	out := make(map[string]jointState, 2*len(joint))
	put := func(counts []int, pr float64) {
		k := jointKey(counts)
		st := out[k]
		if st.counts == nil {
			st.counts = counts
		}
		st.p += pr
		out[k] = st
	}
	for _, st := range joint {
		put(st.counts, (1-p)*st.p)
		if p == 0 {
			continue
		}
		next := make([]int, len(st.counts))
		for g, x := range st.counts {
			next[g] = min(x+n[g], flat[g].need())
		}
		put(next, p*st.p)
		if len(out) > MaxJointStates {
			return nil
		}
	}
	return out
}

// allReach is the probability that every goal's capped count is its N,
// the goals in skip (those the range cannot meet) left out.
func allReach(joint map[string]jointState, flat []runGoal, skip map[int]bool) float64 {
	total := 0.0
	for _, st := range joint {
		ok := true
		for g, x := range st.counts {
			ok = ok && (skip[g] || x == flat[g].need())
		}
		if ok {
			total += st.p
		}
	}
	return total
}

// YearHours is one target's observable hours night by night: the time in
// the night's dark time (Sun below the constraints' twilight altitude) with
// the target at or below the airmass limit (refracted altitude; above the
// horizon when there is no airmass limit), hours, one value per night.
type YearHours struct {
	Target string
	Hours  []float64
}

// ObservableHours returns, for each target and each of the given nights
// (local noon to local noon in zone, nil: UTC), the hours of dark time with
// the target under the airmass limit, edges refined to 1 ms from a scan at
// Options.StepS (the night planner's scan). Only the Sun's altitude and the
// airmass are applied: the other constraints (Moon, hour angle, horizon
// mask) are the night's business, not the season's. The nights must pass
// ValidateRunNights and be full nights.
func ObservableHours(ctx context.Context, site ephem.Site, zone *time.Location, c Constraints, opt Options, targets []Target, nights []RunNight) ([]YearHours, error) {
	if err := ValidateRunNights(nights); err != nil {
		return nil, err
	}
	base, err := newLeanBase(site, Constraints{Twilight: c.Twilight, SunAltMaxDeg: c.SunAltMaxDeg, MaxAirmass: c.MaxAirmass}, opt)
	if err != nil {
		return nil, err
	}
	ts, err := checkTargets(targets)
	if err != nil {
		return nil, err
	}
	if zone == nil {
		zone = time.UTC
	}
	from, to := base.nightBounds(nights, zone)
	frame := ephem.NewSkyFrame(site, timeOf(from[0]-3600), timeOf(to[len(to)-1]+3600))
	for _, t := range ts {
		t.track = frame.Track(t.star)
	}
	out := make([]YearHours, len(ts))
	for i, t := range ts {
		out[i] = YearHours{Target: t.t.Name, Hours: make([]float64, len(nights))}
	}
	err = forEach(ctx, len(nights), func(k int) error {
		en := base.night(from[k], to[k])
		for i, t := range ts {
			total := 0.0
			for _, d := range en.dark {
				ok, _ := scan(d.lo, d.hi, base.opt.StepS, func(u float64) (float64, reasonBits) {
					alt := en.site.RefractedAltDeg(mustAlt(t, u))
					m := alt - base.altAirmass
					if m < 0 {
						return m, bitAirmass
					}
					return m, 0
				})
				total += totalLength(ok)
			}
			out[i].Hours[k] = total / 3600
		}
		return nil
	}, nil)
	if err != nil {
		return nil, err
	}
	return out, nil
}

// mustAlt is the target's airless altitude at u, degrees (fast path).
func mustAlt(ts *targetState, u float64) float64 {
	alt, _ := ts.track.AltAzUnix(u)
	return alt
}

// YearOf returns the nights of the calendar year in which night n falls
// (1 January to 31 December, 365 or 366 nights): the year chart's nights.
func YearOf(n RunNight) []RunNight {
	days := 365
	if time.Date(n.Year, 12, 31, 12, 0, 0, 0, time.UTC).YearDay() == 366 {
		days = 366
	}
	out, _ := NightsFrom(n.Year, time.January, 1, days) // dropped: 365 or 366 nights from 1 January are always accepted
	return out
}

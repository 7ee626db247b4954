package planner

import (
	"context"
	"fmt"
	"math"
	"sync"
	"time"

	"phasecast/ephem"
)

// SafetyCaution is the caution every night sheet shows.
const SafetyCaution = "Caution: never point a telescope or its finder near the Sun; blocks in twilight and the " +
	"Sun-avoidance angle are planning aids only. Check times with your observatory's own tools and follow its safety rules."

// DefaultMaxPhaseErr is Options.MaxPhaseErr's default: the 1σ phase
// uncertainty above which a goal is refused (UncertaintyRule).
const DefaultMaxPhaseErr = 0.25

// Options tune the night planner. A zero field takes the default shown.
type Options struct {
	// StepS is the sampling step of the constraints and the grid of block
	// start times, seconds (default 60). Block starts fall on whole
	// multiples of StepS in UTC, or on the earliest or latest whole second
	// a goal window allows.
	StepS float64
	// SmearFrac: warn when one exposure spans more than this fraction of
	// its goal window in phase (default 0.25).
	SmearFrac float64
	// MaxPhaseErr: goals whose ephemeris' 1σ phase uncertainty on the night
	// exceeds this (phase units) are not scheduled (default 0.25: the
	// window's place on the orbit is then unknown). Above the window's
	// half-width a warning is given.
	MaxPhaseErr float64
	// MoonWarnSepDeg: warn when a block is closer than this to the Moon
	// while the Moon is up (default 30°, common practice).
	MoonWarnSepDeg float64
	// Fill fills idle dark time with filler blocks of the most valuable
	// target observable then (priority first, then the longest fill),
	// marked Filler; they serve no phase goal.
	Fill bool
	// FillMinS is the shortest filler block worth scheduling, seconds
	// (default 600).
	FillMinS float64
	// MaxStates bounds the optimiser's states alive at once (default
	// 4096; see sweep.go). When exceeded, the best feasible schedule found
	// is returned with Plan.Optimal false and a warning.
	MaxStates int
	// MaxOccurrences bounds the goal windows considered per goal and night
	// (default 2000; a 1-minute orbit has 1440 a day).
	MaxOccurrences int
	// PadSigma widens every goal window by k = PadSigma times the
	// ephemeris' 1σ phase uncertainty on the night, on both sides (0..10,
	// default 0: none), at most to a half-width of 0.49: the window then
	// holds the event at k σ. Night plans and queue windows alike.
	PadSigma float64
}

// halfWidth is a goal window's half-width for a 1σ phase uncertainty
// sigma: hw + PadSigma·σ, at most 0.49 (phase).
func (o Options) halfWidth(hw, sigma float64) float64 {
	return math.Min(hw+o.PadSigma*sigma, 0.49)
}

func (o Options) withDefaults() (Options, error) {
	def := func(v *float64, d float64) {
		if *v == 0 {
			*v = d
		}
	}
	def(&o.StepS, 60)
	def(&o.SmearFrac, 0.25)
	def(&o.MaxPhaseErr, DefaultMaxPhaseErr)
	def(&o.MoonWarnSepDeg, 30)
	def(&o.FillMinS, 600)
	if o.MaxStates == 0 {
		o.MaxStates = 4096
	}
	if o.MaxOccurrences == 0 {
		o.MaxOccurrences = 2000
	}
	bad := func(f string, v float64, acc string) error {
		return &ephem.InputError{Field: f, Value: fmtNum(v), Accepted: acc}
	}
	switch {
	case !finite(o.StepS) || o.StepS < 1 || o.StepS > 900:
		return o, bad("step_s", o.StepS, "1..900 seconds")
	case !finite(o.SmearFrac) || o.SmearFrac < 0 || o.SmearFrac > 1:
		return o, bad("smear_frac", o.SmearFrac, "0..1")
	case !finite(o.MaxPhaseErr) || o.MaxPhaseErr < 0 || o.MaxPhaseErr > 1:
		return o, bad("max_phase_err", o.MaxPhaseErr, "0..1 (phase)")
	case !finite(o.MoonWarnSepDeg) || o.MoonWarnSepDeg < 0 || o.MoonWarnSepDeg > 180:
		return o, bad("moon_warn_sep", o.MoonWarnSepDeg, "0..180 degrees")
	case !finite(o.FillMinS) || o.FillMinS < 0 || o.FillMinS > 86400:
		return o, bad("fill_min_s", o.FillMinS, "0..86400 seconds")
	case o.MaxStates < 1:
		return o, bad("max_states", float64(o.MaxStates), "≥ 1")
	case o.MaxOccurrences < 1:
		return o, bad("max_occurrences", float64(o.MaxOccurrences), "≥ 1")
	case !finite(o.PadSigma) || o.PadSigma < 0 || o.PadSigma > 10:
		return o, bad("pad_sigma", o.PadSigma, "0..10 (σ of the phase added to each window's half-width)")
	}
	return o, nil
}

// NightRequest is one night to plan: a site, the planning window (UTC; see
// NightWindow), the targets with their goals, the constraints and options.
type NightRequest struct {
	Site        ephem.Site
	From, To    time.Time
	Targets     []Target
	Constraints Constraints
	Options     Options
	// Instrument, when set, sizes the exposures of goals with an SNR on
	// targets with a Band (see SizeExposure) and gives every block of a
	// target with a Band its S/N per exposure and sky brightness.
	Instrument *Instrument
	// presized holds exposures a run's reach already sized, by occurrence.
	presized map[occKey]ExposureSizing
}

// Block is a run of consecutive exposures of one target serving one goal
// occurrence: exposures laid back to back from Start, each ExposureS then
// OverheadS, so End − Start = N × (ExposureS + OverheadS). Every exposure's
// mid-time phase lies in the goal window (filler blocks have no goal). The
// target meets every constraint from Start to End.
type Block struct {
	Target      string
	TargetIndex int  // index in NightRequest.Targets
	GoalIndex   int  // index in the target's ResolveGoals; −1 for a filler
	Goal        Goal // the resolved goal (Center set); zero for a filler
	Filler      bool
	Priority    int
	Cycle       int64 // the orbital cycle of the window's centre
	Start, End  time.Time
	// AcquireS is the acquisition time charged just before Start (0 when
	// the previous block is of the same target).
	AcquireS   float64
	N          int
	ExposureS  float64
	OverheadS  float64
	PhaseStart float64 // phase at Start, 0..1
	PhaseMid   float64 // phase at the block's middle
	PhaseEnd   float64 // phase at End
	// PhaseFirstMid and PhaseLastMid are the phases at the mid-times of the
	// first and last exposures.
	PhaseFirstMid, PhaseLastMid float64
	// Smear is the phase one exposure spans (ExposureS / P).
	Smear float64
	// PhaseErr is the ephemeris' 1σ phase uncertainty on the night.
	PhaseErr               float64
	AirmassMin, AirmassMax float64 // over the whole block
	// MoonSepDeg is the smallest separation from the Moon during the block,
	// degrees; MoonUp tells whether the Moon was up at any time in it.
	MoonSepDeg  float64
	MoonUp      bool
	MoonIllum   float64 // at the middle, 0..1
	Parallactic float64 // parallactic angle at the middle, degrees, −180..180
	HourAngle   float64 // hour angle at the middle, hours
	SunAltStart float64 // the Sun's altitude at Start, degrees (airless)
	// SizedBySNR tells that ExposureS was sized for the goal's S/N (at the
	// middle of the occurrence's observable part of the window).
	SizedBySNR bool
	// SNR is the S/N per exposure at the block's middle and SkyMag the sky
	// brightness used, mag/arcsec² in the target's band; both 0 (SNROK
	// false) without an instrument or a band.
	SNR, SkyMag float64
	SNROK       bool
	Value       int64 // the block's share of the objective
	Warnings    []Warning
}

// UnscheduledReason says why a goal got no block.
type UnscheduledReason string

// Reasons a goal gets no block on the night.
const (
	UnschedNoDarkTime          UnscheduledReason = "no_dark_time"          // the Sun never goes below the twilight altitude
	UnschedNeverObservable     UnscheduledReason = "never_observable"      // the target is never observable while dark
	UnschedWindowInDaylight    UnscheduledReason = "window_in_daylight"    // no window of the goal falls in dark time
	UnschedWindowNotObservable UnscheduledReason = "window_not_observable" // windows in dark time, target not observable then
	UnschedNoRoom              UnscheduledReason = "no_room"               // the observable part of every window is too short
	UnschedEphemerisUncertain  UnscheduledReason = "ephemeris_uncertain"   // phase uncertainty above Options.MaxPhaseErr
	UnschedLostToPriority      UnscheduledReason = "lost_to_higher_priority"
	UnschedLostToSchedule      UnscheduledReason = "lost_to_schedule" // conflicts with blocks worth more together
	// UnschedSNRUnreachable: the goal's S/N needs a longer exposure than
	// its smear limit allows at every observable time of its windows.
	UnschedSNRUnreachable UnscheduledReason = "snr_unreachable"
)

// Unscheduled is a goal with no block on the night, with the reason.
type Unscheduled struct {
	Target      string
	TargetIndex int
	GoalIndex   int
	Goal        Goal
	Reason      UnscheduledReason
	Detail      string // a sentence for the night sheet
}

// WarningCode classifies a warning.
type WarningCode string

// Warnings the planner gives.
const (
	WarnSmear           WarningCode = "smear"             // one exposure smears too much of the window
	WarnPhaseUncertain  WarningCode = "phase_uncertain"   // phase 1σ larger than the window's half-width
	WarnUnreachable     WarningCode = "unreachable"       // no night-time instant can reach the goal
	WarnMoonNear        WarningCode = "moon_near"         // close to the Moon while it is up
	WarnTwilightStart   WarningCode = "twilight_start"    // block starts before astronomical darkness
	WarnNotOptimal      WarningCode = "not_optimal"       // search stopped at Options.MaxStates
	WarnSunAvoidApplied WarningCode = "sun_avoid_caution" // the Sun-avoidance angle excluded time
	WarnShortfall       WarningCode = "shortfall"         // a goal's blocks hold fewer exposures than it wants, with the numbers
)

// Warning is something the observer should know, about a block, a goal or
// the plan (Target "" for the whole plan; GoalIndex −1 for the whole target).
type Warning struct {
	Code      WarningCode
	Target    string
	GoalIndex int
	Message   string
}

// Plan is a planned night.
type Plan struct {
	Site        ephem.Site
	From, To    time.Time
	Constraints Constraints // resolved (SunAltMaxDeg set)
	Options     Options     // with defaults filled in
	// Dark lists the spans with the Sun's centre below the twilight
	// altitude.
	Dark        []Interval
	Blocks      []Block // in time order
	Unscheduled []Unscheduled
	Warnings    []Warning
	Visibility  []Visibility // per target, in request order
	// Value is the objective of the scheduled goal blocks (fillers not
	// counted); GreedyValue the greedy baseline's on the same candidates.
	Value       int64
	GreedyValue int64
	// Objective and GreedyObjective are Value and GreedyValue by priority,
	// as the optimiser compares them (Objective.Less). The run planner's
	// nights put every goal on the first level.
	Objective, GreedyObjective Objective
	Optimal                    bool
	// Rounds is the number of DSSR rounds, States the most optimiser
	// states alive at once, Candidates the number of candidate blocks.
	Rounds     int
	States     int
	Candidates int
}

// PriorityWeight returns w(p) = 3^(5−p), the weight of priority p (1..5) in
// the objective: 81, 27, 9, 3, 1.
func PriorityWeight(p int) int64 {
	w := int64(1)
	for range 5 - p {
		w *= 3
	}
	return w
}

// priorityLevel is the objective's level of priority p (1..5): 0..4.
func priorityLevel(p int) int { return min(max(p, 1), levels) - 1 }

// goalValue is v(goal, n) in millionths: ½ + ½·min(n, N)/N (see the notes in
// schedule.go), N the exposures wanted or the window's capacity.
func goalValue(n, wanted int) int64 {
	return 500000 + int64(math.Round(500000*float64(min(n, wanted))/float64(wanted)))
}

// targetState is one target's night.
type targetState struct {
	idx      int
	t        Target
	goals    []Goal
	star     ephem.Star
	track    ephem.Track
	clock    phaseClock
	hasClock bool
	vis      []span
	bad      []badSpan
	phaseErr float64
	amGrid   []float64 // airmass on the StepS grid from the window's start, 0 = not yet computed
}

// engine holds one night's shared state.
type engine struct {
	site       ephem.Site
	c          Constraints
	opt        Options
	mask       *horizonMask
	altAirmass float64         // refracted altitude of the airmass limit, 0 = none
	air        *ephem.AirTable // the site's refraction table (sample)
	sky        *nightSky
	from, to   float64
	dark       []span
	day        []badSpan
	envGrid    []env       // Sun and Moon on the StepS grid in dark time (see envAt)
	envK0      int         // grid index of envGrid[0]
	instrument *Instrument // sizes S/N goals' exposures; nil = none
	presized   map[occKey]ExposureSizing
	// short holds, per target and goal, the best S/N of the occurrences
	// whose smear limit stopped the exposure short of the goal's S/N.
	short   map[[2]int]snrShortfall
	shortMu sync.Mutex // buildProblem lists targets on all cores
}

// occMeta describes one goal occurrence.
type occMeta struct {
	target, goal int
	occ          occurrence
	wanted       int     // N (Goal.Wanted for the occurrence's exposure)
	exposureS    float64 // the occurrence's exposure: the goal's, or sized for its S/N
	sized        bool    // exposureS was sized for the goal's S/N
}

// PlanNight plans one night: the observable intervals of every target, the
// optimal schedule of exposure blocks on the goal windows, blocks' details
// and warnings, the reason for every goal left out, and optional fillers.
//
// Objective, exactly. Priorities are strict levels: the schedule maximises
// first V_1, the value of the priority-1 blocks, then their airmass
// tie-breaker T_1, then V_2 and T_2, and so on to priority 5, where
//
//	V_p = Σ over priority-p blocks of w(p) × v(goal, n),   w(p) = 3^(5−p)
//	v(goal, n) = ½ + ½ × min(n, N)/N
//	T_p = −Σ 1000·(X − 1) over their exposures (X at each block's middle)
//
// with n the block's exposures and N the goal's wanted count per window
// (Goal.Wanted: NExposures; by default the exposures that cover the window
// once; NAsManyAsFit for the window's capacity): half for reaching a goal
// window, half for its exposures. So no amount of lower-priority value buys
// time from a higher priority, on any night. Blocks do not overlap, an
// acquisition overhead precedes every change of target (and the first
// block) inside dark time, each goal occurrence gets at most one block, and
// every block meets every constraint from start to end with every
// exposure's mid-time phase in its window (a Continuous goal's block
// instead covers its whole window without gaps; an eclipse, ingress or
// egress goal's block has an exposure containing the event's instant,
// Goal.ContainEvent; no block is shorter than Goal.MinBlockS). It is solved exactly (decremental
// state-space relaxation over the ordered vectors; see the notes in
// schedule.go and sweep.go), not greedily: Plan.GreedyObjective is what
// first-fit by priority reaches on the same candidates, Plan.Objective the
// optimum, Plan.Value the sum of its V_p. (The run planner solves the same
// problem on one level with its own weight per goal: see nightModel.)
//
// A block never starts with the Sun above the chosen twilight altitude (the
// whole block is in dark time); a block that starts while the Sun is above
// −18° (allowed by civil or nautical twilight) gets a "twilight_start"
// warning, since the sky is not yet fully dark.
//
// Inputs are validated first; the error names the first bad field
// (*ephem.InputError). The same request always gives the same plan. Times
// are UTC; From and To bound the night (NightWindow), at most 48 hours apart.
func PlanNight(req NightRequest) (*Plan, error) {
	en, targets, err := newEngine(req)
	if err != nil {
		return nil, err
	}
	if err := en.checkOccurrences(targets); err != nil {
		return nil, err
	}
	m := buildNightModel(req, en, targets)
	m.strict = true
	return m.plan(m.solve(m.priorityWeights())), nil
}

// newEngine validates the request and computes the dark spans and each
// target's track and visibility.
func newEngine(req NightRequest) (*engine, []*targetState, error) {
	if err := req.Site.Validate(); err != nil {
		return nil, nil, err
	}
	from, to := unixSec(req.From), unixSec(req.To)
	if !(to > from) || to-from > 48*3600 {
		return nil, nil, &ephem.InputError{Field: "to", Value: req.To.UTC().Format(time.RFC3339),
			Accepted: "an instant after from (" + req.From.UTC().Format(time.RFC3339) + "), at most 48 hours later"}
	}
	c, err := req.Constraints.Resolved()
	if err != nil {
		return nil, nil, err
	}
	opt, err := req.Options.withDefaults()
	if err != nil {
		return nil, nil, err
	}
	names := map[string]int{}
	for i, t := range req.Targets {
		if err := validateTarget(i, t); err != nil {
			return nil, nil, err
		}
		if j, dup := names[t.Name]; dup {
			return nil, nil, &ephem.InputError{Field: fmt.Sprintf("targets[%d].name", i), Value: fmt.Sprintf("%q", t.Name),
				Accepted: fmt.Sprintf("a name not used by another target (targets[%d] has it)", j)}
		}
		names[t.Name] = i
	}
	if req.Instrument != nil {
		if err := req.Instrument.Validate(); err != nil {
			return nil, nil, err
		}
	}
	en := &engine{site: req.Site, c: c, opt: opt, mask: newHorizonMask(c.Horizon), air: req.Site.AirTable(), from: from, to: to,
		instrument: req.Instrument, presized: req.presized, short: map[[2]int]snrShortfall{}}
	if c.MaxAirmass > 0 {
		en.altAirmass = altForAirmass(c.MaxAirmass)
	}
	en.sky = newNightSky(req.Site, from, to)
	en.dark, en.day = scan(from, to, opt.StepS, func(u float64) (float64, reasonBits) {
		m := c.SunAltMaxDeg - en.sky.sunAlt(u)
		if m <= 0 {
			return m, bitDaylight
		}
		return m, 0
	})
	en.fillEnvCache()
	frame := ephem.NewSkyFrame(req.Site, req.From, req.To)
	targets := make([]*targetState, len(req.Targets))
	// The targets are independent: set them up on all cores (the engine is
	// read-only here; each target's state is its own).
	err = forEach(context.Background(), len(req.Targets), func(i int) error {
		t := req.Targets[i]
		goals, err := t.ResolveGoals()
		if err != nil {
			return err
		}
		ts := &targetState{idx: i, t: t, goals: goals, star: t.Star(), amGrid: make([]float64, int((to-from)/opt.StepS)+2)}
		ts.track = frame.Track(ts.star)
		for _, d := range en.dark {
			ok, bad := scan(d.lo, d.hi, opt.StepS, func(u float64) (float64, reasonBits) { return en.margin(ts, u) })
			ts.vis = append(ts.vis, ok...)
			ts.bad = append(ts.bad, bad...)
		}
		if len(en.dark) > 0 {
			lo := math.Max(from, en.dark[0].lo-3600)
			hi := math.Min(to, en.dark[len(en.dark)-1].hi+3600)
			ts.clock = newPhaseClock(req.Site, ts.star, t.Ephem, lo, hi)
			ts.hasClock = true
			mid := 0.5 * (en.dark[0].lo + en.dark[len(en.dark)-1].hi)
			ts.phaseErr = t.Ephem.PhaseErr(ts.clock.bjd(mid))
		}
		targets[i] = ts
		return nil
	}, nil)
	if err != nil {
		return nil, nil, err
	}
	return en, targets, nil
}

// visibility reports a target's observable intervals and gaps.
func (en *engine) visibility(ts *targetState) Visibility {
	v := Visibility{Target: ts.t.Name, Intervals: toIntervals(ts.vis)}
	all := append(append([]badSpan(nil), en.day...), ts.bad...)
	sortBad(all)
	for _, b := range all {
		v.Gaps = append(v.Gaps, Gap{Interval: b.interval(), Reasons: b.why.reasons()})
	}
	return v
}

// windowMarginS keeps exposure mid-times this far inside the goal window,
// seconds (the phase clock is good to 0.2 ms).
const windowMarginS = 0.01

// guardS keeps blocks this far inside the observable intervals, seconds, so
// that the full computation (edges within a second of the fast path) agrees
// that every constraint holds for the whole block.
const guardS = 1.0

// buildProblem lists every goal occurrence in dark time and its candidate
// blocks.
func (en *engine) buildProblem(targets []*targetState) ([]occMeta, *problem) {
	// Targets on all cores, each with its own occurrences numbered from 0,
	// then put together in target order (renumbered), as one loop would.
	type part struct {
		occs  []occMeta
		cands []candidate
	}
	parts := make([]part, len(targets))
	forAll(len(targets), func(i int) {
		ts := targets[i]
		if !ts.hasClock || UncertaintyRule(ts.phaseErr, 0, en.opt.MaxPhaseErr) >= PhaseRefused {
			return
		}
		p := &parts[i]
		for gi, g := range ts.goals {
			lo, hi := en.dark[0].lo, en.dark[len(en.dark)-1].hi
			sizing := en.instrument != nil && SizesBySNR(ts.t, g)
			for _, oc := range ts.clock.occurrences(g.Center, en.opt.halfWidth(g.HalfWidth, ts.phaseErr), lo-g.ExposureS, hi+g.ExposureS, en.opt.MaxOccurrences) {
				og := g
				if sizing {
					sz, ok, err := en.sizeOccurrence(ts, gi, g, oc)
					if err != nil || !ok {
						continue // not observable in this window: no candidates either way
					}
					if !sz.Reached {
						en.noteShortfall(ts.idx, gi, sz, g)
						continue
					}
					og.ExposureS = sz.ExposureS
				}
				wanted := og.Wanted(ts.t.Ephem.PeriodDays)
				k := len(p.occs)
				p.occs = append(p.occs, occMeta{target: ts.idx, goal: gi, occ: oc, wanted: wanted, exposureS: og.ExposureS, sized: sizing})
				p.cands = en.appendCandidates(p.cands, ts, og, oc, k, wanted)
			}
		}
	})
	n := 0
	for _, p := range parts {
		n += len(p.cands)
	}
	pr := &problem{nTargets: len(targets), cands: make([]candidate, 0, n)}
	var occs []occMeta
	for _, p := range parts {
		base := len(occs)
		occs = append(occs, p.occs...)
		for _, c := range p.cands {
			c.occ += base
			pr.cands = append(pr.cands, c)
		}
	}
	pr.nOcc = len(occs)
	sortCandidates(pr.cands)
	return occs, pr
}

// checkOccurrences reports a goal whose window comes round more than
// Options.MaxOccurrences times in the dark time (buildProblem would consider
// only the first ones): an error naming the goal, never a silent cut.
func (en *engine) checkOccurrences(targets []*targetState) error {
	if len(en.dark) == 0 {
		return nil
	}
	lo, hi := en.dark[0].lo, en.dark[len(en.dark)-1].hi
	for _, ts := range targets {
		if !ts.hasClock {
			continue
		}
		for gi, g := range ts.goals {
			if n := len(ts.clock.occurrences(g.Center, en.opt.halfWidth(g.HalfWidth, ts.phaseErr), lo-g.ExposureS, hi+g.ExposureS, en.opt.MaxOccurrences+1)); n > en.opt.MaxOccurrences {
				return &ephem.InputError{Field: fmt.Sprintf("targets[%d] %q.goals[%d]", ts.idx, ts.t.Name, gi),
					Value:    fmt.Sprintf("more than %d windows in the night (period %g d)", en.opt.MaxOccurrences, ts.t.Ephem.PeriodDays),
					Accepted: fmt.Sprintf("at most %d goal windows per night (Options.MaxOccurrences)", en.opt.MaxOccurrences)}
			}
		}
	}
	return nil
}

// appendCandidates adds the candidate blocks of one occurrence. Starts are
// the multiples of StepS in UTC, the earliest whole second the phase window
// allows (first exposure's mid-time at the window's opening) and, for each n,
// the latest whole second it allows (last mid-time at the window's close);
// every n from 1 to the most that fit (capped at wanted) such that the whole
// block lies in one observable interval, at least guardS inside it. None of
// the starts depends on the constraints, so relaxing a constraint only adds
// candidates (and never lowers the optimum).
func (en *engine) appendCandidates(cs []candidate, ts *targetState, g Goal, oc occurrence, occID, wanted int) []candidate {
	if g.Continuous {
		return en.appendContinuous(cs, ts, g, oc, occID)
	}
	E, L := g.ExposureS, g.ExposureS+g.OverheadS
	step := en.opt.StepS
	w := PriorityWeight(ts.t.Priority)
	// Mid-times stay windowMarginS inside the window, so that a phase
	// computed independently (to a millisecond) agrees they are in it.
	oc.lo += windowMarginS
	oc.hi -= windowMarginS
	first := math.Ceil(oc.lo - E/2)  // earliest start of the window
	last1 := math.Floor(oc.hi - E/2) // latest start of a one-exposure block
	for _, v := range ts.vis {
		vlo, vhi := v.lo+guardS, v.hi-guardS
		sMin := math.Max(first, vlo)
		sMax1 := math.Min(last1, vhi-L)
		if sMin > sMax1 {
			continue
		}
		floor := en.darkStart(v.lo)
		// nmax(s): mid-times in the window and the end in the interval.
		nmax := func(s float64) int {
			return min(wanted, int(math.Floor((oc.hi-E/2-s)/L))+1, int(math.Floor((vhi-s)/L)))
		}
		lv := priorityLevel(ts.t.Priority)
		add := func(s float64, n int) {
			if float64(n)*L < g.MinBlockS || (g.ContainEvent && !containsInstant(s, n, E, L, oc.mid)) {
				return
			}
			x := en.airmassTie(ts, s+0.5*float64(n)*L)
			tie := -int64(math.Round(1000 * float64(n) * (x - 1)))
			cs = append(cs, candidate{
				start: s, end: s + float64(n)*L, acq: ts.t.AcquireS, acqFloor: floor,
				target: ts.idx, occ: occID, n: n, val: at(lv, w*goalValue(n, wanted), tie),
			})
		}
		onGrid := func(s float64) bool { return math.Mod(s, step) == 0 }
		if first >= sMin && !onGrid(first) {
			for n := 1; n <= nmax(first); n++ {
				add(first, n)
			}
		}
		for s := math.Ceil(sMin/step) * step; s <= sMax1; s += step {
			for n := 1; n <= nmax(s); n++ {
				add(s, n)
			}
		}
		for n := 1; n <= wanted; n++ {
			s := math.Floor(oc.hi - float64(n-1)*L - E/2)
			if s < sMin {
				break
			}
			if s == first || onGrid(s) || s+float64(n)*L > vhi {
				continue
			}
			add(s, n)
		}
	}
	return cs
}

// containsInstant reports whether one of n exposures of E seconds laid
// every L seconds from s contains the instant u (all Unix seconds).
func containsInstant(s float64, n int, E, L, u float64) bool {
	j := math.Floor((u - s) / L)
	return j >= 0 && int(j) < n && u-s-j*L <= E
}

// appendContinuous adds the candidate blocks of one occurrence of a
// continuous goal: blocks whose exposures cover the whole window without
// gaps (only the readout between them), from a start at or before the
// window's opening (on the StepS grid within one exposure cycle of it, or
// at the opening's whole second) to a last exposure ending at or after its
// close, inside one observable interval. Each such block fills the goal
// (v = 1); exposures before the opening or after the close are part of
// the coverage, so mid-times may lie outside the window.
func (en *engine) appendContinuous(cs []candidate, ts *targetState, g Goal, oc occurrence, occID int) []candidate {
	E, L := g.ExposureS, g.ExposureS+g.OverheadS
	step := en.opt.StepS
	w := PriorityWeight(ts.t.Priority)
	lv := priorityLevel(ts.t.Priority)
	starts := []float64{math.Floor(oc.lo)}
	for s := math.Ceil((oc.lo-L)/step) * step; s < math.Floor(oc.lo); s += step {
		starts = append(starts, s)
	}
	for _, v := range ts.vis {
		vlo, vhi := v.lo+guardS, v.hi-guardS
		for _, s := range starts {
			n := int(math.Ceil((oc.hi-E-s)/L-1e-9)) + 1
			n = max(n, 1)
			if s < vlo || s+float64(n)*L > vhi || float64(n)*L < g.MinBlockS {
				continue
			}
			x := en.airmassTie(ts, s+0.5*float64(n)*L)
			cs = append(cs, candidate{
				start: s, end: s + float64(n)*L, acq: ts.t.AcquireS, acqFloor: en.darkStart(v.lo),
				target: ts.idx, occ: occID, n: n,
				val: at(lv, w*goalValue(1, 1), -int64(math.Round(1000*float64(n)*(x-1)))),
			})
		}
	}
	return cs
}

// darkStart returns the start of the dark span containing u.
func (en *engine) darkStart(u float64) float64 {
	for _, d := range en.dark {
		if d.lo <= u+1e-6 && u <= d.hi+1e-6 {
			return d.lo
		}
	}
	return u
}

// airmassTie returns the target's airmass at u for the tie-breaker,
// interpolated linearly between values on the StepS grid, each computed once
// per target on the fast path.
func (en *engine) airmassTie(ts *targetState, u float64) float64 {
	step := en.opt.StepS
	x := (u - en.from) / step
	i := int(math.Floor(x))
	if i < 0 || i+1 >= len(ts.amGrid) {
		return en.airmassAt(ts, u)
	}
	for _, k := range [2]int{i, i + 1} {
		if ts.amGrid[k] == 0 {
			ts.amGrid[k] = en.airmassAt(ts, en.from+float64(k)*step)
		}
	}
	f := x - float64(i)
	return ts.amGrid[i] + f*(ts.amGrid[i+1]-ts.amGrid[i])
}

// airmassAt returns the target's airmass at u on the fast path (40 below
// the horizon, never used: blocks lie in observable intervals).
func (en *engine) airmassAt(ts *targetState, u float64) float64 {
	alt, _ := ts.track.AltAzUnix(u)
	if x, ok := ephem.Airmass(en.site.RefractedAltDeg(alt)); ok {
		return x
	}
	return 40
}

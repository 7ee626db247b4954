package planner

import (
	"context"
	"fmt"
	"math"
	"time"

	"phasecast/ephem"
)

// MaxWindowDays is the longest date range QueueWindows accepts: 366 days
// (a year, leap years included).
const MaxWindowDays = 366

// MaxWindowsPerGoal is the most windows QueueWindows returns for one goal;
// a longer list (a period of minutes over months) is refused with an error
// rather than cut.
const MaxWindowsPerGoal = 100000

// WindowRequest asks for the queue windows of targets over a date range.
type WindowRequest struct {
	Site ephem.Site
	// From and To bound the range (UTC); To − From at most MaxWindowDays
	// days.
	From, To time.Time
	// Targets with the goals to list (every goal of each, as ResolveGoals
	// gives them; a "quadratures" goal gives two lists).
	Targets     []Target
	Constraints Constraints
	// Options: StepS is the constraint scan step (default 60 s; edges are
	// refined to 1 ms whatever the step); MaxOccurrences bounds the goal
	// windows per goal and night (default 2000). The other fields are not
	// used.
	Options Options
	// Instrument, when set, sizes the exposures of goals with an SNR on
	// targets with a Band for each window's own sky (at its middle), with
	// the night planner's rule (SizeExposure); Exposures then counts
	// exposures of that length.
	Instrument *Instrument
}

// QueueWindow is one interval in which a goal can be observed.
type QueueWindow struct {
	Interval       // UTC, edges to about 0.1 s (see the notes in windows_core.go)
	Cycle    int64 // the orbital cycle of the window's centre
	// PhaseErr is the ephemeris' 1σ phase uncertainty at the window's
	// middle (ephem.Ephemeris.PhaseErr); Uncertain is true when the rule
	// of the night planner flags it (UncertaintyRule: 3σ beyond the goal's
	// half-width, the window's place on the orbit then in doubt). Windows
	// the rule refuses are not listed (GoalWindows.Refused).
	PhaseErr  float64
	Uncertain bool
	// AirmassMin and AirmassMax over the window (fast path, 60 s samples
	// and both ends).
	AirmassMin, AirmassMax float64
	// Exposures is the number of back-to-back exposures (exposure plus
	// overhead each) that lie entirely inside the window: a conservative
	// count (the night planner also admits exposures whose mid-time, not
	// their whole length, lies in the phase window).
	Exposures int
	// Sizing is the exposure sized for the goal's S/N at the window's
	// middle (nil without an instrument, a band or an S/N goal). When
	// Sizing.Reached is false the smear limit stops the exposure short of
	// the S/N: Sizing.SNR is the best reachable and Exposures is 0.
	Sizing *ExposureSizing
}

// GoalWindows is the list of queue windows of one goal of one target.
type GoalWindows struct {
	Target      string
	TargetIndex int  // index in WindowRequest.Targets
	GoalIndex   int  // index in the target's ResolveGoals
	Goal        Goal // resolved (Center set)
	Windows     []QueueWindow
	// Refused counts the windows left out because the night planner would
	// refuse them (UncertaintyRule: 1σ above Options.MaxPhaseErr), and
	// RefusedNote says why, in words.
	Refused     int
	RefusedNote string
}

// QueueWindows lists, for every goal of every target, each UTC interval in
// [From, To] in which the goal's phase window is open and the target is
// observable under the constraints (the Sun below the twilight altitude and
// every constraint of the night planner met), merged (windows that touch,
// e.g. across local noon in polar night, are one) and sorted by start, with
// the phase uncertainty at each window.
//
// The range is cut into days at the site's mean solar noon (12 h − λ/15°
// UTC, λ east longitude); the days' skies are computed in parallel, then the
// targets in parallel, on a bounded pool of GOMAXPROCS workers. The output
// is in request order (target, then goal) whatever the scheduling.
// progress (may be nil) is called with (done, total) as days and targets
// complete, from one goroutine at a time; when ctx is cancelled the function
// returns ctx.Err() within about one target's work.
//
// Bad input gives an *ephem.InputError naming the field; a goal with more
// than MaxWindowsPerGoal windows, or more than Options.MaxOccurrences in one
// day, is an error too.
func QueueWindows(ctx context.Context, req WindowRequest, progress func(done, total int)) ([]GoalWindows, error) {
	base, err := newLeanBase(req.Site, req.Constraints, req.Options)
	if err != nil {
		return nil, err
	}
	from, to := unixSec(req.From), unixSec(req.To)
	if !(to > from) || to-from > MaxWindowDays*86400 {
		return nil, &ephem.InputError{Field: "to", Value: req.To.UTC().Format(time.RFC3339),
			Accepted: fmt.Sprintf("an instant after from (%s), at most %d days later", req.From.UTC().Format(time.RFC3339), MaxWindowDays)}
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
	bounds := dayBounds(from, to, req.Site.LonEastDeg)
	nights := make([]*engine, len(bounds)-1)
	pc := &progressCounter{total: len(nights) + len(targets), fn: progress}
	err = forEach(ctx, len(nights), func(k int) error {
		nights[k] = base.night(bounds[k], bounds[k+1])
		return nil
	}, pc.tick)
	if err != nil {
		return nil, err
	}
	frame := ephem.NewSkyFrame(req.Site, timeOf(from-3600), timeOf(to+3600))
	perTarget := make([][]GoalWindows, len(targets))
	err = forEach(ctx, len(targets), func(i int) error {
		ts := targets[i]
		ts.track = frame.Track(ts.star)
		clock := newSparseClock(req.Site, ts.star, ts.t.Ephem, bounds)
		lists := make([]GoalWindows, len(ts.goals))
		for gi, g := range ts.goals {
			lists[gi] = GoalWindows{Target: ts.t.Name, TargetIndex: i, GoalIndex: gi, Goal: g}
		}
		for _, en := range nights {
			if err := ctx.Err(); err != nil {
				return err
			}
			spans, _, err := en.reach(ts, &clock, 0)
			if err != nil {
				return err
			}
			for gi, rs := range spans {
				for _, r := range rs {
					var refused string
					lists[gi].Windows, refused = appendWindow(lists[gi].Windows, en, ts, &clock, gi, r, req.Instrument)
					if refused != "" {
						lists[gi].Refused++
						lists[gi].RefusedNote = refused
					}
				}
				if len(lists[gi].Windows) > MaxWindowsPerGoal {
					return fmt.Errorf("target %q goal at phase %.4f: more than %d windows in the range; shorten the range", ts.t.Name, ts.goals[gi].Center, MaxWindowsPerGoal)
				}
			}
		}
		perTarget[i] = lists
		return nil
	}, pc.tick)
	if err != nil {
		return nil, err
	}
	var out []GoalWindows
	for _, l := range perTarget {
		out = append(out, l...)
	}
	return out, nil
}

// appendWindow adds reach span r of goal gi as a queue window, merging it
// with the previous window when they touch (within 1 ms, e.g. across a day
// boundary). With an instrument, an S/N goal's exposure is sized at the
// window's middle.
//
// A window the night planner would refuse (UncertaintyRule) is not added
// (with the window it merged into); the reason is returned instead.
func appendWindow(ws []QueueWindow, en *engine, ts *targetState, clock *phaseClock, gi int, r reachSpan, in *Instrument) ([]QueueWindow, string) {
	g := ts.goals[gi]
	lo, hi := r.lo, r.hi
	xlo, xhi := en.airmassRangeLean(ts, lo, hi)
	cycle := r.occ.cycle
	if n := len(ws); n > 0 && lo-unixSec(ws[n-1].End) <= 1e-3 && ws[n-1].Cycle == cycle {
		prev := ws[n-1]
		ws = ws[:n-1]
		lo = unixSec(prev.Start)
		xlo, xhi = math.Min(xlo, prev.AirmassMin), math.Max(xhi, prev.AirmassMax)
	}
	mid := 0.5 * (lo + hi)
	pe := ts.t.Ephem.PhaseErr(clock.bjd(mid))
	trust := UncertaintyRule(pe, g.HalfWidth, en.opt.MaxPhaseErr)
	if trust >= PhaseRefused {
		return ws, UncertaintyNote(pe, g.HalfWidth, en.opt.MaxPhaseErr)
	}
	var sz *ExposureSizing
	if in != nil && SizesBySNR(ts.t, g) {
		// The middle of an observable window: only an unmodelled sky (a
		// twilight brighter than the model's range) fails, and the window
		// is then listed without a sizing.
		if s, err := SizeExposure(en.site, ts.t, g, *in, timeOf(mid)); err == nil {
			sz = &s
			g.ExposureS = s.ExposureS
		}
	}
	L := g.ExposureS + g.OverheadS
	n := 0
	if d := hi - lo; d >= g.ExposureS && (sz == nil || sz.Reached) {
		n = int(math.Floor((d + g.OverheadS) / L))
	}
	return append(ws, QueueWindow{
		Interval: span{lo, hi}.interval(), Cycle: cycle,
		PhaseErr: pe, Uncertain: trust == PhaseFlagged,
		AirmassMin: xlo, AirmassMax: xhi, Exposures: n, Sizing: sz,
	}), ""
}

// dayBounds cuts [from, to] (Unix seconds) at the site's mean solar noons.
func dayBounds(from, to, lonEastDeg float64) []float64 {
	off := 43200 - lonEastDeg/15*3600 // mean solar noon, seconds after 0h UTC
	first := math.Floor((from-off)/86400)*86400 + off
	b := []float64{from}
	for u := first + 86400; u < to; u += 86400 {
		if u > from+1 {
			b = append(b, u)
		}
	}
	return append(b, to)
}

// checkTargets validates the targets (as the night planner does, names
// unique) and resolves their goals.
func checkTargets(list []Target) ([]*targetState, error) {
	if len(list) == 0 {
		return nil, &ephem.InputError{Field: "targets", Value: "none", Accepted: "at least one target"}
	}
	names := map[string]int{}
	out := make([]*targetState, len(list))
	for i, t := range list {
		if err := validateTarget(i, t); err != nil {
			return nil, err
		}
		if j, dup := names[t.Name]; dup {
			return nil, &ephem.InputError{Field: fmt.Sprintf("targets[%d].name", i), Value: fmt.Sprintf("%q", t.Name),
				Accepted: fmt.Sprintf("a name not used by another target (targets[%d] has it)", j)}
		}
		names[t.Name] = i
		goals, err := t.ResolveGoals()
		if err != nil {
			return nil, err
		}
		out[i] = &targetState{idx: i, t: t, goals: goals, star: t.Star()}
	}
	return out, nil
}

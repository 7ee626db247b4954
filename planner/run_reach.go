package planner

import (
	"math"
	"sort"
	"time"
)

// GoalNight is one night on which a goal can be reached: the stretches of
// the night in which its phase window is open and the target observable
// (every constraint met, in the night's dark time), how long they last
// together, the most exposures one block can hold, and the airmass.
type GoalNight struct {
	Night    int        // index in RunRequest.Nights
	Windows  []Interval // UTC, in time order
	Duration time.Duration
	// Capacity is the most exposures one block can hold on the night, by
	// the night planner's rules (mid-times in the window, the block
	// observable, the acquisition in dark time), in continuous time: an
	// upper bound of what the planner's one-minute grid gives.
	Capacity int
	// AirmassMin and AirmassMax are over the windows (fast path).
	AirmassMin, AirmassMax float64
	// PhaseErr is the ephemeris' 1σ phase uncertainty in the night.
	PhaseErr float64
}

// GoalReach is the best-night search for one goal: every night of the run
// on which the goal can be reached (Capacity ≥ 1), best first: most of the
// goal's exposures per night (up to what it wants), then the lowest
// airmass, then the longest, then the earliest.
type GoalReach struct {
	GoalIndex int
	Goal      Goal
	Nights    []GoalNight
	// Unreachable, when no night can reach the goal, says why.
	Unreachable string
}

// NightRank is one night's standing for a target: Fraction is the sum over
// its goals of the share of each goal's per-night exposures the night can
// hold (min(Capacity, N)/N; 1 for "as many as fit" when reachable), Goals
// the number of goals it can reach at all, AirmassMin the lowest airmass
// over those windows.
type NightRank struct {
	Night      int
	Goals      int
	Fraction   float64
	AirmassMin float64
}

// TargetReach is the best-night search for one target.
type TargetReach struct {
	Target      string
	TargetIndex int
	Goals       []GoalReach
	// Ranking lists the nights on which at least one goal can be reached,
	// best first: highest Fraction, then lowest airmass, then earliest.
	Ranking []NightRank
}

// goalNightReach is the reach of one goal in one night: its stretches, the
// most exposures one block can hold, the phase uncertainty (uncertain: above
// Options.MaxPhaseErr, so the night planner will not schedule it) and the
// airmass range over the stretches.
type goalNightReach struct {
	spans     []reachSpan
	capacity  int
	phaseErr  float64
	uncertain bool // phase uncertainty above Options.MaxPhaseErr: not schedulable
	xlo, xhi  float64
}

// reachNight computes one night's reach for every goal of every target,
// indexed [target][goal].
//
// With an instrument, S/N goals' occurrences are sized (sizeReach) into
// sized, and each span's capacity counts exposures of its occurrence's sized
// length (none when the smear limit stops the S/N short).
func reachNight(en *engine, targets []*targetState, clocks []phaseClock, pad []float64, in *Instrument, sized map[occKey]ExposureSizing) ([][]goalNightReach, error) {
	out := make([][]goalNightReach, len(targets))
	for ti, ts := range targets {
		spans, pe, err := en.reach(ts, &clocks[ti], pad[ti])
		if err != nil {
			return nil, err
		}
		out[ti] = make([]goalNightReach, len(ts.goals))
		for gi, rs := range spans {
			sizeReach(en.site, in, ts, gi, rs, sized)
			r := goalNightReach{spans: rs, phaseErr: pe, uncertain: pe > en.opt.MaxPhaseErr, xlo: math.Inf(1), xhi: math.Inf(-1)}
			for _, s := range rs {
				g := ts.goals[gi]
				if sz, ok := sized[occKey{ts.idx, gi, s.occ.cycle}]; ok {
					if !sz.Reached {
						continue
					}
					g.ExposureS = sz.ExposureS
				}
				r.capacity = max(r.capacity, en.capacity(s, g, ts.t.AcquireS))
				lo, hi := en.airmassRangeLean(ts, s.lo, s.hi)
				r.xlo, r.xhi = math.Min(r.xlo, lo), math.Max(r.xhi, hi)
			}
			if r.uncertain {
				r.capacity = 0
			}
			out[ti][gi] = r
		}
	}
	return out, nil
}

// buildReach turns the nights' reach into the best-night search report.
func buildReach(targets []*targetState, goals [][]runGoal, reach [][][]goalNightReach) []TargetReach {
	out := make([]TargetReach, len(targets))
	for ti, ts := range targets {
		tr := TargetReach{Target: ts.t.Name, TargetIndex: ti}
		ranks := map[int]*NightRank{}
		for gi, rg := range goals[ti] {
			gr := GoalReach{GoalIndex: gi, Goal: rg.g}
			anySpan, allUncertain := false, true
			for k := range reach {
				r := reach[k][ti][gi]
				anySpan = anySpan || len(r.spans) > 0
				allUncertain = allUncertain && r.uncertain
				if r.capacity < 1 {
					continue
				}
				gn := GoalNight{Night: k, Capacity: r.capacity, AirmassMin: r.xlo, AirmassMax: r.xhi, PhaseErr: r.phaseErr}
				for _, s := range r.spans {
					gn.Windows = append(gn.Windows, span{s.lo, s.hi}.interval())
					gn.Duration += time.Duration((s.hi - s.lo) * 1e9)
				}
				gr.Nights = append(gr.Nights, gn)
				nr := ranks[k]
				if nr == nil {
					nr = &NightRank{Night: k, AirmassMin: math.Inf(1)}
					ranks[k] = nr
				}
				nr.Goals++
				nr.Fraction += float64(min(r.capacity, rg.need())) / float64(rg.need())
				nr.AirmassMin = math.Min(nr.AirmassMin, r.xlo)
			}
			sort.SliceStable(gr.Nights, func(a, b int) bool {
				x, y := gr.Nights[a], gr.Nights[b]
				fx, fy := min(x.Capacity, rg.need()), min(y.Capacity, rg.need())
				switch {
				case fx != fy:
					return fx > fy
				case x.AirmassMin != y.AirmassMin:
					return x.AirmassMin < y.AirmassMin
				case x.Duration != y.Duration:
					return x.Duration > y.Duration
				}
				return x.Night < y.Night
			})
			if len(gr.Nights) == 0 {
				switch {
				case allUncertain:
					gr.Unreachable = "the ephemeris' phase uncertainty is above the limit on every night: refine T0 and P first"
				case !anySpan:
					gr.Unreachable = "on no night of the run is the target observable while its phase window is open"
				default:
					gr.Unreachable = "on no night of the run is an observable stretch of the phase window long enough for one exposure with its acquisition"
				}
			}
			tr.Goals = append(tr.Goals, gr)
		}
		for _, nr := range ranks {
			tr.Ranking = append(tr.Ranking, *nr)
		}
		sort.Slice(tr.Ranking, func(a, b int) bool {
			x, y := tr.Ranking[a], tr.Ranking[b]
			switch {
			case x.Fraction != y.Fraction:
				return x.Fraction > y.Fraction
			case x.AirmassMin != y.AirmassMin:
				return x.AirmassMin < y.AirmassMin
			}
			return x.Night < y.Night
		})
		out[ti] = tr
	}
	return out
}

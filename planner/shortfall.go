package planner

import (
	"fmt"
	"math"
	"strconv"
)

// shortfalls warns, in numbers, for every goal whose blocks tonight hold
// fewer exposures than it wants (WarnShortfall): the mid-time span that N
// exposures need, (N − 1) × L with L = exposure + readout, against the
// goal's window W (2 × half-width × P) and the longest stretch of its
// windows tonight in which mid-times are observable (the exposure and its
// readout inside an observable interval), so the observer sees whether the
// window, the sky or the rest of the schedule stops it. For a goal whose
// exposure is sized for its S/N, the longest sized exposure is used.
func (en *engine) shortfalls(targets []*targetState, occs []occMeta, blocks []Block) []Warning {
	type key struct{ t, g int }
	got := map[key]int{}
	for _, b := range blocks {
		if !b.Filler {
			k := key{b.TargetIndex, b.GoalIndex}
			got[k] = max(got[k], b.N)
		}
	}
	var out []Warning
	for _, ts := range targets {
		P := ts.t.Ephem.PeriodDays
		for gi, g := range ts.goals {
			// An S/N goal's exposure, and so its wanted count, is sized
			// per window: the longest exposure is the one that fell short.
			for _, m := range occs {
				if m.target == ts.idx && m.goal == gi && m.sized {
					g.ExposureS = math.Max(g.ExposureS, m.exposureS)
				}
			}
			n, ok := got[key{ts.idx, gi}]
			N := g.Wanted(P)
			if !ok || n >= N {
				continue
			}
			E, L := g.ExposureS, g.ExposureS+g.OverheadS
			needS := float64(N-1) * L
			W := g.WindowS(P)
			avail := 0.0
			for _, m := range occs {
				if m.target != ts.idx || m.goal != gi {
					continue
				}
				for _, v := range ts.vis {
					lo, hi := math.Max(m.occ.lo, v.lo+E/2), math.Min(m.occ.hi, v.hi-(L-E/2))
					avail = math.Max(avail, hi-lo)
				}
			}
			msg := fmt.Sprintf("goal at phase %.3f: %d of %d exposures wanted: the mid-times of %d exposures of %s s + %s s readout span %s s; the window is %s s (±%s in phase)",
				g.Center, n, N, N, fmtNum(E), fmtNum(g.OverheadS), fmtSeconds(needS), fmtSeconds(W), fmtNum(g.HalfWidth))
			switch {
			case W < needS:
				msg += ", too short for them"
			case avail < needS:
				msg += fmt.Sprintf(", of which %s s is observable tonight %s", fmtSeconds(math.Max(avail, 0)), en.limitsText())
			default:
				msg += fmt.Sprintf(" and %s s of it is observable tonight: the rest of the window went to blocks worth more", fmtSeconds(avail))
			}
			out = append(out, Warning{Code: WarnShortfall, Target: ts.t.Name, GoalIndex: gi, Message: msg})
		}
	}
	return out
}

// limitsText names the night's airmass limit for a shortfall message.
func (en *engine) limitsText() string {
	if en.c.MaxAirmass > 0 {
		return "at airmass ≤ " + fmtNum(en.c.MaxAirmass) + " and the other limits"
	}
	return "within the limits"
}

// fmtSeconds formats a duration in whole seconds with thousands separators
// (1264.4 → "1,264").
func fmtSeconds(s float64) string {
	v := strconv.FormatInt(int64(math.Round(s)), 10)
	neg := len(v) > 0 && v[0] == '-'
	if neg {
		v = v[1:]
	}
	var b []byte
	for i := range len(v) {
		if i > 0 && (len(v)-i)%3 == 0 {
			b = append(b, ',')
		}
		b = append(b, v[i])
	}
	if neg {
		return "-" + string(b)
	}
	return string(b)
}

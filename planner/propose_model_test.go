package planner

import (
	"math"
	"math/rand/v2"
	"testing"
)

// bruteGoal enumerates every clear/lost outcome of the nights (2^K) and
// returns E[min(X, N)] and P(X ≥ N), X the exposures of the clear nights:
// the weather model by definition, against which the dynamic programming is
// checked.
func bruteGoal(c []int, N int, p float64) (e, reach float64) {
	K := len(c)
	for mask := 0; mask < 1<<K; mask++ {
		pr, x := 1.0, 0
		for k := range K {
			if mask&(1<<k) != 0 {
				pr *= p
				x += c[k]
			} else {
				pr *= 1 - p
			}
		}
		e += pr * float64(min(x, N))
		if x >= N {
			reach += pr
		}
	}
	return e, reach
}

func TestProposalDPMatchesEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(14, 5))
	for trial := range 200 {
		K, N := 1+r.IntN(10), 1+r.IntN(12)
		p := r.Float64()
		c := make([]int, K)
		dist := []float64{1}
		dist = append(dist, make([]float64, N)...)
		gainSum := 0.0
		for k := range c {
			c[k] = r.IntN(6)
			gainSum += expectedGain(dist, c[k], p)
			dist = addNight(dist, c[k], p)
		}
		wantE, wantP := bruteGoal(c, N, p)
		gotE := 0.0
		for s, pr := range dist {
			gotE += float64(s) * pr
		}
		if math.Abs(gotE-wantE) > 1e-12 || math.Abs(dist[N]-wantP) > 1e-12 || math.Abs(gainSum-wantE) > 1e-12 {
			t.Fatalf("trial %d c=%v N=%d p=%g: DP E=%.15f P=%.15f (gains sum %.15f), enumeration E=%.15f P=%.15f",
				trial, c, N, p, gotE, dist[N], gainSum, wantE, wantP)
		}
	}
}

func TestProposalJointMatchesEnumeration(t *testing.T) {
	r := rand.New(rand.NewPCG(14, 6))
	for trial := range 100 {
		K, G := 1+r.IntN(9), 1+r.IntN(3)
		p := r.Float64()
		flat := make([]runGoal, G)
		for g := range flat {
			flat[g] = runGoal{N: 1 + r.IntN(6)}
		}
		c := make([][]int, K)
		joint := map[string]jointState{jointKey(make([]int, G)): {counts: make([]int, G), p: 1}}
		for k := range c {
			c[k] = make([]int, G)
			for g := range c[k] {
				c[k][g] = r.IntN(4)
			}
			joint = addJointNight(joint, c[k], flat, p)
		}
		want := 0.0
		for mask := 0; mask < 1<<K; mask++ {
			pr, x := 1.0, make([]int, G)
			for k := range K {
				if mask&(1<<k) != 0 {
					pr *= p
					for g := range x {
						x[g] += c[k][g]
					}
				} else {
					pr *= 1 - p
				}
			}
			ok := true
			for g := range x {
				ok = ok && x[g] >= flat[g].N
			}
			if ok {
				want += pr
			}
		}
		if got := allReach(joint, flat, nil); math.Abs(got-want) > 1e-12 {
			t.Fatalf("trial %d: joint P(all reach) = %.15f, enumeration %.15f", trial, got, want)
		}
	}
}

// optimumNights is the true minimum number of nights whose exposures reach
// every goal's N (exhaustive search; −1 when none does).
func optimumNights(c [][]int, need []int) int {
	best := -1
	for mask := 1; mask < 1<<len(c); mask++ {
		x := make([]int, len(need))
		n := 0
		for k := range c {
			if mask&(1<<k) != 0 {
				n++
				for g := range x {
					x[g] += c[k][g]
				}
			}
		}
		ok := true
		for g := range x {
			ok = ok && x[g] >= need[g]
		}
		if ok && (best < 0 || n < best) {
			best = n
		}
	}
	return best
}

func TestProposalGreedyAgainstOptimum(t *testing.T) {
	r := rand.New(rand.NewPCG(14, 7))
	cases, equal, worst := 0, 0, 0
	for trial := range 300 {
		K, G := 2+r.IntN(9), 1+r.IntN(3)
		need := make([]int, G)
		flat := make([]runGoal, G)
		for g := range need {
			need[g] = 1 + r.IntN(5)
			flat[g] = runGoal{N: need[g], w: 1}
		}
		c := make([][]int, K)
		for k := range c {
			c[k] = make([]int, G)
			for g := range c[k] {
				c[k][g] = r.IntN(4)
			}
		}
		opt := optimumNights(c, need)
		if opt < 0 {
			continue
		}
		nights, _ := NightsFrom(2027, 3, 1, K)
		out := &Proposal{Request: ProposalRequest{Nights: nights}}
		choose(out, c, flat, 0.9)
		// The greedy cover reaches every N and never beats the optimum.
		if out.ClearNights < opt {
			t.Fatalf("trial %d c=%v need=%v: greedy %d nights, below the optimum %d", trial, c, need, out.ClearNights, opt)
		}
		cases++
		if out.ClearNights == opt {
			equal++
		}
		worst = max(worst, out.ClearNights-opt)
		last := out.Picks[out.ClearNights-1]
		for g := range need {
			if last.Clear[g] != need[g] || last.ReachProb[g] != 1 {
				t.Fatalf("trial %d: goal %d has %d of %d after the clear nights (P %g)", trial, g, last.Clear[g], need[g], last.ReachProb[g])
			}
		}
		if out.WeatherNights != out.ClearNights || !out.WeatherMet {
			t.Fatalf("trial %d: no loss, but weather nights %d (met %v) against clear %d", trial, out.WeatherNights, out.WeatherMet, out.ClearNights)
		}
	}
	t.Logf("greedy equals the optimum in %d of %d cases, worst %d night(s) above", equal, cases, worst)
	if cases < 100 {
		t.Fatalf("only %d coverable cases", cases)
	}
}

// A hand-made case: one goal of N = 4, nights giving 2, 4, 1 and 2
// exposures. With a clear sky the 4-night alone is enough. With a loss of ½
// and confidence 0.9 the margin adds the 2-nights, then the 1-night; with
// all four, X ≥ 4 when the 4-night is clear (½) or, when it is lost, when
// both 2-nights are clear (¼): P = ½ + ½·¼ = 0.625 < 0.9, so the nights run
// out first.
func TestProposalMarginByHand(t *testing.T) {
	c := [][]int{{2}, {4}, {1}, {2}}
	nights, _ := NightsFrom(2027, 3, 1, len(c))
	out := &Proposal{Request: ProposalRequest{Nights: nights, Loss: 0.5}}
	choose(out, c, []runGoal{{N: 4, w: 1}}, 0.9)
	if out.ClearNights != 1 || out.Picks[0].Night != 1 {
		t.Fatalf("clear: %d nights, first pick night %d; want 1 night, night 1 (4 exposures)", out.ClearNights, out.Picks[0].Night)
	}
	if out.WeatherMet || out.WeatherNights != 4 {
		t.Fatalf("weather: %d nights, met %v; want all 4 nights, not met", out.WeatherNights, out.WeatherMet)
	}
	if got := out.Picks[3].ReachProb[0]; math.Abs(got-0.625) > 1e-15 {
		t.Errorf("P(X ≥ 4) after every night = %.15f, want 0.625", got)
	}
	// Expected min(X, 4) after every night, by enumeration of the 16 cases.
	want, _ := bruteGoal([]int{4, 2, 2, 1}, 4, 0.5)
	if got := out.Picks[3].Expected[0]; math.Abs(got-want/4) > 1e-15 {
		t.Errorf("expected coverage %.15f, want %.15f", got, want/4)
	}
	// A 2-night adds ½·(½·2) = ½ exposure to E[min(X, 4)] after the
	// 4-night, the 1-night ¼: the 2-nights come first.
	if out.Picks[1].Gives[0] != 2 || out.Picks[3].Gives[0] != 1 {
		t.Errorf("margin order gives %d, %d, %d; want 2, 2, 1", out.Picks[1].Gives[0], out.Picks[2].Gives[0], out.Picks[3].Gives[0])
	}
}

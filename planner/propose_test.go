package planner_test

import (
	"context"
	"errors"
	"math"
	"os"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// proposeSite is the invented site of planner/testdata/run_targets.csv.
var proposeSite = ephem.Site{LatDeg: -27.85, LonEastDeg: -69.12, ElevM: 2650}

func proposeTargets(tb testing.TB, n int) []planner.Target {
	tb.Helper()
	return targetsFile(tb, "testdata/run_targets.csv", n)
}

// targetsFile reads a plan-command targets file of testdata, every target
// acquiring in 120 s and every goal wanting n exposures.
func targetsFile(tb testing.TB, path string, n int) []planner.Target {
	tb.Helper()
	fh, err := os.Open(path)
	if err != nil {
		tb.Fatal(err)
	}
	defer fh.Close()
	list, err := planner.ParseTargetsCSV(fh)
	if err != nil {
		tb.Fatal(err)
	}
	for i := range list {
		list[i].AcquireS = 120
		for k := range list[i].Goals {
			list[i].Goals[k].NExposures = n
		}
	}
	return list
}

func TestProposeRunTargets(t *testing.T) {
	nights, err := planner.NightsBetween(2026, 12, 1, 2026, 12, 20)
	if err != nil {
		t.Fatal(err)
	}
	loc := time.FixedZone("UTC-3", -3*3600)
	req := planner.ProposalRequest{Site: proposeSite, Zone: loc, Nights: nights, Targets: proposeTargets(t, 6)[:2],
		Constraints: planner.DefaultConstraints(), Loss: 0.3}
	p, err := planner.Propose(context.Background(), req)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Goals) != 4 || p.Solves != 20 {
		t.Fatalf("%d goals, %d solves; want 4 goals (two targets, two phases each), 20 solves", len(p.Goals), p.Solves)
	}
	if p.ClearNights < 1 || p.WeatherNights < p.ClearNights {
		t.Fatalf("clear nights %d, weather nights %d", p.ClearNights, p.WeatherNights)
	}
	// Replay the picks: the clear coverage is the capped sum of the gives,
	// and after ClearNights every goal that the range can meet is met.
	sum := make([]int, len(p.Goals))
	for i, pk := range p.Picks {
		for g, n := range pk.Gives {
			sum[g] += n
			if want := min(sum[g], p.Goals[g].Need); pk.Clear[g] != want {
				t.Fatalf("pick %d goal %d: clear %d, want %d", i, g, pk.Clear[g], want)
			}
		}
		if pk.Margin != (i >= p.ClearNights) {
			t.Errorf("pick %d: margin %v with %d clear nights", i, pk.Margin, p.ClearNights)
		}
	}
	unmet := map[int]bool{}
	for _, g := range p.Unmet {
		unmet[g] = true
	}
	at := p.Picks[p.ClearNights-1]
	for g, pg := range p.Goals {
		if !unmet[g] && at.Clear[g] != pg.Need {
			t.Errorf("goal %d (%s): %d of %d after the clear nights", g, pg.Target, at.Clear[g], pg.Need)
		}
		if unmet[g] && pg.Available >= pg.Need {
			t.Errorf("goal %d listed unmet with %d available of %d", g, pg.Available, pg.Need)
		}
	}
	if p.WeatherMet {
		for g, pr := range p.Picks[p.WeatherNights-1].ReachProb {
			if !unmet[g] && pr < 0.9 {
				t.Errorf("goal %d: P(reach) %.4f below 0.9 after the weather nights", g, pr)
			}
		}
	}
	// Each pick's gives are the night planner's own plan of that night:
	// check the first pick by planning its night with PlanNight.
	first := p.Picks[0]
	from, to := planner.NightWindow(first.Date.Year, first.Date.Month, first.Date.Day, loc)
	plan, err := planner.PlanNight(planner.NightRequest{Site: proposeSite, From: from, To: to, Targets: req.Targets, Constraints: req.Constraints})
	if err != nil {
		t.Fatal(err)
	}
	total, gives := 0, 0
	for _, b := range plan.Blocks {
		total += b.N
	}
	for _, n := range first.Gives {
		gives += n
	}
	if gives != total {
		t.Errorf("night %s: the pick gives %d exposures, PlanNight plans %d", first.Date, gives, total)
	}
	dates := p.Dates(p.WeatherNights)
	for i := 1; i < len(dates); i++ {
		if dates[i].String() <= dates[i-1].String() {
			t.Errorf("dates out of order: %v", dates)
		}
	}
}

func TestProposeBadInput(t *testing.T) {
	nights, _ := planner.NightsFrom(2026, 12, 1, 3)
	half := append([]planner.RunNight(nil), nights...)
	half[1].Part = planner.PartFirst
	zero := proposeTargets(t, 0)
	for _, tc := range []struct {
		name, field string
		edit        func(*planner.ProposalRequest)
	}{
		{"ErrLossAbove", "loss", func(r *planner.ProposalRequest) { r.Loss = 0.96 }},
		{"ErrLossNaN", "loss", func(r *planner.ProposalRequest) { r.Loss = math.NaN() }},
		{"ErrConfidence", "confidence", func(r *planner.ProposalRequest) { r.Confidence = 0.2 }},
		{"ErrHalfNight", "nights[1]", func(r *planner.ProposalRequest) { r.Nights = half }},
		{"ErrNoCount", "targets[0].goals[0].n_exposures", func(r *planner.ProposalRequest) { r.Targets = zero }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			req := planner.ProposalRequest{Site: proposeSite, Nights: nights, Targets: proposeTargets(t, 4), Constraints: planner.DefaultConstraints()}
			tc.edit(&req)
			_, err := planner.Propose(context.Background(), req)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != tc.field || ie.Accepted == "" {
				t.Fatalf("err = %v; want an InputError on %s", err, tc.field)
			}
		})
	}
}

func TestSemester(t *testing.T) {
	for _, tc := range []struct {
		name, first, last string
		n                 int
	}{{"2027A", "2027-02-01", "2027-07-31", 181}, {"2027b", "2027-08-01", "2028-01-31", 184}, {"2028A", "2028-02-01", "2028-07-31", 182}} {
		got, err := planner.Semester(tc.name)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != tc.n || got[0].String() != tc.first || got[len(got)-1].String() != tc.last {
			t.Errorf("%s: %d nights %s..%s; want %d nights %s..%s", tc.name, len(got), got[0], got[len(got)-1], tc.n, tc.first, tc.last)
		}
	}
	for _, bad := range []string{"", "2027", "2027C", "27A", "999A", "2027AB"} {
		var ie *ephem.InputError
		if _, err := planner.Semester(bad); !errors.As(err, &ie) || ie.Field != "semester" {
			t.Errorf("Semester(%q) = %v; want an InputError on semester", bad, err)
		}
	}
}

// TestObservableHours checks the hours against a plain count on the full
// path: ephem.ApparentPlace and Site.Horizontal every 20 s, the Sun from
// Site.SunAltDeg, refraction from Site.RefractedAltDeg.
func TestObservableHours(t *testing.T) {
	nights, _ := planner.NightsFrom(2026, 12, 1, 3)
	loc := time.FixedZone("UTC-3", -3*3600)
	list := proposeTargets(t, 1)
	c := planner.DefaultConstraints()
	got, err := planner.ObservableHours(context.Background(), proposeSite, loc, c, planner.Options{}, list, nights)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k, n := range nights {
		from, to := planner.NightWindow(n.Year, n.Month, n.Day, loc)
		for i, tg := range list {
			const step = 20 * time.Second
			count := 0
			for u := from; u.Before(to); u = u.Add(step) {
				if proposeSite.SunAltDeg(u) >= c.SunAltMaxDeg {
					continue
				}
				ra, dec := ephem.ApparentPlace(tg.Star(), u)
				h := proposeSite.Horizontal(ra, dec, u)
				x, ok := ephem.Airmass(proposeSite.RefractedAltDeg(h.AltDeg))
				if ok && x <= c.MaxAirmass {
					count++
				}
			}
			want := float64(count) * step.Hours()
			d := math.Abs(got[i].Hours[k] - want)
			worst = math.Max(worst, d)
			// Two edges per stretch, each good to one sample (20 s), and
			// the fast path against the full one.
			if d > 4*step.Hours()+0.02 {
				t.Errorf("%s night %s: %.4f h, count %.4f h", tg.Name, n, got[i].Hours[k], want)
			}
		}
	}
	t.Logf("worst difference %.4f h", worst)
}

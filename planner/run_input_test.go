package planner_test

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

func TestParseRunNights(t *testing.T) {
	t.Run("OK", func(t *testing.T) {
		got, err := planner.ParseRunNights("2026-03-14, 2026-03-15:first,2026-03-15:second,2026-03-20:second")
		if err != nil {
			t.Fatal(err)
		}
		var parts []string
		for _, n := range got {
			parts = append(parts, n.String())
		}
		if s := strings.Join(parts, ","); s != "2026-03-14,2026-03-15:first,2026-03-15:second,2026-03-20:second" {
			t.Errorf("got %s", s)
		}
	})
	for _, tc := range []struct{ name, in, field, accepted string }{
		{"ErrNotADate", "2026-03-14,tomorrow", "nights[1]", "YYYY-MM-DD"},
		{"ErrNoSuchDay", "2026-02-30", "nights[0]", "YYYY-MM-DD"},
		{"ErrBadPart", "2026-03-14:third", "nights[0]", ":first or :second"},
		{"ErrUnordered", "2026-03-14,2026-03-12", "nights[1]", "date order"},
		{"ErrRepeated", "2026-03-14,2026-03-14", "nights[1]", "does not overlap"},
		{"ErrHalfOverlapsFull", "2026-03-14,2026-03-14:second", "nights[1]", "does not overlap"},
		{"ErrHalvesReversed", "2026-03-14:second,2026-03-14:first", "nights[1]", "does not overlap"},
		{"ErrSpanTooLong", "2026-01-01,2027-01-03", "nights[1]", "at most 366 days"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := planner.ParseRunNights(tc.in)
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("err = %v, want an *ephem.InputError", err)
			}
			if ie.Field != tc.field || !strings.Contains(ie.Accepted, tc.accepted) {
				t.Errorf("field %q accepted %q; want %q and %q", ie.Field, ie.Accepted, tc.field, tc.accepted)
			}
		})
	}
}

func TestNightsFrom(t *testing.T) {
	got, err := planner.NightsFrom(2026, 12, 30, 3)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(got[0], got[1], got[2]) != "2026-12-30 2026-12-31 2027-01-01" {
		t.Errorf("got %v", got)
	}
	for _, n := range []int{0, 367} {
		t.Run(fmt.Sprintf("Err%d", n), func(t *testing.T) {
			_, err := planner.NightsFrom(2026, 1, 1, n)
			var ie *ephem.InputError
			if !errors.As(err, &ie) || ie.Field != "nights" || !strings.Contains(ie.Accepted, "1..366") {
				t.Errorf("err = %v, want nights 1..366", err)
			}
		})
	}
}

func TestPlanRunBadInput(t *testing.T) {
	ok := runScenario(9, 3, 3)
	for _, tc := range []struct {
		name  string
		edit  func(r *planner.RunRequest)
		field string
	}{
		{"ErrNoNights", func(r *planner.RunRequest) { r.Nights = nil }, "nights"},
		{"ErrTooManyNights", func(r *planner.RunRequest) {
			r.Nights, _ = planner.NightsFrom(2026, 1, 1, 366)
			r.Nights = append(r.Nights, planner.RunNight{Year: 2027, Month: 1, Day: 2})
		}, "nights"},
		{"ErrPast", func(r *planner.RunRequest) { r.Past = 4 }, "past"},
		{"ErrBins", func(r *planner.RunRequest) { r.Bins = 1 }, "bins"},
		{"ErrNoTargets", func(r *planner.RunRequest) { r.Targets = nil }, "targets"},
		{"ErrTwilight", func(r *planner.RunRequest) { r.Constraints.Twilight = "dusk" }, "twilight"},
		{"ErrSite", func(r *planner.RunRequest) { r.Site.LatDeg = 91 }, "lat"},
		{"ErrPriority", func(r *planner.RunRequest) {
			r.Targets = append([]planner.Target(nil), r.Targets...)
			r.Targets[1].Priority = 0
		}, `targets[1] "RS-02".priority`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			req := ok
			tc.edit(&req)
			_, err := planner.PlanRun(context.Background(), req, nil)
			var ie *ephem.InputError
			if !errors.As(err, &ie) {
				t.Fatalf("err = %v, want an *ephem.InputError", err)
			}
			if ie.Field != tc.field {
				t.Errorf("field %q, want %q (%v)", ie.Field, tc.field, err)
			}
		})
	}
}

// TestPlanRunProgressAndCancel checks the progress callback (done never
// decreasing, ending at total), that cancelling stops the run with
// ctx.Err(), and that two plans of the same request are the same.
func TestPlanRunProgressAndCancel(t *testing.T) {
	req := runScenario(5, 8, 4)
	t.Run("Progress", func(t *testing.T) {
		last, total := 0, 0
		_, err := planner.PlanRun(context.Background(), req, func(done, tot int) {
			if done < last || done > tot {
				t.Errorf("progress %d/%d after %d", done, tot, last)
			}
			last, total = done, tot
		})
		if err != nil {
			t.Fatal(err)
		}
		if last != total || total == 0 {
			t.Errorf("progress ended at %d/%d", last, total)
		}
	})
	t.Run("Cancelled", func(t *testing.T) {
		ctx, cancel := context.WithCancel(context.Background())
		calls := 0
		_, err := planner.PlanRun(ctx, req, func(done, total int) {
			calls++
			if done == total/2 {
				cancel()
			}
		})
		if !errors.Is(err, context.Canceled) {
			t.Errorf("err = %v, want context.Canceled", err)
		}
	})
	t.Run("Deterministic", func(t *testing.T) {
		a, b := mustPlanRun(t, req), mustPlanRun(t, req)
		if fmt.Sprint(a.Coverage, a.Value) != fmt.Sprint(b.Coverage, b.Value) {
			t.Fatal("two plans of the same run differ")
		}
		for k := range a.Nights {
			if fmt.Sprint(a.Nights[k].Plan.Blocks) != fmt.Sprint(b.Nights[k].Plan.Blocks) {
				t.Errorf("night %d differs between two plans", k)
			}
		}
	})
}

// TestRunHalfNights checks the halves of one date: adjacent, split at the
// middle of the dark time, the first ending and the second starting there.
func TestRunHalfNights(t *testing.T) {
	req := runScenario(4, 3, 1)
	req.Nights = []planner.RunNight{{Year: 2026, Month: 4, Day: 14, Part: planner.PartFirst}, {Year: 2026, Month: 4, Day: 14, Part: planner.PartSecond}}
	rp := mustPlanRun(t, req)
	a, b := rp.Nights[0], rp.Nights[1]
	if !a.To.Equal(b.From) {
		t.Fatalf("first half ends %v, second starts %v", a.To, b.From)
	}
	ev := ephem.Night(req.Site, 2026, 4, 14, req.Zone)
	mid := ev.NauticalDusk.Add(ev.NauticalDawn.Sub(*ev.NauticalDusk) / 2)
	if d := a.To.Sub(mid); d < -2*time.Minute || d > 2*time.Minute {
		t.Errorf("split at %v, the middle of nautical darkness is %v", a.To, mid)
	}
	for _, np := range rp.Nights {
		for _, bl := range np.Plan.Blocks {
			if bl.Start.Before(np.From) || bl.End.After(np.To) {
				t.Errorf("%s block %s %v–%v outside %v–%v", np.Night, bl.Target, bl.Start, bl.End, np.From, np.To)
			}
		}
	}
}

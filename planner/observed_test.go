package planner_test

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"phasecast/planner"
)

func TestParseObservedCSV(t *testing.T) {
	t.Run("OK", func(t *testing.T) {
		in := "# log of the first night\n" +
			"target,start_utc,exposure_s,n_exposures,overhead_s,status,note\n" +
			"RS-01,2026-04-15T01:00:00Z,300,3,20,ok,seeing 1.1\n" +
			"RS-02,2026-04-15T02:00:00-03:00,120,,,failed,clouds\n"
		got, err := planner.ParseObservedCSV(strings.NewReader(in))
		if err != nil {
			t.Fatal(err)
		}
		want := []struct {
			target string
			mid    string
			failed bool
		}{
			{"RS-01", "2026-04-15T01:02:30Z", false},
			{"RS-01", "2026-04-15T01:07:50Z", false},
			{"RS-01", "2026-04-15T01:13:10Z", false},
			{"RS-02", "2026-04-15T05:01:00Z", true},
		}
		if len(got) != len(want) {
			t.Fatalf("%d exposures, want %d", len(got), len(want))
		}
		for i, w := range want {
			if got[i].Target != w.target || got[i].Mid.Format(time.RFC3339) != w.mid || got[i].Failed != w.failed || got[i].Line != 3+i/3 {
				t.Errorf("exposure %d: %s %s failed=%v line %d, want %s %s failed=%v line %d", i, got[i].Target, got[i].Mid.Format(time.RFC3339), got[i].Failed, got[i].Line, w.target, w.mid, w.failed, 3+i/3)
			}
		}
	})
	t.Run("OKMidTimes", func(t *testing.T) {
		got, err := planner.ParseObservedCSV(strings.NewReader("mid_utc,target,exposure_s\n2026-04-15T03:00:00Z,RS-03,600\n"))
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != 1 || got[0].Mid.Format(time.RFC3339) != "2026-04-15T03:00:00Z" || got[0].ExposureS != 600 {
			t.Errorf("got %+v", got)
		}
	})
	for _, tc := range []struct {
		name, in string
		want     []string // substrings of the error, one per bad cell, in order
	}{
		{"ErrEmpty", "", []string{"line 1", "empty"}},
		{"ErrMissingColumns", "target,note\n", []string{"missing column exposure_s", "missing column start_utc or mid_utc"}},
		{"ErrBothTimes", "target,start_utc,mid_utc,exposure_s\n", []string{"not both"}},
		{"ErrUnknownColumn", "target,start_utc,exposure_s,filter\n", []string{"column 4 (filter)", "unknown column"}},
		{"ErrEveryBadCellListed",
			"target,start_utc,exposure_s,n_exposures\n" +
				"RS-01,2026-04-15T01:00:00Z,300,2\n" +
				",2026-04-15T01:00:00Z,300,1\n" +
				"RS-01,yesterday,300,1\n" +
				"RS-01,2026-04-15T01:00:00Z,-5,1\n" +
				"RS-01,2026-04-15T01:00:00Z,NaN,0\n",
			[]string{"line 3, column 1 (target)", "line 4, column 2 (start_utc)", "line 5, column 3 (exposure_s)", "line 6, column 3 (exposure_s)", "line 6, column 4 (n_exposures)"}},
		{"ErrMidWithRun", "target,mid_utc,exposure_s,n_exposures\nRS-01,2026-04-15T01:00:00Z,300,3\n", []string{"line 2", "one exposure per row"}},
		{"ErrStatus", "target,start_utc,exposure_s,status\nRS-01,2026-04-15T01:00:00Z,300,cloudy\n", []string{"line 2, column 4 (status)"}},
		{"ErrTooManyExposures", "target,start_utc,exposure_s,n_exposures\n" + strings.Repeat("RS-01,2026-04-15T01:00:00Z,1,10000\n", 21), []string{"line 22", "too many exposures"}},
		{"ErrFieldCount", "target,start_utc,exposure_s\nRS-01,2026-04-15T01:00:00Z\n", []string{"line 2", "has 2 fields"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := planner.ParseObservedCSV(strings.NewReader(tc.in))
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("err = %v, want a *TableError", err)
			}
			if got != nil {
				t.Errorf("%d exposures returned with the error; a bad log must give none", len(got))
			}
			msg := err.Error()
			pos := 0
			for _, w := range tc.want {
				i := strings.Index(msg[pos:], w)
				if i < 0 {
					t.Errorf("error lacks %q (in order):\n%s", w, msg)
					break
				}
				pos += i + len(w)
			}
		})
	}
}

// TestRunObservedChecks checks the run's checks of an observed log: a row
// naming no target, a time outside every night, a time in a night still to
// be planned: every bad row by line, and the whole log rejected.
func TestRunObservedChecks(t *testing.T) {
	req := runScenario(7, 4, 3)
	req.Past = 1
	log := "target,start_utc,exposure_s\n" +
		"RS-01,2026-04-15T02:00:00Z,300\n" + // fine: the first night
		"XX-99,2026-04-15T02:00:00Z,300\n" + // no such target
		"RS-02,2026-04-10T02:00:00Z,300\n" + // before the run
		"RS-03,2026-04-16T02:00:00Z,300\n" // the second night, still to be planned
	obs, err := planner.ParseObservedCSV(strings.NewReader(log))
	if err != nil {
		t.Fatal(err)
	}
	req.Observed = obs
	_, err = planner.PlanRun(context.Background(), req, nil)
	var te *planner.TableError
	if !errors.As(err, &te) {
		t.Fatalf("err = %v, want a *TableError", err)
	}
	want := []string{"line 3", "matches no target", "line 4", "outside every night", "line 5", "still to be planned"}
	msg := err.Error()
	pos := 0
	for _, w := range want {
		i := strings.Index(msg[pos:], w)
		if i < 0 {
			t.Fatalf("error lacks %q (in order):\n%s", w, msg)
		}
		pos += i + len(w)
	}
	if len(te.Cells) != 3 {
		t.Errorf("%d bad rows reported, want 3:\n%s", len(te.Cells), msg)
	}
}

// TestRunUsesObserved checks that what was observed counts. First, a run's
// first night taken exactly as planned: its exposures, given back as
// observed, are the night's coverage. Second, later plans follow what was
// taken: two targets whose windows coincide every night (only one fits), a
// run of two nights, the first past with one of them observed: the second
// night goes to the other one, whichever it is.
func TestRunUsesObserved(t *testing.T) {
	t.Run("CountedAsObserved", func(t *testing.T) {
		req := runScenario(3, 10, 4)
		first := mustPlanRun(t, req)
		done, err := first.MarkedExposures(first.MarkNight(0, planner.BlockDone))
		if err != nil {
			t.Fatal(err)
		}
		req.Observed, req.Past = done, 1
		rp := mustPlanRun(t, req)
		if rp.Nights[0].Plan != nil || !rp.Nights[0].Past {
			t.Fatal("the first night is past but still planned")
		}
		n := 0
		for ti, tc := range rp.Coverage {
			for gi, gc := range tc.Goals {
				was := first.Coverage[ti].Goals[gi].PerNight[0]
				if got := gc.PerNight[0]; got.Observed != was.Planned || got.Planned != 0 {
					t.Errorf("%s goal %d night 0: %d observed + %d planned, want the %d planned before as observed", tc.Target, gi, got.Observed, got.Planned, was.Planned)
				}
				n += gc.PerNight[0].Observed
			}
		}
		if n == 0 {
			t.Fatal("nothing observed: the case tests nothing")
		}
	})
	for _, seen := range []string{"CX", "CY"} {
		t.Run("Observed"+seen, func(t *testing.T) {
			req := conflictRun(2, []int{3, 3})
			at := time.Date(2026, 1, 10, 22, 30, 0, 0, time.UTC)
			req.Observed = []planner.Exposure{{Target: seen, Mid: at, ExposureS: 1500}}
			req.Past = 1
			rp := mustPlanRun(t, req)
			bl := rp.Nights[1].Plan.Blocks
			if len(bl) != 1 || bl[0].Target == seen {
				t.Fatalf("second night: %v; want one block of the target not observed", bl)
			}
			for _, tc := range rp.Coverage {
				if tc.Goals[0].Status != planner.CoverageMet {
					t.Errorf("%s is %s, want met", tc.Target, tc.Goals[0].Status)
				}
			}
		})
	}
}

// TestRunReplanAfterLostNight checks that replanning after a lost night is
// one call. Two targets whose windows coincide every night (only one fits),
// CX priority 1 and CY priority 2, two nights: the plan gives the first
// night to CX (CY's gain is the same on either night, CX's worth more) and
// the second to CY. The first night is lost: Replan(nil, 1) makes it past
// with nothing observed and moves CX to the second night.
func TestRunReplanAfterLostNight(t *testing.T) {
	rp := mustPlanRun(t, conflictRun(2, []int{1, 2}))
	if got := blockTargets(rp); got != "CX|CY" {
		t.Fatalf("plan %s, want CX|CY", got)
	}
	again, err := rp.Replan(context.Background(), nil, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !again.Nights[0].Past || again.Nights[0].Plan != nil || again.Request.Past != 1 {
		t.Fatal("the lost night is not past after Replan")
	}
	if got := blockTargets(again); got != "-|CX" {
		t.Errorf("after losing the first night: %s, want -|CX", got)
	}
	for _, tc := range again.Coverage {
		if nc := tc.Goals[0].PerNight[0]; nc != (planner.NightCount{}) {
			t.Errorf("%s: the lost night still counts %+v", tc.Target, nc)
		}
	}
	t.Run("DoneThenReplan", func(t *testing.T) {
		done, err := rp.Replan(context.Background(), rp.MarkNight(0, planner.BlockDone), 1, nil)
		if err != nil {
			t.Fatal(err)
		}
		if got := blockTargets(done); got != "-|CY" {
			t.Errorf("after the first night went as planned: %s, want -|CY", got)
		}
	})
	t.Run("ErrMarkAfterPast", func(t *testing.T) {
		_, err := rp.Replan(context.Background(), rp.MarkNight(1, planner.BlockDone), 1, nil)
		if err == nil || !strings.Contains(err.Error(), "marks[0].night") {
			t.Errorf("err = %v, want one naming marks[0].night", err)
		}
	})
	t.Run("ErrPastBackwards", func(t *testing.T) {
		_, err := again.Replan(context.Background(), nil, 0, nil)
		if err == nil || !strings.Contains(err.Error(), "past") {
			t.Errorf("err = %v, want one naming past", err)
		}
	})
	t.Run("ErrBadMark", func(t *testing.T) {
		_, err := rp.Replan(context.Background(), []planner.BlockMark{{Night: 0, Block: 999, Status: planner.BlockDone}}, 1, nil)
		if err == nil || !strings.Contains(err.Error(), "marks[0].block") {
			t.Errorf("err = %v, want one naming marks[0].block", err)
		}
	})
	t.Run("PartialBlock", func(t *testing.T) {
		if len(rp.Nights[0].Plan.Blocks) == 0 {
			t.Fatal("no block on the first night: the case tests nothing")
		}
		b := rp.Nights[0].Plan.Blocks[0]
		exps, err := rp.MarkedExposures([]planner.BlockMark{{Night: 0, Block: 0, Status: planner.BlockDone, Taken: 1}})
		if err != nil {
			t.Fatal(err)
		}
		want := b.Start.Add(time.Duration(b.ExposureS / 2 * 1e9))
		if len(exps) != 1 || !exps[0].Mid.Equal(want) || exps[0].Target != b.Target {
			t.Errorf("got %+v, want one exposure of %s at %v", exps, b.Target, want)
		}
	})
}

package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"strings"
	"testing"
	"time"

	"phasecast/planner/export"
	"phasecast/planner/export/exporttest"
)

// runCSV is an invented target list for the test site (27.85° S) in May.
const runCSV = `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority
Tarn-4,13:02:10,-38:40:00,2461120.41872,0.2311,0.25;0.75,0.05,300,20,1
Mirel-9,14:45:30,-22:05:00,2461118.90233,1.7420,0.25;0.75,0.03,600,20,1
Okapi-2,11:20:45,-51:12:00,2461121.10490,0.0958,0.0;0.5,0.06,180,15,2
Suvi-7,16:10:05,-12:30:00,2461119.77310,0.4105,0.25;0.75,0.04,240,20,3
`

var runArgs = []string{"--tz", "America/Santiago", "--dates", "2026-05-12,2026-05-13:first,2026-05-14"}

// decodeRun runs `run --json` and decodes the run document.
func decodeRun(t *testing.T, argv ...string) export.Run {
	t.Helper()
	stdout, stderr, code := runCmd(t, append(argv, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out export.Run
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, stdout)
	}
	return out
}

func TestRunCommandJSON(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	out := decodeRun(t, args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--n-exposures", "3", "--min-nights", "2", "--bins", "8"})...)
	if len(out.Nights) != 3 || out.Nights[1].Part != "first" || out.Nights[1].Date != "2026-05-13" {
		t.Fatalf("nights %+v", out.Nights)
	}
	blocks := 0
	for _, n := range out.Nights {
		for _, b := range n.Blocks {
			s, e := time.Time(b.Start), time.Time(b.End)
			from, to := time.Time(n.From), time.Time(n.To)
			if want := float64(b.NExposures) * (b.ExposureS + b.OverheadS); math.Abs(e.Sub(s).Seconds()-want) > 1e-6 {
				t.Errorf("%s block %s: %v long, want %g s", n.Date, b.Target, e.Sub(s), want)
			}
			if s.Before(from) || e.After(to) {
				t.Errorf("%s block %s %v–%v outside the night %v–%v", n.Date, b.Target, s, e, from, to)
			}
			blocks++
		}
	}
	if blocks == 0 {
		t.Fatal("no blocks")
	}
	// Coverage per night adds up to the blocks' exposures in each window;
	// here every total is checked against the per-night list.
	for _, c := range out.Targets {
		binTotal := 0
		for _, b := range c.Bins {
			binTotal += b.Observed + b.Planned
		}
		if len(c.Bins) != 8 {
			t.Errorf("%s: %d bins, want 8", c.Target, len(c.Bins))
		}
		for _, g := range c.Goals {
			sum := 0
			for _, pn := range g.PerNight {
				sum += pn.Planned
			}
			if len(g.PerNight) != 3 || sum != g.Planned {
				t.Errorf("%s goal %.2f: per-night %v does not add up to %d planned", c.Target, g.PhaseGoal, g.PerNight, g.Planned)
			}
		}
	}
	ranked := 0
	for _, c := range out.Targets {
		if len(c.BestNights) > 0 {
			ranked++
		}
	}
	if len(out.Targets) != 4 || ranked == 0 || out.Objective.Fraction <= 0 {
		t.Errorf("%d targets, %d with best nights, objective %+v", len(out.Targets), ranked, out.Objective)
	}
}

func TestRunCommandHuman(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	stdout, stderr, code := runCmd(t, args([]string{"run"}, siteArgs, []string{"--tz", "America/Santiago", "--from", "2026-05-12", "--nights", "2", "--targets", csvPath, "--compare"})...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"Run of 2 night(s)", "Night 1: Tue 2026-05-12, full night", "Night 2: Wed 2026-05-13", "Coverage:",
		"each night planned on its own", "Best nights per goal", "Caution"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

// TestRunCommandObserved checks the observed log: the nights it reaches
// are over (not planned again), its exposures count as observed; a bad log
// is rejected whole with every bad row by line.
func TestRunCommandObserved(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	t.Run("OK", func(t *testing.T) {
		logPath := writeFile(t, "log.csv", "target,start_utc,exposure_s,n_exposures,overhead_s\nTarn-4,2026-05-13T02:40:00Z,300,3,20\n")
		out := decodeRun(t, args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--observed", logPath})...)
		if !out.Nights[0].Past || out.Nights[1].Past || len(out.Nights[0].Blocks) != 0 {
			t.Fatalf("night 1 past %v with %d blocks, night 2 past %v", out.Nights[0].Past, len(out.Nights[0].Blocks), out.Nights[1].Past)
		}
		if len(out.Observed) != 3 {
			t.Errorf("%d observed exposures, want 3", len(out.Observed))
		}
		obs := 0
		for _, c := range out.Targets {
			for _, g := range c.Goals {
				obs += g.Observed
			}
		}
		if obs == 0 {
			t.Error("the observed exposures count in no goal")
		}
	})
	t.Run("ErrBadRows", func(t *testing.T) {
		logPath := writeFile(t, "log.csv", "target,start_utc,exposure_s\n"+
			"Tarn-4,2026-05-13T01:00:00Z,300\n"+
			"Nobody-1,2026-05-13T01:00:00Z,300\n"+
			"Tarn-4,2026-06-30T01:00:00Z,300\n")
		_, stderr, code := runCmd(t, args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--observed", logPath, "--past", "1"})...)
		if code != exitUsage {
			t.Errorf("exit %d, want %d", code, exitUsage)
		}
		for _, want := range []string{"--observed", "2 error(s)", "line 3", "matches no target", "line 4", "outside every night"} {
			if !strings.Contains(stderr, want) {
				t.Errorf("stderr lacks %q: %s", want, stderr)
			}
		}
	})
	t.Run("ErrBadCells", func(t *testing.T) {
		logPath := writeFile(t, "log.csv", "target,start_utc,exposure_s\nTarn-4,soon,300\nTarn-4,2026-05-13T01:00:00Z,0\n")
		_, stderr, code := runCmd(t, args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--observed", logPath})...)
		if code != exitUsage || !strings.Contains(stderr, "line 2, column 2 (start_utc)") || !strings.Contains(stderr, "line 3, column 3 (exposure_s)") {
			t.Errorf("exit %d, stderr %s", code, stderr)
		}
	})
}

func TestRunCommandBadFlags(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	for _, tc := range []struct {
		name  string
		extra []string
		want  string
	}{
		{"ErrUnordered", []string{"--dates", "2026-05-14,2026-05-12"}, "nights[1]"},
		{"ErrOverlap", []string{"--dates", "2026-05-14,2026-05-14:second"}, "does not overlap"},
		{"ErrBothForms", []string{"--dates", "2026-05-14", "--from", "2026-05-14"}, "not both"},
		{"ErrNoNights", []string{}, "missing the nights"},
		{"ErrTooMany", []string{"--from", "2026-05-14", "--nights", "367"}, "--nights 367"},
		{"ErrBins", []string{"--from", "2026-05-14", "--bins", "1"}, "--bins 1"},
		{"ErrBinGoalsAlone", []string{"--from", "2026-05-14", "--bin-goals"}, "--bin-goals needs --bins"},
		{"ErrPast", []string{"--from", "2026-05-14", "--nights", "2", "--past", "3"}, "--past 3"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, args([]string{"run"}, siteArgs, []string{"--tz", "UTC", "--targets", csvPath}, tc.extra)...)
			if code != exitUsage || !strings.Contains(stderr, tc.want) {
				t.Errorf("exit %d, stderr %q; want exit %d and %q", code, stderr, exitUsage, tc.want)
			}
		})
	}
}

// TestRunCommandBinGoals plans a light curve: with --bin-goals every
// target's goals are the phase bins.
func TestRunCommandBinGoals(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	out := decodeRun(t, args([]string{"run"}, siteArgs, []string{"--tz", "UTC", "--from", "2026-05-12", "--nights", "2", "--targets", csvPath, "--bins", "5", "--bin-goals"})...)
	for _, c := range out.Targets {
		if len(c.Goals) != 5 {
			t.Errorf("%s: %d goals, want the 5 bins", c.Target, len(c.Goals))
		}
		for i, g := range c.Goals {
			if want := (float64(i) + 0.5) / 5; math.Abs(g.PhaseGoal-want) > 1e-12 {
				t.Errorf("%s goal %d at %g, want %g", c.Target, i, g.PhaseGoal, want)
			}
		}
	}
}

// runRVCSV is runCSV with an RV goal on two targets.
const runRVCSV = `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority,rv_model,rv_k_kms,rv_sigma_kms,rv_want_rel_k
Tarn-4,13:02:10,-38:40:00,2461120.41872,0.2311,0.25;0.75,0.05,300,20,1,circular,85,6,0.02
Mirel-9,14:45:30,-22:05:00,2461118.90233,1.7420,0.25;0.75,0.03,600,20,1,,,,
Okapi-2,11:20:45,-51:12:00,2461121.10490,0.0958,0.0;0.5,0.06,180,15,2,eccentric,40,3,
`

// TestRunCommandPrecision checks the predicted precision in `run`: the JSON
// counts the target's planned exposures and, at the quadratures with the
// phase nearly known, σK is close to σv/√N (planner's closed form); the
// text shows the table.
func TestRunCommandPrecision(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runRVCSV)
	argv := args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--n-exposures", "4"})
	stdout, stderr, code := runCmd(t, append(argv, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out struct {
		Targets []struct {
			Target string `json:"target"`
			Goals  []struct {
				Planned int `json:"planned"`
			} `json:"goals"`
		} `json:"targets"`
		Precision []struct {
			Target string `json:"target"`
			RV     struct {
				After struct {
					N          int     `json:"n_exposures"`
					Determined bool    `json:"determined"`
					SigmaK     float64 `json:"sigma_k_kms"`
					RelK       float64 `json:"rel_k"`
				} `json:"after_plan"`
				PerNight  []json.RawMessage `json:"after_night"`
				NeedAfter *int              `json:"exposures_needed_after_plan"`
			} `json:"rv"`
		} `json:"precision"`
	}
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatal(err)
	}
	if len(out.Precision) != 2 || out.Precision[0].Target != "Tarn-4" || out.Precision[1].Target != "Okapi-2" {
		t.Fatalf("precision %+v, want Tarn-4 and Okapi-2", out.Precision)
	}
	p := out.Precision[0].RV
	planned := 0
	for _, g := range out.Targets[0].Goals {
		planned += g.Planned
	}
	if p.After.N < planned || planned == 0 || !p.After.Determined || len(p.PerNight) != 3 {
		t.Fatalf("Tarn-4: %+v with %d exposures in its quadrature windows", p, planned)
	}
	// Every exposure within ±0.05 of a quadrature: sin ≥ cos(2π·0.05), so
	// σv/√N ≤ σK ≤ σv/(√N·cos(2π·0.05)) when all N are in the windows.
	lo := 6 / math.Sqrt(float64(p.After.N))
	if p.After.N == planned && (p.After.SigmaK < lo*(1-1e-9) || p.After.SigmaK > lo/math.Cos(2*math.Pi*0.05)*1.05) {
		t.Errorf("σK %.4f km/s with %d exposures, want about σv/√N = %.4f", p.After.SigmaK, p.After.N, lo)
	}
	if p.NeedAfter == nil {
		t.Errorf("no exposures-needed figure for a wanted 2 %%")
	}
	stdout, _, code = runCmd(t, argv...)
	if code != 0 || !strings.Contains(stdout, "Predicted precision") || !strings.Contains(stdout, "≤ 2 %") {
		t.Errorf("text output lacks the precision table:\n%s", stdout)
	}
}

// TestRunCommandTimings gives measured timings of one target: it gets σP now
// and, with the reference events inside its planned blocks, a smaller σP
// after the plan; a timing of a target not in the list is refused by line.
func TestRunCommandTimings(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runRVCSV)
	tim := writeFile(t, "timings.csv", "target,time,std,err_s\n"+
		"Okapi-2,2460833.704900,BJD_TDB,5\nOkapi-2,2460977.404900,BJD_TDB,5\nOkapi-2,2461101.944900,BJD_TDB,5\nOkapi-2,2461119.188900,BJD_TDB,5\n")
	argv := args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--n-exposures", "0", "--timings", tim})
	stdout, stderr, code := runCmd(t, append(argv, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out struct {
		Precision []struct {
			Target string `json:"target"`
			Timing *struct {
				Planned int `json:"planned_timings"`
				Now     struct {
					N      int     `json:"n_timings"`
					SigmaP float64 `json:"sigma_p_days"`
				} `json:"now"`
				After struct {
					N      int     `json:"n_timings"`
					SigmaP float64 `json:"sigma_p_days"`
				} `json:"after_plan"`
			} `json:"timing"`
		} `json:"precision"`
	}
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatal(err)
	}
	var found bool
	for _, p := range out.Precision {
		if p.Target != "Okapi-2" || p.Timing == nil {
			continue
		}
		found = true
		tm := p.Timing
		if tm.Now.N != 4 || tm.Planned == 0 || tm.After.N != 4+tm.Planned || !(tm.After.SigmaP < tm.Now.SigmaP) {
			t.Errorf("Okapi-2 timing forecast %+v: want 4 timings now, planned ones, σP shrinking", *tm)
		}
	}
	if !found {
		t.Fatalf("no timing forecast for Okapi-2: %s", stdout)
	}
	stdout, _, code = runCmd(t, argv...)
	if code != 0 || !strings.Contains(stdout, "Predicted ephemeris precision") {
		t.Errorf("text output lacks the timing table:\n%s", stdout)
	}
	bad := writeFile(t, "bad.csv", "target,time,std,err_s\nNobody-1,2460833.7049,BJD_TDB,5\n")
	_, stderr, code = runCmd(t, args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--timings", bad})...)
	if code != 2 || !strings.Contains(stderr, "line 2") || !strings.Contains(stderr, "Nobody-1") {
		t.Errorf("unknown target: exit %d, %s", code, stderr)
	}
}

// TestRunCommandFormats checks --format csv and ics against the JSON
// document: one row and one event per block, the same every time.
func TestRunCommandFormats(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	base := args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath, "--name", "Test run"})
	out := decodeRun(t, base...)
	blocks := 0
	for _, n := range out.Nights {
		blocks += len(n.Blocks)
	}
	if blocks == 0 || out.Run != "Test run" {
		t.Fatalf("%d blocks, run %q", blocks, out.Run)
	}
	get := func(extra ...string) string {
		t.Helper()
		stdout, stderr, code := runCmd(t, append(append([]string{}, base...), extra...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		return stdout
	}
	rows, err := csv.NewReader(strings.NewReader(get("--format", "csv"))).ReadAll()
	if err != nil || len(rows) != blocks+1 || strings.Join(rows[0], ",") != strings.Join(export.RunCSVHeader, ",") {
		t.Errorf("CSV: %v, %d rows for %d blocks, header %v", err, len(rows), blocks, rows[0])
	}
	ics := get("--format", "ics", "--stamp", "2026-05-01T00:00:00Z")
	cal, err := exporttest.ParseICal(strings.NewReader(ics))
	if err != nil || len(cal.Events) != blocks || !cal.Events[0].Stamp.Equal(time.Date(2026, 5, 1, 0, 0, 0, 0, time.UTC)) {
		t.Errorf("iCalendar: %v, %d events for %d blocks", err, len(cal.Events), blocks)
	}
	if again := get("--format", "ics", "--stamp", "2026-05-01T00:00:00Z"); again != ics {
		t.Error("the same command gives another calendar")
	}
	if _, stderr, code := runCmd(t, append(append([]string{}, base...), "--format", "csv", "--json")...); code != 2 || !strings.Contains(stderr, "give one output format") {
		t.Errorf("--format csv with --json: exit %d, %s", code, stderr)
	}
}

package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// proposeArgs is a ten-night range at the test site with the run test's
// targets (runCSV).
var proposeArgs = []string{"--tz", "America/Santiago", "--from", "2026-05-10", "--to", "2026-05-19", "--n-exposures", "6"}

type proposeOutTest struct {
	Nights        int      `json:"nights"`
	ClearNights   int      `json:"clear_nights"`
	ClearDates    []string `json:"clear_dates"`
	WeatherNights int      `json:"weather_nights"`
	WeatherMet    bool     `json:"weather_met"`
	WeatherDates  []string `json:"weather_dates"`
	Goals         []struct {
		Target           string  `json:"target"`
		Need             int     `json:"need"`
		Reachable        bool    `json:"reachable"`
		Clear            int     `json:"clear"`
		ReachProbability float64 `json:"reach_probability"`
	} `json:"goals"`
	Picks []struct {
		Date   string `json:"date"`
		Margin bool   `json:"margin"`
		Gives  []int  `json:"gives"`
	} `json:"picks"`
	HoursFrom string `json:"hours_from"`
	Hours     []struct {
		Target string    `json:"target"`
		Hours  []float64 `json:"hours"`
	} `json:"hours"`
}

func TestProposeCommandJSON(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	stdout, stderr, code := runCmd(t, args([]string{"propose"}, siteArgs, proposeArgs, []string{"--targets", csvPath, "--loss", "0.35", "--json"})...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out proposeOutTest
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, stdout)
	}
	if out.Nights != 10 || len(out.Goals) != 8 {
		t.Fatalf("%d nights, %d goals; want 10 nights, 8 goals", out.Nights, len(out.Goals))
	}
	if len(out.ClearDates) != out.ClearNights || len(out.WeatherDates) != out.WeatherNights || out.WeatherNights < out.ClearNights || out.ClearNights < 1 {
		t.Fatalf("clear %d %v, weather %d %v", out.ClearNights, out.ClearDates, out.WeatherNights, out.WeatherDates)
	}
	// Replay the clear nights: every reachable goal gets its 6.
	sum := make([]int, len(out.Goals))
	for _, pk := range out.Picks[:out.ClearNights] {
		for g, n := range pk.Gives {
			sum[g] += n
		}
	}
	for g, gd := range out.Goals {
		if gd.Reachable && sum[g] < gd.Need {
			t.Errorf("%s goal %d: %d exposures on the clear nights, wants %d", gd.Target, g, sum[g], gd.Need)
		}
		if out.WeatherMet && gd.Reachable && gd.ReachProbability < 0.9 {
			t.Errorf("%s goal %d: P %.3f below the confidence", gd.Target, g, gd.ReachProbability)
		}
	}
	if out.HoursFrom != "2026-01-01" || len(out.Hours) != 4 || len(out.Hours[0].Hours) != 365 {
		t.Fatalf("hours from %s, %d targets", out.HoursFrom, len(out.Hours))
	}
	for _, h := range out.Hours {
		for k, x := range h.Hours {
			if x < 0 || x > 14 {
				t.Fatalf("%s night %d: %g h", h.Target, k, x)
			}
		}
	}
}

func TestProposeCommandHuman(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	stdout, stderr, code := runCmd(t, args([]string{"propose"}, siteArgs, proposeArgs, []string{"--targets", csvPath, "--loss", "0.35"})...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"Proposal 2026-05-10 to 2026-05-19 (10 nights)", "Minimum with a clear sky: 3 night(s): 2026-05-11, 2026-05-15, 2026-05-16", "Probability 0.9 is out of reach in this range: every useful night (10) gives Mirel-9 0.750 a probability of 0.570",
		"Nights in the order chosen", "Hours per night in dark time at airmass ≤ 2, 2026", "Tarn-4", "Caution:"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

func TestProposeCommandBadInput(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	base := args([]string{"propose"}, siteArgs, []string{"--tz", "UTC", "--targets", csvPath})
	for _, tc := range []struct {
		name string
		argv []string
		want string
	}{
		{"ErrLoss", []string{"--from", "2026-05-10", "--to", "2026-05-12", "--n-exposures", "4", "--loss", "1.5"}, "--loss 1.5: out of range"},
		{"ErrConfidence", []string{"--from", "2026-05-10", "--to", "2026-05-12", "--n-exposures", "4", "--loss", "0.2", "--confidence", "1"}, "--confidence 1: out of range"},
		{"ErrSemester", []string{"--semester", "2027C", "--n-exposures", "4"}, "--semester 2027C: not a semester; accepted: a year"},
		{"ErrBoth", []string{"--semester", "2027A", "--from", "2027-02-01", "--n-exposures", "4"}, "either --semester, or --from with --to"},
		{"ErrNoRange", []string{"--n-exposures", "4"}, "missing the candidate nights"},
		{"ErrToBefore", []string{"--from", "2026-05-10", "--to", "2026-05-09", "--n-exposures", "4"}, "--to 2026-05-09: out of range; accepted: a date from --from to 365 days after it"},
		{"ErrNoCount", []string{"--from", "2026-05-10", "--to", "2026-05-12"}, "missing --n-exposures N"},
		{"ErrZeroCount", []string{"--from", "2026-05-10", "--to", "2026-05-12", "--n-exposures", "0"}, "--n-exposures 0: out of range; accepted: a whole number of exposures 1..10000"},
		{"ErrHalfCount", []string{"--from", "2026-05-10", "--to", "2026-05-12", "--n-exposures", "2.5"}, "--n-exposures 2.5: not a whole number"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, append(append([]string{}, base...), tc.argv...)...)
			if code != 2 || !strings.Contains(stderr, tc.want) {
				t.Fatalf("exit %d, stderr %q; want exit 2 with %q", code, stderr, tc.want)
			}
		})
	}
}

package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"
)

// planCSV is an invented target list for the test site (Cerro Quilla,
// 27.85° S) in early December: four binaries around the evening and
// morning sky.
const planCSV = `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority
Aurel-1,08:12:40,-41:20:00,2460100.31452,0.1375,0.25;0.75,0.05,300,25,1
Brisa-3,06:58:10.5,-12:05:00,2460210.88120,0.2650,0.0;0.5,0.04,240,20,2
Cobre-7,10:02:33,-58:44:10,2459980.12345,0.0812,0.25,0.06,120,15,3
Duna-2,03:05:00,-30:00:00,2460002.50000,0.3300,0.1;0.6,0.05,420,30,4
`

func writeFile(tb testing.TB, name, text string) string {
	tb.Helper()
	p := filepath.Join(tb.TempDir(), name)
	if err := os.WriteFile(p, []byte(text), 0o600); err != nil {
		tb.Fatal(err)
	}
	return p
}

// hasAtLeast checks that m has every key named (the plan's objects carry
// extra keys beyond the contract).
func hasAtLeast(tb testing.TB, m map[string]any, keys ...string) {
	tb.Helper()
	for _, k := range keys {
		if _, ok := m[k]; !ok {
			tb.Errorf("key %q missing", k)
		}
	}
}

var planArgs = []string{"--tz", "America/Santiago", "--date", "2026-12-01"}

func TestPlanJSON(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", planCSV)
	m := runJSON(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath})...)
	hasAtLeast(t, m, "night", "blocks", "unscheduled")

	night := runJSON(t, args([]string{"night"}, siteArgs, planArgs)...)
	if !reflect.DeepEqual(m["night"], night) {
		t.Errorf("plan's night object differs from `night --json`:\n%v\n%v", m["night"], night)
	}

	type setup struct{ exp, ovh float64 }
	goals := map[string]map[string]setup{}
	for _, line := range strings.Split(strings.TrimSpace(planCSV), "\n")[1:] {
		f := strings.Split(line, ",")
		exp, _ := strconv.ParseFloat(f[7], 64)
		ovh, _ := strconv.ParseFloat(f[8], 64)
		goals[f[0]] = map[string]setup{}
		for _, ph := range strings.Split(f[5], ";") {
			v, _ := strconv.ParseFloat(ph, 64)
			goals[f[0]][strconv.FormatFloat(v, 'f', 4, 64)] = setup{exp, ovh}
		}
	}
	seen := map[string]bool{}
	blocks, _ := m["blocks"].([]any)
	var prevEnd time.Time
	for i, bv := range blocks {
		b := bv.(map[string]any)
		hasAtLeast(t, b, "target", "phase_goal", "start", "end", "n_exposures", "exposure_s", "phase_start", "phase_end", "airmass_max")
		start, end := instantOf(t, b, "start"), instantOf(t, b, "end")
		target := b["target"].(string)
		goal := strconv.FormatFloat(num(t, b, "phase_goal"), 'f', 4, 64)
		s, ok := goals[target][goal]
		if !ok {
			t.Fatalf("block %d: %s phase %s is not a goal of the file", i, target, goal)
		}
		seen[target+"/"+goal] = true
		n := num(t, b, "n_exposures")
		if num(t, b, "exposure_s") != s.exp {
			t.Errorf("block %d: exposure_s %v, want %v", i, b["exposure_s"], s.exp)
		}
		if d := end.Sub(*start).Seconds() - n*(s.exp+s.ovh); math.Abs(d) > 1e-6 {
			t.Errorf("block %d: end − start − n(E+O) = %g s", i, d)
		}
		if start.Before(prevEnd) {
			t.Errorf("block %d starts %v before the previous block ends %v", i, start, prevEnd)
		}
		prevEnd = *end
		if am := num(t, b, "airmass_max"); am > 2 || am < 1 {
			t.Errorf("block %d: airmass_max %g", i, am)
		}
		for _, k := range []string{"phase_start", "phase_end"} {
			if ph := num(t, b, k); ph < 0 || ph >= 1 {
				t.Errorf("block %d: %s %g outside [0, 1)", i, k, ph)
			}
		}
	}
	for _, uv := range m["unscheduled"].([]any) {
		u := uv.(map[string]any)
		hasAtLeast(t, u, "target", "phase_goal", "reason")
		goal := strconv.FormatFloat(num(t, u, "phase_goal"), 'f', 4, 64)
		if seen[u["target"].(string)+"/"+goal] {
			t.Errorf("%s phase %s both scheduled and unscheduled", u["target"], goal)
		}
		seen[u["target"].(string)+"/"+goal] = true
		if r, _ := u["reason"].(string); r == "" {
			t.Errorf("%s phase %s unscheduled without a reason", u["target"], goal)
		}
	}
	for target, gs := range goals {
		for g := range gs {
			if !seen[target+"/"+g] {
				t.Errorf("%s phase %s neither in a block nor unscheduled", target, g)
			}
		}
	}
	if len(blocks) < 3 {
		t.Errorf("only %d blocks for the invented night", len(blocks))
	}
}

func TestPlanHuman(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", planCSV)
	out, errOut, code := runCmd(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath, "--twilight", "astronomical"})...)
	if code != 0 || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	for _, want := range []string{"Night plan for Tuesday 2026-12-01", "Sun below -18° (astronomical)", "local", "UTC",
		"Aurel-1", "Caution: never point a telescope", "Schedule value"} {
		if !strings.Contains(out, want) {
			t.Errorf("night sheet lacks %q:\n%s", want, out)
		}
	}
}

func TestPlanOptionsChangeThePlan(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", planCSV)
	horizon := writeFile(t, "horizon.txt", "# a tall ridge to the west\n0 5\n200 5\n270 40\n340 5\n")
	base := runJSON(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath})...)
	strict := runJSON(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath,
		"--twilight", "-15", "--max-airmass", "1.5", "--horizon", horizon, "--min-moon-sep", "30", "--acquire-s", "300", "--fill"})...)
	c := strict["constraints"].(map[string]any)
	if num(t, c, "sun_alt_max_deg") != -15 || num(t, c, "max_airmass") != 1.5 || num(t, c, "horizon_points") != 4 {
		t.Errorf("constraints not applied: %v", c)
	}
	ov := func(m map[string]any) float64 { return num(t, m["objective"].(map[string]any), "value") }
	if ov(strict) > ov(base) {
		t.Errorf("stricter limits scheduled more: %v > %v", ov(strict), ov(base))
	}
}

func TestPlanBadCSV(t *testing.T) {
	bad := `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority
Good-1,10:00:00,-20:00:00,2460100.5,0.2,0.25,0.05,60,10,1
Bad-2,10:00:00,-20:00:00,2460100.5,abc,1.25,0.05,60,10,1
Bad-3,10:00:00,-20:00:00,2460100.5,0.2,0.25,0.5,0,10,1
`
	csvPath := writeFile(t, "targets.csv", bad)
	_, errOut, code := runCmd(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath})...)
	if code != exitUsage {
		t.Errorf("exit %d, want %d", code, exitUsage)
	}
	for _, want := range []string{"line 3, column 5 (period_days)", "line 3, column 6 (phases)", "line 4, column 7 (phase_halfwidth)", "line 4, column 8 (exposure_s)"} {
		if !strings.Contains(errOut, want) {
			t.Errorf("stderr lacks %q: %s", want, errOut)
		}
	}
	if strings.Count(strings.TrimSpace(errOut), "\n") != 0 {
		t.Errorf("error is not one line: %q", errOut)
	}
}

func TestPlanBadFlags(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", planCSV)
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"MissingTargets", nil, "missing --targets"},
		{"Twilight", []string{"--targets", csvPath, "--twilight", "dusky"}, "--twilight dusky"},
		{"TwilightHigh", []string{"--targets", csvPath, "--twilight", "5"}, "--twilight 5"},
		{"Airmass", []string{"--targets", csvPath, "--max-airmass", "0.5"}, "--max-airmass 0.5"},
		{"HAAlone", []string{"--targets", csvPath, "--ha-min", "-3"}, "--ha-min -3"},
		{"NExposures", []string{"--targets", csvPath, "--n-exposures", "2.5"}, "--n-exposures 2.5"},
		{"NoFile", []string{"--targets", filepath.Join(t.TempDir(), "none.csv")}, "--targets"},
		{"Zone", []string{"--targets", csvPath, "--tz", "Mars/Olympus"}, "--tz Mars/Olympus"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			argv := args([]string{"plan"}, siteArgs, []string{"--tz", "UTC", "--date", "2026-12-01"}, tc.args)
			_, errOut, code := runCmd(t, argv...)
			if code == 0 || !strings.Contains(errOut, tc.want) {
				t.Errorf("exit %d, stderr %q; want an error naming %q", code, errOut, tc.want)
			}
		})
	}
}

// TestPlanJSONNumbers: the JSON has no NaN and every time is RFC 3339 UTC.
func TestPlanJSONNumbers(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", planCSV)
	stdout, _, code := runCmd(t, args([]string{"plan"}, siteArgs, planArgs, []string{"--targets", csvPath, "--json", "--fill"})...)
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var v any
	if err := json.Unmarshal([]byte(stdout), &v); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(stdout, "NaN") {
		t.Error("NaN in the output")
	}
	for _, b := range v.(map[string]any)["blocks"].([]any) {
		for _, k := range []string{"start", "end"} {
			s := b.(map[string]any)[k].(string)
			if _, err := time.Parse(time.RFC3339Nano, s); err != nil || !strings.HasSuffix(s, "Z") {
				t.Errorf("%s %q is not RFC 3339 UTC", k, s)
			}
		}
	}
}

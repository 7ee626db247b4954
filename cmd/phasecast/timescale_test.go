package main

import (
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestTimeScaleNote: where TT − UTC rests on an assumption beyond the tables
// (after the leap-second table's end, before 1960), sky, bjd and phase say
// so in their output and still give every figure; inside the tables they
// say nothing. The first case runs at the test clock (PHASECAST_TEST_NOW
// when set), so the time-travel runs of the suite check the far future.
func TestTimeScaleNote(t *testing.T) {
	past := "after that is assumed (TT − UTC = 69.184 s)"
	cases := []struct {
		name string
		at   []string // nil: the command's default, the clock's now
		want string   // "" for no note
	}{
		{"Now", nil, map[bool]string{true: past, false: ""}[testNow.After(ephem.LeapTableKnownUntil)]},
		{"InsideTable", []string{"--at", "2020-01-01T00:00:00Z"}, ""},
		{"AfterTable", []string{"--at", "2049-12-31T23:59:59Z"}, past},
		{"Before1960", []string{"--at", "1955-06-01T00:00:00Z"}, "before 1960 UTC had no atomic definition"},
	}
	for _, tc := range cases {
		for _, cmd := range [][]string{{"sky"}, {"bjd"}, phaseArgs()[:1]} {
			t.Run(tc.name+"/"+cmd[0], func(t *testing.T) {
				argv := args(cmd, siteArgs, targetArgs, tc.at)
				if cmd[0] == "phase" {
					argv = append(argv, "--t0", "2460700.1234567", "--period", "0.0612345678")
				}
				out, errOut, code := runCmd(t, argv...)
				if code != 0 {
					t.Fatalf("exit %d: %s", code, errOut)
				}
				line := ""
				for _, l := range strings.Split(out, "\n") {
					if strings.HasPrefix(l, "note: time scales:") {
						line = l
					}
				}
				switch {
				case tc.want == "" && line != "":
					t.Errorf("unexpected note %q", line)
				case tc.want != "" && !strings.Contains(line, tc.want):
					t.Errorf("note %q, want one containing %q\n%s", line, tc.want, out)
				}
				m := runJSON(t, argv...)
				note, _ := m["time_scale_note"].(string)
				if (tc.want == "") != (note == "") || !strings.Contains(note, tc.want) {
					t.Errorf("JSON time_scale_note %q, want %q", note, tc.want)
				}
			})
		}
	}
}

func TestTimeScaleNoteBoundaries(t *testing.T) {
	for _, c := range []struct {
		t    time.Time
		want bool
	}{
		{ephem.LeapTableKnownUntil, false},
		{ephem.LeapTableKnownUntil.Add(time.Second), true},
		{time.Date(1960, 1, 1, 0, 0, 0, 0, time.UTC), false},
		{time.Date(1959, 12, 31, 23, 59, 59, 0, time.UTC), true},
		{time.Date(1600, 1, 1, 0, 0, 0, 0, time.UTC), true},
	} {
		if got := ephem.TimeScaleNote(c.t) != ""; got != c.want {
			t.Errorf("TimeScaleNote(%s) present %v, want %v", c.t, got, c.want)
		}
	}
	if n := ephem.TimeScaleNote(time.Date(1600, 1, 1, 0, 0, 0, 0, time.UTC)); !strings.Contains(n, "extrapolated") {
		t.Errorf("before 1620: %q, want the extrapolation said", n)
	}
}

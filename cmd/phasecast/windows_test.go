package main

import (
	"encoding/csv"
	"encoding/json"
	"regexp"
	"strings"
	"testing"
	"time"

	"phasecast/planner/export"
	"phasecast/planner/export/exporttest"
)

var windowsArgs = []string{"--from", "2026-05-01", "--to", "2026-05-21"}

func windowsRun(t *testing.T, extra ...string) string {
	t.Helper()
	csvPath := writeFile(t, "targets.csv", runCSV)
	stdout, stderr, code := runCmd(t, args([]string{"windows"}, siteArgs, windowsArgs, []string{"--targets", csvPath}, extra)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	return stdout
}

// windowGroups decodes the windows document out and groups its flat list
// by goal (target, phase and event, in the document's order).
func windowGroups(t *testing.T, out string) [][]export.Window {
	t.Helper()
	var d export.Windows
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatal(err)
	}
	var groups [][]export.Window
	for i, w := range d.Windows {
		if i == 0 || w.Target != d.Windows[i-1].Target || w.PhaseGoal != d.Windows[i-1].PhaseGoal || w.Event != d.Windows[i-1].Event {
			groups = append(groups, nil)
		}
		groups[len(groups)-1] = append(groups[len(groups)-1], w)
	}
	return groups
}

// TestWindowsFormats checks that the JSON, CSV and iCalendar outputs carry
// the same windows, sorted and disjoint per goal.
func TestWindowsFormats(t *testing.T) {
	groups := windowGroups(t, windowsRun(t, "--format", "json", "--target", "Mirel-9"))
	if len(groups) != 2 || groups[0][0].Target != "Mirel-9" {
		t.Fatalf("goals %+v", groups)
	}
	n := 0
	for _, g := range groups {
		var prev time.Time
		for _, w := range g {
			s, e := time.Time(w.Start), time.Time(w.End)
			if !e.After(s) || !s.After(prev) {
				t.Errorf("window %s–%s not after the previous one (%v) or empty", w.Start, w.End, prev)
			}
			prev = e
			n++
		}
	}
	if n == 0 {
		t.Fatal("no windows")
	}
	rows, err := csv.NewReader(strings.NewReader(windowsRun(t, "--format", "csv", "--target", "Mirel-9"))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != strings.Join(export.WindowsCSVHeader, ",") || len(rows)-1 != n {
		t.Errorf("CSV header %v and %d rows; want %v and %d", rows[0], len(rows)-1, export.WindowsCSVHeader, n)
	}
	cal, err := exporttest.ParseICal(strings.NewReader(windowsRun(t, "--format", "ics", "--target", "Mirel-9")))
	if err != nil {
		t.Fatal(err)
	}
	if len(cal.Events) != n {
		t.Errorf("%d events, want %d", len(cal.Events), n)
	}
	k := 0
	for _, g := range groups {
		for _, w := range g {
			s := time.Time(w.Start)
			if !cal.Events[k].Start.Equal(s.Truncate(time.Second)) {
				t.Errorf("event %d starts %v, JSON window %v", k, cal.Events[k].Start, s)
			}
			k++
		}
	}
}

// TestWindowsICSRules checks the iCalendar output against RFC 5545:
// §3.1 content lines end in CRLF and are at most 75 octets, longer ones
// folded with CRLF and a single space; §3.4 the object is
// BEGIN:VCALENDAR … END:VCALENDAR; §3.6 VERSION:2.0 and PRODID present;
// §3.6.1 with §3.8.4.7 and §3.8.7.2 every VEVENT has exactly one UID and one
// DTSTAMP; §3.3.5 DTSTART, DTEND and DTSTAMP in the UTC form
// (YYYYMMDDTHHMMSSZ). And the file is stable: the same command gives the same
// bytes (so UIDs and DTSTAMP are stable), and UIDs are unique.
func TestWindowsICSRules(t *testing.T) {
	out := windowsRun(t, "--format", "ics", "--min-exposures", "1")
	if out != windowsRun(t, "--format", "ics", "--min-exposures", "1") {
		t.Error("two runs of the same command give different files")
	}
	if !strings.HasSuffix(out, "\r\n") {
		t.Error("the file does not end in CRLF")
	}
	lines := strings.Split(strings.TrimSuffix(out, "\r\n"), "\r\n")
	utc := regexp.MustCompile(`^\d{8}T\d{6}Z$`)
	var unfolded []string
	for i, l := range lines {
		if strings.ContainsAny(l, "\r\n") {
			t.Fatalf("line %d holds a bare CR or LF: %q", i+1, l)
		}
		if len(l) > 75 {
			t.Errorf("line %d is %d octets, above 75 (§3.1): %q", i+1, len(l), l)
		}
		if strings.HasPrefix(l, " ") {
			unfolded[len(unfolded)-1] += l[1:]
			continue
		}
		unfolded = append(unfolded, l)
	}
	if unfolded[0] != "BEGIN:VCALENDAR" || unfolded[len(unfolded)-1] != "END:VCALENDAR" {
		t.Errorf("object starts %q and ends %q", unfolded[0], unfolded[len(unfolded)-1])
	}
	has := map[string]bool{}
	uids := map[string]bool{}
	events := 0
	var cur map[string]int
	for _, l := range unfolded {
		name, value, _ := strings.Cut(l, ":")
		has[name] = true
		switch {
		case l == "BEGIN:VEVENT":
			cur = map[string]int{}
			events++
		case l == "END:VEVENT":
			if cur["UID"] != 1 || cur["DTSTAMP"] != 1 || cur["DTSTART"] != 1 || cur["DTEND"] != 1 {
				t.Errorf("event %d: UID×%d DTSTAMP×%d DTSTART×%d DTEND×%d, want one each", events, cur["UID"], cur["DTSTAMP"], cur["DTSTART"], cur["DTEND"])
			}
			cur = nil
		case cur != nil:
			cur[name]++
			switch name {
			case "DTSTART", "DTEND", "DTSTAMP":
				if !utc.MatchString(value) {
					t.Errorf("event %d: %s %q not in the UTC form", events, name, value)
				}
			case "UID":
				if uids[value] {
					t.Errorf("UID %q repeated", value)
				}
				uids[value] = true
			}
		}
	}
	if !has["VERSION"] || !has["PRODID"] || events == 0 {
		t.Errorf("VERSION %v, PRODID %v, %d events", has["VERSION"], has["PRODID"], events)
	}
	t.Logf("%d events, %d physical lines, longest ≤ 75 octets", events, len(lines))
}

// TestWindowsGoalAndTarget checks --target and --goal: an event name gives
// its windows, a phase its own, and the human sheet names them.
func TestWindowsGoalAndTarget(t *testing.T) {
	groups := windowGroups(t, windowsRun(t, "--format", "json", "--target", "Tarn-4", "--goal", "0.5", "--halfwidth", "0.02"))
	if len(groups) != 1 || groups[0][0].PhaseGoal != 0.5 || groups[0][0].PhaseHalfWidth != 0.02 {
		t.Fatalf("goals %+v", groups)
	}
	if groups = windowGroups(t, windowsRun(t, "--format", "json", "--target", "Tarn-4", "--goal", "quadratures")); len(groups) != 2 {
		t.Errorf("quadratures gave %d lists, want 2", len(groups))
	}
	human := windowsRun(t, "--target", "Suvi-7", "--tz", "America/Santiago")
	for _, want := range []string{"Suvi-7, phase 0.250 ± 0.040", "Start UTC", "Caution"} {
		if !strings.Contains(human, want) {
			t.Errorf("output lacks %q:\n%s", want, human)
		}
	}
}

func TestWindowsBadFlags(t *testing.T) {
	csvPath := writeFile(t, "targets.csv", runCSV)
	for _, tc := range []struct {
		name  string
		extra []string
		want  string
	}{
		{"ErrNoTarget", append([]string{"--target", "Nobody"}, windowsArgs...), "--target Nobody: no such target"},
		{"ErrGoal", append([]string{"--goal", "dusk"}, windowsArgs...), "--goal dusk: not a phase or an event"},
		{"ErrPhase", append([]string{"--goal", "1.5"}, windowsArgs...), "--goal 1.5: out of range"},
		{"ErrHalfWidthAlone", append([]string{"--halfwidth", "0.1"}, windowsArgs...), "--halfwidth goes with --goal"},
		{"ErrRangeTooLong", []string{"--from", "2026-01-01", "--to", "2027-01-03"}, "at most 366 days"},
		{"ErrRangeReversed", []string{"--from", "2026-01-05", "--to", "2026-01-01"}, "--to 2026-01-01: out of range"},
		{"ErrFormat", append([]string{"--format", "xml"}, windowsArgs...), "--format xml: not a format"},
		{"ErrNoFrom", []string{"--to", "2026-01-01"}, "missing --from"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, args([]string{"windows"}, siteArgs, []string{"--targets", csvPath}, tc.extra)...)
			if code != exitUsage || !strings.Contains(stderr, tc.want) {
				t.Errorf("exit %d, stderr %q; want exit %d and %q", code, stderr, exitUsage, tc.want)
			}
		})
	}
}

package export_test

import (
	"regexp"
	"strings"
	"testing"

	"phasecast/planner/export"
)

// TestSafeCSVCell checks what SafeCSVCell makes of each cell and that
// UnquoteCSVCell gives the cell back.
func TestSafeCSVCell(t *testing.T) {
	tests := []struct{ name, in, out string }{
		{"plain", "plain", "plain"},
		{"empty", "", ""},
		{"negative decimal", "-9.29", "-9.29"},
		{"positive decimal", "+1.5", "+1.5"},
		{"signed integer", "+3", "+3"},
		{"exponent", "1e-5", "1e-5"},
		{"signed exponent", "-2.5E+3", "-2.5E+3"},
		{"negative sexagesimal", "-12:48:07", "-12:48:07"},
		{"negative sexagesimal fraction", "-05:06:07.8", "-05:06:07.8"},
		{"signed sexagesimal spaces", "+05 30", "+05 30"},
		{"formula", "=SUM(A1)", "'=SUM(A1)"},
		{"formula 1+2", "=1+2", "'=1+2"},
		{"plus text", "+cmd", "'+cmd"},
		{"minus arithmetic", "-1+1", "'-1+1"},
		{"minus text", "-x", "'-x"},
		{"at", "@x", "'@x"},
		{"at sum", "@SUM(A1)", "'@SUM(A1)"},
		{"tab formula", "\t=1", "'\t=1"},
		{"tab text", "\tx", "'\tx"},
		{"carriage return", "\r=1", "'\r=1"},
		{"sign only", "-", "'-"},
		{"sexagesimal too long", "-1234:5", "'-1234:5"},
		{"already quoted formula", "'=already quoted", "''=already quoted"},
		{"twice quoted formula", "''=twice", "'''=twice"},
		{"quoted plain", "'plain", "'plain"},
		{"quoted number", "'-9.29", "'-9.29"},
		{"quoted sexagesimal", "'-12:48:07", "'-12:48:07"},
		{"quote only", "'", "'"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := export.SafeCSVCell(tc.in)
			if got != tc.out {
				t.Errorf("SafeCSVCell(%q) = %q, want %q", tc.in, got, tc.out)
			}
			if back := export.UnquoteCSVCell(got); back != tc.in {
				t.Errorf("UnquoteCSVCell(%q) = %q, want %q", got, back, tc.in)
			}
		})
	}
}

// fuzzNumber is the test's own idea of a cell a spreadsheet reads as a
// value despite a leading sign: a decimal number or a sexagesimal angle.
var fuzzNumber = regexp.MustCompile(`^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$|^[+-]?\d{1,3}[: ]\d{1,2}([: ]\d{1,2}(\.\d*)?)?$`)

// runnable reports whether a spreadsheet would take cell for a formula.
func runnable(cell string) bool {
	return cell != "" && strings.ContainsRune("=+-@\t\r", rune(cell[0])) && !fuzzNumber.MatchString(cell)
}

// FuzzSafeCSVCell: SafeCSVCell leaves a cell alone or prefixes one
// apostrophe, what it returns is never runnable, and UnquoteCSVCell gives
// the cell back. Run longer with
//
//	go test -run='^$' -fuzz='^FuzzSafeCSVCell$' -fuzztime=30s ./planner/export/
func FuzzSafeCSVCell(f *testing.F) {
	for _, s := range []string{"=cmd|' /C calc'!A0", "+1+cmd|' /C calc'!A0", "-1+1", "@SUM(A1:A2)", "=HYPERLINK(\"http://x\")", "-2-3",
		"", "-12.5", "+1e5", "-12:30:00", "-12 30", "\t=1", "\r=1", "'=x", "''-1", "'-12:30", "=", "-", "+-1", "-1e", "\xff", "-٣"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		out := export.SafeCSVCell(s)
		if out != s && out != "'"+s {
			t.Fatalf("SafeCSVCell(%q) = %q: neither the cell nor the cell after an apostrophe", s, out)
		}
		if runnable(out) {
			t.Fatalf("SafeCSVCell(%q) = %q is still runnable", s, out)
		}
		if back := export.UnquoteCSVCell(out); back != s {
			t.Fatalf("UnquoteCSVCell(SafeCSVCell(%q)) = %q", s, back)
		}
	})
}

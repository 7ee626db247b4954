package store

import "testing"

func TestCSVSafeCellRoundTrip(t *testing.T) {
	tests := []struct{ in, out string }{
		{"plain", "plain"},
		{"-9.29", "-9.29"},
		{"+1.5", "+1.5"},
		{"=SUM(A1)", "'=SUM(A1)"},
		{"-1+1", "'-1+1"},
		{"@x", "'@x"},
		{"\t=1", "'\t=1"},
		{"'=already quoted", "''=already quoted"},
		{"''=twice", "'''=twice"},
		{"'plain", "'plain"},
		{"'-9.29", "'-9.29"},
		{"", ""},
		{"'", "'"},
	}
	for _, tc := range tests {
		t.Run(tc.in, func(t *testing.T) {
			got := csvSafeCell(tc.in)
			if got != tc.out {
				t.Errorf("csvSafeCell(%q) = %q, want %q", tc.in, got, tc.out)
			}
			if back := csvUnquoteFormula(got); back != tc.in {
				t.Errorf("csvUnquoteFormula(%q) = %q, want %q", got, back, tc.in)
			}
		})
	}
}

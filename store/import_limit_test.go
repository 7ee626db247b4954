package store_test

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// TestImportRowLimit: a file of more than MaxTargets rows, every one of them
// bad, is refused with the one problem of its length, naming the first line
// past the limit; its rows are not checked one by one, and nothing is
// written. Each format is tried.
func TestImportRowLimit(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	n := store.MaxTargets + 3
	var team, plan, js strings.Builder
	team.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,priority\n")
	plan.WriteString(strings.Join(planner.PlanCSVHeader, ",") + "\n")
	js.WriteString(`{"format":"` + store.JSONFormatTag + `","targets":[` + "\n")
	for i := range n {
		// Every row is bad (RA 25h), so row-by-row checks would report n problems.
		fmt.Fprintf(&team, "T%d,25h,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n", i)
		fmt.Fprintf(&plan, "T%d,25h,37.69,2460123.4567891234,0.1352,0.25,0.05,120,8,1\n", i)
		sep := ","
		if i == n-1 {
			sep = ""
		}
		fmt.Fprintf(&js, `{"name":"T%d","ra":"25h"}%s`+"\n", i, sep)
	}
	js.WriteString("]}\n")
	tests := []struct {
		name     string
		file     string
		f        store.FileFormat
		wantLine int
	}{
		{"TeamCSV", team.String(), store.FormatCSV, store.MaxTargets + 2},
		{"PlanCSV", plan.String(), store.FormatPlanCSV, store.MaxTargets + 2},
		{"JSON", js.String(), store.FormatJSON, store.MaxTargets + 2},
	}
	before, err := w.s.ListTargets(ctx, w.editor, w.list.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := w.s.ImportTargets(ctx, w.editor, w.list.ID, strings.NewReader(tc.file), tc.f)
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("err = %v, want a *planner.TableError", err)
			}
			if got := len(te.Cells); got != 1 {
				t.Fatalf("%d problems, want only the length: %.300v", got, err)
			}
			if got := te.Cells[0].Line; got != tc.wantLine {
				t.Errorf("line %d, want %d: %v", got, tc.wantLine, err)
			}
			if !strings.Contains(te.Cells[0].Reason, fmt.Sprint(store.MaxTargets)) {
				t.Errorf("reason %q does not state the limit", te.Cells[0].Reason)
			}
			got, err := w.s.ListTargets(ctx, w.editor, w.list.ID)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(before) {
				t.Fatalf("the list holds %d targets after a refused import, want %d", len(got), len(before))
			}
		})
	}
}

package store_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// TestImportMissingGoalColumn: a team CSV without a phase_halfwidth column
// whose goals give no ±half-width is refused with a message on that column,
// saying it is missing, not on the goals cell with a value the file does
// not hold.
func TestImportMissingGoalColumn(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	tests := []struct {
		name, file string
		wantCol    string
	}{
		{"NoHalfWidth", "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,exposure_s,priority\n" +
			"Missing W,10.5,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,quadratures,60,1\n", "phase_halfwidth"},
		{"NoExposure", "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,priority\n" +
			"Missing E,10.5,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,quadratures,0.05,1\n", "exposure_s"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := w.s.PreviewImport(ctx, w.editor, w.list.ID, strings.NewReader(tt.file), store.FormatAuto)
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("no TableError in %v", err)
			}
			if len(te.Cells) != 1 {
				t.Fatalf("cells = %v, want one", te.Cells)
			}
			c := te.Cells[0]
			msg := c.String()
			if c.Line != 2 || c.Column != tt.wantCol || c.Col != 0 || c.Value != "" {
				t.Errorf("cell %+v, want line 2, column %s (missing, no number, no value)", c, tt.wantCol)
			}
			if !strings.Contains(msg, "no "+tt.wantCol+" column") {
				t.Errorf("message %q does not say the column is missing", msg)
			}
			if strings.Contains(msg, "(goals)") {
				t.Errorf("message %q blames the goals cell", msg)
			}
		})
	}
	t.Run("InlineHalfWidthOK", func(t *testing.T) {
		file := "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,exposure_s,priority\n" +
			"Inline W,10.5,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25±0.05,60,1\n"
		if _, err := w.s.PreviewImport(ctx, w.editor, w.list.ID, strings.NewReader(file), store.FormatAuto); err != nil {
			t.Fatalf("inline half-width refused: %v", err)
		}
	})
}

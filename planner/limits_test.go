package planner_test

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"phasecast/planner"
)

// TestReadTargetsCSVRowLimit: a file of MaxTargetRows targets is read; one
// more row is refused with the one error of its length, naming the line
// past the limit.
func TestReadTargetsCSVRowLimit(t *testing.T) {
	file := func(n int) string {
		var b strings.Builder
		b.WriteString(planHeader)
		for i := range n {
			// Distinct names; positions need not differ for the reader.
			fmt.Fprintf(&b, "T%d,8.1234,37.69,2460123.4567891234,0.1352,0.25,0.05,120,8,1\n", i)
		}
		return b.String()
	}
	t.Run("OK", func(t *testing.T) {
		rows, err := planner.ReadTargetsCSV(strings.NewReader(file(planner.MaxTargetRows)))
		if err != nil {
			t.Fatal(err)
		}
		if got, want := len(rows), planner.MaxTargetRows; got != want {
			t.Fatalf("read %d rows, want %d", got, want)
		}
	})
	t.Run("ErrTooManyRows", func(t *testing.T) {
		_, err := planner.ReadTargetsCSV(strings.NewReader(file(planner.MaxTargetRows + 5)))
		var te *planner.TableError
		if !errors.As(err, &te) {
			t.Fatalf("err = %v, want a *TableError", err)
		}
		if len(te.Cells) != 1 {
			t.Fatalf("%d problems, want the length alone", len(te.Cells))
		}
		last := te.Cells[0]
		if got, want := last.Line, planner.MaxTargetRows+2; got != want { // header is line 1
			t.Errorf("line %d, want %d: %v", got, want, err)
		}
		if !strings.Contains(last.Reason, fmt.Sprint(planner.MaxTargetRows)) {
			t.Errorf("reason %q does not state the limit", last.Reason)
		}
	})
}

// TestParseHorizonPointLimit: MaxHorizonPoints points are read; one more is
// refused with an error naming its line.
func TestParseHorizonPointLimit(t *testing.T) {
	text := func(n int) string {
		var b strings.Builder
		b.WriteString("# az alt\n")
		for i := range n {
			fmt.Fprintf(&b, "%.3f 10\n", float64(i)*360/float64(n))
		}
		return b.String()
	}
	t.Run("OK", func(t *testing.T) {
		pts, err := planner.ParseHorizon(strings.NewReader(text(planner.MaxHorizonPoints)))
		if err != nil {
			t.Fatal(err)
		}
		if got, want := len(pts), planner.MaxHorizonPoints; got != want {
			t.Fatalf("read %d points, want %d", got, want)
		}
	})
	t.Run("ErrTooManyPoints", func(t *testing.T) {
		_, err := planner.ParseHorizon(strings.NewReader(text(planner.MaxHorizonPoints + 1)))
		if err == nil {
			t.Fatal("accepted a horizon of too many points")
		}
		want := fmt.Sprintf("line %d:", planner.MaxHorizonPoints+2) // comment is line 1
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not name %q", err, want)
		}
	})
}

// TestTargetCSVPeriodLimitsValidate: the reader's period bounds lie within
// ephem.Ephemeris.Validate's, so a period the reader accepts validates.
func TestTargetCSVPeriodLimitsValidate(t *testing.T) {
	for _, p := range []float64{planner.MinPeriodDays, planner.MaxPeriodDays} {
		t.Run(fmt.Sprint(p), func(t *testing.T) {
			in := planHeader + fmt.Sprintf("X,8.1234,37.69,2460123.4567891234,%v,0.25,0.05,120,8,1\n", p)
			ts, err := planner.ParseTargetsCSV(strings.NewReader(in))
			if err != nil {
				t.Fatalf("period %v refused: %v", p, err)
			}
			if err := ts[0].Ephem.Validate(); err != nil {
				t.Fatalf("period %v read but invalid: %v", p, err)
			}
		})
	}
}

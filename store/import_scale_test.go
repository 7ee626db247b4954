package store_test

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// importScaleAllocBound is the most bytes that previewing, or importing, a
// 50,000-row file of one position may allocate in all (runtime.MemStats
// TotalAlloc before and after): 400 MB, 100 times the 4.0 MB file; 271 MB
// measured for each (Go 1.26, linux/amd64).
// The all-pairs duplicate check it replaced formatted n(n−1)/2 ≈ 1.25e9
// messages for such a file and was ended by the kernel's out-of-memory
// killer at 25,000 rows (22.5 GB).
const importScaleAllocBound = 400 << 20

// TestImportSamePositionScale previews and imports 50,000 rows with
// different names at one position into an empty list: both are refused
// with at most MaxFileProblems problems listed plus a count of the rest,
// one finding per line, nothing is written, and neither allocates more
// than importScaleAllocBound.
func TestImportSamePositionScale(t *testing.T) {
	if testing.Short() {
		t.Skip("50,000-row import in -short mode")
	}
	ctx := context.Background()
	w := newWorld(t)
	list, err := w.s.CreateList(ctx, w.owner, w.team.ID, store.ListInput{Name: "Scale"})
	if err != nil {
		t.Fatal(err)
	}
	const n = store.MaxTargets
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,priority\n")
	for i := range n {
		fmt.Fprintf(&b, "PCX S%05d,150.0,20.0,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n", i)
	}
	file := b.String()
	steps := []struct {
		name string
		do   func() error
	}{
		{"Preview", func() error {
			_, err := w.s.PreviewImport(ctx, w.editor, list.ID, strings.NewReader(file), store.FormatCSV)
			return err
		}},
		{"Import", func() error {
			_, err := w.s.ImportTargets(ctx, w.editor, list.ID, strings.NewReader(file), store.FormatCSV)
			return err
		}},
	}
	for _, step := range steps {
		t.Run(step.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			err := step.do()
			runtime.ReadMemStats(&after)
			alloc := after.TotalAlloc - before.TotalAlloc
			t.Logf("%d rows, %.1f MB file: %.1f MB allocated in all, %d GC cycles", n, float64(len(file))/1e6, float64(alloc)/1e6, after.NumGC-before.NumGC)
			if alloc > importScaleAllocBound {
				t.Errorf("allocated %d bytes, want at most %d", alloc, importScaleAllocBound)
			}
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("err = %.300v, want a *planner.TableError", err)
			}
			if got := len(te.Cells); got != store.MaxFileProblems+1 {
				t.Fatalf("%d problems listed, want %d and a count of the rest", got, store.MaxFileProblems+1)
			}
			lines := map[int]bool{}
			for _, c := range te.Cells[:store.MaxFileProblems] {
				if lines[c.Line] {
					t.Errorf("line %d reported twice", c.Line)
				}
				lines[c.Line] = true
				if !strings.Contains(c.Reason, `"PCX S00000" on line 2`) {
					t.Errorf("line %d: %q does not name the first row", c.Line, c.Reason)
				}
			}
			last := te.Cells[store.MaxFileProblems].Reason
			if want := fmt.Sprintf("… and %d more problems", n-1-store.MaxFileProblems); !strings.Contains(last, want) {
				t.Errorf("last entry %q, want it to say %q", last, want)
			}
			got, err := w.s.ListTargets(ctx, w.editor, list.ID)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != 0 {
				t.Errorf("the list holds %d targets after a refused import", len(got))
			}
		})
	}
}

package store_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"phasecast/store"
)

// TestConcurrentWritersAndReaders runs 50 goroutines against one database
// file for a few seconds (less with -short): writers increment counters
// held in targets' notes through UpdateTarget (read, then write with the
// version read, retrying on ECONFLICT), a batch writer re-imports a list so
// that five targets change together, and readers read targets and lists.
// Checked: no error other than ECONFLICT (never "database is locked"); no
// lost update (each counter equals the number of successful increments);
// no torn read (the five batch targets are always seen with one
// generation).
func TestConcurrentWritersAndReaders(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	const counters = 5
	var ids []int64
	for i := range counters {
		st, err := s.CreateTarget(ctx, w.editor, w.list.ID, counterInput(i, 0))
		if err != nil {
			t.Fatal(err)
		}
		ids = append(ids, st.ID)
	}
	batch, err := s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Batch"})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.ImportTargets(ctx, w.editor, batch.ID, strings.NewReader(batchCSV(0)), store.FormatCSV); err != nil {
		t.Fatal(err)
	}

	duration := 3 * time.Second
	if testing.Short() {
		duration = 500 * time.Millisecond
	}
	deadline := time.Now().Add(duration)
	var success [counters]atomic.Int64
	var conflicts, reads, imports atomic.Int64
	errs := make(chan error, 100)
	fail := func(err error) {
		select {
		case errs <- err:
		default:
		}
	}
	var wg sync.WaitGroup
	const writers, readers = 25, 24 // plus one batch writer: 50
	for g := range writers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			rng := rand.New(rand.NewPCG(uint64(g), 7))
			actor := []store.Actor{w.owner, w.editor}[g%2]
			for time.Now().Before(deadline) {
				i := rng.IntN(counters)
				st, err := s.GetTarget(ctx, actor, ids[i])
				if err != nil {
					fail(fmt.Errorf("writer read: %w", err))
					return
				}
				n := counterOf(st)
				_, err = s.UpdateTarget(ctx, actor, st.ID, st.Version, counterInput(i, n+1))
				switch store.ErrorCode(err) {
				case "":
					success[i].Add(1)
				case store.ECONFLICT:
					conflicts.Add(1)
				default:
					fail(fmt.Errorf("writer update: %w", err))
					return
				}
			}
		}()
	}
	wg.Add(1)
	go func() { // batch writer
		defer wg.Done()
		for gen := 1; time.Now().Before(deadline); gen++ {
			if _, err := s.ImportTargets(ctx, w.editor, batch.ID, strings.NewReader(batchCSV(gen)), store.FormatCSV); err != nil {
				fail(fmt.Errorf("batch import: %w", err))
				return
			}
			imports.Add(1)
		}
	}()
	for g := range readers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			actor := []store.Actor{w.viewer, w.owner, w.editor}[g%3]
			for time.Now().Before(deadline) {
				ts, err := s.ListTargets(ctx, actor, batch.ID)
				if err != nil {
					fail(fmt.Errorf("reader: %w", err))
					return
				}
				gens := map[string]bool{}
				for _, st := range ts {
					gens[st.Target.Notes] = true
				}
				if len(ts) != 5 || len(gens) != 1 {
					fail(fmt.Errorf("torn read: %d targets with generations %v", len(ts), gens))
					return
				}
				if _, err := s.ListLists(ctx, actor, w.team.ID); err != nil {
					fail(fmt.Errorf("reader lists: %w", err))
					return
				}
				reads.Add(1)
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	total := int64(0)
	for i, id := range ids {
		st, err := s.GetTarget(ctx, w.viewer, id)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := int64(counterOf(st)), success[i].Load(); got != want {
			t.Errorf("counter %d = %d, but %d increments succeeded: lost updates", i, got, want)
		}
		if st.Version != success[i].Load()+1 {
			t.Errorf("counter %d version = %d, want %d", i, st.Version, success[i].Load()+1)
		}
		total += success[i].Load()
	}
	t.Logf("%v: %d increments, %d conflicts retried, %d batch imports, %d consistent reads", duration, total, conflicts.Load(), imports.Load(), reads.Load())
	if total == 0 || reads.Load() == 0 || imports.Load() == 0 {
		t.Errorf("the test did no work")
	}
}

func counterInput(i, n int) store.TargetInput {
	in := targetInput(fmt.Sprintf("Counter %d", i), float64(100+10*i), 30)
	in.Target.Notes = "n=" + strconv.Itoa(n)
	return in
}

func counterOf(st store.StoredTarget) int {
	n, err := strconv.Atoi(strings.TrimPrefix(st.Target.Notes, "n="))
	if err != nil {
		panic(err)
	}
	return n
}

// batchCSV is a five-target file whose notes all carry generation gen.
func batchCSV(gen int) string {
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days,notes\n")
	for i := range 5 {
		fmt.Fprintf(&b, "B%d,%d,-20,2460000.5,BJD_TDB,inferior_conjunction,0.2,gen %d\n", i, 200+10*i, gen)
	}
	return b.String()
}

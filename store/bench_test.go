package store_test

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"

	"phasecast/store"
)

// benchCSV is a team CSV of n targets spread over the sky (no two within
// DuplicateRadiusArcsec), each with two goals.
func benchCSV(n int) string {
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,t0_err_days,period_days,period_err_days,goals,phase_halfwidth,exposure_s,overhead_s,priority,tags\n")
	for i := range n {
		ra := float64(i%360) + 0.5
		dec := -80 + 160*float64(i/360)/float64(n/360+1)
		fmt.Fprintf(&b, "PCX B%05d,%.4f,%.4f,2460%03d.%06d,BJD_TDB,inferior_conjunction,0.0001,0.%06d,1e-8,0.25;0.75,0.05,120,8,%d,bench\n",
			i, ra, dec, i%1000, i*7919%1000000, 50000+i, 1+i%5)
	}
	return b.String()
}

// BenchmarkImport10000 imports 10,000 targets into an empty list in one
// import (one transaction: validation, duplicate search, 10,000 targets,
// their ephemerides and audit entries).
func BenchmarkImport10000(b *testing.B) {
	ctx := context.Background()
	w := newWorld(b)
	file := benchCSV(10000)
	b.SetBytes(int64(len(file)))
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		b.StopTimer()
		l, err := w.s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: fmt.Sprintf("Bench %d", i)})
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		res, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(file), store.FormatCSV)
		if err != nil || res.Added != 10000 {
			b.Fatalf("import: %+v, %v", res.Added, err)
		}
	}
}

// BenchmarkList1000 lists a 1,000-target list with current ephemerides
// (the targets page's query).
func BenchmarkList1000(b *testing.B) {
	ctx := context.Background()
	w := newWorld(b)
	l, err := w.s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Thousand"})
	if err != nil {
		b.Fatal(err)
	}
	if _, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(benchCSV(1000)), store.FormatCSV); err != nil {
		b.Fatal(err)
	}
	// Give a tenth of the targets a longer ephemeris history.
	ts, err := w.s.ListTargets(ctx, w.editor, l.ID)
	if err != nil {
		b.Fatal(err)
	}
	for _, st := range ts[:100] {
		e := st.Target.Ephem
		e.PeriodErr /= 2
		if _, err := w.s.AddEphemeris(ctx, w.editor, st.ID, st.Version, store.EphemerisInput{Ephem: e, T0: st.Ephemeris.T0, Source: store.SourceEntered}); err != nil {
			b.Fatal(err)
		}
	}
	b.ResetTimer()
	for b.Loop() {
		ts, err := w.s.ListTargets(ctx, w.viewer, l.ID)
		if err != nil || len(ts) != 1000 {
			b.Fatalf("list: %d, %v", len(ts), err)
		}
	}
}

// BenchmarkExport1000 writes a 1,000-target list as team CSV.
func BenchmarkExport1000(b *testing.B) {
	ctx := context.Background()
	w := newWorld(b)
	l, err := w.s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Thousand"})
	if err != nil {
		b.Fatal(err)
	}
	if _, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(benchCSV(1000)), store.FormatCSV); err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	b.ResetTimer()
	for b.Loop() {
		buf.Reset()
		if err := w.s.ExportTargets(ctx, w.viewer, l.ID, &buf, store.FormatCSV); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkUpdateTarget is one versioned update (read, check, write with
// its audit entry, commit).
func BenchmarkUpdateTarget(b *testing.B) {
	ctx := context.Background()
	w := newWorld(b)
	st := w.target
	in := targetInput(st.Target.Name, st.Target.RADeg, st.Target.DecDeg)
	for i := 0; b.Loop(); i++ {
		in.Target.Notes = fmt.Sprint(i)
		var err error
		if st, err = w.s.UpdateTarget(ctx, w.editor, st.ID, st.Version, in); err != nil {
			b.Fatal(err)
		}
	}
}

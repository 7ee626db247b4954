package web

import (
	"context"
	"fmt"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

// fixture ids made by addFixtures.
type fixtures struct {
	siteID, listID int64
	targetIDs      []int64
}

// addFixtures gives the harness team an invented site ("Test Ridge", 31.9° N,
// 111.6° W, 2100 m, America/Phoenix) and a list of n invented binaries
// spread around the sky, each with two quadrature goals.
func (h *harness) addFixtures(tb testing.TB, n int) fixtures {
	tb.Helper()
	ctx := context.Background()
	owner := h.actor("owner")
	c := planner.DefaultConstraints()
	st, err := h.store.CreateSite(ctx, owner, h.teamID, store.SiteInput{Name: "Test Ridge", Zone: "America/Phoenix",
		Site: ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}, Constraints: c,
		Horizon: []planner.HorizonPoint{{AzDeg: 0, AltDeg: 5}, {AzDeg: 90, AltDeg: 12}, {AzDeg: 200, AltDeg: 8}}})
	if err != nil {
		tb.Fatal(err)
	}
	l, err := h.store.CreateList(ctx, owner, h.teamID, store.ListInput{Name: "Test list"})
	if err != nil {
		tb.Fatal(err)
	}
	f := fixtures{siteID: st.ID, listID: l.ID}
	for i := range n {
		t0, err := store.ParseEpoch(fmt.Sprintf("2460400.%06d", 123457+i*7919), ephem.StdBJDTDB, ephem.FormJD)
		if err != nil {
			tb.Fatal(err)
		}
		tg := planner.Target{Name: fmt.Sprintf("TST %02d", i+1), RADeg: float64(i*360) / float64(n) * 0.999, DecDeg: float64(i%7)*12 - 20,
			Priority: 1 + i%5, AcquireS: 120, Tags: []string{"test", fmt.Sprintf("group%d", i%3)},
			Ephem: ephem.Ephemeris{PeriodDays: 0.05 + 0.013*float64(i), T0ErrDays: 1e-5, PeriodErr: 1e-9, Convention: ephem.ConvInferiorConjunction},
			Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}, {Center: 0.75, HalfWidth: 0.05, ExposureS: 60, OverheadS: 5}}}
		t, err := h.store.CreateTarget(ctx, owner, l.ID, store.TargetInput{Target: tg, T0: t0})
		if err != nil {
			tb.Fatal(err)
		}
		f.targetIDs = append(f.targetIDs, t.ID)
	}
	return f
}

package planner_test

import (
	"bytes"
	"encoding/csv"
	"errors"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
)

// TestTelescopeSheet builds the sheet of the README's night: one row per
// block, points labelled start, mid and end at the block's start, middle
// and end, airmass and phase ranges the block's own, and a CSV with one
// line per block under SheetCSVHeader.
func TestTelescopeSheet(t *testing.T) {
	req := replanNight(t, 4)
	req.Targets[0].Mag = 15.2
	p, err := planner.PlanNight(req)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := planner.TelescopeSheet(req.Site, req.Targets, p.Blocks)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != len(p.Blocks) || len(rows) == 0 {
		t.Fatalf("%d rows for %d blocks", len(rows), len(p.Blocks))
	}
	for i, r := range rows {
		b := p.Blocks[i]
		mid := b.Start.Add(b.End.Sub(b.Start) / 2)
		if r.Points[0].Label != "start" || !r.Points[0].At.Equal(b.Start) || r.Points[1].Label != "mid" || !r.Points[1].At.Equal(mid) ||
			r.Points[2].Label != "end" || !r.Points[2].At.Equal(b.End) {
			t.Errorf("row %d: points %+v", i, r.Points)
		}
		// The block's own airmass range holds the refracted altitudes of
		// its ends (airmass from ephem.Airmass).
		for _, pt := range []planner.SheetPoint{r.Points[0], r.Points[2]} {
			x, ok := ephem.Airmass(pt.AltDeg)
			if !ok || x < b.AirmassMin-1e-3 || x > b.AirmassMax+1e-3 {
				t.Errorf("row %d %s: airmass %.4f at %s outside the block's %.4f–%.4f", i, b.Target, x, pt.Label, b.AirmassMin, b.AirmassMax)
			}
		}
		// The mid-point's parallactic angle is the block's (Block.Parallactic).
		if d := r.Points[1].ParallacticDeg - b.Parallactic; d > 0.01 || d < -0.01 {
			t.Errorf("row %d: mid parallactic %.4f, block %.4f", i, r.Points[1].ParallacticDeg, b.Parallactic)
		}
	}
	doc := export.NewSheetDoc(rows)
	b, err := export.SheetCSV(doc)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(rows)+1 || len(recs[0]) != len(export.SheetCSVHeader) {
		t.Fatalf("%d CSV lines of %d fields", len(recs), len(recs[0]))
	}
	withMag := 0
	for _, r := range doc.Rows {
		switch {
		case r.Target == req.Targets[0].Name && (r.Mag == nil || *r.Mag != 15.2):
			t.Errorf("%s: magnitude %v, want 15.2", r.Target, r.Mag)
		case r.Target == req.Targets[0].Name:
			withMag++
		case r.Mag != nil:
			t.Errorf("%s: magnitude %v, want null (unknown)", r.Target, *r.Mag)
		}
	}
	if withMag == 0 {
		t.Errorf("no block of %s, whose magnitude is known", req.Targets[0].Name)
	}
	_, err = planner.TelescopeSheet(req.Site, req.Targets, []planner.Block{{TargetIndex: 99}})
	var ie *ephem.InputError
	if !errors.As(err, &ie) || ie.Field != "blocks[0].target_index" {
		t.Errorf("bad target index: %v", err)
	}
}

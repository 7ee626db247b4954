package store_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

const timingsFile = "time,std,err_s,form,event,observer,note\n" +
	"2460319.7894313,HJD_UTC,6,JD,,A. Lund,older photometry\n" +
	"60401.8956957,BJD_TDB,3.2,MJD,,B. Okoro,\n" +
	"2460500.4322443,BJD_TDB,6,JD,max_recession,,\n"

func TestImportTimingsCSV(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	// A dry run converts and returns the rows and writes nothing.
	prev, err := s.ImportTimingsCSV(ctx, w.editor, w.target.ID, strings.NewReader(timingsFile), true)
	if err != nil {
		t.Fatal(err)
	}
	if len(prev) != 3 || prev[0].ID != 0 || prev[0].T.Standard != ephem.StdHJDUTC || prev[2].Event != "max_recession" {
		t.Fatalf("preview %+v", prev)
	}
	// HJD_UTC → BJD_TDB moves the time by TT − UTC and the barycentre
	// correction of the Sun: about a minute here, never zero.
	if d := prev[0].BJD.SubDays(prev[0].T.JD) * 86400; d < 30 || d > 120 {
		t.Errorf("HJD_UTC → BJD_TDB moved the first timing by %.2f s", d)
	}
	if got, err := s.ListTimings(ctx, w.viewer, w.target.ID); err != nil || len(got) != 0 {
		t.Fatalf("after the dry run: %d timings (%v), want none", len(got), err)
	}
	got, err := s.ImportTimingsCSV(ctx, w.editor, w.target.ID, strings.NewReader(timingsFile), false)
	if err != nil {
		t.Fatal(err)
	}
	list, err := s.ListTimings(ctx, w.viewer, w.target.ID)
	if err != nil || len(list) != 3 || len(got) != 3 {
		t.Fatalf("%d timings stored (%v), want 3", len(list), err)
	}
	for i := range got {
		if got[i].BJD != prev[i].BJD || got[i].ID == 0 {
			t.Errorf("row %d: stored BJD %v (id %d), previewed %v", i, got[i].BJD, got[i].ID, prev[i].BJD)
		}
	}
	if list[0].Observer != "A. Lund" || list[0].Note != "older photometry" || list[1].ErrDays != 3.2/86400 {
		t.Errorf("stored %+v", list[:2])
	}
}

func TestImportTimingsCSVAllOrNothing(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	s := w.s
	for _, tc := range []struct {
		name, file string
		want       []string
	}{
		{"BadCells", "time,std,err_s\n2460319.7894313,HJD_UTC,6\n2460320.7,XJD,6\n2460321.7,BJD_TDB,-2\n",
			[]string{"line 3, column 2 (std)", "line 4, column 3 (err_s)"}},
		// The store refuses what the file reader cannot judge: an observer
		// name longer than the store keeps, on its line.
		{"StoreRefusesRow", "time,std,err_s,observer\n2460319.7894313,BJD_TDB,6,ok\n2460320.7894313,BJD_TDB,6," + strings.Repeat("x", store.MaxNameLen+1) + "\n",
			[]string{"line 3, column observer"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := s.ImportTimingsCSV(ctx, w.editor, w.target.ID, strings.NewReader(tc.file), false)
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) || len(te.Cells) != len(tc.want) {
				t.Fatalf("err = %v; want %d cells", err, len(tc.want))
			}
			for i, want := range tc.want {
				if c := te.Cells[i].String(); !strings.HasPrefix(c, want) || !strings.Contains(c, "accepted") {
					t.Errorf("cell %d = %q, want %q… naming what is accepted", i, c, want)
				}
			}
			if got, _ := s.ListTimings(ctx, w.viewer, w.target.ID); len(got) != 0 {
				t.Fatalf("%d timings stored from a rejected file", len(got))
			}
		})
	}
	_, err := s.ImportTimingsCSV(ctx, w.viewer, w.target.ID, strings.NewReader(timingsFile), false)
	wantCode(t, err, store.EFORBIDDEN)
}

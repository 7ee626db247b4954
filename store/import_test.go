package store_test

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
)

const teamCSV = `name,ra,dec,t0,t0_form,t0_standard,t0_convention,t0_err_days,period_days,period_err_days,ecc,omega_deg,goals,phase_halfwidth,exposure_s,overhead_s,priority,tags,notes
PCX J0032+3741,00:32:18.42,+37:41:22.7,2458791.8347,JD,BJD_TDB,inferior_conjunction,0.0002,0.135217,5e-7,,,eclipse±0.03;eclipse_ingress±0.01[exposure_s=10 eclipse_duration_days=0.00614];quadratures,0.04,300,10,1,eclipsing;white-dwarf,"invented, with a comma"
PCX J0218-0917,02:18:05.91,-09:17:44.0,58962.447213,MJD,BJD_TDB,ascending_node,2e-6,0.21411782,3e-10,,,superior_conjunction;0.5+-0.1[n_exposures=4 min_nights=2],0.05,600,10,2,pulsar,
PCX J0405+2206,61.4626,22.1030,2455940.61233,,HJD_UTC,inferior_conjunction,0.0003,0.069312,1e-8,,,,,,,3,,
PCX J1552-2130,15:52:47.12,-21:30:16.8,2459730.2241,JD,BJD_TDB,inferior_conjunction,0.002,0.873114,5e-6,0.28,142,periastron;max_recession,0.04,300,10,2,eccentric,
`

func importInto(tb testing.TB, w *world, listName, file string, f store.FileFormat) (store.TargetList, store.ImportResult) {
	tb.Helper()
	ctx := context.Background()
	l, err := w.s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: listName})
	if err != nil {
		tb.Fatal(err)
	}
	res, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(file), f)
	if err != nil {
		tb.Fatalf("import: %v", err)
	}
	return l, res
}

func TestImportTeamCSV(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	l, res := importInto(t, w, "Imported", teamCSV, store.FormatAuto)
	if res.Format != store.FormatCSV || res.Added != 4 || res.Updated != 0 || len(res.Rows) != 4 || res.Rows[2].Line != 4 {
		t.Fatalf("result = %+v", res)
	}
	ts, err := w.s.ListTargets(ctx, w.viewer, l.ID)
	if err != nil || len(ts) != 4 {
		t.Fatalf("ListTargets = %d, %v", len(ts), err)
	}
	a := ts[0]
	if len(a.Target.Goals) != 3 || a.Target.Goals[1].Event != "eclipse_ingress" || a.Target.Goals[1].ExposureS != 10 ||
		a.Target.Goals[1].EclipseDurDays != 0.00614 || a.Target.Goals[1].HalfWidth != 0.01 || a.Target.Goals[2].HalfWidth != 0.04 ||
		a.Target.Goals[2].ExposureS != 300 || a.Target.Notes != "invented, with a comma" || a.Ephemeris.Source != store.SourceImport {
		t.Errorf("first target = %+v", a.Target)
	}
	b := ts[1]
	if b.Ephemeris.T0.Form != ephem.FormMJD || b.Target.Ephem.Convention != ephem.ConvAscendingNode ||
		b.Target.Goals[1].NExposures != 4 || b.Target.Goals[1].MinNights != 2 || b.Target.Goals[1].HalfWidth != 0.1 {
		t.Errorf("pulsar target = %+v / %+v", b.Ephemeris, b.Target.Goals)
	}
	if ts[2].Target.Priority != 3 || len(ts[2].Target.Goals) != 0 || ts[2].Ephemeris.T0.Form != ephem.FormJD {
		t.Errorf("defaults: %+v", ts[2])
	}
	if ts[3].Target.Ephem.Ecc != 0.28 || ts[3].Target.Ephem.OmegaDeg != 142 {
		t.Errorf("eccentric: %+v", ts[3].Target.Ephem)
	}
}

func TestImportPlanCSV(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	plan := strings.Join(planner.PlanCSVHeader, ",") + "\n" +
		"PCX J0032+3741,8.1234,37.69,2460123.4567891234,0.1352,0.25;0.75,0.05,120,8,1\n" +
		"PCX J2117+1805,21:17:30.50,+18:05:12.0,2459000.0,0.1015,0,0.1,60,5,5\n"
	l, res := importInto(t, w, "From plan", plan, store.FormatAuto)
	if res.Format != store.FormatPlanCSV || res.Added != 2 || len(res.Assumptions) == 0 ||
		!strings.Contains(strings.Join(res.Assumptions, " "), "inferior_conjunction") {
		t.Fatalf("result = %+v", res)
	}
	ts, err := w.s.ListTargets(ctx, w.viewer, l.ID)
	if err != nil || len(ts) != 2 {
		t.Fatal(err)
	}
	if ts[0].Ephemeris.T0.Text != "2460123.4567891234" || ts[0].Ephemeris.T0.Standard != ephem.StdBJDTDB ||
		len(ts[0].Target.Goals) != 2 || ts[0].Target.Goals[1].OverheadS != 8 {
		t.Errorf("target = %+v", ts[0])
	}
	t.Run("PlanFileErrorsKeepPlannerCells", func(t *testing.T) {
		bad := strings.Join(planner.PlanCSVHeader, ",") + "\nX,400,0,2460000.5,1,0.5,0.1,10,0,1\n"
		_, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(bad), store.FormatAuto)
		wantCode(t, err, store.EINVALID)
		var te *planner.TableError
		if !errors.As(err, &te) || te.Cells[0].Line != 2 || te.Cells[0].Column != "ra" {
			t.Errorf("err = %v", err)
		}
	})
}

// TestImportRejectsWithEveryProblem: a file with several bad rows is
// refused whole, and the error names every problem by line and column.
func TestImportRejectsWithEveryProblem(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	head := "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,priority\n"
	file := head +
		"Good A,10.5,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n" + // line 2: fine
		"Bad B,25h,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n" + // line 3: ra
		"Bad C,20,10,2460000.5,,inferior_conjunction,-1,0.25,0.05,60,1\n" + // line 4: standard, period
		"Good A,30,10,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n" + // line 5: duplicate name
		"Near A,10.5004,10.0003,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n" + // line 6: 1.7″ from line 2
		"Bad D,40,10,60000.5,BJD_TDB,,0.1,sunset,0.05,60,7\n" + // line 7: t0 (MJD as JD), convention, goals, priority
		"Near old,10.0002,20.0001,2460000.5,BJD_TDB,inferior_conjunction,0.1,0.25,0.05,60,1\n" // line 8: near the existing target
	ex, err := w.s.CreateTarget(ctx, w.editor, w.list.ID, targetInput("Existing", 10, 20))
	if err != nil {
		t.Fatal(err)
	}
	before, err := w.s.ListTargets(ctx, w.editor, w.list.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, mode := range []string{"Preview", "Import"} {
		t.Run(mode, func(t *testing.T) {
			var err error
			if mode == "Preview" {
				_, err = w.s.PreviewImport(ctx, w.editor, w.list.ID, strings.NewReader(file), store.FormatAuto)
			} else {
				_, err = w.s.ImportTargets(ctx, w.editor, w.list.ID, strings.NewReader(file), store.FormatAuto)
			}
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("no TableError in %v", err)
			}
			got := map[string]bool{}
			for _, c := range te.Cells {
				got[c.String()[:strings.Index(c.String()+":", ":")]] = true
			}
			want := []string{
				"line 3, column 2 (ra)",
				"line 4, column 5 (t0_standard)", "line 4, column 7 (period_days)",
				"line 5, column 1 (name)",
				"line 7, column 4 (t0)", "line 7, column 6 (t0_convention)", "line 7, column 8 (goals)", "line 7, column 11 (priority)",
			}
			for _, wnt := range want {
				if !got[wnt] {
					t.Errorf("missing %q in:\n%v", wnt, err)
				}
			}
			text := err.Error()
			for _, frag := range []string{"line 6", "1.8″", `"Good A" on line 2`, "line 8", `"Existing" already on the list`, "5″"} {
				if !strings.Contains(text, frag) {
					t.Errorf("error lacks %q:\n%v", frag, text)
				}
			}
			if strings.Contains(text, "line 2,") {
				t.Errorf("good line 2 reported:\n%v", text)
			}
		})
	}
	after, err := w.s.ListTargets(ctx, w.editor, w.list.ID)
	if err != nil || len(after) != len(before) {
		t.Fatalf("a refused import changed the list: %d → %d (%v)", len(before), len(after), err)
	}
	_ = ex
}

func TestImportUpdatesAndPreview(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	l, _ := importInto(t, w, "L", teamCSV, store.FormatCSV)
	changed := strings.Replace(teamCSV, "0.21411782", "0.21411790", 1) // pulsar: new period
	changed = strings.Replace(changed, ",3,,\n", ",4,,\n", 1)          // dwarf nova: priority
	changed += "PCX J2339-0541,23:39:02.66,-05:41:37.3,2459904.55520,JD,BJD_TDB,inferior_conjunction,2e-5,0.0290344,1e-10,,,quadratures,0.04,30,4,1,,\n"
	prev, err := w.s.PreviewImport(ctx, w.editor, l.ID, strings.NewReader(changed), store.FormatAuto)
	if err != nil {
		t.Fatal(err)
	}
	if prev.Added != 1 || prev.Updated != 2 || prev.Unchanged != 2 {
		t.Fatalf("preview = %+v", prev)
	}
	if r := prev.Rows[1]; r.Action != store.ImportUpdate || strings.Join(r.Changed, ",") != "ephemeris" {
		t.Errorf("pulsar row = %+v", r)
	}
	if r := prev.Rows[2]; r.Action != store.ImportUpdate || strings.Join(r.Changed, ",") != "priority" {
		t.Errorf("dwarf nova row = %+v", r)
	}
	if ts, _ := w.s.ListTargets(ctx, w.editor, l.ID); len(ts) != 4 {
		t.Fatalf("preview wrote: %d targets", len(ts))
	}
	res, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(changed), store.FormatAuto)
	if err != nil || res.Added != 1 || res.Updated != 2 {
		t.Fatalf("import = %+v, %v", res, err)
	}
	hist, err := w.s.ListEphemerides(ctx, w.viewer, res.Rows[1].TargetID)
	if err != nil || len(hist) != 2 || hist[0].Source != store.SourceImport || hist[1].Ephem.PeriodDays != 0.21411782 {
		t.Errorf("pulsar history = %+v, %v", hist, err)
	}
}

// TestExportRoundTrip: export, import into a new list, export again: the
// two exports are identical, in both formats.
func TestExportRoundTrip(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	l, _ := importInto(t, w, "Source", teamCSV, store.FormatCSV)
	// A target with tricky text, and a formula-like name.
	in := targetInput("=SUM(A1) \"quoted\"", 300, -45)
	in.Target.Notes = "line one\nline two, with a comma"
	in.Target.Tags = []string{"a", "b c"}
	if _, err := w.s.CreateTarget(ctx, w.editor, l.ID, in); err != nil {
		t.Fatal(err)
	}
	for _, f := range []store.FileFormat{store.FormatCSV, store.FormatJSON} {
		t.Run(string(f), func(t *testing.T) {
			var first bytes.Buffer
			if err := w.s.ExportTargets(ctx, w.viewer, l.ID, &first, f); err != nil {
				t.Fatal(err)
			}
			l2, res := importInto(t, w, "Copy "+string(f), first.String(), store.FormatAuto)
			if res.Format != f || res.Added != 5 {
				t.Fatalf("re-import = %+v", res)
			}
			var second bytes.Buffer
			if err := w.s.ExportTargets(ctx, w.viewer, l2.ID, &second, f); err != nil {
				t.Fatal(err)
			}
			got := strings.Replace(second.String(), `"Copy `+string(f)+`"`, `"Source"`, 1)
			if got != first.String() {
				t.Errorf("export → import → export differs:\n--- first\n%s\n--- second\n%s", first.String(), second.String())
			}
			if f == store.FormatCSV && !strings.Contains(first.String(), `"'=SUM(A1) ""quoted"""`) {
				t.Errorf("formula-like name not quoted:\n%s", first.String())
			}
		})
	}
}

func TestImportJSONErrorsHaveLines(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	doc := `{
  "format": "phasecast-targets/1",
  "targets": [
    {"name": "A", "ra": 10, "dec": 10, "ephemeris": {"t0": 2460000.5, "t0_standard": "BJD_TDB", "t0_convention": "inferior_conjunction", "period_days": 0.1}, "goals": []},
    {"name": "B", "ra": "25:00:00", "dec": 10,
     "ephemeris": {"t0": "2460000.5", "t0_standard": "BJD_TDB", "t0_convention": "inferior_conjunction", "period_days": -2}}
  ]
}`
	_, err := w.s.ImportTargets(ctx, w.editor, w.list.ID, strings.NewReader(doc), store.FormatAuto)
	wantCode(t, err, store.EINVALID)
	var te *planner.TableError
	if !errors.As(err, &te) || len(te.Cells) != 2 || te.Cells[0].Line != 5 || te.Cells[0].Column != "ra" ||
		te.Cells[1].Line != 5 || te.Cells[1].Column != "ephemeris.period_days" {
		t.Fatalf("err = %v", err)
	}
	fixed := strings.Replace(doc, `"25:00:00"`, `"01:00:00"`, 1)
	_, err = w.s.ImportTargets(ctx, w.editor, w.list.ID, strings.NewReader(fixed), store.FormatAuto)
	if !errors.As(err, &te) || len(te.Cells) != 1 || te.Cells[0].Line != 5 || te.Cells[0].Column != "ephemeris.period_days" {
		t.Fatalf("err = %v", err)
	}
	_, err = w.s.ImportTargets(ctx, w.editor, w.list.ID, strings.NewReader(strings.Replace(doc, `"name": "A", `, `"name": "A", "colour": 1, `, 1)), store.FormatAuto)
	wantCode(t, err, store.EINVALID)
	if !strings.Contains(err.Error(), "colour") {
		t.Errorf("unknown member not named: %v", err)
	}
}

package store_test

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// TestImportRVGoal checks the RV goal through the target files: the team
// CSV's rv_ columns and the JSON "rv" object are stored and exported back;
// a file without them (an older file) imports with no RV goal; a bad value
// is refused naming its column or member, and nothing is imported.
func TestImportRVGoal(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	head := "name,ra,dec,t0,t0_standard,t0_convention,period_days,ecc,omega_deg,goals,phase_halfwidth,exposure_s,rv_model,rv_k_kms,rv_sigma_kms,rv_want_rel_k\n"
	file := head +
		"RV-A,10,-20,2460000.5,BJD_TDB,inferior_conjunction,0.3,,,quadratures,0.05,300,circular,85,4.5,0.03\n" +
		"RV-B,40,-20,2460000.5,BJD_TDB,inferior_conjunction,2.3,0.4,120,quadratures,0.05,600,eccentric,30,2,\n" +
		"RV-C,80,-20,2460000.5,BJD_TDB,inferior_conjunction,0.5,,,eclipse,0.05,60,,,,\n"
	l, res := importInto(t, w, "RV", file, store.FormatAuto)
	if res.Added != 3 {
		t.Fatalf("result %+v", res)
	}
	ts, err := w.s.ListTargets(ctx, w.viewer, l.ID)
	if err != nil {
		t.Fatal(err)
	}
	want := []*planner.RVGoal{
		{Model: planner.RVCircular, KKms: 85, SigmaVKms: 4.5, WantRelK: 0.03},
		{Model: planner.RVEccentric, KKms: 30, SigmaVKms: 2},
		nil,
	}
	for i, st := range ts {
		got := st.Target.RV
		if (got == nil) != (want[i] == nil) || (got != nil && *got != *want[i]) {
			t.Errorf("%s: RV %+v, want %+v", st.Target.Name, got, want[i])
		}
	}
	for _, f := range []store.FileFormat{store.FormatCSV, store.FormatJSON} {
		var out bytes.Buffer
		if err := w.s.ExportTargets(ctx, w.viewer, l.ID, &out, f); err != nil {
			t.Fatal(err)
		}
		l2, _ := importInto(t, w, "RV copy "+string(f), out.String(), store.FormatAuto)
		ts2, err := w.s.ListTargets(ctx, w.viewer, l2.ID)
		if err != nil {
			t.Fatal(err)
		}
		for i, st := range ts2 {
			if got := st.Target.RV; (got == nil) != (want[i] == nil) || (got != nil && *got != *want[i]) {
				t.Errorf("%s round trip %s: RV %+v, want %+v", f, st.Target.Name, got, want[i])
			}
		}
	}
	// A changed RV goal is an update naming rv_goal; the rest unchanged.
	changed := strings.Replace(file, "circular,85,4.5,0.03", "circular,85,4.5,0.02", 1)
	prev, err := w.s.PreviewImport(ctx, w.editor, l.ID, strings.NewReader(changed), store.FormatAuto)
	if err != nil {
		t.Fatal(err)
	}
	if prev.Updated != 1 || prev.Unchanged != 2 || strings.Join(prev.Rows[0].Changed, ",") != "rv_goal" {
		t.Errorf("preview of a changed RV goal = %+v", prev)
	}
	// An older team CSV, without the rv_ columns, has no RV goals.
	lOld, _ := importInto(t, w, "Old", teamCSV, store.FormatCSV)
	old, err := w.s.ListTargets(ctx, w.viewer, lOld.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, st := range old {
		if st.Target.RV != nil {
			t.Errorf("%s: RV goal %+v from a file without rv_ columns", st.Target.Name, st.Target.RV)
		}
	}
	for _, c := range []struct{ name, file, column, value string }{
		{"KZero", head + "X,200,-20,2460000.5,BJD_TDB,inferior_conjunction,0.3,,,quadratures,0.05,300,circular,0,4.5,\n", "rv_k_kms", "0"},
		{"SigmaNegative", head + "X,200,-20,2460000.5,BJD_TDB,inferior_conjunction,0.3,,,quadratures,0.05,300,circular,10,-1,\n", "rv_sigma_kms", "-1"},
		{"NoModel", head + "X,200,-20,2460000.5,BJD_TDB,inferior_conjunction,0.3,,,quadratures,0.05,300,,10,,\n", "rv_k_kms", "10"},
		{"JSON", `{"format": "phasecast-targets/1", "targets": [{"name": "X", "ra": 200, "dec": -20, "ephemeris": {"t0": 2460000.5,
 "t0_standard": "BJD_TDB", "t0_convention": "inferior_conjunction", "period_days": 0.3},
 "goals": [{"center": 0.25, "phase_halfwidth": 0.05, "exposure_s": 300}], "rv": {"model": "circular", "k_kms": 10, "sigma_kms": 0}}]}`,
			"rv.sigma_kms", "0"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := w.s.ImportTargets(ctx, w.editor, l.ID, strings.NewReader(c.file), store.FormatAuto)
			wantCode(t, err, store.EINVALID)
			var te *planner.TableError
			if !errors.As(err, &te) || len(te.Cells) != 1 || te.Cells[0].Column != c.column || te.Cells[0].Value != c.value {
				t.Fatalf("error %v, want one problem in %s (%s)", err, c.column, c.value)
			}
		})
	}
}

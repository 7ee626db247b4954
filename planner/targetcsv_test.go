package planner_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
)

const planHeader = "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority\n"

func TestParseTargetsCSV_OK(t *testing.T) {
	in := planHeader +
		"# a comment line\n" +
		"PCX J0032+3741,8.1234,37.6900,2460123.4567891234,0.1352,0.25;0.75,0.05,120,8,1\n" +
		"\n" +
		"PCX J2117+1805,21:17:30.50,+18:05:12.0,2459000.0,0.1015,0,0.1,60,5,5\n"
	got, err := planner.ParseTargetsCSV(strings.NewReader(in))
	if err != nil {
		t.Fatalf("ParseTargetsCSV: %v", err)
	}
	if len(got) != 2 {
		t.Fatalf("got %d targets, want 2", len(got))
	}
	a := got[0]
	if a.Name != "PCX J0032+3741" || a.RADeg != 8.1234 || a.DecDeg != 37.69 || a.Priority != 1 {
		t.Errorf("first target = %+v", a)
	}
	if a.Ephem.Convention != ephem.ConvInferiorConjunction {
		t.Errorf("convention = %q, want inferior_conjunction", a.Ephem.Convention)
	}
	// The epoch keeps digits beyond float64: Day + Frac must reproduce the
	// fractional digits .4567891234 to 1e-12 days.
	if a.Ephem.T0.Day != 2460122.5 || math.Abs(a.Ephem.T0.Frac-0.9567891234) > 1e-12 {
		t.Errorf("T0 = %+v, want Day 2460122.5 Frac 0.9567891234", a.Ephem.T0)
	}
	if len(a.Goals) != 2 || a.Goals[0].Center != 0.25 || a.Goals[1].Center != 0.75 ||
		a.Goals[1].HalfWidth != 0.05 || a.Goals[1].ExposureS != 120 || a.Goals[1].OverheadS != 8 {
		t.Errorf("goals = %+v", a.Goals)
	}
	b := got[1]
	if math.Abs(b.RADeg-(21+17/60.0+30.5/3600)*15) > 1e-9 || math.Abs(b.DecDeg-(18+5/60.0+12/3600.0)) > 1e-9 {
		t.Errorf("sexagesimal position = %v %v", b.RADeg, b.DecDeg)
	}
	if b.Ephem.T0.Day != 2458999.5 || b.Ephem.T0.Frac != 0.5 {
		t.Errorf("T0 = %+v", b.Ephem.T0)
	}
}

func TestParseTargetsCSV_Errors(t *testing.T) {
	tests := []struct {
		name string
		in   string
		want []string // each must appear in the error text
		n    int      // number of cells reported
	}{
		{"Empty", "", []string{"line 1", "empty"}, 1},
		{"MissingColumn", "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s\nX,1,2,2460000.5,1,0.5,0.1,10,0\n",
			[]string{"missing column priority"}, 1},
		{"UnknownColumn", strings.TrimSuffix(planHeader, "\n") + ",colour\n", []string{"column 11 (colour)", "unknown column"}, 1},
		{"HeaderOnly", planHeader, []string{"line 2", "no targets"}, 1},
		{"EveryBadCell", planHeader +
			"A,400,95,60000.5,-1,1.5,0.5,0,-1,9\n" +
			"B,10,10,2460000.5,1,0.5,0.1,10,0,1\n" +
			",10,10,2460000.5,1,0.5;0.5,0.1,10,0,1\n",
			[]string{
				"line 2, column 2 (ra)", "line 2, column 3 (dec)", "line 2, column 4 (t0_bjd_tdb)",
				"line 2, column 5 (period_days)", "line 2, column 6 (phases)", "line 2, column 7 (phase_halfwidth)",
				"line 2, column 8 (exposure_s)", "line 2, column 9 (overhead_s)", "line 2, column 10 (priority)",
				"line 4, column 1 (name)", "line 4, column 6 (phases)",
			}, 11},
		{"FieldCount", planHeader + "A,1,2\n", []string{"line 2", "has 3 fields; the header has 10"}, 1},
		{"DuplicateName", planHeader + "A,1,2,2460000.5,1,0.5,0.1,10,0,1\nA,3,4,2460000.5,1,0.5,0.1,10,0,1\n",
			[]string{"line 3, column 1 (name)", "duplicate", "line 2"}, 1},
		{"NaN", planHeader + "A,1,2,2460000.5,NaN,0.5,0.1,10,0,1\n", []string{"line 2, column 5 (period_days)"}, 1},
		{"BadQuote", planHeader + "A\"x,1,2,2460000.5,1,0.5,0.1,10,0,1\nB,1,2,2460000.5,0,0.5,0.1,10,0,1\n",
			[]string{"line 2", "malformed CSV", "line 3, column 5 (period_days)"}, 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := planner.ParseTargetsCSV(strings.NewReader(tc.in))
			if err == nil {
				t.Fatalf("no error; got %d targets", len(got))
			}
			if got != nil {
				t.Errorf("targets returned with an error: %v", got)
			}
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("error %T is not a *TableError: %v", err, err)
			}
			if len(te.Cells) != tc.n {
				t.Errorf("got %d cells, want %d:\n%v", len(te.Cells), tc.n, err)
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error lacks %q:\n%v", w, err)
				}
			}
		})
	}
}

func TestParseTargetsCSV_RVColumns(t *testing.T) {
	head := strings.TrimSuffix(planHeader, "\n") + ",rv_model,rv_k_kms,rv_sigma_kms,rv_want_rel_k\n"
	t.Run("OK", func(t *testing.T) {
		in := head +
			"A,8.1,37.7,2460123.45,0.1352,0.25;0.75,0.05,120,8,1,circular,85,4.5,0.03\n" +
			"B,8.1,37.7,2460123.45,0.1352,0.25,0.05,120,8,1,,,,\n"
		got, err := planner.ParseTargetsCSV(strings.NewReader(in))
		if err != nil {
			t.Fatal(err)
		}
		want := planner.RVGoal{Model: planner.RVCircular, KKms: 85, SigmaVKms: 4.5, WantRelK: 0.03}
		if got[0].RV == nil || *got[0].RV != want || got[1].RV != nil {
			t.Errorf("RV goals %+v and %+v, want %+v and none", got[0].RV, got[1].RV, want)
		}
	})
	for _, c := range []struct{ name, in, want string }{
		{"KZero", head + "A,8.1,37.7,2460123.45,0.1352,0.25,0.05,120,8,1,circular,0,4.5,\n",
			`line 2, column 12 (rv_k_kms): "0": a semi-amplitude K > 0 km/s, at most 2000`},
		{"SigmaNegative", head + "A,8.1,37.7,2460123.45,0.1352,0.25,0.05,120,8,1,eccentric,10,-1,\n",
			`line 2, column 13 (rv_sigma_kms): "-1": a velocity error of one exposure σv > 0 km/s`},
		{"CellsWithoutModel", head + "A,8.1,37.7,2460123.45,0.1352,0.25,0.05,120,8,1,,10,1,\n",
			`line 2, column 12 (rv_k_kms): "10": empty: this row has no rv_model`},
		{"ColumnWithoutModel", strings.TrimSuffix(planHeader, "\n") + ",rv_k_kms\nA,8.1,37.7,2460123.45,0.1352,0.25,0.05,120,8,1,10\n",
			`column without rv_model`},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := planner.ParseTargetsCSV(strings.NewReader(c.in))
			var te *planner.TableError
			if !errors.As(err, &te) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

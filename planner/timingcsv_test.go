package planner_test

import (
	"errors"
	"strings"
	"testing"

	"phasecast/ephem"
	"phasecast/planner"
)

func TestParseTimingsCSV(t *testing.T) {
	in := "# invented eclipse timings\ntime,std,err_s,form,event,observer,note\n" +
		"2460319.7894313,HJD_UTC,6,JD,,A. Lund,older photometry\n" +
		"60401.8956957,bjd_tdb,3.2,MJD,max_recession,,\n"
	rows, err := planner.ParseTimingsCSV(strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].Line != 3 || rows[1].Line != 4 {
		t.Fatalf("rows %+v", rows)
	}
	if rows[0].Std != ephem.StdHJDUTC || rows[0].Form != ephem.FormJD || rows[0].ErrDays != 6.0/86400 || rows[0].Observer != "A. Lund" {
		t.Errorf("row 1: %+v", rows[0])
	}
	if got := rows[1].JD.Float(); got != 2460402.3956957 || rows[1].Std != ephem.StdBJDTDB || rows[1].Event != "max_recession" {
		t.Errorf("row 2: JD %.7f %+v", got, rows[1])
	}
	days, err := planner.ParseTimingsCSV(strings.NewReader("time,std,err_days\n2460500.4322443,BJD_TDB,0.00005\n"))
	if err != nil || days[0].ErrDays != 0.00005 {
		t.Errorf("err_days: %v %+v", err, days)
	}
}

func TestParseTimingsCSVErrors(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		want     []string // every cell message, in order
	}{
		{"Empty", "", []string{"line 1: the file is empty"}},
		{"NoRows", "time,std,err_s\n", []string{"line 2: the file has a header but no timings"}},
		{"Header", "time,error,err_s,err_days\n", []string{`line 1, column 2 (error): "error": unknown column; accepted: time,std,err_s,err_days,form,event,observer,note`,
			"line 1, column std: missing column std", `line 1, column 4 (err_days): "err_days": give err_s (seconds) or err_days (days), not both`}},
		{"NoErr", "time,std\n", []string{"line 1, column err_s: missing column err_s or err_days"}},
		{"EveryBadCell", "time,std,err_s,form,event\n" +
			"2460500.43,BJD_TDB,6,JD,\n" +
			"24605OO.43,BJD,-1,XJD,quadrature_9\n" +
			"2460501.43,,0,JD,\n", []string{
			`line 3, column 2 (std): "BJD": accepted: BJD_TDB, BJD_UTC`,
			`line 3, column 4 (form): "XJD": accepted: JD, MJD`,
			`line 3, column 3 (err_s): "-1": accepted: the 1σ uncertainty, > 0 and at most one day (seconds)`,
			`line 3, column 5 (event): "quadrature_9": accepted: empty (the reference event of T0) or one of`,
			`line 4, column 2 (std): accepted: BJD_TDB`,
			`line 4, column 3 (err_s): "0": accepted: the 1σ uncertainty`}},
		{"BadTime", "time,std,err_s\n24605OO.43,BJD_TDB,6\n", []string{`line 2, column 1 (time): "24605OO.43": accepted:`}},
		{"Fields", "time,std,err_s\n2460500.43,BJD_TDB\n", []string{"line 2: has 2 fields; the header has 3"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := planner.ParseTimingsCSV(strings.NewReader(tc.in))
			var te *planner.TableError
			if !errors.As(err, &te) {
				t.Fatalf("err = %v, want a TableError", err)
			}
			if len(te.Cells) != len(tc.want) {
				t.Fatalf("%d cells, want %d:\n%v", len(te.Cells), len(tc.want), err)
			}
			for i, w := range tc.want {
				if got := te.Cells[i].String(); !strings.HasPrefix(got, w) {
					t.Errorf("cell %d = %q, want it to start %q", i, got, w)
				}
			}
		})
	}
}

// FuzzParseTimingsCSV: any input gives rows or a TableError, never both,
// never a panic; accepted rows have a finite time, a known standard and
// form, and a 1σ in (0, 1] day.
func FuzzParseTimingsCSV(f *testing.F) {
	f.Add("time,std,err_s\n2460500.4322443,BJD_TDB,6\n")
	f.Add("\ufefftime,std,err_days,form,event,observer,note\n60401.8956957,HJD_UTC,0.00005,MJD,eclipse,\"Lund, A.\",=1+1\n")
	f.Add("time,std,err_s\n\"2460500\n")
	f.Add("time,std,err_s\n1e400,BJD_TDB,NaN\n")
	f.Fuzz(func(t *testing.T, in string) {
		rows, err := planner.ParseTimingsCSV(strings.NewReader(in))
		if err != nil {
			var te *planner.TableError
			if rows != nil || !errors.As(err, &te) || len(te.Cells) == 0 {
				t.Fatalf("error %v with %d rows", err, len(rows))
			}
			return
		}
		for _, r := range rows {
			if r.Std.Validate() != nil || r.Form.Validate() != nil || !(r.ErrDays > 0 && r.ErrDays <= 1) || r.JD.Float() < 2299160 {
				t.Fatalf("accepted a bad row %+v", r)
			}
		}
	})
}

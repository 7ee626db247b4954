package store

// FuzzHostileParseFile fuzzes the target-file reader and the row checks
// without the database. The database-level fuzzer (FuzzHostileImport in
// fuzz_hostile_test.go) runs only tens of inputs a minute, because the
// fuzzer instruments the whole SQLite library it links; this one runs
// about a thousand a second. Corpus under testdata/fuzz/FuzzHostileParseFile/.
//
//	go test -run='^$' -fuzz='^FuzzHostileParseFile$' -fuzztime=60s ./store/

import (
	"errors"
	"math"
	"strings"
	"testing"
	"unicode/utf8"

	"phasecast/planner"
)

// FuzzHostileParseFile: any file in any format is either refused with an
// EINVALID whose cells each name a line (and whose message stays short), or
// read into rows that each name a line; a row that passes
// validateTargetInput holds only finite numbers in FORMAT.md's ranges and
// valid UTF-8 text. Never a panic.
func FuzzHostileParseFile(f *testing.F) {
	const header = "name,ra,dec,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,priority,tags,notes"
	row := "PCX A,150.25,-12.5,2460123.4567891234,BJD_TDB,inferior_conjunction,0.1352,0.25;0.75,0.05,120,2,cv;eclipsing,invented"
	f.Add(header+"\n"+row+"\n", uint8(0))
	f.Add(header+"\n"+row+"\n", uint8(1))
	f.Add(header+"\n"+strings.Replace(row, "0.25;0.75", "quadratures±0.1[exposure_s=30 n_exposures=1e300];eclipse_ingress+-0.01", 1)+"\n", uint8(1))
	f.Add(header+"\n"+strings.Replace(row, "PCX A", "'=cmd|' /C calc'!A0", 1)+"\n", uint8(1))
	f.Add(strings.Join(planner.PlanCSVHeader, ",")+"\nPCX P,8.1,37.7,2460123.45678,0.1352,0.25;0.75,0.05,120,8,1\n", uint8(0))
	f.Add(`{"format":"phasecast-targets/1","targets":[{"name":"PCX J1","ra":"09:53:00","dec":-6.125,"ephemeris":{"t0":"60123.1",`+
		`"t0_form":"MJD","t0_standard":"HJD_UTC","t0_convention":"custom","phase_offset":0.3,"period_days":0.25},`+
		`"goals":[{"center":0.5,"phase_halfwidth":0.1,"exposure_s":60}],"tags":["a"]}]}`, uint8(3))
	f.Add(`{"format":"phasecast-targets/1","targets":[{}]} {}`, uint8(0))
	f.Add(header+"\n"+strings.Replace(row, "0.1352", "NaN", 1)+"\n", uint8(1))
	f.Add(header+"\n"+strings.Replace(row, "-12.5", "\xff", 1)+"\n", uint8(1))
	formats := []FileFormat{FormatAuto, FormatCSV, FormatPlanCSV, FormatJSON, "xml"}
	f.Fuzz(func(t *testing.T, in string, fi uint8) {
		format := formats[int(fi)%len(formats)]
		pf, err := parseFile([]byte(in), format)
		if err != nil {
			var se *Error
			if !errors.As(err, &se) || se.Code != EINVALID {
				t.Fatalf("error %v (%T) is not an EINVALID *Error", err, err)
			}
			if len(se.Message) > 4096 {
				t.Fatalf("message is %d bytes", len(se.Message))
			}
			var te *planner.TableError
			if errors.As(err, &te) {
				for _, c := range te.Cells {
					if c.Line < 1 || c.Reason == "" {
						t.Fatalf("cell %+v names no line or no reason", c)
					}
				}
			} else if format != "xml" {
				t.Fatalf("refused without line-numbered cells: %v", err)
			}
			return
		}
		if len(pf.Cells) > 0 {
			// Problems found while reading are kept to be reported with the
			// range checks, all together (importPlan): the import is refused.
			for _, c := range pf.Cells {
				if c.Line < 1 || c.Reason == "" || len(c.Value) > 4096 {
					t.Fatalf("cell %+v names no line or no reason, or echoes a long value", c)
				}
			}
			return
		}
		if len(pf.Rows) == 0 {
			t.Fatalf("read with no rows and no problems")
		}
		for _, r := range pf.Rows {
			if r.Line < 1 {
				t.Fatalf("row %+v has no line", r)
			}
			in, v := validateTargetInput(r.Input)
			if len(v.Fields) > 0 {
				for _, fe := range v.Fields {
					if col, _ := pf.column(fe.Field); col == "" {
						t.Fatalf("field %q maps to no column", fe.Field)
					}
				}
				continue
			}
			tg := in.Target
			e := tg.Ephem
			nums := []float64{tg.RADeg, tg.DecDeg, tg.PMRAmasyr, tg.PMDecmasyr, tg.Mag, tg.AcquireS, e.T0.Day, e.T0.Frac,
				e.T0ErrDays, e.PeriodDays, e.PeriodErr, e.CovT0P, e.Pdot, e.PdotErr, e.CovT0Pdot, e.CovPPdot, e.PhaseOffset, e.Ecc, e.OmegaDeg}
			for _, g := range tg.Goals {
				nums = append(nums, g.Center, g.HalfWidth, g.ExposureS, g.OverheadS, g.EclipseDurDays)
				if g.Center < 0 || g.Center >= 1 || g.HalfWidth <= 0 || g.HalfWidth >= 0.5 || g.ExposureS <= 0 {
					t.Fatalf("%q: goal %+v out of range", tg.Name, g)
				}
			}
			for i, x := range nums {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("%q: value %d is %v", tg.Name, i, x)
				}
			}
			if tg.RADeg < 0 || tg.RADeg >= 360 || tg.DecDeg < -90 || tg.DecDeg > 90 || tg.Priority < 1 || tg.Priority > 5 {
				t.Fatalf("%q: out of range: %+v", tg.Name, tg)
			}
			if err := e.Validate(); err != nil {
				t.Fatalf("%q: valid row with an invalid ephemeris: %v", tg.Name, err)
			}
			for _, s := range append([]string{tg.Name, tg.Notes, in.T0.Text}, tg.Tags...) {
				if !utf8.ValidString(s) {
					t.Fatalf("%q: text %q is not valid UTF-8", tg.Name, s)
				}
			}
		}
	})
}

package planner_test

// Hostile input for the planner's parsers (issue "Proof under load, faults
// and hostile input"): fuzz targets whose seed corpus is committed under
// testdata/fuzz/FuzzXxx/ so that `go test ./planner/` replays it, and
// table tests for oversize, non-finite, non-UTF-8 and formula-like input.
// Run one target for longer with, e.g.,
//
//	go test -run='^$' -fuzz='^FuzzHostileTargetsCSV$' -fuzztime=60s ./planner/

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// hostileHeader is the plan CSV header in its documented order.
var hostileHeader = strings.Join(planner.PlanCSVHeader, ",")

// hostileRow is a valid plan CSV row whose name is name.
func hostileRow(name string) string {
	return fmt.Sprintf("%s,8.1234,37.69,2460123.4567891234,0.1352,0.25;0.75,0.05,120,8,1", name)
}

// hostileCells are cell values a hostile or careless user may type: non-finite
// and huge numbers, hexadecimal and underscored forms, invalid UTF-8, control
// characters and spreadsheet formulas.
var hostileCells = []string{
	"NaN", "nan", "+Inf", "-Inf", "inf", "Infinity", "1e400", "-1e400", "1e-400", "4.9e-324",
	"0x1p-2", "1_0", "9223372036854775808", "-0", "+0", "  ", "\x00", "\xff\xfe", "\xc3", "é",
	"=cmd|' /C calc'!A0", "+1", "-1", "@SUM(A1:A2)", "\t=1", "\r=1", `"quoted"`, "1;;2", ";", "0.25;0.25",
	strings.Repeat("9", 400), "1." + strings.Repeat("0", 400) + "1",
}

// checkTargets fails unless every target is within the documented ranges of
// ParseTargetsCSV: the properties a successful parse promises.
func checkTargets(tb testing.TB, ts []planner.Target) {
	tb.Helper()
	if len(ts) == 0 {
		tb.Fatalf("success with no targets")
	}
	names := map[string]bool{}
	for _, tg := range ts {
		e := tg.Ephem
		jd := e.T0.Float()
		switch {
		case tg.Name == "" || names[tg.Name]:
			tb.Fatalf("name %q empty or repeated", tg.Name)
		case !finiteAll(tg.RADeg, tg.DecDeg, e.PeriodDays, e.T0.Day, e.T0.Frac):
			tb.Fatalf("%q: non-finite value %+v", tg.Name, tg)
		case tg.RADeg < 0 || tg.RADeg >= 360 || tg.DecDeg < -90 || tg.DecDeg > 90:
			tb.Fatalf("%q: RA %v Dec %v out of range", tg.Name, tg.RADeg, tg.DecDeg)
		case jd < 2299160.5 || jd > 2816787.5 || e.T0.Frac < 0 || e.T0.Frac >= 1:
			tb.Fatalf("%q: T0 %+v out of 1582-10-15..3000-01-01", tg.Name, e.T0)
		case e.PeriodDays <= 0 || e.PeriodDays > planner.MaxPeriodDays:
			tb.Fatalf("%q: period %v out of range", tg.Name, e.PeriodDays)
		case tg.Priority < 1 || tg.Priority > 5:
			tb.Fatalf("%q: priority %d out of 1..5", tg.Name, tg.Priority)
		case len(tg.Goals) == 0:
			tb.Fatalf("%q: no goals", tg.Name)
		}
		names[tg.Name] = true
		seen := map[float64]bool{}
		for _, g := range tg.Goals {
			switch {
			case !finiteAll(g.Center, g.HalfWidth, g.ExposureS, g.OverheadS):
				tb.Fatalf("%q: non-finite goal %+v", tg.Name, g)
			case g.Center < 0 || g.Center >= 1 || seen[g.Center]:
				tb.Fatalf("%q: goal centre %v out of [0, 1) or repeated", tg.Name, g.Center)
			case g.HalfWidth <= 0 || g.HalfWidth >= 0.5:
				tb.Fatalf("%q: half-width %v out of (0, 0.5)", tg.Name, g.HalfWidth)
			case g.ExposureS <= 0 || g.ExposureS > planner.MaxExposureS || g.OverheadS < 0 || g.OverheadS > planner.MaxExposureS:
				tb.Fatalf("%q: exposure %v / overhead %v out of range", tg.Name, g.ExposureS, g.OverheadS)
			}
			seen[g.Center] = true
		}
	}
}

func finiteAll(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// checkTableError fails unless err is a *planner.TableError whose every cell
// names a line of the input (1..lines+1) and reads "line N…".
func checkTableError(tb testing.TB, in string, err error) *planner.TableError {
	tb.Helper()
	var te *planner.TableError
	if !errors.As(err, &te) {
		tb.Fatalf("error %v (%T) is not a *planner.TableError", err, err)
	}
	if len(te.Cells) == 0 {
		tb.Fatalf("TableError with no cells")
	}
	lines := strings.Count(in, "\n") + strings.Count(in, "\r") + 1
	for _, c := range te.Cells {
		s := c.String()
		if c.Line < 1 || c.Line > lines+1 || !strings.HasPrefix(s, fmt.Sprintf("line %d", c.Line)) {
			tb.Fatalf("cell %q: line %d not in 1..%d", s, c.Line, lines+1)
		}
		if c.Reason == "" {
			tb.Fatalf("cell %q gives no reason", s)
		}
		if c.Col > 0 && c.Column != "" && !strings.Contains(s, "column") {
			tb.Fatalf("cell %q does not name its column", s)
		}
	}
	return te
}

// FuzzHostileTargetsCSV: any file either parses to targets that all lie in
// the documented ranges, or is rejected whole with a *planner.TableError
// whose every cell names a line of the file; never a panic.
func FuzzHostileTargetsCSV(f *testing.F) {
	f.Add(hostileHeader + "\n" + hostileRow("PCX J0032+3741") + "\n")
	f.Add(hostileHeader + "\r\n" + hostileRow("A") + "\r\n" + hostileRow("B") + "\r\n")
	f.Add("\ufeff" + hostileHeader + "\n# comment\n\n" + hostileRow(`"quoted, name"`) + "\n")
	f.Add(hostileHeader + "\n" + hostileRow(`"unterminated`) + "\n")
	f.Add(hostileHeader + "\n" + hostileRow("=cmd|' /C calc'!A0") + "\n")
	for _, cell := range hostileCells {
		for k := 1; k < len(planner.PlanCSVHeader); k += 3 {
			fields := strings.Split(hostileRow("X"), ",")
			fields[k] = cell
			f.Add(hostileHeader + "\n" + strings.Join(fields, ",") + "\n")
		}
	}
	f.Fuzz(func(t *testing.T, in string) {
		ts, err := planner.ParseTargetsCSV(strings.NewReader(in))
		if err != nil {
			if ts != nil {
				t.Fatalf("error %v with %d targets: not all-or-nothing", err, len(ts))
			}
			checkTableError(t, in, err)
			return
		}
		checkTargets(t, ts)
	})
}

// FuzzHostilePhaseList: a phase list either gives at least one centre, each
// finite, 0 ≤ φ < 1 and distinct, or a reason; never a panic.
func FuzzHostilePhaseList(f *testing.F) {
	for _, s := range append([]string{"0.25;0.75", "0", "0.999999", "0;-0", " 0.5 ; 0.1 ", "1", "0.25;", ""}, hostileCells...) {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		cs, reason := planner.ParsePhaseList(s)
		if reason != "" {
			if cs != nil {
				t.Fatalf("%q: reason %q with centres %v", s, reason, cs)
			}
			return
		}
		if len(cs) == 0 {
			t.Fatalf("%q: no centres and no reason", s)
		}
		seen := map[float64]bool{}
		for _, c := range cs {
			if !finiteAll(c) || c < 0 || c >= 1 || seen[c] {
				t.Fatalf("%q: centre %v not finite, out of [0, 1) or repeated (%v)", s, c, cs)
			}
			seen[c] = true
		}
	})
}

// FuzzHostileHorizon: a horizon file either gives a mask that
// planner.ValidateHorizon accepts (every point finite, 0 ≤ az < 360,
// −5 ≤ alt ≤ 89, no azimuth twice), or an error naming a line and column or
// the bad point; never a panic.
func FuzzHostileHorizon(f *testing.F) {
	for _, s := range []string{
		"0 5\n90 12\n180 3\n270 20\n", "# comment\n0,5\n\n359.9\t-5\n", "0 5\n0 6\n", "360 5\n", "0 90\n",
		"0 NaN\n", "Inf 5\n", "0x10 5\n", "1_0 5\n", "0 5 7\n", "\xff 5\n", "=1 +2\n", "0 5\r\n10 6\r\n", "",
		"0 1e400\n", "-0 5\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		pts, err := planner.ParseHorizon(strings.NewReader(in))
		if err != nil {
			if pts != nil {
				t.Fatalf("error %v with %d points", err, len(pts))
			}
			checkHorizonError(t, err)
			return
		}
		if len(pts) == 0 {
			t.Fatalf("%q: no points and no error", in)
		}
		if verr := planner.ValidateHorizon(pts); verr != nil {
			t.Fatalf("%q: parsed mask fails validation: %v", in, verr)
		}
	})
}

// checkHorizonError fails unless err says where the problem is: a line (and
// for a bad number its column), or, for a point that reads but is out of
// range, an *ephem.InputError naming the point's field.
func checkHorizonError(tb testing.TB, err error) {
	tb.Helper()
	msg := err.Error()
	var ie *ephem.InputError
	switch {
	case errors.As(err, &ie):
		if !strings.HasPrefix(ie.Field, "horizon[") || ie.Accepted == "" {
			tb.Fatalf("InputError %+v does not name a horizon point and what is accepted", ie)
		}
	case strings.Contains(msg, "no points"):
	case !strings.Contains(msg, "line "):
		tb.Fatalf("error %q names no line", msg)
	case strings.Contains(msg, "not a number") && !strings.Contains(msg, "column"):
		tb.Fatalf("error %q names no column", msg)
	}
}

// FuzzHostileObservedCSV: any observed log either gives exposures with a
// target, a UTC mid-time, a length 0 < t ≤ MaxExposureS and the line they
// came from, or is rejected whole with a *planner.TableError naming lines;
// never a panic.
func FuzzHostileObservedCSV(f *testing.F) {
	const head = "target,start_utc,exposure_s,n_exposures,overhead_s,status,note\n"
	f.Add(head + "PCX A,2026-03-14T02:31:00Z,120,3,8,ok,first\n")
	f.Add("target,mid_utc,exposure_s\nPCX A,2026-03-14T02:31:00+01:00,60\n")
	f.Add("target,mid_utc,start_utc,exposure_s\n")
	f.Add(head + "PCX A,2026-03-14T02:31:00Z,NaN,1,0,,\n")
	f.Add(head + "PCX A,2026-03-14T02:31:00Z,1e400,1,0,,\n")
	f.Add(head + "PCX A,2026-03-14T02:31:00Z,86400,10000,86400,failed,\n")
	f.Add(head + "=cmd|' /C calc'!A0,9999-12-31T23:59:59Z,1,1,0,FAILED,\n")
	f.Add(head + "\xff,0001-01-01T00:00:00Z,1,1,0,ok,\n")
	f.Fuzz(func(t *testing.T, in string) {
		// A row may ask for 10,000 exposures: keep the fuzzer's memory sane.
		if strings.Count(in, "\n") > 50 {
			return
		}
		exps, err := planner.ParseObservedCSV(strings.NewReader(in))
		if err != nil {
			if exps != nil {
				t.Fatalf("error %v with %d exposures", err, len(exps))
			}
			checkTableError(t, in, err)
			return
		}
		for _, e := range exps {
			switch {
			case e.Target == "":
				t.Fatalf("exposure without a target: %+v", e)
			case e.Mid.IsZero() || e.Mid.Location() != time.UTC:
				t.Fatalf("mid-time %v is zero or not UTC", e.Mid)
			case !finiteAll(e.ExposureS) || e.ExposureS <= 0 || e.ExposureS > planner.MaxExposureS:
				t.Fatalf("exposure length %v out of range", e.ExposureS)
			case e.Line < 2:
				t.Fatalf("exposure from line %d (the header is line 1 at the earliest)", e.Line)
			}
		}
	})
}

// TestHostileObservedAmplification: a small log cannot make an unbounded
// number of exposures. A row may ask for 10,000 exposures and a log may
// hold MaxObservedRows rows; 100 rows of 30 bytes give 1,000,000
// exposures (64 MB), and MaxObservedRows rows would give 2×10⁹.
func TestHostileObservedAmplification(t *testing.T) {
	var b strings.Builder
	b.WriteString("target,start_utc,exposure_s,n_exposures\n")
	for i := range 100 {
		fmt.Fprintf(&b, "T%d,2026-03-14T02:31:00Z,1,10000\n", i)
	}
	exps, err := planner.ParseObservedCSV(strings.NewReader(b.String()))
	t.Logf("%d-byte log: %d exposures, err %v", b.Len(), len(exps), err)
	if err == nil {
		t.Fatalf("a %d-byte log asking for 1,000,000 exposures was accepted (%d exposures; the limit is %d)", b.Len(), len(exps), planner.MaxObservedExposures)
	}
	if !strings.Contains(err.Error(), "line 22") || !strings.Contains(err.Error(), "too many exposures") || len(exps) != 0 {
		t.Errorf("err %q, %d exposures: want the line past the exposure limit named and nothing read", err, len(exps))
	}
}

// FuzzHostileRunNights: a nights list either gives nights that
// planner.ValidateRunNights accepts, or an *ephem.InputError naming the
// nights or one night; never a panic.
func FuzzHostileRunNights(f *testing.F) {
	for _, s := range []string{"2026-03-14,2026-03-15:second", "2026-03-14:first,2026-03-14:second", "2026-03-15,2026-03-14",
		"2026-03-14,2026-03-14", "2026-02-30", "2026-03-14:third", "", ",", "2026-03-14:", "9999-12-31", "0000-01-01", "\xff",
		"2026-03-14," + strings.Repeat("2026-03-15,", 3) + "2027-03-20"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		nights, err := planner.ParseRunNights(s)
		if err != nil {
			var ie *ephem.InputError
			if !errors.As(err, &ie) || !strings.HasPrefix(ie.Field, "nights") || ie.Accepted == "" {
				t.Fatalf("%q: error %v (%T) does not name the nights", s, err, err)
			}
			if len(err.Error()) > 1024 {
				t.Fatalf("%q: error is %d bytes", s, len(err.Error()))
			}
			return
		}
		if verr := planner.ValidateRunNights(nights); verr != nil {
			t.Fatalf("%q: parsed nights fail validation: %v", s, verr)
		}
	})
}

// TestHostileTargetsCSVCells puts each hostile value into each column of a
// valid file: the file is rejected with the cell's line and column, or (for
// a value the column accepts) the targets stay in range. Formula-like names
// are accepted as text: neutralising them is the CSV exporters' job.
func TestHostileTargetsCSVCells(t *testing.T) {
	for k, column := range planner.PlanCSVHeader {
		for _, cell := range hostileCells {
			t.Run(fmt.Sprintf("%s=%q", column, cell), func(t *testing.T) {
				fields := strings.Split(hostileRow("X"), ",")
				fields[k] = csvQuote(cell)
				in := hostileHeader + "\n" + strings.Join(fields, ",") + "\n"
				ts, err := planner.ParseTargetsCSV(strings.NewReader(in))
				if err == nil {
					checkTargets(t, ts)
					return
				}
				te := checkTableError(t, in, err)
				found := false
				for _, c := range te.Cells {
					found = found || (c.Line == 2 && c.Col == k+1 && c.Column == column)
				}
				if !found {
					t.Fatalf("error does not name line 2, column %d (%s): %v", k+1, column, err)
				}
			})
		}
	}
}

// TestHostileTargetsCSVPlannable: a target the file reader accepts has an
// ephemeris the rest of phasecast accepts too (ephem.Ephemeris.Validate);
// otherwise the plan would fail later with no line or column to point at.
func TestHostileTargetsCSVPlannable(t *testing.T) {
	for _, period := range []string{"1e-300", "1e-6", "9.99e-6", "1e-5", "36525", "36525.01"} {
		t.Run(period, func(t *testing.T) {
			in := hostileHeader + "\n" + strings.Replace(hostileRow("X"), "0.1352", period, 1) + "\n"
			ts, err := planner.ParseTargetsCSV(strings.NewReader(in))
			if err != nil {
				te := checkTableError(t, in, err)
				if te.Cells[0].Column != "period_days" {
					t.Fatalf("refused, but not on period_days: %v", err)
				}
				return
			}
			if verr := ts[0].Ephem.Validate(); verr != nil {
				t.Fatalf("period %s read, but the ephemeris is invalid: %v", period, verr)
			}
		})
	}
}

// csvQuote quotes a cell the way a spreadsheet would write it.
func csvQuote(s string) string {
	if strings.ContainsAny(s, "\",\r\n") {
		return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
	}
	return s
}

// TestHostileTargetsCSVOversize: a 10 MB cell and a 10 MB line are rejected
// (or read) without a panic, and the error names line and column.
func TestHostileTargetsCSVOversize(t *testing.T) {
	big := strings.Repeat("9", 10<<20)
	tests := []struct {
		name string
		in   string
	}{
		{"HugeRA", hostileHeader + "\n" + strings.Replace(hostileRow("X"), "8.1234", big, 1) + "\n"},
		{"HugePhases", hostileHeader + "\n" + strings.Replace(hostileRow("X"), "0.25;0.75", strings.Repeat("0.1;", 2<<20)+"0.2", 1) + "\n"},
		{"HugeHeader", strings.Repeat("x", 10<<20) + "\n" + hostileRow("X") + "\n"},
		{"HugeQuotedUnterminated", hostileHeader + "\n\"" + big},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := planner.ParseTargetsCSV(strings.NewReader(tc.in))
			if err == nil {
				t.Fatalf("a 10 MB cell was accepted")
			}
			checkTableError(t, tc.in, err)
			t.Logf("error message: %d bytes", len(err.Error()))
			if n := len(err.Error()); n > 64<<10 {
				t.Fatalf("the error message is %d bytes: it echoes the 10 MB cell", n)
			}
		})
	}
}

// TestHostileTargetsCSVManyRows reads a file of many valid rows. The planner
// sets no row limit (the store bounds imports by size and count); this
// records that a large file is read whole without error. 1e6 rows take
// several seconds, so the full size runs only with PHASECAST_HOSTILE_LONG=1.
func TestHostileTargetsCSVManyRows(t *testing.T) {
	n := 20000
	if os.Getenv("PHASECAST_HOSTILE_LONG") != "" {
		n = 1000000
	}
	var b strings.Builder
	b.WriteString(hostileHeader + "\n")
	for i := range n {
		b.WriteString(hostileRow(fmt.Sprintf("T%07d", i)) + "\n")
	}
	ts, err := planner.ParseTargetsCSV(strings.NewReader(b.String()))
	if err != nil {
		t.Fatalf("%d rows: %v", n, err)
	}
	if len(ts) != n {
		t.Fatalf("got %d targets, want %d", len(ts), n)
	}
	t.Logf("%d rows (%d MB) read; the planner has no row limit", n, b.Len()>>20)
}

// TestHostileHorizonOversize: a horizon line longer than the line scanner's
// buffer, a huge number or too many fields is an error naming the line,
// and the message stays short.
func TestHostileHorizonOversize(t *testing.T) {
	tests := []struct {
		name string
		in   string
		line string
	}{
		{"LongLine", "0 5\n" + strings.Repeat(" ", 10<<20) + "90 12\n", "line 2"},
		{"HugeNumber", "0 " + strings.Repeat("9", 1<<20) + "\n", "line 1"},
		{"ManyFields", strings.Repeat("1 ", 100000) + "\n", "line 1"},
		{"HugeNumberShortLine", "0 5\n0 " + strings.Repeat("9", 60000) + "\n", "line 2"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pts, err := planner.ParseHorizon(strings.NewReader(tc.in))
			if err == nil {
				t.Fatalf("accepted: %d points", len(pts))
			}
			t.Logf("error (%d bytes): %.200s", len(err.Error()), err)
			if !strings.Contains(err.Error(), tc.line) || len(err.Error()) > 1024 {
				t.Fatalf("error %.300q: want a short message naming %s", err, tc.line)
			}
		})
	}
}

// TestHostileHorizonNumbers: a horizon file takes plain decimal numbers
// only, like the targets file; a point out of range is reported with its
// line (comments and blank lines counted).
func TestHostileHorizonNumbers(t *testing.T) {
	tests := []struct{ name, in, want string }{
		{"Hex", "0 5\n0x1p4 5\n", "line 2 column 1 (az)"},
		{"Underscore", "0 5\n90 1_0\n", "line 2 column 2 (alt)"},
		{"NaN", "0 NaN\n", "line 1 column 2 (alt)"},
		{"Inf", "-Inf 5\n", "line 1 column 1 (az)"},
		{"Overflow", "0 1e400\n", "line 1 column 2 (alt)"},
		{"AltOutOfRange", "# mask\n\n0 5\n90 89.5\n", "line 4"},
		{"AzimuthTwice", "0 5\n# again\n0 6\n", "line 3"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pts, err := planner.ParseHorizon(strings.NewReader(tc.in))
			if err == nil {
				t.Fatalf("accepted as %v", pts)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %q does not name %s", err, tc.want)
			}
		})
	}
}

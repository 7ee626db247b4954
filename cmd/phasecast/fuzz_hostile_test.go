package main

// Hostile input for the timings CSV of `phasecast fit` and the targets and
// horizon files of `phasecast plan` (issue "Proof under load, faults and
// hostile input"). The seed corpus is committed under testdata/fuzz/ so
// that `go test ./cmd/phasecast/` replays it; run a fuzzer longer with
//
//	go test -run='^$' -fuzz='^FuzzHostileTimings$' -fuzztime=60s ./cmd/phasecast/

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

// hostileFit runs `fit` on a timings file holding text, with the guess of
// the invented system in testdata/timings.csv.
func hostileFit(tb testing.TB, text string) (stdout, stderr string, code int) {
	tb.Helper()
	file := filepath.Join(tb.TempDir(), "timings.csv")
	if err := os.WriteFile(file, []byte(text), 0o600); err != nil {
		tb.Fatal(err)
	}
	var out, errOut bytes.Buffer
	err := run(context.Background(), testClock(tb), []string{"fit", "--timings", file, "--t0", "2460500.432", "--period", "0.06123457",
		"--t0-err", "0.0002", "--period-err", "2e-8", "--ra", "04:12:33.9", "--dec", "-12:48:07", "--json"}, &out, &errOut)
	return out.String(), errOut.String(), exitCode(err)
}

// checkFitOutcome fails on a recovered panic, on an error that is not one
// line naming the timings file, or on output holding a non-finite number or
// a timing with a non-positive uncertainty.
func checkFitOutcome(tb testing.TB, text, stdout, stderr string, code int) {
	tb.Helper()
	switch {
	case code == exitInternal:
		tb.Fatalf("internal error (a panic) on %q: %s", text, stderr)
	case code != 0:
		if stdout != "" || strings.Count(stderr, "\n") != 1 {
			tb.Fatalf("exit %d on %q: stdout %q, stderr %q: want one stderr line", code, text, stdout, stderr)
		}
		if !strings.Contains(stderr, "--timings") {
			tb.Fatalf("error %q does not name the timings file", stderr)
		}
		if !utf8.ValidString(stderr) {
			tb.Fatalf("error message is not valid UTF-8: %q", stderr)
		}
		return
	case strings.Contains(stdout, "NaN") || strings.Contains(stdout, "Inf"):
		tb.Fatalf("output holds a non-finite value on %q:\n%s", text, stdout)
	}
	var out struct {
		N             int     `json:"n"`
		T0ErrDays     float64 `json:"t0_err_days"`
		PeriodDays    float64 `json:"period_days"`
		PeriodErrDays float64 `json:"period_err_days"`
		Timings       []struct {
			Line     int     `json:"line"`
			ErrDays  float64 `json:"err_days"`
			OCSigmas float64 `json:"o_c_sigma"`
		} `json:"timings"`
	}
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		tb.Fatalf("stdout is not the fit JSON: %v\n%s", err, stdout)
	}
	if !(out.PeriodDays > 0) || out.T0ErrDays < 0 || out.PeriodErrDays < 0 || out.N != len(out.Timings) || out.N < 2 {
		tb.Fatalf("fit out of range: P %v σT0 %v σP %v n %d (%d timings)", out.PeriodDays, out.T0ErrDays, out.PeriodErrDays, out.N, len(out.Timings))
	}
	for _, tm := range out.Timings {
		if !(tm.ErrDays > 0) || tm.Line < 2 {
			tb.Fatalf("timing %+v: uncertainty not > 0 or line not after the header", tm)
		}
	}
	if !utf8.ValidString(stderr) {
		tb.Fatalf("stderr is not valid UTF-8: %q", stderr)
	}
}

// FuzzHostileTimings: any timings file makes `fit` either print a fit whose
// numbers are finite (every timing with σ > 0 and its line), or exit with one
// error line naming the file; never a panic.
func FuzzHostileTimings(f *testing.F) {
	good, err := os.ReadFile("testdata/timings.csv")
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(good))
	f.Add("time,std,err_s\n2460319.7894313,BJD_TDB,6\n2460319.8506659,BJD_TDB,6\n2460400.1,BJD_TDB,6\n")
	for i, cell := range []string{"NaN", "Inf", "1e400", "4.9e-324", "1e-320", "0", "-1", "0x1p-2", "\xff", "=cmd|' /C calc'!A0", "1e308"} {
		if i%2 == 0 {
			f.Add("time,std,err_s\n2460319.7894313,BJD_TDB," + cell + "\n2460319.8506659,BJD_TDB,6\n2460400.1,BJD_TDB,6\n")
		} else {
			f.Add("time,std,err_days\n" + cell + ",BJD_TDB,0.0001\n2460319.8506659,BJD_TDB,0.0001\n2460400.1,BJD_TDB,0.0001\n")
		}
	}
	f.Add("time,std,err_s,form\n60319.2894313,HJD_UTC,6,MJD\n60319.3506659,hjd_utc,6,mjd\n60400.1,JD_UTC,6,RJD\n")
	f.Add("time,std,err_s\n\"2460319.7894313\n\",BJD_TDB,6\n")
	f.Add("\ufefftime,std,err_s\r\n2460319.7894313,BJD_TDB,6\r\n2460319.7894313,BJD_TDB,6\r\n")
	f.Add("time,std,err_s,err_days\n")
	f.Add("")
	f.Fuzz(func(t *testing.T, text string) {
		stdout, stderr, code := hostileFit(t, text)
		checkFitOutcome(t, text, stdout, stderr, code)
	})
}

// TestHostileTimingsFile: oversize lines, too many rows, tiny and huge
// uncertainties and non-UTF-8 text are refused with the line (or, for a
// value the reader accepts, fitted with finite numbers).
func TestHostileTimingsFile(t *testing.T) {
	rows := func(n int) string {
		var b strings.Builder
		b.WriteString("time,std,err_s\n")
		for i := range n {
			fmt.Fprintf(&b, "%.7f,BJD_TDB,6\n", 2460319.7894313+float64(i)*0.0612345678)
		}
		return b.String()
	}
	tests := []struct {
		name     string
		text     string
		wantLine string // "" when the fit may succeed
	}{
		{"TooManyRows", rows(maxTimings + 1), fmt.Sprintf("line %d", maxTimings+2)},
		{"TenMBLine", "time,std,err_s\n" + strings.Repeat("9", 10<<20) + ",BJD_TDB,6\n", "line 2"},
		{"TenMBNote", "time,std,err_s,note\n2460319.7894313,BJD_TDB,6," + strings.Repeat("n", 10<<20) + "\n2460320.7894313,BJD_TDB,6,\n2460330.7894313,BJD_TDB,6,\n", ""},
		{"ErrUnderflowsToZero", "time,std,err_s\n2460319.7894313,BJD_TDB,1e-320\n2460319.8506659,BJD_TDB,6\n2460400.1,BJD_TDB,6\n", "line 2"},
		{"ErrHuge", "time,std,err_s\n2460319.7894313,BJD_TDB,1e308\n2460319.8506659,BJD_TDB,6\n2460400.1,BJD_TDB,6\n", ""},
		{"TenMBTimeWithSpace", "time,std,err_s\n1 " + strings.Repeat("9", 10<<20) + ",BJD_TDB,6\n", "line 2"},
		{"BareQuote", "time,std,err_s\n2\"0,BJD_TDB,6\n", "line 2"},
		{"UnterminatedQuote", "time,std,err_s\n2460319.7894313,BJD_TDB,6\n\"2460320", "line 3"},
		{"StdInvalidUTF8", "time,std,err_s\n2460319.7894313,BJD\xff,6\n", "line 2"},
		{"FormulaTime", "time,std,err_s\n=2460319.7894313,BJD_TDB,6\n", "line 2"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			stdout, stderr, code := hostileFit(t, tc.text)
			checkFitOutcome(t, tc.text[:min(len(tc.text), 200)], stdout, stderr, code)
			t.Logf("exit %d, stderr %d bytes: %.200s", code, len(stderr), stderr)
			if tc.wantLine != "" && (code == 0 || !strings.Contains(stderr, tc.wantLine)) {
				t.Fatalf("exit %d, stderr %.300q: want an error naming %s", code, stderr, tc.wantLine)
			}
			if len(stderr) > 4096 {
				t.Fatalf("error is %d bytes: it echoes the oversize value", len(stderr))
			}
		})
	}
}

// FuzzHostilePlanFiles: any targets file and horizon file given to `plan`
// make it either print a plan with finite numbers, or exit with one error
// line; never a panic.
func FuzzHostilePlanFiles(f *testing.F) {
	header := "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority\n"
	row := "PCX J0412-1248,04:12:33.9,-12:48:07,2460500.4321987,0.0612345678,0.25;0.75,0.05,120,8,1\n"
	f.Add(header+row, "0 5\n90 12\n180 3\n270 20\n")
	f.Add(header+row, "")
	f.Add(header+strings.Replace(row, "0.05", "NaN", 1), "0 NaN\n")
	f.Add(header+strings.Replace(row, "PCX J0412-1248", "=cmd|' /C calc'!A0", 1), "0 89\n")
	f.Add(header+strings.Replace(row, "0.0612345678", "1e-300", 1), "359.999 -5\n")
	f.Add(header+strings.Replace(row, "120", "86400", 1), "0 5\n0 6\n")
	f.Fuzz(func(t *testing.T, targets, horizon string) {
		dir := t.TempDir()
		tf, hf := filepath.Join(dir, "targets.csv"), filepath.Join(dir, "horizon.txt")
		if err := os.WriteFile(tf, []byte(targets), 0o600); err != nil {
			t.Fatal(err)
		}
		argv := []string{"plan", "--lat", "-24.6", "--lon", "-70.4", "--elev", "2600", "--tz", "UTC", "--date", "2026-11-20",
			"--targets", tf, "--json"}
		if horizon != "" {
			if err := os.WriteFile(hf, []byte(horizon), 0o600); err != nil {
				t.Fatal(err)
			}
			argv = append(argv, "--horizon", hf)
		}
		var out, errOut bytes.Buffer
		code := exitCode(run(context.Background(), testClock(t), argv, &out, &errOut))
		stdout, stderr := out.String(), errOut.String()
		switch {
		case code == exitInternal:
			t.Fatalf("internal error (a panic): %s", stderr)
		case code != 0:
			if stdout != "" || stderr == "" {
				t.Fatalf("exit %d: stdout %q, stderr %q", code, stdout, stderr)
			}
			if !strings.Contains(stderr, "--targets") && !strings.Contains(stderr, "--horizon") {
				t.Fatalf("error %q names neither file", stderr)
			}
		case strings.Contains(stdout, "NaN") || strings.Contains(stdout, "Inf"):
			t.Fatalf("output holds a non-finite value:\n%s", stdout)
		}
	})
}

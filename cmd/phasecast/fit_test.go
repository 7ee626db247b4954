package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The invented system behind testdata/timings.csv.
const (
	fitTrueP  = 0.0612345678
	fitTrueT0 = 2460500.4321987
)

func fitArgs(file string, extra ...string) []string {
	return args([]string{"fit", "--timings", file, "--t0", "2460500.432", "--period", "0.06123457",
		"--t0-err", "0.0002", "--period-err", "2e-8", "--ra", "04:12:33.9", "--dec", "-12:48:07"}, extra)
}

func TestFitRecoversEphemeris(t *testing.T) {
	m := runJSON(t, fitArgs("testdata/timings.csv")...)
	p, sp := num(t, m, "period_days"), num(t, m, "period_err_days")
	t.Logf("P = %.12f ± %.2g d (true %.10f: %.2fσ)", p, sp, fitTrueP, (p-fitTrueP)/sp)
	if math.Abs(p-fitTrueP) > 4*sp {
		t.Errorf("P = %.12f ± %.2g, more than 4σ from the true %.10f", p, sp, fitTrueP)
	}
	// The refined T0 is a whole number of true periods from the true T0.
	t0 := jdOf(t, m, "t0_bjd_tdb")
	e := (t0.Float() - fitTrueT0) / fitTrueP
	st0 := num(t, m, "t0_err_days")
	if d := (e - math.Round(e)) * fitTrueP; math.Abs(d) > 4*st0 {
		t.Errorf("T0 is %.1f s off the true ephemeris (σ %.1f s)", d*86400, st0*86400)
	}
	timings := m["timings"].([]any)
	if len(timings) != 14 || num(t, m, "n") != 14 {
		t.Fatalf("%d timings reported, want 14", len(timings))
	}
	// The HJD_UTC rows were converted: BJD_TDB − HJD_UTC is about 69 s.
	first := timings[0].(map[string]any)
	if first["std"] != "HJD_UTC" {
		t.Fatalf("first timing std = %v", first["std"])
	}
	given, _ := parseNumber(first["time"].(string))
	if d := (jdOf(t, first, "bjd_tdb").Float() - given) * 86400; d < 60 || d > 80 {
		t.Errorf("HJD_UTC → BJD_TDB moved the first timing by %.2f s, want about 69 s", d)
	}
	if rc := num(t, m, "reduced_chi2"); rc <= 0 || rc > 3 {
		t.Errorf("reduced χ² = %v for timings drawn with their stated errors", rc)
	}
}

func TestFitHuman(t *testing.T) {
	stdout, stderr, code := runCmd(t, fitArgs("testdata/timings.csv")...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"Refined linear ephemeris from 14 timings", "BJD_TDB", "O−C residuals", "HJD_UTC", "decorrelates"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
}

// checkBad runs argv and checks for a non-zero exit and one stderr line
// containing want.
func checkBad(tb testing.TB, argv []string, want string) {
	tb.Helper()
	stdout, stderr, code := runCmd(tb, argv...)
	if code == 0 {
		tb.Fatalf("exit 0, want an error; stdout %q", stdout)
	}
	if strings.Count(stderr, "\n") != 1 || !strings.HasPrefix(stderr, "phasecast: ") {
		tb.Errorf("stderr = %q, want one line", stderr)
	}
	if !strings.Contains(stderr, want) {
		tb.Errorf("stderr %q does not contain %q", stderr, want)
	}
}

func TestFitBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		t.Helper()
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	good := "2460500.4322443,BJD_TDB,6\n2460501.1670577,BJD_TDB,4.5\n2460591.6716967,BJD_TDB,8\n"
	tests := []struct {
		name string
		argv []string
		want string
	}{
		{"MissingFile", fitArgs(filepath.Join(dir, "none.csv")), "none.csv"},
		{"MissingTimingsFlag", []string{"fit", "--period", "0.06"}, "missing --timings"},
		{"MissingPeriod", []string{"fit", "--timings", "x.csv"}, "missing --period"},
		{"EmptyStd", fitArgs(write("a.csv", "time,std,err_s\n"+good+"2460592.9576540,,3.2\n")), "line 5: std is empty"},
		{"UnknownStd", fitArgs(write("b.csv", "time,std,err_s\n2460500.4322443,BJD,6\n")), "line 2: std BJD: unknown"},
		{"UnknownColumn", fitArgs(write("c.csv", "time,std,error\n"+good)), `unknown column "error"`},
		{"NoStdColumn", fitArgs(write("d.csv", "time,err_s\n2460500.4322443,6\n")), `no "std" column`},
		{"BothErrColumns", fitArgs(write("e.csv", "time,std,err_s,err_days\n2460500.4322443,BJD_TDB,6,0.0001\n")), "exactly one of"},
		{"NegativeErr", fitArgs(write("f.csv", "time,std,err_s\n2460500.4322443,BJD_TDB,-6\n")), "line 2: err_s -6"},
		{"BadTime", fitArgs(write("g.csv", "time,std,err_s\n24605OO.43,BJD_TDB,6\n")), "line 2: time 24605OO.43"},
		{"NoRows", fitArgs(write("h.csv", "time,std,err_s\n# nothing yet\n")), "no timings"},
		{"TooFew", fitArgs(write("i.csv", "time,std,err_s\n2460500.4322443,BJD_TDB,6\n")), "at least 2 timings"},
		{"HJDWithoutTarget", []string{"fit", "--timings", write("j.csv", "time,std,err_s\n2460319.7894313,HJD_UTC,6\n"), "--period", "0.06123457"}, "give --ra and --dec"},
		// Two timings one cycle apart cannot carry the count 11,000 cycles on.
		{"Ambiguous", fitArgs(write("k.csv", "time,std,err_s\n2460500.4322443,BJD_TDB,60\n2460500.4934789,BJD_TDB,60\n2461175.4820787,BJD_TDB,3.2\n"),
			"--t0-err", "0.001", "--period-err", "1e-4"), "line 4 (time 2461175.4820787 BJD_TDB): cycle number is ambiguous"},
		{"GuessPeriodZero", fitArgs(write("l.csv", "time,std,err_s\n"+good), "--period", "0"), "--period 0"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			checkBad(t, tc.argv, tc.want)
		})
	}
}

// TestFitHandCycle: the "Ambiguous" file of TestFitBadInput (two timings a
// cycle apart, a third 11,024 cycles on with a loose guess) is refused
// without help; with the cycles given by hand in a cycle column the fit
// takes them and reports them. A bad cycle is refused on its line.
func TestFitHandCycle(t *testing.T) {
	loose := []string{"--t0-err", "0.001", "--period-err", "1e-4"}
	file := writeFile(t, "k.csv", "time,std,err_s,cycle\n2460500.4322443,BJD_TDB,60,0\n2460500.4934789,BJD_TDB,60,1\n2461175.4820787,BJD_TDB,3.2,11024\n")
	m := runJSON(t, fitArgs(file, loose...)...)
	tms := m["timings"].([]any)
	shift := int64(num(t, m, "cycle_shift"))
	for i, want := range []int64{0, 1, 11024} {
		c, _ := tms[i].(map[string]any)["cycle"].(json.Number).Int64()
		if c+shift != want {
			t.Errorf("timing %d: cycle %d (+ shift %d), want %d as given", i, c, shift, want)
		}
	}
	checkBad(t, fitArgs(writeFile(t, "l.csv", "time,std,err_s,cycle\n2460500.4322443,BJD_TDB,60,zero\n2460500.4934789,BJD_TDB,60,1\n"), loose...),
		"line 2: cycle zero: not accepted; accepted: a whole cycle number")
}

package main

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
)

const fitSynopsis = `Refine a binary's ephemeris from measured times of its reference event (the
event T0 marks, e.g. mid-eclipse), read from a CSV file with a header line:

  time,std,err_s          e.g.  2460712.3456789,BJD_TDB,4.2
  time,std,err_days,form  e.g.  60711.8456789,HJD_UTC,0.00005,MJD

  time      the measured time, a decimal Julian date in the row's form
  std       its time standard, REQUIRED on every row: BJD_TDB, BJD_UTC,
            HJD_TT, HJD_UTC or JD_UTC (never guessed)
  err_s     its 1σ uncertainty in seconds, or err_days in days (one of them)
  form      optional: JD (default), MJD or RJD
  cycle     optional: the timing's whole cycle number counted from --t0
            (cycle 0), fixed by hand; empty = numbered by the fit. Timings
            numbered by hand help number the others; with two or more
            distinct hand cycles the alias check is not made
  note      optional free text, ignored

Lines starting with # are comments. Rows not in BJD_TDB are converted with the
target's --ra and --dec (for an observer at the geocentre, within 21 ms,
unless --lat and --lon give the site). The guess (--t0, --period and their
uncertainties) numbers the cycles; a timing whose cycle cannot be told without
guessing is reported, never assigned. The fit is weighted least squares;
T0 is moved to the cycle that decorrelates it from P.`

// fitTimingJSON is one timing with its residual.
type fitTimingJSON struct {
	Line     int     `json:"line"`     // line of the CSV file
	Time     string  `json:"time"`     // as given
	Std      string  `json:"std"`      // as given
	Form     string  `json:"form"`     // JD, MJD or RJD
	BJDTDB   jdValue `json:"bjd_tdb"`  // converted
	ErrDays  float64 `json:"err_days"` // 1σ
	Cycle    int64   `json:"cycle"`    // from the refined T0
	OCDays   float64 `json:"o_c_days"` // observed − computed
	OCS      float64 `json:"o_c_s"`
	OCSigmas float64 `json:"o_c_sigma"` // O−C over the timing's σ
}

// fitJSON is the `fit --json` object.
type fitJSON struct {
	N             int             `json:"n"`
	Quadratic     bool            `json:"quadratic"`
	Convention    string          `json:"convention"`
	T0BJDTDB      jdValue         `json:"t0_bjd_tdb"`
	T0ErrDays     float64         `json:"t0_err_days"`
	PeriodDays    float64         `json:"period_days"`
	PeriodErrDays float64         `json:"period_err_days"`
	Pdot          float64         `json:"pdot"`
	PdotErr       float64         `json:"pdot_err"`
	Cov           [3][3]float64   `json:"cov"` // of (T0 d, P d, Ṗ)
	CorrT0P       float64         `json:"corr_t0_p"`
	ChiSq         float64         `json:"chi2"`
	DOF           int             `json:"dof"`
	RedChiSq      float64         `json:"reduced_chi2"`
	RMSS          float64         `json:"rms_o_c_s"`
	CycleShift    int64           `json:"cycle_shift"` // guess cycle of the new T0
	Note          string          `json:"note"`
	Timings       []fitTimingJSON `json:"timings"`
}

func runFit(ctx context.Context, _ func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("fit", fitSynopsis)
	file := fl.text("timings", "FILE.csv", "", "CSV file of measured event times (see above); required")
	ef := addEphemFlags(fl)
	ef.t0.usage = "guess of the reference epoch (a Julian date in --t0-std and --t0-form); default: the earliest timing"
	quadratic := fl.boolean("quadratic", "fit a quadratic ephemeris (T0, P, Ṗ) instead of a linear one")
	tf := addTargetFlags(fl)
	tf.ra.usage = "target right ascension, needed when a timing or --t0 is not BJD_TDB"
	tf.dec.usage = "target declination, needed when a timing or --t0 is not BJD_TDB"
	sf := addSiteFlags(fl)
	sf.lat.usage = "site latitude for the conversions (default: the geocentre)"
	sf.lon.usage = "site longitude, east positive, for the conversions (default: the geocentre)"
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	var site *ephem.Site
	if sf.lat.set || sf.lon.set {
		s, err := sf.site()
		if err != nil {
			return err
		}
		site = &s
	}
	var star *ephem.Star
	if tf.ra.set || tf.dec.set {
		s, err := tf.star()
		if err != nil {
			return err
		}
		star = &s
	}
	guess, err := ef.parse(site, star, true)
	if err != nil {
		return err
	}
	if !file.set {
		return missing(file)
	}
	rows, err := readTimings(file, site, star, nil)
	if err != nil {
		return err
	}
	timings := make([]ephem.Timing, len(rows))
	for i, r := range rows {
		timings[i] = ephem.Timing{Value: r.bjd, Std: ephem.StdBJDTDB, ErrDays: r.errDays, Cycle: r.cycle}
	}
	res, err := ephem.FitEphemeris(timings, guess, *quadratic)
	if err != nil {
		return fitError(err, file, rows, ef)
	}
	out := fitJSON{
		N: len(rows), Quadratic: res.Quadratic, Convention: string(res.Ephem.Convention),
		T0BJDTDB: jdValue(res.Ephem.T0), T0ErrDays: res.Ephem.T0ErrDays,
		PeriodDays: res.Ephem.PeriodDays, PeriodErrDays: res.Ephem.PeriodErr,
		Pdot: res.Ephem.Pdot, PdotErr: res.Ephem.PdotErr, Cov: res.Cov,
		ChiSq: res.ChiSq, RedChiSq: res.RedChiSq, CycleShift: res.CycleShift, Note: res.Note,
	}
	out.DOF = len(rows) - 2
	if res.Quadratic {
		out.DOF = len(rows) - 3
	}
	if res.Ephem.T0ErrDays > 0 && res.Ephem.PeriodErr > 0 {
		out.CorrT0P = res.Cov[0][1] / (res.Ephem.T0ErrDays * res.Ephem.PeriodErr)
	}
	var sumSq float64
	for i, r := range rows {
		oc := res.Residuals[i]
		sumSq += oc * oc
		out.Timings = append(out.Timings, fitTimingJSON{Line: r.line, Time: r.text, Std: string(r.std), Form: string(r.form),
			BJDTDB: jdValue(r.bjd), ErrDays: r.errDays, Cycle: res.Cycles[i],
			OCDays: oc, OCS: oc * 86400, OCSigmas: oc / r.errDays})
	}
	out.RMSS = math.Sqrt(sumSq/float64(len(rows))) * 86400
	if *asJSON {
		return writeJSON(stdout, out)
	}
	return printFit(stdout, out)
}

// timingRow is one parsed CSV row.
type timingRow struct {
	line    int
	target  string // the row's target (run's timings file only)
	text    string
	std     ephem.TimeStandard
	form    ephem.EpochForm
	bjd     ephem.JD2
	errDays float64
	cycle   *int64 // fixed by hand (the cycle column), nil = numbered by the fit
}

// maxTimings bounds the file: a refinement needs far fewer.
const maxTimings = 100000

var timingColumns = []string{"time", "std", "err_s", "err_days", "form", "cycle", "note"}

// readTimings reads and converts the CSV file named by the flag. With
// targets (run's file of several targets' timings) a target column is
// required, naming a target of the list, whose position converts the row;
// otherwise star does.
func readTimings(file *textValue, site *ephem.Site, star *ephem.Star, targets map[string]ephem.Star) ([]timingRow, error) {
	f, err := os.Open(file.value)
	if err != nil {
		return nil, fmt.Errorf("--timings %s: %w", shown(file.value), errors.Unwrap(err))
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	r.TrimLeadingSpace = true
	r.FieldsPerRecord = -1
	where := func(line int) string { return fmt.Sprintf("--timings %s line %d", shown(file.value), line) }

	header, err := r.Read()
	if err != nil {
		return nil, usageErrorf("--timings %s: no header line: %v; accepted: a header such as time,std,err_s", shown(file.value), oneLine(err.Error()))
	}
	col := map[string]int{}
	accepted := timingColumns
	if targets != nil {
		accepted = append([]string{"target"}, timingColumns...)
	}
	for i, h := range header {
		name := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		if !slices.Contains(accepted, name) {
			return nil, usageErrorf("%s: unknown column %q; accepted: %s", where(1), name, strings.Join(accepted, ", "))
		}
		if _, dup := col[name]; dup {
			return nil, usageErrorf("%s: column %q appears twice", where(1), name)
		}
		col[name] = i
	}
	need := []string{"time", "std"}
	if targets != nil {
		need = append(need, "target")
	}
	for _, need := range need {
		if _, ok := col[need]; !ok {
			return nil, usageErrorf("%s: no %q column; accepted: a header with time, std and err_s or err_days", where(1), need)
		}
	}
	_, hasS := col["err_s"]
	_, hasD := col["err_days"]
	if hasS == hasD {
		return nil, usageErrorf("%s: give exactly one of the columns err_s (seconds) and err_days (days)", where(1))
	}

	var rows []timingRow
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			// A malformed record has no fields: FieldPos would panic. The
			// csv.ParseError names its line and column.
			return nil, usageErrorf("--timings %s: %s", shown(file.value), oneLine(err.Error()))
		}
		line, _ := r.FieldPos(0)
		if len(rows) == maxTimings {
			return nil, usageErrorf("%s: more than %d timings", where(line), maxTimings)
		}
		get := func(name string) string {
			if i, ok := col[name]; ok && i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		rowStar := star
		if targets != nil {
			st, ok := targets[get("target")]
			if !ok {
				return nil, usageErrorf("%s: target %s is not in the targets file", where(line), shown(get("target")))
			}
			rowStar = &st
		}
		row, err := parseTimingRow(get, site, rowStar)
		if err != nil {
			return nil, usageErrorf("%s: %s", where(line), oneLine(err.Error()))
		}
		row.line, row.target = line, get("target")
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, usageErrorf("--timings %s: no timings after the header", shown(file.value))
	}
	return rows, nil
}

var stdsAccepted = "BJD_TDB, BJD_UTC, HJD_TT, HJD_UTC or JD_UTC"

// parseTimingRow reads one row's cells (get returns "" for a missing cell).
func parseTimingRow(get func(string) string, site *ephem.Site, star *ephem.Star) (timingRow, error) {
	row := timingRow{text: get("time"), std: ephem.TimeStandard(strings.ToUpper(get("std"))), form: ephem.FormJD}
	if row.std == "" {
		return row, fmt.Errorf("std is empty; accepted: %s (every timing carries its time standard)", stdsAccepted)
	}
	if err := row.std.Validate(); err != nil {
		return row, fmt.Errorf("std %s: unknown time standard; accepted: %s", shown(string(row.std)), stdsAccepted)
	}
	if v := get("form"); v != "" {
		row.form = ephem.EpochForm(strings.ToUpper(v))
		if err := row.form.Validate(); err != nil {
			return row, fmt.Errorf("form %s: unknown; accepted: JD, MJD (JD − 2400000.5) or RJD (JD − 2400000)", shown(v))
		}
	}
	jd, err := ephem.ParseEpoch(row.text, row.std, row.form)
	if err != nil {
		var ie *ephem.InputError
		if errors.As(err, &ie) {
			return row, fmt.Errorf("time %s: not accepted; accepted: %s", shown(row.text), ie.Accepted)
		}
		return row, err
	}
	errText, scale, unit := get("err_s"), 1/86400.0, "err_s"
	if errText == "" && get("err_days") != "" {
		errText, scale, unit = get("err_days"), 1, "err_days"
	}
	e, ok := parseNumber(errText)
	if !ok || e <= 0 {
		return row, fmt.Errorf("%s %s: not accepted; accepted: a 1σ uncertainty > 0", unit, shown(errText))
	}
	row.errDays = e * scale
	row.bjd = jd
	if v := get("cycle"); v != "" {
		c, err := strconv.ParseInt(v, 10, 64)
		if err != nil || c < -ephem.MaxFixedCycle || c > ephem.MaxFixedCycle {
			return row, fmt.Errorf("cycle %s: not accepted; accepted: a whole cycle number −%d..%d counted from --t0, or empty", shown(v), ephem.MaxFixedCycle, ephem.MaxFixedCycle)
		}
		row.cycle = &c
	}
	if row.std != ephem.StdBJDTDB {
		if star == nil {
			return row, fmt.Errorf("std %s: converting to BJD_TDB needs the target's position: give --ra and --dec", row.std)
		}
		if site != nil {
			row.bjd, err = ephem.ConvertEpoch(jd, row.std, ephem.StdBJDTDB, *site, *star)
		} else {
			row.bjd, err = ephem.ConvertEpochGeocentric(jd, row.std, ephem.StdBJDTDB, *star)
		}
		if err != nil {
			return row, fmt.Errorf("time %s %s: cannot be converted to BJD_TDB: %v", shown(row.text), row.std, err)
		}
	}
	return row, nil
}

var timingField = regexp.MustCompile(`^timings\[(\d+)\]`)

// fitError rewrites FitEphemeris' errors in terms of the CSV lines and flags.
func fitError(err error, file *textValue, rows []timingRow, ef ephemFlags) error {
	lineOf := func(i int) string {
		if i >= 0 && i < len(rows) {
			return fmt.Sprintf("--timings %s line %d (time %s %s)", shown(file.value), rows[i].line, rows[i].text, rows[i].std)
		}
		return "--timings " + shown(file.value)
	}
	var ae *ephem.AmbiguityError
	if errors.As(err, &ae) {
		return usageErrorf("%s: cycle number is ambiguous: %s", lineOf(ae.Index), ae.Reason)
	}
	var ie *ephem.InputError
	if errors.As(err, &ie) {
		if m := timingField.FindStringSubmatch(ie.Field); m != nil {
			i, err := strconv.Atoi(m[1])
			if err != nil {
				return usageErrorf("--timings %s: %s %s not accepted; accepted: %s", shown(file.value), ie.Field, ie.Value, ie.Accepted)
			}
			return usageErrorf("%s: %s %s not accepted; accepted: %s", lineOf(i), strings.TrimPrefix(ie.Field, m[0]+"."), ie.Value, ie.Accepted)
		}
		if f, ok := strings.CutPrefix(ie.Field, "guess."); ok {
			if v, ok := ef.byField()[f]; ok {
				return fieldError(v, "not accepted for the guess", ie.Accepted)
			}
		}
		return usageErrorf("--timings %s: %s %s: not accepted; accepted: %s", shown(file.value), ie.Field, ie.Value, ie.Accepted)
	}
	return err
}

func printFit(w io.Writer, o fitJSON) error {
	kind := "linear"
	if o.Quadratic {
		kind = "quadratic"
	}
	fmt.Fprintf(w, "Refined %s ephemeris from %d timings (BJD_TDB; T0 marks %s):\n\n", kind, o.N, o.Convention)
	tb := newTable(w)
	tb.row("  T0", o.T0BJDTDB.String()+" BJD_TDB", "± "+f(o.T0ErrDays, 9)+" d", "(± "+f(o.T0ErrDays*86400, 2)+" s)")
	tb.row("  P", f(o.PeriodDays, 12)+" d", "± "+strconv.FormatFloat(o.PeriodErrDays, 'e', 2, 64)+" d", "(± "+strconv.FormatFloat(o.PeriodErrDays*86400*1000, 'g', 3, 64)+" ms)")
	if o.Quadratic {
		tb.row("  Ṗ", strconv.FormatFloat(o.Pdot, 'e', 3, 64), "± "+strconv.FormatFloat(o.PdotErr, 'e', 2, 64), "(s/s)")
	}
	tb.row("  corr(T0, P)", signed(o.CorrT0P, 3))
	chi := fmt.Sprintf("%.2f for %d degrees of freedom", o.ChiSq, o.DOF)
	if o.DOF > 0 {
		chi += fmt.Sprintf(" (reduced %.2f)", o.RedChiSq)
	}
	tb.row("  χ²", chi)
	tb.row("  rms O−C", f(o.RMSS, 2)+" s")
	if err := tb.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "\n%s\n\nO−C residuals:\n", o.Note)
	tb = newTable(w)
	tb.row("line", "time (as given)", "std", "BJD_TDB", "cycle", "O−C (s)", "O−C/σ")
	for _, t := range o.Timings {
		tb.row(fmt.Sprint(t.Line), t.Time+" "+t.Form, t.Std, t.BJDTDB.String(), fmt.Sprint(t.Cycle), signed(t.OCS, 2), signed(t.OCSigmas, 2))
	}
	return tb.flush()
}

package store

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/planner/export"
)

// The team target file formats are described in FORMAT.md.

// FileFormat names a target file format.
type FileFormat string

// Target file formats.
const (
	FormatAuto    FileFormat = ""         // detect: JSON if it starts with '{', plan CSV by its header, else team CSV
	FormatCSV     FileFormat = "csv"      // phasecast's team CSV (FORMAT.md)
	FormatPlanCSV FileFormat = "plan_csv" // the `plan` command's targets CSV
	FormatJSON    FileFormat = "json"     // phasecast-targets/1 JSON (FORMAT.md)
)

// JSONFormatTag is the "format" member of a JSON target file.
const JSONFormatTag = "phasecast-targets/1"

// csvColumns are the team CSV's columns in export order; required ones are
// marked in csvRequired.
var csvColumns = []string{
	"name", "ra", "dec", "pm_ra_masyr", "pm_dec_masyr", "mag", "band", "faint_mag", "faint_phase", "bright_mag", "bright_phase",
	"t0", "t0_form", "t0_standard", "t0_convention", "t0_err_days", "period_days", "period_err_days",
	"cov_t0_period", "pdot", "pdot_err", "cov_t0_pdot", "cov_period_pdot", "phase_offset", "ecc", "omega_deg",
	"goals", "phase_halfwidth", "exposure_s", "overhead_s", "n_exposures", "min_nights", "eclipse_duration_days",
	"snr", "max_smear", "priority", "acquire_s", "tags", "notes", "rv_model", "rv_k_kms", "rv_sigma_kms", "rv_want_rel_k",
}

var csvRequired = []string{"name", "ra", "dec", "t0", "t0_standard", "t0_convention", "period_days"}

// goalKeys are the per-goal settings a goals item may override in
// brackets, e.g. "0.25±0.04[exposure_s=300 n_exposures=4]".
var goalKeys = []string{"exposure_s", "overhead_s", "n_exposures", "min_nights", "eclipse_duration_days", "snr", "max_smear"}

// MaxImportBytes bounds an imported file (64 MiB).
const MaxImportBytes = 64 << 20

// fileRow is one target read from a file: its line, the input, and the
// column each validation field name maps to.
type fileRow struct {
	Line  int
	Input TargetInput
}

// parsedFile is a whole file read, before any check against the database.
type parsedFile struct {
	Format      FileFormat
	Rows        []fileRow
	Assumptions []string
	// Cells are the problems found while reading (text that is not a
	// number, a missing required value, …). Rows holds every row that
	// could be read at all, with or without such problems, so that the
	// import can check the rest of each row too and report everything.
	Cells []planner.CellError
	// column maps a validation field name (e.g. "period_days",
	// "goals[1].exposure_s") to the file's column (CSV) or member path
	// (JSON) and its 1-based CSV column number (0 for JSON).
	column func(field string) (string, int)
}

// readAllLimited reads r up to MaxImportBytes.
func readAllLimited(r io.Reader) ([]byte, error) {
	b, err := io.ReadAll(io.LimitReader(r, MaxImportBytes+1))
	if err != nil {
		return nil, fmt.Errorf("read file: %w", err)
	}
	if len(b) > MaxImportBytes {
		return nil, errInvalid("the file is larger than %d MiB", MaxImportBytes>>20)
	}
	return b, nil
}

// detectFormat picks the format of b.
func detectFormat(b []byte) FileFormat {
	trim := bytes.TrimLeft(b, " \t\r\n\ufeff")
	if len(trim) > 0 && trim[0] == '{' {
		return FormatJSON
	}
	first, _, _ := bytes.Cut(trim, []byte("\n"))
	if bytes.Contains(first, []byte("t0_bjd_tdb")) {
		return FormatPlanCSV
	}
	return FormatCSV
}

// parseFile reads a target file of the given (or detected) format. Bad
// cells are returned as an EINVALID *Error carrying a *planner.TableError.
func parseFile(b []byte, f FileFormat) (parsedFile, error) {
	if f == FormatAuto {
		f = detectFormat(b)
	}
	switch f {
	case FormatCSV:
		return parseTeamCSV(b)
	case FormatPlanCSV:
		return parsePlanCSV(b)
	case FormatJSON:
		return parseJSONFile(b)
	}
	return parsedFile{}, errInvalid("format: %q is not accepted; accepted: csv, plan_csv, json (or empty to detect)", f)
}

// MaxFileProblems is the most problems a refused file lists one by one;
// the rest are counted in a last entry ("… and N more problems"), so that
// a file bad on every line does not make a message per line to send.
const MaxFileProblems = 100

// tableErr wraps a TableError as EINVALID with a short message, keeping
// the first MaxFileProblems problems and a last entry counting the rest.
func tableErr(te *planner.TableError) error {
	total := len(te.Cells)
	msg := fmt.Sprintf("%d problem(s) in the file; nothing was imported", total)
	if total > 0 {
		msg += "; first: " + te.Cells[0].String()
	}
	if total > MaxFileProblems {
		rest := te.Cells[MaxFileProblems]
		te.Cells = append(te.Cells[:MaxFileProblems:MaxFileProblems], planner.CellError{Line: rest.Line,
			Reason: fmt.Sprintf("… and %d more problems from this line on (the first %d are listed); fix these and import again",
				total-MaxFileProblems, MaxFileProblems)})
	}
	return &Error{Code: EINVALID, Message: msg, Err: te}
}

// parsePlanCSV reads the `plan` command's file with the planner's own
// reader, so that both accept exactly the same files.
func parsePlanCSV(b []byte) (parsedFile, error) {
	rows, err := planner.ReadTargetsCSV(bytes.NewReader(b))
	if err != nil {
		var te *planner.TableError
		if errors.As(err, &te) {
			return parsedFile{}, tableErr(te)
		}
		return parsedFile{}, err
	}
	header, _, _ := bytes.Cut(bytes.TrimLeft(b, "\ufeff"), []byte("\n"))
	cols := map[string]int{}
	for i, h := range strings.Split(strings.TrimSpace(string(header)), ",") {
		cols[strings.TrimSpace(h)] = i + 1
	}
	pf := parsedFile{Format: FormatPlanCSV, Assumptions: []string{
		"the plan CSV has no convention column: T0 is taken as the companion's inferior conjunction (inferior_conjunction)",
		"t0_bjd_tdb is a full Julian date on BJD_TDB, as its name says",
		"no uncertainties are given: σT0 and σP are taken as 0, so phase uncertainty is not tracked for these targets",
	}}
	for _, r := range rows {
		t := r.Target
		pf.Rows = append(pf.Rows, fileRow{Line: r.Line, Input: TargetInput{
			Target: t,
			T0:     Epoch{Text: r.T0Text, Form: ephem.FormJD, Standard: ephem.StdBJDTDB, JD: t.Ephem.T0},
		}})
	}
	planCol := map[string]string{
		"t0": "t0_bjd_tdb", "period_days": "period_days", "priority": "priority", "name": "name", "ra": "ra", "dec": "dec",
		"phase_halfwidth": "phase_halfwidth", "exposure_s": "exposure_s", "overhead_s": "overhead_s",
		"rv_model": "rv_model", "rv_k_kms": "rv_k_kms", "rv_sigma_kms": "rv_sigma_kms", "rv_want_rel_k": "rv_want_rel_k",
	}
	pf.column = func(field string) (string, int) {
		if c, ok := planCol[goalSubfield(field)]; ok {
			return c, cols[c]
		}
		if strings.HasPrefix(field, "goals") {
			return "phases", cols["phases"]
		}
		return field, 0
	}
	return pf, nil
}

// goalSubfield turns "goals[3].exposure_s" into "exposure_s" and returns
// other fields unchanged.
func goalSubfield(field string) string {
	if strings.HasPrefix(field, "goals[") {
		if _, after, ok := strings.Cut(field, "]."); ok {
			return after
		}
	}
	return field
}

// parseTeamCSV reads phasecast's team CSV (FORMAT.md).
func parseTeamCSV(b []byte) (parsedFile, error) {
	cr := csv.NewReader(bytes.NewReader(b))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	te := &planner.TableError{}
	add := func(line, col int, column, value, reason string) {
		te.Cells = append(te.Cells, planner.CellError{Line: line, Col: col, Column: planner.ClipValue(column), Value: planner.ClipValue(value), Reason: reason})
	}
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		add(1, 0, "", "", "the file is empty; expected a header naming the columns (see FORMAT.md)")
		return parsedFile{}, tableErr(te)
	}
	if err != nil {
		add(1, 0, "", "", "malformed CSV: "+err.Error())
		return parsedFile{}, tableErr(te)
	}
	headerLine, _ := cr.FieldPos(0)
	col := planner.ColumnIndex(header, csvColumns, csvRequired, headerLine, te, "accepted columns: "+strings.Join(csvColumns, ","),
		func(n string) string {
			return "missing required column " + n + "; required: " + strings.Join(csvRequired, ",")
		})
	if len(te.Cells) > 0 {
		return parsedFile{}, tableErr(te)
	}
	pf := parsedFile{Format: FormatCSV}
	for n := 1; ; n++ {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if n > MaxTargets {
			line := 0
			var pe *csv.ParseError
			switch {
			case err == nil:
				line, _ = cr.FieldPos(0)
			case errors.As(err, &pe):
				line = pe.StartLine
			}
			return parsedFile{}, tableErr(&planner.TableError{Cells: []planner.CellError{{Line: line,
				Reason: fmt.Sprintf("the file holds more than %d targets; accepted: at most %d rows after the header", MaxTargets, MaxTargets)}}})
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				add(pe.Line, pe.Column, "", "", "malformed CSV: "+pe.Err.Error())
				continue
			}
			return parsedFile{}, err
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			add(line, 0, "", "", fmt.Sprintf("has %d fields; the header has %d", len(rec), len(header)))
			continue
		}
		in, cells := parseTeamRow(rec, col, line)
		te.Cells = append(te.Cells, cells...)
		pf.Rows = append(pf.Rows, fileRow{Line: line, Input: in})
	}
	if len(pf.Rows) == 0 && len(te.Cells) == 0 {
		add(headerLine+1, 0, "", "", "the file has a header but no targets")
		return parsedFile{}, tableErr(te)
	}
	pf.Cells = te.Cells
	pf.column = func(field string) (string, int) {
		c := goalSubfield(field)
		if strings.HasPrefix(c, "goals") || (strings.HasPrefix(field, "goals") && !hasKey(col, c) && !slices.Contains(csvColumns, c)) {
			c = "goals"
		}
		if i, ok := col[c]; ok {
			return c, i + 1
		}
		return c, 0 // a column the header lacks: see missingColumn
	}
	return pf, nil
}

// missingColumn rewords a check on a value the team CSV never gave: the
// header lacks its column, so the value is the default and the message
// says the column is missing (and, for a goal's setting, that the goals
// cell gave none either).
func missingColumn(field, col, accepted string) (value, reason string) {
	if strings.HasPrefix(field, "goals[") {
		return "", fmt.Sprintf("the file has no %s column and the goals cell gives none for this goal; accepted: %s", col, accepted)
	}
	return "", fmt.Sprintf("the file has no %s column; accepted: %s", col, accepted)
}

func hasKey(m map[string]int, k string) bool { _, ok := m[k]; return ok }

// cellReader collects a row's cells and their errors.
type cellReader struct {
	rec   []string
	col   map[string]int
	line  int
	cells []planner.CellError
}

func (c *cellReader) get(name string) string {
	i, ok := c.col[name]
	if !ok {
		return ""
	}
	return export.UnquoteCSVCell(strings.TrimSpace(c.rec[i]))
}

func (c *cellReader) bad(name, value, reason string) {
	c.cells = append(c.cells, planner.CellError{Line: c.line, Col: c.col[name] + 1, Column: name, Value: planner.ClipValue(value), Reason: reason})
}

// float reads an optional number (empty = def).
func (c *cellReader) float(name string, def float64) float64 {
	v := c.get(name)
	if v == "" {
		return def
	}
	x, ok := parseNumber(v)
	if !ok {
		c.bad(name, v, "a decimal number")
		return def
	}
	return x
}

// int reads an optional integer (empty = def).
func (c *cellReader) int(name string, def int) int {
	v := c.get(name)
	if v == "" {
		return def
	}
	x, err := strconv.Atoi(v)
	if err != nil {
		c.bad(name, v, "an integer")
		return def
	}
	return x
}

// parseNumber parses a plain decimal number (no NaN, infinities, hex).
func parseNumber(s string) (float64, bool) {
	if s == "" || strings.ContainsAny(s, "xXpP_") {
		return 0, false
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || !finite(v) {
		return 0, false
	}
	return v, true
}

// defaultPriority is the priority of a target whose file gives none.
const defaultPriority = 3

// parseTeamRow converts one CSV record. Range checks are left to
// validateTargetInput; here only the text is read.
func parseTeamRow(rec []string, col map[string]int, line int) (TargetInput, []planner.CellError) {
	c := &cellReader{rec: rec, col: col, line: line}
	var in TargetInput
	t := &in.Target
	t.Name = c.get("name")
	{
		v := c.get("ra")
		ra, err := ephem.ParseRA(v)
		if err != nil {
			c.bad("ra", v, acceptedOf(err))
		}
		t.RADeg = ra
	}
	{
		v := c.get("dec")
		dec, err := ephem.ParseDec(v)
		if err != nil {
			c.bad("dec", v, acceptedOf(err))
		}
		t.DecDeg = dec
	}
	t.PMRAmasyr = c.float("pm_ra_masyr", 0)
	t.PMDecmasyr = c.float("pm_dec_masyr", 0)
	t.Mag = c.float("mag", 0)
	t.Band = c.get("band")
	t.FaintMag = c.float("faint_mag", 0)
	t.FaintPhase = c.float("faint_phase", 0)
	t.BrightMag = c.float("bright_mag", 0)
	t.BrightPhase = c.float("bright_phase", 0)
	in.T0 = Epoch{Text: c.get("t0"), Form: ephem.EpochForm(c.get("t0_form")), Standard: ephem.TimeStandard(c.get("t0_standard"))}
	if in.T0.Form == "" {
		in.T0.Form = ephem.FormJD
	}
	if in.T0.Text == "" {
		c.bad("t0", "", "the reference epoch T0 is required")
	}
	if in.T0.Standard == "" {
		c.bad("t0_standard", "", "the time standard of t0 is required: JD_UTC, HJD_UTC, HJD_TT, BJD_UTC or BJD_TDB")
	}
	e := &t.Ephem
	e.Convention = ephem.Convention(c.get("t0_convention"))
	if e.Convention == "" {
		c.bad("t0_convention", "", "the event T0 marks is required: inferior_conjunction, ascending_node, superior_conjunction or custom")
	}
	e.T0ErrDays = c.float("t0_err_days", 0)
	if c.get("period_days") == "" {
		c.bad("period_days", "", "the orbital period in days is required")
	}
	e.PeriodDays = c.float("period_days", 0)
	e.PeriodErr = c.float("period_err_days", 0)
	e.CovT0P = c.float("cov_t0_period", 0)
	e.Pdot = c.float("pdot", 0)
	e.PdotErr = c.float("pdot_err", 0)
	e.CovT0Pdot = c.float("cov_t0_pdot", 0)
	e.CovPPdot = c.float("cov_period_pdot", 0)
	e.PhaseOffset = c.float("phase_offset", 0)
	e.Ecc = c.float("ecc", 0)
	e.OmegaDeg = c.float("omega_deg", 0)
	base := planner.Goal{
		HalfWidth:      c.float("phase_halfwidth", 0),
		ExposureS:      c.float("exposure_s", 0),
		OverheadS:      c.float("overhead_s", 0),
		NExposures:     c.int("n_exposures", 0),
		MinNights:      c.int("min_nights", 0),
		EclipseDurDays: c.float("eclipse_duration_days", 0),
		SNR:            c.float("snr", 0),
		MaxSmear:       c.float("max_smear", 0),
	}
	if v := c.get("goals"); v != "" {
		goals, reason := parseGoals(v, base)
		if reason != "" {
			c.bad("goals", v, reason)
		}
		t.Goals = goals
	}
	t.Priority = c.int("priority", defaultPriority)
	t.AcquireS = c.float("acquire_s", 0)
	if v := c.get("tags"); v != "" {
		for _, tag := range strings.Split(v, ";") {
			t.Tags = append(t.Tags, strings.TrimSpace(tag))
		}
	}
	t.Notes = c.get("notes")
	t.RV = c.rvGoal()
	return in, c.cells
}

// rvGoal reads the rv_ cells: nil when rv_model is empty (then the others
// must be empty too). Ranges are left to validateTargetInput.
func (c *cellReader) rvGoal() *planner.RVGoal {
	if c.get("rv_model") == "" {
		for _, n := range []string{"rv_k_kms", "rv_sigma_kms", "rv_want_rel_k"} {
			if v := c.get(n); v != "" {
				c.bad(n, v, "empty: the row has no rv_model, so no RV goal (give rv_model circular or eccentric)")
			}
		}
		return nil
	}
	return &planner.RVGoal{Model: planner.RVModel(c.get("rv_model")), KKms: c.float("rv_k_kms", 0),
		SigmaVKms: c.float("rv_sigma_kms", 0), WantRelK: c.float("rv_want_rel_k", 0)}
}

// acceptedOf returns what an *ephem.InputError says is accepted.
func acceptedOf(err error) string {
	var ie *ephem.InputError
	if errors.As(err, &ie) {
		return "accepted: " + ie.Accepted
	}
	return err.Error()
}

const goalsAccepted = "goals separated by ';', each a phase 0 ≤ φ < 1 or an event name, optionally ±half-width " +
	"(or +-half-width) and [key=value …] with keys exposure_s, overhead_s, n_exposures, min_nights, eclipse_duration_days, snr, max_smear; " +
	"e.g. 0.25±0.04;max_approach;eclipse_ingress±0.01[exposure_s=30 eclipse_duration_days=0.0061]"

// parseGoals reads a goals cell; base supplies the row's defaults.
func parseGoals(s string, base planner.Goal) ([]planner.Goal, string) {
	var out []planner.Goal
	for _, item := range strings.Split(s, ";") {
		item = strings.TrimSpace(item)
		g := base
		if open := strings.IndexByte(item, '['); open >= 0 {
			if !strings.HasSuffix(item, "]") {
				return nil, goalsAccepted
			}
			for _, kv := range strings.Fields(item[open+1 : len(item)-1]) {
				k, v, ok := strings.Cut(kv, "=")
				x, okNum := parseNumber(v)
				if !ok || !okNum || !slices.Contains(goalKeys, k) {
					return nil, goalsAccepted
				}
				switch k {
				case "exposure_s":
					g.ExposureS = x
				case "overhead_s":
					g.OverheadS = x
				case "n_exposures":
					g.NExposures = int(x)
					if float64(g.NExposures) != x {
						return nil, goalsAccepted
					}
				case "min_nights":
					g.MinNights = int(x)
					if float64(g.MinNights) != x {
						return nil, goalsAccepted
					}
				case "eclipse_duration_days":
					g.EclipseDurDays = x
				case "snr":
					g.SNR = x
				case "max_smear":
					g.MaxSmear = x
				}
			}
			item = strings.TrimSpace(item[:open])
		}
		where, hw, hasHW := strings.Cut(item, "±")
		if !hasHW {
			where, hw, hasHW = strings.Cut(item, "+-")
		}
		if hasHW {
			w, ok := parseNumber(strings.TrimSpace(hw))
			if !ok {
				return nil, goalsAccepted
			}
			g.HalfWidth = w
		}
		where = strings.TrimSpace(where)
		if where == "" {
			return nil, goalsAccepted
		}
		if x, ok := parseNumber(where); ok {
			g.Center = x
		} else {
			g.Event = where
		}
		out = append(out, g)
	}
	return out, ""
}

// formatGoals writes goals as a goals cell relative to the row's base
// values (the first goal's), so that reading it back gives the same goals.
func formatGoals(goals []planner.Goal, base planner.Goal) string {
	items := make([]string, len(goals))
	for i, g := range goals {
		var b strings.Builder
		if g.Event != "" {
			b.WriteString(g.Event)
		} else {
			b.WriteString(num(g.Center))
		}
		if g.HalfWidth != base.HalfWidth {
			b.WriteString("±" + num(g.HalfWidth))
		}
		var kv []string
		if g.ExposureS != base.ExposureS {
			kv = append(kv, "exposure_s="+num(g.ExposureS))
		}
		if g.OverheadS != base.OverheadS {
			kv = append(kv, "overhead_s="+num(g.OverheadS))
		}
		if g.NExposures != base.NExposures {
			kv = append(kv, "n_exposures="+strconv.Itoa(g.NExposures))
		}
		if g.MinNights != base.MinNights {
			kv = append(kv, "min_nights="+strconv.Itoa(g.MinNights))
		}
		if g.EclipseDurDays != base.EclipseDurDays {
			kv = append(kv, "eclipse_duration_days="+num(g.EclipseDurDays))
		}
		if g.SNR != base.SNR {
			kv = append(kv, "snr="+num(g.SNR))
		}
		if g.MaxSmear != base.MaxSmear {
			kv = append(kv, "max_smear="+num(g.MaxSmear))
		}
		if len(kv) > 0 {
			b.WriteString("[" + strings.Join(kv, " ") + "]")
		}
		items[i] = b.String()
	}
	return strings.Join(items, ";")
}

// numOrEmpty writes x, or "" for zero (optional columns).
func numOrEmpty(x float64) string {
	if x == 0 {
		return ""
	}
	return num(x)
}

func intOrEmpty(x int) string {
	if x == 0 {
		return ""
	}
	return strconv.Itoa(x)
}

// writeTeamCSV writes targets in the team CSV format.
func writeTeamCSV(w io.Writer, targets []StoredTarget) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(csvColumns); err != nil {
		return err
	}
	for _, st := range targets {
		t, e, t0 := st.Target, st.Target.Ephem, st.Ephemeris.T0
		var base planner.Goal
		if len(t.Goals) > 0 {
			base = t.Goals[0]
		}
		rec := []string{
			t.Name, num(t.RADeg), num(t.DecDeg), numOrEmpty(t.PMRAmasyr), numOrEmpty(t.PMDecmasyr), numOrEmpty(t.Mag),
			t.Band, numOrEmpty(t.FaintMag), numOrEmpty(t.FaintPhase), numOrEmpty(t.BrightMag), numOrEmpty(t.BrightPhase),
			t0.Text, string(t0.Form), string(t0.Standard), string(e.Convention), numOrEmpty(e.T0ErrDays), num(e.PeriodDays),
			numOrEmpty(e.PeriodErr), numOrEmpty(e.CovT0P), numOrEmpty(e.Pdot), numOrEmpty(e.PdotErr), numOrEmpty(e.CovT0Pdot),
			numOrEmpty(e.CovPPdot), numOrEmpty(e.PhaseOffset), numOrEmpty(e.Ecc), numOrEmpty(e.OmegaDeg),
			formatGoals(t.Goals, base), numOrEmpty(base.HalfWidth), numOrEmpty(base.ExposureS), numOrEmpty(base.OverheadS),
			intOrEmpty(base.NExposures), intOrEmpty(base.MinNights), numOrEmpty(base.EclipseDurDays),
			numOrEmpty(base.SNR), numOrEmpty(base.MaxSmear),
			strconv.Itoa(t.Priority), numOrEmpty(t.AcquireS), strings.Join(t.Tags, ";"), t.Notes, "", "", "", "",
		}
		if g := t.RV; g != nil {
			copy(rec[len(rec)-4:], []string{string(g.Model), num(g.KKms), num(g.SigmaVKms), numOrEmpty(g.WantRelK)})
		}
		for i := range rec {
			rec[i] = export.SafeCSVCell(rec[i])
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// --- JSON ---

// jsonFile is the phasecast-targets/1 document.
type jsonFile struct {
	Format  string       `json:"format"`
	List    string       `json:"list,omitempty"`
	Targets []jsonTarget `json:"targets"`
}

// jsonText accepts a JSON string or number and keeps its text exactly.
type jsonText string

func (j *jsonText) UnmarshalJSON(b []byte) error {
	if len(b) > 0 && b[0] == '"' {
		var s string
		if err := json.Unmarshal(b, &s); err != nil {
			return err
		}
		*j = jsonText(s)
		return nil
	}
	var n json.Number
	if err := json.Unmarshal(b, &n); err != nil {
		return fmt.Errorf("expected a string or a number")
	}
	*j = jsonText(n.String())
	return nil
}

type jsonEphem struct {
	T0            *jsonText `json:"t0"`
	T0Form        string    `json:"t0_form,omitempty"`
	T0Standard    string    `json:"t0_standard"`
	T0Convention  string    `json:"t0_convention"`
	T0ErrDays     float64   `json:"t0_err_days,omitempty"`
	PeriodDays    *float64  `json:"period_days"`
	PeriodErrDays float64   `json:"period_err_days,omitempty"`
	CovT0Period   float64   `json:"cov_t0_period,omitempty"`
	Pdot          float64   `json:"pdot,omitempty"`
	PdotErr       float64   `json:"pdot_err,omitempty"`
	CovT0Pdot     float64   `json:"cov_t0_pdot,omitempty"`
	CovPeriodPdot float64   `json:"cov_period_pdot,omitempty"`
	PhaseOffset   float64   `json:"phase_offset,omitempty"`
	Ecc           float64   `json:"ecc,omitempty"`
	OmegaDeg      float64   `json:"omega_deg,omitempty"`
}

type jsonGoal struct {
	Event          string  `json:"event,omitempty"`
	Center         float64 `json:"center"`
	PhaseHalfwidth float64 `json:"phase_halfwidth"`
	ExposureS      float64 `json:"exposure_s"`
	OverheadS      float64 `json:"overhead_s,omitempty"`
	NExposures     int     `json:"n_exposures,omitempty"`
	MinNights      int     `json:"min_nights,omitempty"`
	EclipseDurDays float64 `json:"eclipse_duration_days,omitempty"`
	SNR            float64 `json:"snr,omitempty"`
	MaxSmear       float64 `json:"max_smear,omitempty"`
}

type jsonTarget struct {
	Name        string     `json:"name"`
	RA          *jsonText  `json:"ra"`
	Dec         *jsonText  `json:"dec"`
	PMRAmasyr   float64    `json:"pm_ra_masyr,omitempty"`
	PMDecmasyr  float64    `json:"pm_dec_masyr,omitempty"`
	Mag         float64    `json:"mag,omitempty"`
	Band        string     `json:"band,omitempty"`
	FaintMag    float64    `json:"faint_mag,omitempty"`
	FaintPhase  float64    `json:"faint_phase,omitempty"`
	BrightMag   float64    `json:"bright_mag,omitempty"`
	BrightPhase float64    `json:"bright_phase,omitempty"`
	Ephemeris   *jsonEphem `json:"ephemeris"`
	Goals       []jsonGoal `json:"goals"`
	Priority    *int       `json:"priority,omitempty"`
	AcquireS    float64    `json:"acquire_s,omitempty"`
	Tags        []string   `json:"tags"`
	Notes       string     `json:"notes,omitempty"`
	RV          *jsonRV    `json:"rv,omitempty"`
}

// jsonRV is a target's RV goal (planner.RVGoal): km/s and a fraction.
type jsonRV struct {
	Model     string  `json:"model"`
	KKms      float64 `json:"k_kms"`
	SigmaVKms float64 `json:"sigma_kms"`
	WantRelK  float64 `json:"want_rel_k,omitempty"`
}

// lineAt returns the 1-based line of byte offset off in b.
func lineAt(b []byte, off int64) int {
	if off > int64(len(b)) {
		off = int64(len(b))
	}
	return bytes.Count(b[:off], []byte("\n")) + 1
}

// parseJSONFile reads a phasecast-targets/1 document. Errors name the line
// where the target starts and the member ("ephemeris.period_days").
func parseJSONFile(b []byte) (parsedFile, error) {
	te := &planner.TableError{}
	add := func(line int, member, value, reason string) {
		te.Cells = append(te.Cells, planner.CellError{Line: line, Column: member, Value: planner.ClipValue(value), Reason: reason})
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	var head struct {
		Format  string            `json:"format"`
		List    string            `json:"list"`
		Targets []json.RawMessage `json:"targets"`
	}
	if err := dec.Decode(&head); err != nil {
		line := 1
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line = lineAt(b, se.Offset)
		}
		add(line, "", "", "malformed JSON: "+err.Error())
		return parsedFile{}, tableErr(te)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		add(lineAt(b, dec.InputOffset()), "", "", "trailing data after the JSON document: a file holds exactly one document")
		return parsedFile{}, tableErr(te)
	}
	if head.Format != JSONFormatTag {
		add(1, "format", head.Format, fmt.Sprintf("the document's \"format\" must be %q", JSONFormatTag))
		return parsedFile{}, tableErr(te)
	}
	// Find where each target starts, for line numbers.
	starts := targetOffsets(b)
	if len(head.Targets) > MaxTargets {
		line := 1
		if MaxTargets < len(starts) {
			line = lineAt(b, starts[MaxTargets])
		}
		add(line, fmt.Sprintf("targets[%d]", MaxTargets), "", fmt.Sprintf("the document holds more than %d targets; accepted: at most %d", MaxTargets, MaxTargets))
		return parsedFile{}, tableErr(te)
	}
	pf := parsedFile{Format: FormatJSON}
	for i, raw := range head.Targets {
		line := 1
		if i < len(starts) {
			line = lineAt(b, starts[i])
		}
		var jt jsonTarget
		d := json.NewDecoder(bytes.NewReader(raw))
		d.DisallowUnknownFields()
		if err := d.Decode(&jt); err != nil {
			add(line, fmt.Sprintf("targets[%d]", i), "", "malformed target: "+err.Error())
			continue
		}
		in, cells := jsonToInput(jt, line, i)
		te.Cells = append(te.Cells, cells...)
		pf.Rows = append(pf.Rows, fileRow{Line: line, Input: in})
	}
	if len(pf.Rows) == 0 && len(te.Cells) == 0 {
		add(1, "targets", "", "the document has no targets")
		return parsedFile{}, tableErr(te)
	}
	pf.Cells = te.Cells
	pf.column = func(field string) (string, int) {
		if _, ok := ephemMember[field]; ok {
			return "ephemeris." + field, 0
		}
		if m, ok := strings.CutPrefix(field, "rv_"); ok {
			return "rv." + m, 0
		}
		return field, 0
	}
	return pf, nil
}

// ephemMember lists the fields that live under "ephemeris" in JSON.
var ephemMember = map[string]bool{
	"t0": true, "t0_form": true, "t0_standard": true, "t0_convention": true, "t0_err_days": true, "period_days": true,
	"period_err_days": true, "cov_t0_period": true, "pdot": true, "pdot_err": true, "cov_t0_pdot": true,
	"cov_period_pdot": true, "phase_offset": true, "ecc": true, "omega_deg": true,
}

// targetOffsets returns the byte offset of each element of the top-level
// "targets" array.
func targetOffsets(b []byte) []int64 {
	dec := json.NewDecoder(bytes.NewReader(b))
	tok, err := dec.Token()
	if err != nil || tok != json.Delim('{') {
		return nil
	}
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return nil
		}
		if key != "targets" {
			var skip json.RawMessage
			if err := dec.Decode(&skip); err != nil {
				return nil
			}
			continue
		}
		if tok, err := dec.Token(); err != nil || tok != json.Delim('[') {
			return nil
		}
		var offs []int64
		for dec.More() {
			off := dec.InputOffset()
			var skip json.RawMessage
			if err := dec.Decode(&skip); err != nil {
				return offs
			}
			// InputOffset is before any whitespace and comma; step to '{'.
			for off < int64(len(b)) && b[off] != '{' {
				off++
			}
			offs = append(offs, off)
		}
		return offs
	}
	return nil
}

// jsonToInput converts one JSON target; missing required members and
// unreadable coordinates are cells.
func jsonToInput(jt jsonTarget, line, i int) (TargetInput, []planner.CellError) {
	var cells []planner.CellError
	bad := func(member, value, reason string) {
		cells = append(cells, planner.CellError{Line: line, Column: member, Value: planner.ClipValue(value), Reason: reason})
	}
	var in TargetInput
	t := &in.Target
	t.Name = jt.Name
	if jt.RA == nil {
		bad("ra", "", "required: degrees (number) or sexagesimal hours (string)")
	} else if ra, err := ephem.ParseRA(string(*jt.RA)); err != nil {
		bad("ra", string(*jt.RA), acceptedOf(err))
	} else {
		t.RADeg = ra
	}
	if jt.Dec == nil {
		bad("dec", "", "required: degrees (number) or sexagesimal degrees (string)")
	} else if d, err := ephem.ParseDec(string(*jt.Dec)); err != nil {
		bad("dec", string(*jt.Dec), acceptedOf(err))
	} else {
		t.DecDeg = d
	}
	t.PMRAmasyr, t.PMDecmasyr, t.Mag = jt.PMRAmasyr, jt.PMDecmasyr, jt.Mag
	t.Band, t.FaintMag, t.FaintPhase, t.BrightMag, t.BrightPhase = jt.Band, jt.FaintMag, jt.FaintPhase, jt.BrightMag, jt.BrightPhase
	if je := jt.Ephemeris; je == nil {
		bad("ephemeris", "", "required: t0, t0_standard, t0_convention, period_days at least")
	} else {
		if je.T0 == nil {
			bad("ephemeris.t0", "", "the reference epoch T0 is required")
		} else {
			in.T0.Text = string(*je.T0)
		}
		if je.T0Standard == "" {
			bad("ephemeris.t0_standard", "", "the time standard of t0 is required: JD_UTC, HJD_UTC, HJD_TT, BJD_UTC or BJD_TDB")
		}
		if je.T0Convention == "" {
			bad("ephemeris.t0_convention", "", "the event T0 marks is required: inferior_conjunction, ascending_node, superior_conjunction or custom")
		}
		if je.PeriodDays == nil {
			bad("ephemeris.period_days", "", "the orbital period in days is required")
		} else {
			t.Ephem.PeriodDays = *je.PeriodDays
		}
		in.T0.Form = ephem.EpochForm(je.T0Form)
		if in.T0.Form == "" {
			in.T0.Form = ephem.FormJD
		}
		in.T0.Standard = ephem.TimeStandard(je.T0Standard)
		e := &t.Ephem
		e.Convention = ephem.Convention(je.T0Convention)
		e.T0ErrDays, e.PeriodErr, e.CovT0P = je.T0ErrDays, je.PeriodErrDays, je.CovT0Period
		e.Pdot, e.PdotErr, e.CovT0Pdot, e.CovPPdot = je.Pdot, je.PdotErr, je.CovT0Pdot, je.CovPeriodPdot
		e.PhaseOffset, e.Ecc, e.OmegaDeg = je.PhaseOffset, je.Ecc, je.OmegaDeg
	}
	for _, g := range jt.Goals {
		t.Goals = append(t.Goals, planner.Goal{Event: g.Event, Center: g.Center, HalfWidth: g.PhaseHalfwidth,
			ExposureS: g.ExposureS, OverheadS: g.OverheadS, NExposures: g.NExposures, MinNights: g.MinNights,
			EclipseDurDays: g.EclipseDurDays, SNR: g.SNR, MaxSmear: g.MaxSmear})
	}
	t.Priority = defaultPriority
	if jt.Priority != nil {
		t.Priority = *jt.Priority
	}
	t.AcquireS, t.Tags, t.Notes = jt.AcquireS, jt.Tags, jt.Notes
	if r := jt.RV; r != nil {
		t.RV = &planner.RVGoal{Model: planner.RVModel(r.Model), KKms: r.KKms, SigmaVKms: r.SigmaVKms, WantRelK: r.WantRelK}
	}
	return in, cells
}

// writeJSONFile writes targets as a phasecast-targets/1 document.
func writeJSONFile(w io.Writer, listName string, targets []StoredTarget) error {
	f := jsonFile{Format: JSONFormatTag, List: listName, Targets: make([]jsonTarget, 0, len(targets))}
	for _, st := range targets {
		t, e, t0 := st.Target, st.Target.Ephem, st.Ephemeris.T0
		ra, dec := jsonText(num(t.RADeg)), jsonText(num(t.DecDeg))
		t0Text := jsonText(t0.Text)
		p := e.PeriodDays
		prio := t.Priority
		jt := jsonTarget{
			Name: t.Name, RA: &ra, Dec: &dec, PMRAmasyr: t.PMRAmasyr, PMDecmasyr: t.PMDecmasyr, Mag: t.Mag,
			Band: t.Band, FaintMag: t.FaintMag, FaintPhase: t.FaintPhase, BrightMag: t.BrightMag, BrightPhase: t.BrightPhase,
			Ephemeris: &jsonEphem{
				T0: &t0Text, T0Form: string(t0.Form), T0Standard: string(t0.Standard), T0Convention: string(e.Convention),
				T0ErrDays: e.T0ErrDays, PeriodDays: &p, PeriodErrDays: e.PeriodErr, CovT0Period: e.CovT0P, Pdot: e.Pdot,
				PdotErr: e.PdotErr, CovT0Pdot: e.CovT0Pdot, CovPeriodPdot: e.CovPPdot, PhaseOffset: e.PhaseOffset,
				Ecc: e.Ecc, OmegaDeg: e.OmegaDeg,
			},
			Goals:    []jsonGoal{},
			Priority: &prio, AcquireS: t.AcquireS, Tags: append([]string{}, t.Tags...), Notes: t.Notes,
		}
		if g := t.RV; g != nil {
			jt.RV = &jsonRV{Model: string(g.Model), KKms: g.KKms, SigmaVKms: g.SigmaVKms, WantRelK: g.WantRelK}
		}
		for _, g := range t.Goals {
			jt.Goals = append(jt.Goals, jsonGoal{Event: g.Event, Center: g.Center, PhaseHalfwidth: g.HalfWidth,
				ExposureS: g.ExposureS, OverheadS: g.OverheadS, NExposures: g.NExposures, MinNights: g.MinNights,
				EclipseDurDays: g.EclipseDurDays, SNR: g.SNR, MaxSmear: g.MaxSmear})
		}
		f.Targets = append(f.Targets, jt)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(f)
}

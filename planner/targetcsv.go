package planner

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"phasecast/ephem"
)

// PlanCSVHeader is the header of the `plan` command's targets file, in its
// documented order. ParseTargetsCSV accepts the columns in any order but
// requires every one of them and no other.
var PlanCSVHeader = []string{
	"name", "ra", "dec", "t0_bjd_tdb", "period_days", "phases",
	"phase_halfwidth", "exposure_s", "overhead_s", "priority",
}

// PlanCSVOptional are the targets file's optional columns, in their
// documented order: the target's brightness (band, mag), the wanted S/N
// per exposure with its smear limit (snr, max_smear), and a variable's faint
// and bright magnitudes with their phases. A file without them reads as
// before; an empty cell means "not given".
var PlanCSVOptional = []string{"band", "mag", "snr", "max_smear", "faint_mag", "faint_phase", "bright_mag", "bright_phase"}

// PlanCSVRV are the optional columns of a target's radial-velocity goal
// (RVGoal). With rv_model, rv_k_kms and rv_sigma_kms are required columns
// too; a row with rv_model empty has no RV goal and its other rv_ cells must
// be empty.
var PlanCSVRV = []string{"rv_model", "rv_k_kms", "rv_sigma_kms", "rv_want_rel_k"}

// CellError is one rejected cell of a table file: the 1-based line of the
// file, the 1-based column number and the column's header name (both 0 and ""
// when the whole line is at fault), the value as written, and what is
// accepted.
type CellError struct {
	Line   int
	Col    int
	Column string
	Value  string
	Reason string
}

// String reads "line 7, column 3 (dec): "+95:00:00" is not accepted; ...".
func (c CellError) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "line %d", c.Line)
	switch {
	case c.Col > 0 && c.Column != "":
		fmt.Fprintf(&b, ", column %d (%s)", c.Col, c.Column)
	case c.Col > 0:
		fmt.Fprintf(&b, ", column %d", c.Col)
	case c.Column != "":
		fmt.Fprintf(&b, ", column %s", c.Column)
	}
	if c.Value != "" {
		fmt.Fprintf(&b, ": %q", c.Value)
	}
	b.WriteString(": ")
	b.WriteString(c.Reason)
	return b.String()
}

// TableError lists every rejected cell of a file. A file with any rejected
// cell is rejected whole: nothing of it is used.
type TableError struct {
	Cells []CellError
}

// Error lists the cells one per line, after a count.
func (e *TableError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d error(s) in the file, nothing was read:", len(e.Cells))
	for _, c := range e.Cells {
		b.WriteString("\n  ")
		b.WriteString(c.String())
	}
	return b.String()
}

// add records a rejected cell.
func (e *TableError) add(line, col int, column, value, reason string) {
	e.Cells = append(e.Cells, CellError{Line: line, Col: col, Column: ClipValue(column), Value: ClipValue(value), Reason: reason})
}

// MaxShownValue is the longest value, in characters, that an error shows;
// longer ones are cut and end in "…", so that a hostile 10 MB cell does not
// come back in the message.
const MaxShownValue = 80

// ClipValue returns s cut to MaxShownValue characters (with "…" when cut),
// with invalid UTF-8 replaced, for showing in an error.
func ClipValue(s string) string {
	s = strings.ToValidUTF8(s, "\ufffd")
	if utf8.RuneCountInString(s) <= MaxShownValue {
		return s
	}
	r := []rune(s)
	return string(r[:MaxShownValue]) + "…"
}

// Limits of the plan CSV's numeric columns and of its length.
const (
	// MinPeriodDays is the shortest orbital period accepted in a targets
	// file, days: ephem.MinPeriodDays (0.864 s), so that every period the
	// reader accepts also passes ephem.Ephemeris.Validate.
	MinPeriodDays = ephem.MinPeriodDays
	// MaxPeriodDays is the longest orbital period accepted in a targets file:
	// one Julian century, far beyond the compact binaries phasecast is for
	// but a plain sanity bound (below ephem.MaxPeriodDays, so such a period
	// also passes ephem.Ephemeris.Validate).
	MaxPeriodDays = min(36525.0, ephem.MaxPeriodDays)
	// MaxTargetRows is the most targets a targets file may hold (the store
	// keeps at most as many on one list). A longer file is refused at the
	// first row past the limit, naming its line, before the rest is read.
	MaxTargetRows = 50000
	// MaxExposureS is the longest single exposure accepted, s (one day).
	MaxExposureS = 86400.0
)

// ParseTargetsCSV reads the `plan` command's targets file: a header line
// naming the columns of PlanCSVHeader (any order, each exactly once) and any
// of PlanCSVOptional and PlanCSVRV, no others, then one target per line. Blank lines and lines starting with '#'
// are skipped.
//
//   - name: non-empty text.
//   - ra, dec: ICRS, decimal degrees or sexagesimal (RA in hours, Dec in
//     degrees), as ephem.ParseRA and ephem.ParseDec accept.
//   - t0_bjd_tdb: the reference epoch as a full Julian date on the BJD_TDB
//     scale (e.g. 2460123.4567891), read by ephem.ParseEpoch, which keeps
//     every digit given (two-part ephem.JD2); 1582-10-15 to 3000-01-01, so
//     an MJD or a reduced date is rejected, not guessed.
//   - period_days: MinPeriodDays ≤ P ≤ MaxPeriodDays (0.864 s to one
//     Julian century).
//   - phases: goal centres separated by ';' (e.g. "0.25;0.75"), each
//     0 ≤ φ < 1, no repeats, in the convention of T0.
//   - phase_halfwidth: half-width of every goal window, 0 < w < 0.5.
//   - exposure_s: one exposure, 0 < t ≤ MaxExposureS seconds.
//   - overhead_s: readout after each exposure, 0 ≤ t ≤ MaxExposureS seconds.
//   - priority: integer 1 (highest) to 5.
//
// The optional columns (PlanCSVOptional) may be left out or left empty:
//
//   - band: the band of mag, U B V R I (Vega) or g r i z (AB).
//   - mag: the target's magnitude in band, −2..30.
//   - snr: the wanted S/N per exposure of every goal of the row, 0 < S/N ≤
//     100000; needs band and mag. With an instrument, the planner then sizes
//     each block's exposure for its sky (SizeExposure) and exposure_s is
//     used only without one.
//   - max_smear: the most phase one S/N-sized exposure may span,
//     0 < s < 0.5 (empty: DefaultMaxSmear).
//   - faint_mag, faint_phase, bright_mag, bright_phase: a variable's
//     extremes in band (−2..30, bright not fainter than faint) and their
//     phases (0 ≤ φ < 1); all four or none (Target.MagAtPhase).
//   - rv_model: "circular" or "eccentric" (the eccentric model takes e and
//     ω of the ephemeris: 0 in this file, which has no such columns), or
//     empty for no RV goal.
//   - rv_k_kms, rv_sigma_kms, rv_want_rel_k (with rv_model): the rough K and
//     the velocity error of one exposure, km/s, and the wanted σK/K as a
//     fraction (empty or 0 for none); RVGoal.Validate's ranges.
//
// The file has no convention column: T0 is recorded as the companion's
// inferior conjunction (ephem.ConvInferiorConjunction), and the phases are
// taken as given. On any bad cell the error is a *TableError listing EVERY
// bad cell by line and column, and no target is returned. A file of more
// than MaxTargetRows targets is refused at the first line past the limit,
// with that one problem.
func ParseTargetsCSV(r io.Reader) ([]Target, error) {
	rows, err := ReadTargetsCSV(r)
	if err != nil {
		return nil, err
	}
	out := make([]Target, len(rows))
	for i, row := range rows {
		out[i] = row.Target
	}
	return out, nil
}

// TargetRow is one target read from a targets file, with the line it is on
// and the epoch exactly as written.
type TargetRow struct {
	Line   int
	Target Target
	T0Text string
}

// ReadTargetsCSV is ParseTargetsCSV keeping, for each target, its line and
// the t0_bjd_tdb text as written (for callers that record what was typed or
// report later checks by line).
func ReadTargetsCSV(r io.Reader) ([]TargetRow, error) {
	cr, header, headerLine, err := openTable(r, "the file is empty; expected the header "+strings.Join(PlanCSVHeader, ","))
	if err != nil {
		return nil, err
	}
	te := &TableError{}
	col := columnIndex(header, PlanCSVHeader, headerLine, te, slices.Concat(PlanCSVOptional, PlanCSVRV)...)
	if hasKey(col, "rv_model") {
		for _, n := range PlanCSVRV[1:3] {
			if !hasKey(col, n) {
				te.add(headerLine, 0, n, "", "missing column "+n+": rv_model needs rv_k_kms and rv_sigma_kms")
			}
		}
	} else {
		for _, n := range PlanCSVRV[1:] {
			if hasKey(col, n) {
				te.add(headerLine, col[n]+1, n, n, "column without rv_model: an RV goal needs rv_model, rv_k_kms and rv_sigma_kms")
			}
		}
	}
	if len(te.Cells) > 0 {
		return nil, te
	}
	var targets []TargetRow
	names := map[string]int{}
	rows := 0
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if rows++; rows > MaxTargetRows {
			return nil, tooManyRows(cr, err)
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				// Bad quoting: note it and read on, to report every bad line.
				te.add(pe.Line, pe.Column, "", "", "malformed CSV: "+pe.Err.Error())
				continue
			}
			return nil, fmt.Errorf("read targets CSV: %w", err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			te.add(line, 0, "", "", fmt.Sprintf("has %d fields; the header has %d", len(rec), len(header)))
			continue
		}
		t, ok := parsePlanRow(rec, col, line, te)
		if !ok {
			continue
		}
		if first, dup := names[t.Name]; dup {
			te.add(line, col["name"]+1, "name", t.Name, fmt.Sprintf("duplicate: the same name is on line %d", first))
			continue
		}
		names[t.Name] = line
		targets = append(targets, TargetRow{Line: line, Target: t, T0Text: strings.TrimSpace(rec[col["t0_bjd_tdb"]])})
	}
	if len(te.Cells) > 0 {
		return nil, te
	}
	if len(targets) == 0 {
		return nil, &TableError{Cells: []CellError{{Line: headerLine + 1, Reason: "the file has a header but no targets"}}}
	}
	return targets, nil
}

// tooManyRows is the error for the row past MaxTargetRows that cr.Read has
// just returned (with err): the file's length is its one problem reported.
func tooManyRows(cr *csv.Reader, err error) *TableError {
	line := 0
	var pe *csv.ParseError
	switch {
	case err == nil:
		line, _ = cr.FieldPos(0)
	case errors.As(err, &pe):
		line = pe.StartLine
	}
	te := &TableError{}
	te.add(line, 0, "", "", fmt.Sprintf("the file holds more than %d targets; accepted: at most %d rows after the header", MaxTargetRows, MaxTargetRows))
	return te
}

// csvReadError reports a malformed CSV (bad quoting) as a one-cell
// TableError naming the line.
func csvReadError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &TableError{Cells: []CellError{{Line: pe.Line, Col: pe.Column, Reason: "malformed CSV: " + pe.Err.Error()}}}
	}
	return fmt.Errorf("read targets CSV: %w", err)
}

// ColumnIndex is the one column-index helper of the CSV readers (the plan
// targets file, the observed log, the store's team file): it maps each
// column of header to its 0-based index, ignoring a byte-order mark and
// blanks around names, and records in te, at line, every column not in
// known ("unknown column; " + accepted), every repeated one, and every
// name of required missing from the header (missing(name) says what to
// write).
func ColumnIndex(header, known, required []string, line int, te *TableError, accepted string, missing func(name string) string) map[string]int {
	col := map[string]int{}
	for i, h := range header {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		switch {
		case !slices.Contains(known, h):
			te.add(line, i+1, h, h, "unknown column; "+accepted)
		case hasKey(col, h):
			te.add(line, i+1, h, h, fmt.Sprintf("column repeated (first at column %d)", col[h]+1))
		default:
			col[h] = i
		}
	}
	for _, n := range required {
		if !hasKey(col, n) {
			te.add(line, 0, n, "", missing(n))
		}
	}
	return col
}

// columnIndex is ColumnIndex for the plan CSV: every required column, and
// each optional one when present.
func columnIndex(header, required []string, line int, te *TableError, optional ...string) map[string]int {
	expected := strings.Join(required, ",")
	if len(optional) > 0 {
		expected += " (optional: " + strings.Join(optional, ",") + ")"
	}
	known := append(append([]string(nil), required...), optional...)
	return ColumnIndex(header, known, required, line, te, "the header must be "+expected,
		func(n string) string {
			return "missing column " + n + "; the header must be " + strings.Join(required, ",")
		})
}

func hasKey(m map[string]int, k string) bool { _, ok := m[k]; return ok }

// parsePlanRow converts one record; every bad cell is added to te.
func parsePlanRow(rec []string, col map[string]int, line int, te *TableError) (Target, bool) {
	n0 := len(te.Cells)
	get := func(name string) string { return strings.TrimSpace(rec[col[name]]) }
	bad := func(name, value, reason string) { te.add(line, col[name]+1, name, value, reason) }
	var t Target
	t.Ephem.Convention = ephem.ConvInferiorConjunction

	name := get("name")
	if name == "" {
		bad("name", name, "a target name is required")
	}
	t.Name = name

	{
		v := get("ra")
		ra, err := ephem.ParseRA(v)
		if err != nil {
			bad("ra", v, inputReason(err))
		}
		t.RADeg = ra
	}
	{
		v := get("dec")
		dec, err := ephem.ParseDec(v)
		if err != nil {
			bad("dec", v, inputReason(err))
		}
		t.DecDeg = dec
	}
	{
		v := get("t0_bjd_tdb")
		jd, err := ephem.ParseEpoch(v, ephem.StdBJDTDB, ephem.FormJD)
		if err != nil {
			bad("t0_bjd_tdb", v, inputReason(err)+" (a full Julian date on BJD_TDB)")
		}
		t.Ephem.T0 = jd
	}
	{
		v := get("period_days")
		p, ok := parseFinite(v)
		if !ok || p < MinPeriodDays || p > MaxPeriodDays {
			bad("period_days", v, fmt.Sprintf("a period in days, %g ≤ P ≤ %g (0.864 s to one Julian century)", MinPeriodDays, MaxPeriodDays))
		}
		t.Ephem.PeriodDays = p
	}
	hw := 0.0
	{
		v := get("phase_halfwidth")
		w, ok := parseFinite(v)
		if !ok {
			bad("phase_halfwidth", v, "a phase half-width, 0 < w < 0.5")
		}
		hw = w
	}
	exp := 0.0
	{
		v := get("exposure_s")
		e, ok := parseFinite(v)
		if !ok {
			bad("exposure_s", v, fmt.Sprintf("one exposure in seconds, 0 < t ≤ %g", MaxExposureS))
		}
		exp = e
	}
	ovh := 0.0
	{
		v := get("overhead_s")
		o, ok := parseFinite(v)
		if !ok {
			bad("overhead_s", v, fmt.Sprintf("readout overhead per exposure in seconds, 0 ≤ t ≤ %g", MaxExposureS))
		}
		ovh = o
	}
	{
		v := get("priority")
		p, err := strconv.Atoi(v)
		if err != nil {
			bad("priority", v, "an integer 1 (highest) to 5")
		}
		t.Priority = p
	}
	{
		v := get("phases")
		centres, reason := ParsePhaseList(v)
		if reason != "" {
			bad("phases", v, reason)
		}
		snr, smear := parseBrightnessCells(&t, get, col, bad)
		for _, c := range centres {
			t.Goals = append(t.Goals, Goal{Center: c, HalfWidth: hw, ExposureS: exp, OverheadS: ovh, SNR: snr, MaxSmear: smear})
		}
	}
	if hasKey(col, "rv_model") {
		t.RV = parseRVCells(get, bad, func(n string) bool { return hasKey(col, n) })
	}
	// The rules of a target are TargetProblems', given at the column that
	// holds the value, once per column (the goals share phase_halfwidth,
	// exposure_s and overhead_s) and not for a cell that did not parse.
	seen := map[string]bool{}
	for _, c := range te.Cells[n0:] {
		seen[c.Column] = true
	}
	checked := t
	if len(checked.Goals) == 0 { // phases did not parse: check the shared goal cells on their own
		checked.Goals = []Goal{{HalfWidth: hw, ExposureS: exp, OverheadS: ovh}}
	}
	for _, p := range TargetProblems(checked) {
		c := planColumn(p.Field)
		if seen[c] {
			continue
		}
		seen[c] = true
		if _, ok := col[c]; ok {
			bad(c, get(c), p.Accepted)
		} else {
			te.add(line, 0, p.Field, p.Value, p.Accepted)
		}
	}
	return t, len(te.Cells) == n0
}

// parseRVCells reads a row's RV goal (nil for none), reporting bad cells.
func parseRVCells(get func(string) string, bad func(name, value, reason string), has func(string) bool) *RVGoal {
	cell := func(n string) string {
		if !has(n) {
			return ""
		}
		return get(n)
	}
	if cell("rv_model") == "" {
		for _, n := range PlanCSVRV[1:] {
			if v := cell(n); v != "" {
				bad(n, v, "empty: this row has no rv_model, so no RV goal")
			}
		}
		return nil
	}
	g := RVGoal{Model: RVModel(cell("rv_model"))}
	num := func(n string, dst *float64) {
		v := cell(n)
		if v == "" && n == "rv_want_rel_k" {
			return
		}
		x, ok := parseFinite(v)
		if !ok {
			bad(n, v, "a number")
			return
		}
		*dst = x
	}
	num("rv_k_kms", &g.KKms)
	num("rv_sigma_kms", &g.SigmaVKms)
	num("rv_want_rel_k", &g.WantRelK)
	if err := g.Validate(); err != nil {
		var ie *ephem.InputError
		if errors.As(err, &ie) {
			bad(ie.Field, cell(ie.Field), ie.Accepted)
		}
		return nil
	}
	return &g
}

// planColumn is the plan CSV's column of a TargetProblems field
// ("goals[1].exposure_s" → "exposure_s", a goal's centre → "phases").
func planColumn(field string) string {
	if _, sub, ok := strings.Cut(field, "]."); ok && strings.HasPrefix(field, "goals[") {
		if sub == "center" {
			return "phases"
		}
		return sub
	}
	return field
}

// parseBrightnessCells reads the optional columns of PlanCSVOptional into t
// (band, mag) and returns the goals' snr and max_smear (0 when absent or
// empty); bad cells go to bad.
func parseBrightnessCells(t *Target, get func(string) string, col map[string]int, bad func(name, value, reason string)) (snr, smear float64) {
	cell := func(name string) string {
		if !hasKey(col, name) {
			return ""
		}
		return get(name)
	}
	if v := cell("band"); v != "" {
		b, err := ephem.ParseBand(v)
		if err != nil {
			bad("band", v, inputReason(err))
		}
		t.Band = string(b)
	}
	if v := cell("mag"); v != "" {
		m, ok := parseFinite(v)
		if !ok || m < -2 || m > 30 {
			bad("mag", v, "a magnitude −2..30 in the band")
		}
		t.Mag = m
		if t.Band == "" && cell("band") == "" {
			bad("mag", v, "a magnitude needs its band in the band column")
		}
	}
	if v := cell("snr"); v != "" {
		x, ok := parseFinite(v)
		if !ok || x <= 0 || x > 100000 {
			bad("snr", v, "a wanted S/N per exposure, 0 < S/N ≤ 100000")
		}
		if cell("band") == "" || (cell("mag") == "" && cell("faint_mag") == "") {
			bad("snr", v, "an S/N goal needs the target's band and mag (or faint and bright magnitudes)")
		}
		snr = x
	}
	variable := []struct {
		name   string
		dst    *float64
		lo, hi float64
		accept string
	}{
		{"faint_mag", &t.FaintMag, -2, 30, "a magnitude −2..30 in the band"},
		{"faint_phase", &t.FaintPhase, 0, 0.999999999, "a phase 0 ≤ φ < 1"},
		{"bright_mag", &t.BrightMag, -2, 30, "a magnitude −2..30 in the band"},
		{"bright_phase", &t.BrightPhase, 0, 0.999999999, "a phase 0 ≤ φ < 1"},
	}
	given := 0
	for _, f := range variable {
		if v := cell(f.name); v != "" {
			x, ok := parseFinite(v)
			if !ok || x < f.lo || x > f.hi {
				bad(f.name, v, f.accept)
			}
			*f.dst = x
			given++
		}
	}
	switch {
	case given != 0 && given != len(variable):
		bad("faint_mag", cell("faint_mag"), "all of faint_mag, faint_phase, bright_mag and bright_phase, or none")
	case given != 0 && cell("band") == "":
		bad("faint_mag", cell("faint_mag"), "a variable's magnitudes need the band column")
	case given != 0 && (t.BrightMag > t.FaintMag || t.BrightPhase == t.FaintPhase):
		bad("bright_mag", cell("bright_mag"), "not fainter than faint_mag, at a phase other than faint_phase")
	}
	if v := cell("max_smear"); v != "" {
		x, ok := parseFinite(v)
		if !ok || x <= 0 || x >= 0.5 {
			bad("max_smear", v, fmt.Sprintf("the most phase one exposure may span, 0 < s < 0.5 (empty: %g)", DefaultMaxSmear))
		}
		smear = x
	}
	return snr, smear
}

// ParsePhaseList parses goal centres separated by ';' ("0.25;0.75"), each
// 0 ≤ φ < 1, at least one, no repeats. reason is "" on success, else what is
// accepted.
func ParsePhaseList(s string) (centres []float64, reason string) {
	const accepted = "phases separated by ';' (e.g. 0.25;0.75), each 0 ≤ phase < 1, no repeats"
	if strings.TrimSpace(s) == "" {
		return nil, "at least one phase is required: " + accepted
	}
	seen := map[float64]bool{}
	for _, part := range strings.Split(s, ";") {
		c, ok := parseFinite(strings.TrimSpace(part))
		if !ok || c < 0 || c >= 1 || seen[c] {
			return nil, accepted
		}
		seen[c] = true
		centres = append(centres, c)
	}
	return centres, ""
}

// parseFinite parses a decimal number, rejecting NaN, infinities and
// hexadecimal forms.
func parseFinite(s string) (float64, bool) {
	if s == "" || strings.ContainsAny(s, "xXpP_") {
		return 0, false
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// inputReason returns what an *ephem.InputError says is accepted, or the
// error's text.
func inputReason(err error) string {
	var ie *ephem.InputError
	if errors.As(err, &ie) {
		return "accepted: " + ie.Accepted
	}
	return err.Error()
}

// openTable starts reading a CSV table of the planner's files: comment lines
// ('#') skipped, rows of any length, leading spaces trimmed; it reads the
// header and returns it with its line. An empty file is a *TableError whose
// reason is empty (what the header should be).
func openTable(r io.Reader, empty string) (*csv.Reader, []string, int, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, nil, 0, &TableError{Cells: []CellError{{Line: 1, Reason: empty}}}
	}
	if err != nil {
		return nil, nil, 0, csvReadError(err)
	}
	headerLine, _ := cr.FieldPos(0) // the header was just read: its position is known
	return cr, header, headerLine, nil
}

package planner

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"phasecast/ephem"
)

// TimingCSVColumns are the columns of a timings file, in their documented
// order (store/FORMAT.md, "Timings CSV"). time and std are required, and
// exactly one of err_s and err_days; the others are optional.
var TimingCSVColumns = []string{"time", "std", "err_s", "err_days", "form", "event", "observer", "note"}

// MaxTimingRows is the most timings a timings file may hold.
const MaxTimingRows = 100000

// TimingRow is one row of a timings file as written: the measured time
// (Text, in Form on the Std scale, read to JD), its 1σ in days, the event
// timed ("" for the reference event of the target's T0), the observer and a
// note. Line is the row's line in the file.
type TimingRow struct {
	Line     int
	Text     string
	Std      ephem.TimeStandard
	Form     ephem.EpochForm
	JD       ephem.JD2
	ErrDays  float64
	Event    string
	Observer string
	Note     string
}

// ParseTimingsCSV reads a timings file: a header naming columns of
// TimingCSVColumns (any order, each at most once, time, std and exactly one
// of err_s, err_days required), then one timing per line; blank lines and
// lines starting with '#' are skipped.
//
//   - time: a decimal Julian date in the row's form, every digit kept
//     (ephem.ParseEpoch, two-part);
//   - std: its time standard, required on every row: BJD_TDB, BJD_UTC,
//     HJD_TT, HJD_UTC or JD_UTC (never guessed);
//   - err_s or err_days: the 1σ uncertainty, seconds or days, > 0;
//   - form: JD (default), MJD (JD − 2400000.5) or RJD (JD − 2400000);
//   - event: empty (the reference event of the target's T0) or an event
//     name (EventNames);
//   - observer, note: free text, as written (a reader that wrote them
//     through export.SafeCSVCell undoes it with export.UnquoteCSVCell).
//
// Conversion to BJD_TDB needs the target's position and is the store's
// (store.ImportTimingsCSV). On any bad cell the error is a *TableError
// listing EVERY bad cell by line and column, with the value and what is
// accepted, and no row is returned.
func ParseTimingsCSV(r io.Reader) ([]TimingRow, error) {
	cr, header, headerLine, err := openTable(r, "the file is empty; expected a header such as time,std,err_s")
	if err != nil {
		return nil, err
	}
	te := &TableError{}
	col := timingColumns(header, headerLine, te)
	if len(te.Cells) > 0 {
		return nil, te
	}
	var out []TimingRow
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				te.add(pe.Line, pe.Column, "", "", "malformed CSV: "+pe.Err.Error())
				continue
			}
			return nil, fmt.Errorf("read timings CSV: %w", err)
		}
		line, _ := cr.FieldPos(0)
		if len(out) == MaxTimingRows {
			te.add(line, 0, "", "", fmt.Sprintf("the file holds more than %d timings; accepted: at most %d rows after the header", MaxTimingRows, MaxTimingRows))
			break
		}
		if len(rec) != len(header) {
			te.add(line, 0, "", "", fmt.Sprintf("has %d fields; the header has %d", len(rec), len(header)))
			continue
		}
		if row, ok := parseTimingRow(rec, col, line, te); ok {
			out = append(out, row)
		}
	}
	if len(te.Cells) > 0 {
		return nil, te
	}
	if len(out) == 0 {
		return nil, &TableError{Cells: []CellError{{Line: headerLine + 1, Reason: "the file has a header but no timings"}}}
	}
	return out, nil
}

// timingColumns maps the header's columns, recording unknown, repeated and
// missing ones.
func timingColumns(header []string, line int, te *TableError) map[string]int {
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		switch {
		case !slices.Contains(TimingCSVColumns, h):
			te.add(line, i+1, h, h, "unknown column; accepted: "+strings.Join(TimingCSVColumns, ","))
		case hasKey(col, h):
			te.add(line, i+1, h, h, fmt.Sprintf("column repeated (first at column %d)", col[h]+1))
		default:
			col[h] = i
		}
	}
	for _, n := range []string{"time", "std"} {
		if !hasKey(col, n) {
			te.add(line, 0, n, "", "missing column "+n+" (required: time, std, and err_s or err_days)")
		}
	}
	switch keyCount(col, "err_s") + keyCount(col, "err_days") {
	case 0:
		te.add(line, 0, "err_s", "", "missing column err_s or err_days (exactly one of them)")
	case 2:
		te.add(line, col["err_days"]+1, "err_days", "err_days", "give err_s (seconds) or err_days (days), not both")
	}
	return col
}

// parseTimingRow reads one row; every bad cell is added to te.
func parseTimingRow(rec []string, col map[string]int, line int, te *TableError) (TimingRow, bool) {
	n0 := len(te.Cells)
	get := func(name string) string {
		if i, ok := col[name]; ok {
			return strings.TrimSpace(rec[i])
		}
		return ""
	}
	bad := func(name, value, reason string) { te.add(line, col[name]+1, name, value, reason) }
	row := TimingRow{Line: line, Text: get("time"), Std: ephem.TimeStandard(strings.ToUpper(get("std"))), Form: ephem.FormJD,
		Event: get("event"), Observer: get("observer"), Note: get("note")}
	const stds = "BJD_TDB, BJD_UTC, HJD_TT, HJD_UTC or JD_UTC (every timing carries its time standard; none is guessed)"
	stdOK := row.Std != "" && row.Std.Validate() == nil
	if !stdOK {
		bad("std", get("std"), "accepted: "+stds)
	}
	if v := get("form"); v != "" {
		row.Form = ephem.EpochForm(strings.ToUpper(v))
		if row.Form.Validate() != nil {
			bad("form", v, "accepted: JD, MJD (JD − 2400000.5) or RJD (JD − 2400000); empty = JD")
		}
	}
	if stdOK && row.Form.Validate() == nil {
		jd, err := ephem.ParseEpoch(row.Text, row.Std, row.Form)
		if err != nil {
			bad("time", row.Text, inputReason(err))
		}
		row.JD = jd
	}
	name, scale := "err_s", 1/86400.0
	if hasKey(col, "err_days") {
		name, scale = "err_days", 1
	}
	if e, ok := parseFinite(get(name)); !ok || e <= 0 || e*scale > 1 {
		bad(name, get(name), fmt.Sprintf("accepted: the 1σ uncertainty, > 0 and at most one day (%s)", map[string]string{"err_s": "seconds", "err_days": "days"}[name]))
	} else {
		row.ErrDays = e * scale
	}
	if row.Event != "" && !slices.Contains(EventNames(), row.Event) {
		bad("event", row.Event, "accepted: empty (the reference event of T0) or one of "+strings.Join(EventNames(), ", "))
	}
	return row, len(te.Cells) == n0
}

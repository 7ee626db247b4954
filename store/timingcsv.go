package store

import (
	"context"
	"errors"
	"io"
	"regexp"
	"strconv"

	"phasecast/planner"
	"phasecast/planner/export"
)

// ImportTimingsCSV reads a timings file (planner.ParseTimingsCSV; the
// format is in FORMAT.md, "Timings CSV") and adds every row to the target
// as one transaction, all or nothing (editors and owners). With dryRun
// nothing is written: the timings are validated and converted to BJD_TDB
// exactly as they would be, and returned for a preview (their IDs are 0).
// A bad file is a *planner.TableError naming every bad cell by line and
// column; a row the store refuses (a time outside the accepted range, a
// note too long) comes back the same way, on its line.
func (s *Store) ImportTimingsCSV(ctx context.Context, a Actor, targetID int64, r io.Reader, dryRun bool) ([]Timing, error) {
	const op = "store.ImportTimingsCSV"
	rows, err := planner.ParseTimingsCSV(r)
	if err != nil {
		var te *planner.TableError
		if errors.As(err, &te) {
			err = tableErr(te)
		}
		return nil, wrap(op, err)
	}
	in := make([]TimingInput, len(rows))
	for i, row := range rows {
		in[i] = TimingInput{Event: row.Event, T: Epoch{Text: row.Text, Form: row.Form, Standard: row.Std, JD: row.JD},
			ErrDays: row.ErrDays, Observer: export.UnquoteCSVCell(row.Observer), Note: export.UnquoteCSVCell(row.Note)}
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	out, err := addTimings(t, targetID, in)
	if err != nil {
		return nil, wrap(op, timingLines(err, rows))
	}
	if dryRun {
		for i := range out {
			out[i].ID, out[i].Version = 0, 0
		}
		return out, nil // rolled back
	}
	return out, commit(t, op)
}

var timingIndex = regexp.MustCompile(`^timings\[(\d+)\]\.(.+)$`)

// timingColumn names the file's column of a TimingInput field.
var timingColumn = map[string]string{"event": "event", "err_days": "err_s or err_days", "observer": "observer", "note": "note",
	"time": "time", "time_standard": "std", "time_form": "form"}

// timingLines turns the store's refusal of rows ("timings[i].field") into
// the file's lines and columns; other errors pass unchanged.
func timingLines(err error, rows []planner.TimingRow) error {
	var ve *ValidationError
	if !errors.As(err, &ve) {
		return err
	}
	te := &planner.TableError{}
	for _, f := range ve.Fields {
		m := timingIndex.FindStringSubmatch(f.Field)
		if m == nil {
			te.Cells = append(te.Cells, planner.CellError{Line: 0, Column: f.Field, Value: f.Value, Reason: "accepted: " + f.Accepted})
			continue
		}
		i, _ := strconv.Atoi(m[1]) // dropped: the pattern matched digits only
		line := 0
		if i < len(rows) {
			line = rows[i].Line
		}
		col, ok := timingColumn[m[2]]
		if !ok {
			col = m[2]
		}
		te.Cells = append(te.Cells, planner.CellError{Line: line, Column: col, Value: f.Value, Reason: "accepted: " + f.Accepted})
	}
	return tableErr(te)
}

package store

import (
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"

	"phasecast/planner"
)

// DuplicateRadiusArcsec is how close two targets of one list may be before
// an import calls them duplicates: 5 arcseconds, wider than catalogue
// position errors and proper motion over decades for these faint binaries,
// narrower than the separation of distinct objects in one field of view
// that a team would list apart (common practice).
const DuplicateRadiusArcsec = 5.0

// ImportAction says what an import does with one row.
type ImportAction string

// Import actions.
const (
	ImportAdd       ImportAction = "add"       // a new target
	ImportUpdate    ImportAction = "update"    // a target of the same name changes
	ImportUnchanged ImportAction = "unchanged" // a target of the same name is already so
)

// ImportRow is the fate of one row of an imported file.
type ImportRow struct {
	Line     int
	Name     string
	Action   ImportAction
	TargetID int64    // 0 for an add in a preview
	Changed  []string // for updates: the fields that change ("ephemeris", "goals", …)
}

// ImportResult is what an import did, or (PreviewImport) would do.
type ImportResult struct {
	Format FileFormat
	// Assumptions the file format forced (e.g. the plan CSV's implied
	// convention), to show to the user.
	Assumptions               []string
	Rows                      []ImportRow
	Added, Updated, Unchanged int
	ListID                    int64
}

// fileCheck is what checkFile found in a parsed file on its own: each row
// validated, and every problem so far by line and column.
type fileCheck struct {
	pf        parsedFile
	inputs    []TargetInput
	te        *planner.TableError
	seen      map[cellKey]bool
	badCoords map[int]bool // lines whose position could not be read or is out of range
}

type cellKey struct {
	line   int
	column string
}

// add records a problem with a row's field, once per line and column.
func (c *fileCheck) add(line int, field, value, reason string) {
	col, n := c.pf.column(field)
	if n == 0 && c.pf.Format == FormatCSV && slices.Contains(csvColumns, col) {
		value, reason = missingColumn(field, col, reason)
	}
	if c.seen[cellKey{line, col}] { // already reported while reading
		return
	}
	c.seen[cellKey{line, col}] = true
	if col == "ra" || col == "dec" {
		c.badCoords[line] = true
	}
	c.te.Cells = append(c.te.Cells, planner.CellError{Line: line, Col: n, Column: col, Value: planner.ClipValue(value), Reason: reason})
}

// checkFile validates every row of a parsed file and finds names given
// twice, touching no database, so that an import does this work before it
// opens a transaction. A file of more than MaxTargets rows is refused at
// once, naming the first line past the limit, before any row is checked.
func checkFile(pf parsedFile) (*fileCheck, error) {
	if len(pf.Rows) > MaxTargets {
		return nil, tableErr(&planner.TableError{Cells: []planner.CellError{{Line: pf.Rows[MaxTargets].Line,
			Reason: fmt.Sprintf("the file holds more than %d targets; accepted: at most %d", MaxTargets, MaxTargets)}}})
	}
	c := &fileCheck{pf: pf, te: &planner.TableError{Cells: append([]planner.CellError(nil), pf.Cells...)},
		seen: map[cellKey]bool{}, badCoords: map[int]bool{}}
	for _, cell := range pf.Cells {
		c.seen[cellKey{cell.Line, cell.Column}] = true
		if cell.Column == "ra" || cell.Column == "dec" {
			c.badCoords[cell.Line] = true
		}
	}
	c.inputs = make([]TargetInput, len(pf.Rows))
	firstLine := map[string]int{}
	for i, row := range pf.Rows {
		in, v := validateTargetInput(row.Input)
		for _, f := range v.Fields {
			c.add(row.Line, f.Field, f.Value, f.Accepted)
		}
		c.inputs[i] = in
		name := in.Target.Name
		if l, dup := firstLine[name]; dup && name != "" {
			c.add(row.Line, "name", name, fmt.Sprintf("duplicate: the same name is on line %d", l))
		} else if !dup {
			firstLine[name] = row.Line
		}
	}
	return c, nil
}

// importPlan checks a file, already checked on its own (checkFile),
// against the list and decides each row. Any problem is an EINVALID
// carrying a *planner.TableError with every bad row by line and column;
// nothing is decided then.
func importPlan(t *txn, listID int64, c *fileCheck) (ImportResult, []TargetInput, []StoredTarget, error) {
	pf, inputs, te, add := c.pf, c.inputs, c.te, c.add
	res := ImportResult{Format: pf.Format, Assumptions: pf.Assumptions, ListID: listID}
	existing, err := listTargets(t, listID)
	if err != nil {
		return res, nil, nil, err
	}
	byName := map[string]StoredTarget{}
	for _, st := range existing {
		byName[st.Target.Name] = st
	}
	if len(existing)+len(pf.Rows) > MaxTargets {
		te.Cells = append(te.Cells, planner.CellError{Line: pf.Rows[len(pf.Rows)-1].Line,
			Reason: fmt.Sprintf("the list would hold more than %d targets", MaxTargets)})
	}
	for _, d := range nearPairs(pf, inputs, existing, c.badCoords) {
		add(d.line, "ra", "", d.reason)
	}
	if len(te.Cells) > 0 {
		sort.SliceStable(te.Cells, func(i, j int) bool {
			a, b := te.Cells[i], te.Cells[j]
			if a.Line != b.Line {
				return a.Line < b.Line
			}
			return a.Col < b.Col
		})
		return res, nil, nil, tableErr(te)
	}
	befores := make([]StoredTarget, len(inputs))
	for i, in := range inputs {
		row := ImportRow{Line: pf.Rows[i].Line, Name: in.Target.Name, Action: ImportAdd}
		if st, ok := byName[in.Target.Name]; ok {
			befores[i] = st
			row.TargetID = st.ID
			row.Changed = changedFields(st, in)
			row.Action = ImportUpdate
			if len(row.Changed) == 0 {
				row.Action = ImportUnchanged
			}
		}
		switch row.Action {
		case ImportAdd:
			res.Added++
		case ImportUpdate:
			res.Updated++
		default:
			res.Unchanged++
		}
		res.Rows = append(res.Rows, row)
	}
	return res, inputs, befores, nil
}

// changedFields lists what an input changes on a stored target.
func changedFields(st StoredTarget, in TargetInput) []string {
	a, b := st.Target, in.Target
	var out []string
	if a.RADeg != b.RADeg || a.DecDeg != b.DecDeg {
		out = append(out, "position")
	}
	if a.PMRAmasyr != b.PMRAmasyr || a.PMDecmasyr != b.PMDecmasyr {
		out = append(out, "proper_motion")
	}
	if a.Mag != b.Mag {
		out = append(out, "mag")
	}
	if a.Band != b.Band || a.FaintMag != b.FaintMag || a.FaintPhase != b.FaintPhase || a.BrightMag != b.BrightMag ||
		a.BrightPhase != b.BrightPhase {
		out = append(out, "brightness")
	}
	if !sameEphemeris(st.Ephemeris, b.Ephem, in.T0) {
		out = append(out, "ephemeris")
	}
	if !sameGoals(a.Goals, b.Goals) {
		out = append(out, "goals")
	}
	if a.Priority != b.Priority {
		out = append(out, "priority")
	}
	if a.AcquireS != b.AcquireS {
		out = append(out, "acquire_s")
	}
	if !sameStrings(a.Tags, b.Tags) {
		out = append(out, "tags")
	}
	if a.Notes != b.Notes {
		out = append(out, "notes")
	}
	if (a.RV == nil) != (b.RV == nil) || (a.RV != nil && *a.RV != *b.RV) {
		out = append(out, "rv_goal")
	}
	return out
}

func sameGoals(a, b []planner.Goal) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func sameStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

type nearPair struct {
	line   int
	reason string
}

// sepArcsec returns the angular separation of two ICRS positions, arcsec
// (haversine form, accurate at small separations).
func sepArcsec(ra1, dec1, ra2, dec2 float64) float64 {
	const r = math.Pi / 180
	d1, d2 := dec1*r, dec2*r
	sdd := math.Sin((d2 - d1) / 2)
	sda := math.Sin((ra2 - ra1) * r / 2)
	h := sdd*sdd + math.Cos(d1)*math.Cos(d2)*sda*sda
	return 2 * math.Asin(math.Min(1, math.Sqrt(h))) / r * 3600
}

// nearPairs finds the rows within DuplicateRadiusArcsec of an earlier row
// of the file, or of a target already on the list under another name: at
// most one finding per row, naming the earliest such neighbour (a target
// of the list before any row). The search is a k-d tree over unit vectors
// (nearIndex), so time and memory stay close to proportional to the file
// even when every row is at one position; an all-pairs comparison made
// n(n−1)/2 findings there.
func nearPairs(pf parsedFile, inputs []TargetInput, existing []StoredTarget, skip map[int]bool) []nearPair {
	renamedAway := map[string]bool{} // existing names the file itself lists
	for _, in := range inputs {
		renamedAway[in.Target.Name] = true
	}
	var pts []nearPoint
	for _, st := range existing {
		if !renamedAway[st.Target.Name] {
			pts = append(pts, newNearPoint(st.Target.RADeg, st.Target.DecDeg, 0, st.Target.Name))
		}
	}
	for i, in := range inputs {
		if !skip[pf.Rows[i].Line] {
			pts = append(pts, newNearPoint(in.Target.RADeg, in.Target.DecDeg, pf.Rows[i].Line, in.Target.Name))
		}
	}
	queries := append([]nearPoint(nil), pts...)
	idx := newNearIndex(pts)
	var out []nearPair
	for _, p := range queries {
		if p.line == 0 {
			continue // targets already on the list are not checked against each other
		}
		q, ok := idx.earliestWithin(p)
		if !ok {
			continue
		}
		where := fmt.Sprintf("%q on line %d", q.name, q.line)
		if q.line == 0 {
			where = fmt.Sprintf("%q already on the list", q.name)
		}
		out = append(out, nearPair{line: p.line, reason: fmt.Sprintf(
			"probable duplicate: %.1f″ from %s (targets closer than %g″ are taken for the same object)",
			sepArcsec(p.ra, p.dec, q.ra, q.dec), where, DuplicateRadiusArcsec)})
	}
	return out
}

// PreviewImport reads a target file and reports what ImportTargets would do
// with it, writing nothing: each row's line, name and action (add, update
// with the fields that change, unchanged), or an EINVALID error carrying a
// *planner.TableError with every bad row by line and column.
func (s *Store) PreviewImport(ctx context.Context, a Actor, listID int64, r io.Reader, f FileFormat) (ImportResult, error) {
	const op = "store.PreviewImport"
	b, err := readAllLimited(r)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	pf, err := parseFile(b, f)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	checked, err := checkFile(pf)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := authorizedList(t, ActCreate, EntTarget, listID); err != nil {
		return ImportResult{}, wrap(op, err)
	}
	res, _, _, err := importPlan(t, listID, checked)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	return res, commit(t, op)
}

// ImportTargets reads a target file (team CSV, plan CSV or JSON; FormatAuto
// detects) into a list, all or nothing, in one transaction (editors and
// owners). The file is read and every row validated before that
// transaction begins; a file of more than MaxTargets rows is refused at
// once. Rows whose name is on the list update that target (a changed
// ephemeris is added to its history, source "import"); other rows add
// targets. A file with any bad row, a name twice, or two positions within
// DuplicateRadiusArcsec (in the file, or against a target of the list under
// another name) is rejected whole: EINVALID carrying a *planner.TableError
// listing every problem by line and column.
func (s *Store) ImportTargets(ctx context.Context, a Actor, listID int64, r io.Reader, f FileFormat) (ImportResult, error) {
	const op = "store.ImportTargets"
	b, err := readAllLimited(r)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	pf, err := parseFile(b, f)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	// Every row is read and validated before the write transaction begins,
	// so that a big or bad file does not hold the write lock meanwhile.
	checked, err := checkFile(pf)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	l, err := authorizedList(t, ActCreate, EntTarget, listID)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	if len(pf.Rows) > 0 {
		if _, err := t.authorize(ActUpdate, EntTarget, scopeRef{TeamID: l.TeamID, ListID: listID}, "list", listID); err != nil {
			return ImportResult{}, wrap(op, err)
		}
	}
	res, inputs, befores, err := importPlan(t, listID, checked)
	if err != nil {
		return ImportResult{}, wrap(op, err)
	}
	for i, row := range res.Rows {
		switch row.Action {
		case ImportAdd:
			id, err := insertTarget(t, listID, inputs[i], SourceImport)
			if err != nil {
				return ImportResult{}, wrap(op, fmt.Errorf("import line %d: %w", row.Line, err))
			}
			st, err := getTarget(t, id)
			if err != nil {
				return ImportResult{}, wrap(op, err)
			}
			if err := t.audit(l.TeamID, EntTarget, id, ActCreate, nil, st); err != nil {
				return ImportResult{}, wrap(op, err)
			}
			res.Rows[i].TargetID = id
		case ImportUpdate:
			if _, err := applyTargetUpdate(t, befores[i], inputs[i], SourceImport); err != nil {
				return ImportResult{}, wrap(op, fmt.Errorf("import line %d: %w", row.Line, err))
			}
		}
	}
	return res, commit(t, op)
}

// ExportTargets writes a list's targets in a file format (FormatCSV or
// FormatJSON) that ImportTargets reads back to the same targets. Epochs
// are written as they were given (text, form and standard).
func (s *Store) ExportTargets(ctx context.Context, a Actor, listID int64, w io.Writer, f FileFormat) error {
	const op = "store.ExportTargets"
	if f != FormatCSV && f != FormatJSON {
		return &Error{Code: EINVALID, Op: op, Message: fmt.Sprintf("format: %q is not accepted; accepted: csv, json", f)}
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	l, err := authorizedList(t, ActRead, EntTarget, listID)
	if err != nil {
		return wrap(op, err)
	}
	targets, err := listTargets(t, listID)
	if err != nil {
		return wrap(op, err)
	}
	if err := commit(t, op); err != nil {
		return err
	}
	if f == FormatCSV {
		err = writeTeamCSV(w, targets)
	} else {
		err = writeJSONFile(w, l.Name, targets)
	}
	if err != nil {
		return wrap(op, fmt.Errorf("write %s: %w", f, err))
	}
	return nil
}

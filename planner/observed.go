package planner

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"phasecast/ephem"
)

// Exposure is one exposure actually taken (or, in coverage, planned).
type Exposure struct {
	Target    string
	Mid       time.Time // the exposure's mid-time, UTC
	ExposureS float64   // its length, s
	// Failed marks an exposure that was taken but is unusable (clouds,
	// guiding lost): it is kept in the record and not counted in coverage.
	Failed bool
	// Line is the line of the log the exposure came from (0 when it did not
	// come from a log, e.g. a marked block).
	Line int
}

// ObservedCSVColumns are the columns of an observed-exposure log, in the
// documented order; see ParseObservedCSV.
var ObservedCSVColumns = []string{"target", "start_utc", "mid_utc", "exposure_s", "n_exposures", "overhead_s", "status", "note"}

// MaxObservedRows bounds the lines of an observed log, and
// MaxObservedExposures the exposures they hold together.
const (
	MaxObservedRows      = 200000
	MaxObservedExposures = 200000
)

// ParseObservedCSV reads a log of exposures actually taken. The first line
// is a header naming the columns (any order, each at most once, no others);
// blank lines and lines starting with '#' are skipped. One row is one
// exposure or a run of back-to-back exposures:
//
//   - target (required): the target's name as in the run's target list.
//   - start_utc or mid_utc (exactly one of the two columns): the start of
//     the first exposure, or the mid-time of the exposure, as RFC 3339
//     ("2026-03-14T02:31:00Z"; UTC unless an offset is written).
//   - exposure_s (required): one exposure, 0 < t ≤ MaxExposureS seconds.
//   - n_exposures (optional, default 1): exposures in the row, 1..10000,
//     laid back to back from start_utc, each exposure_s then overhead_s
//     (mid_utc takes one exposure per row).
//   - overhead_s (optional, default 0): readout after each exposure,
//     0 ≤ t ≤ MaxExposureS seconds.
//   - status (optional): "ok" (or empty) for a usable exposure, "failed" for
//     one taken but unusable (recorded, not counted in coverage).
//   - note (optional): free text, ignored.
//
// On any bad cell the error is a *TableError listing every bad cell by line
// and column, and no exposure is returned. Whether each target exists and
// each time falls in a past night of the run is checked by PlanRun.
func ParseObservedCSV(r io.Reader) ([]Exposure, error) {
	cr, header, headerLine, err := openTable(r, "the file is empty; expected a header such as target,start_utc,exposure_s,n_exposures,overhead_s")
	if err != nil {
		return nil, err
	}
	te := &TableError{}
	col := observedColumns(header, headerLine, te)
	if len(te.Cells) > 0 {
		return nil, te
	}
	var out []Exposure
	rows := 0
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
			return nil, fmt.Errorf("read observed log: %w", err)
		}
		line, _ := cr.FieldPos(0)
		if rows++; rows > MaxObservedRows {
			te.add(line, 0, "", "", fmt.Sprintf("too many rows: at most %d", MaxObservedRows))
			break
		}
		if len(rec) != len(header) {
			te.add(line, 0, "", "", fmt.Sprintf("has %d fields; the header has %d", len(rec), len(header)))
			continue
		}
		out = append(out, parseObservedRow(rec, col, line, te)...)
		if len(out) > MaxObservedExposures {
			te.add(line, 0, "", "", fmt.Sprintf("too many exposures: the log may hold at most %d", MaxObservedExposures))
			break
		}
	}
	if len(te.Cells) > 0 {
		return nil, te
	}
	return out, nil
}

// observedColumns maps the header's columns, recording unknown, repeated
// and missing ones.
func observedColumns(header []string, line int, te *TableError) map[string]int {
	col := ColumnIndex(header, ObservedCSVColumns, []string{"target", "exposure_s"}, line, te, "accepted: "+strings.Join(ObservedCSVColumns, ","),
		func(n string) string {
			return "missing column " + n + " (required: target, exposure_s, and start_utc or mid_utc)"
		})
	switch keyCount(col, "start_utc") + keyCount(col, "mid_utc") {
	case 0:
		te.add(line, 0, "start_utc", "", "missing column start_utc or mid_utc (exactly one of them)")
	case 2:
		te.add(line, col["mid_utc"]+1, "mid_utc", "mid_utc", "give start_utc or mid_utc, not both")
	}
	return col
}

func keyCount(m map[string]int, k string) int {
	if hasKey(m, k) {
		return 1
	}
	return 0
}

// parseObservedRow converts one row into its exposures; every bad cell is
// added to te (and nothing returned for the row).
func parseObservedRow(rec []string, col map[string]int, line int, te *TableError) []Exposure {
	n0 := len(te.Cells)
	get := func(name string) (string, bool) {
		i, ok := col[name]
		if !ok {
			return "", false
		}
		return strings.TrimSpace(rec[i]), true
	}
	bad := func(name, value, reason string) { te.add(line, col[name]+1, name, value, reason) }
	num := func(name string, def, lo, hi float64, loOpen bool, accepted string) float64 {
		s, ok := get(name)
		if !ok || s == "" {
			if def < 0 {
				bad(name, s, "a value is required: "+accepted)
			}
			return def
		}
		x, ok := parseFinite(s)
		if !ok || x < lo || x > hi || (loOpen && x == lo) {
			bad(name, s, accepted)
		}
		return x
	}
	target, _ := get("target")
	if target == "" {
		bad("target", target, "a target name is required")
	}
	E := num("exposure_s", -1, 0, MaxExposureS, true, fmt.Sprintf("seconds, 0 < t ≤ %g", MaxExposureS))
	O := num("overhead_s", 0, 0, MaxExposureS, false, fmt.Sprintf("seconds, 0 ≤ t ≤ %g", MaxExposureS))
	n := 1
	if s, ok := get("n_exposures"); ok && s != "" {
		v, err := strconv.Atoi(s)
		if err != nil || v < 1 || v > 10000 {
			bad("n_exposures", s, "a whole number 1..10000")
		}
		n = v
	}
	failed := false
	if s, ok := get("status"); ok {
		switch strings.ToLower(s) {
		case "", "ok":
		case "failed":
			failed = true
		default:
			bad("status", s, "ok (or empty) or failed")
		}
	}
	name, isMid := "start_utc", false
	if _, ok := col["mid_utc"]; ok {
		name, isMid = "mid_utc", true
	}
	ts, _ := get(name)
	var t0 time.Time
	if ts == "" {
		bad(name, ts, "a time is required (RFC 3339, e.g. 2026-03-14T02:31:00Z)")
	} else if t, err := ephem.ParseTime(ts); err != nil {
		bad(name, ts, "a time in RFC 3339, e.g. 2026-03-14T02:31:00Z (UTC unless an offset is given): "+inputReason(err))
	} else {
		t0 = t
	}
	if isMid && n != 1 && len(te.Cells) == n0 {
		bad("n_exposures", strconv.Itoa(n), "1 with mid_utc (one exposure per row); give start_utc for a run of exposures")
	}
	if len(te.Cells) > n0 {
		return nil
	}
	out := make([]Exposure, n)
	for j := range out {
		mid := t0
		if !isMid {
			mid = t0.Add(durationOf(float64(j)*(E+O) + E/2))
		}
		out[j] = Exposure{Target: target, Mid: mid.UTC(), ExposureS: E, Failed: failed, Line: line}
	}
	return out
}

// durationOf converts seconds to a Duration rounded to the microsecond.
func durationOf(s float64) time.Duration {
	return time.Duration(s*1e6+0.5) * time.Microsecond
}

// checkObserved checks the observed exposures against a run: each names
// one of the run's targets, its length is positive and finite, and its
// mid-time falls inside one of the first past nights' planning windows
// (bounds[k] = [from, to) of night k, Unix seconds). It returns, for each
// exposure, the index of its night. Exposures read from a log are reported
// all together by line (*TableError); one that did not come from a log
// (Line 0) is reported alone by its position (*ephem.InputError).
func checkObserved(obs []Exposure, names map[string]int, bounds [][2]float64, past int, nights []RunNight) ([]int, error) {
	te := &TableError{}
	night := make([]int, len(obs))
	for i, e := range obs {
		column, value, reason := "", "", ""
		u := unixSec(e.Mid)
		k := -1
		for j, b := range bounds {
			if u >= b[0] && u < b[1] {
				k = j
				break
			}
		}
		mid := e.Mid.UTC().Format(time.RFC3339)
		switch _, known := names[e.Target]; {
		case !known:
			column, value, reason = "target", e.Target, "matches no target of the run"
		case !finite(e.ExposureS) || e.ExposureS <= 0 || e.ExposureS > MaxExposureS:
			column, value, reason = "exposure_s", fmtNum(e.ExposureS), fmt.Sprintf("seconds, 0 < t ≤ %g", MaxExposureS)
		case k < 0:
			value, reason = mid, "the exposure's mid-time falls outside every night of the run"
		case k >= past:
			value, reason = mid, fmt.Sprintf("the exposure's mid-time falls in night %d (%s), which is still to be planned: only the first %d night(s) are past; raise the number of past nights", k+1, nights[k], past)
		default:
			night[i] = k
			continue
		}
		if e.Line == 0 {
			field := fmt.Sprintf("observed[%d]", i)
			if column != "" {
				field += "." + column
			}
			return nil, &ephem.InputError{Field: field, Value: value, Accepted: reason}
		}
		te.add(e.Line, 0, column, value, reason)
	}
	if len(te.Cells) > 0 {
		return nil, te
	}
	return night, nil
}

// BlockStatus is what became of a planned block.
type BlockStatus string

// Block outcomes.
const (
	BlockDone BlockStatus = "done" // observed (all its exposures, or the first Taken)
	BlockLost BlockStatus = "lost" // not observed (clouds, technical trouble)
)

// BlockMark records the outcome of one planned block of a run.
type BlockMark struct {
	Night  int // index in the run's nights
	Block  int // index in that night's Plan.Blocks
	Status BlockStatus
	// Taken is, for a done block, the number of its exposures taken from
	// its start (0 = all of them).
	Taken int
}

// MarkNight returns a mark with status st for every block of night k
// (none for a past night).
func (rp *RunPlan) MarkNight(k int, st BlockStatus) []BlockMark {
	if k < 0 || k >= len(rp.Nights) || rp.Nights[k].Plan == nil {
		return nil
	}
	out := make([]BlockMark, len(rp.Nights[k].Plan.Blocks))
	for i := range out {
		out[i] = BlockMark{Night: k, Block: i, Status: st}
	}
	return out
}

// MarkedExposures turns the marks into observed exposures: every exposure
// of a done block (or its first Taken), laid back to back from the block's
// start as planned; nothing for a lost block. Each mark must name a
// planned block once; the error names the mark and what is accepted.
func (rp *RunPlan) MarkedExposures(marks []BlockMark) ([]Exposure, error) {
	seen := map[[2]int]int{}
	var out []Exposure
	for i, mk := range marks {
		field := fmt.Sprintf("marks[%d]", i)
		if mk.Night < 0 || mk.Night >= len(rp.Nights) || rp.Nights[mk.Night].Plan == nil {
			return nil, &ephem.InputError{Field: field + ".night", Value: fmt.Sprint(mk.Night), Accepted: "the index of a planned (not past) night of the run"}
		}
		blocks := rp.Nights[mk.Night].Plan.Blocks
		if mk.Block < 0 || mk.Block >= len(blocks) {
			return nil, &ephem.InputError{Field: field + ".block", Value: fmt.Sprint(mk.Block), Accepted: fmt.Sprintf("0..%d (the night's blocks)", len(blocks)-1)}
		}
		if j, dup := seen[[2]int{mk.Night, mk.Block}]; dup {
			return nil, &ephem.InputError{Field: field, Value: fmt.Sprintf("night %d block %d", mk.Night, mk.Block), Accepted: fmt.Sprintf("one mark per block (marks[%d] has it)", j)}
		}
		seen[[2]int{mk.Night, mk.Block}] = i
		b := blocks[mk.Block]
		switch mk.Status {
		case BlockLost:
			continue
		case BlockDone:
		default:
			return nil, &ephem.InputError{Field: field + ".status", Value: fmt.Sprintf("%q", string(mk.Status)), Accepted: "done or lost"}
		}
		n := b.N
		if mk.Taken != 0 {
			if mk.Taken < 0 || mk.Taken > b.N {
				return nil, &ephem.InputError{Field: field + ".taken", Value: fmt.Sprint(mk.Taken), Accepted: fmt.Sprintf("0 (all) to %d (the block's exposures)", b.N)}
			}
			n = mk.Taken
		}
		L := b.ExposureS + b.OverheadS
		for j := range n {
			out = append(out, Exposure{Target: b.Target, Mid: b.Start.Add(durationOf(float64(j)*L + b.ExposureS/2)), ExposureS: b.ExposureS})
		}
	}
	return out, nil
}

// Replan plans the rest of the run after its first past nights are over:
// the marked blocks' exposures (MarkedExposures) join the observed ones,
// nights before past are no longer planned, and the remaining nights are
// planned again for what is still missing. A night that was lost needs no
// mark at all (nothing was observed): rp.Replan(ctx, nil, k+1, nil) replans
// after losing night k. past must be at least the plan's own and at most
// the number of nights, and every mark must be for a night before past.
func (rp *RunPlan) Replan(ctx context.Context, marks []BlockMark, past int, progress func(done, total int)) (*RunPlan, error) {
	req := rp.Request
	if past < req.Past || past > len(req.Nights) {
		return nil, &ephem.InputError{Field: "past", Value: fmt.Sprint(past), Accepted: fmt.Sprintf("%d..%d (at least the nights already past)", req.Past, len(req.Nights))}
	}
	for i, mk := range marks {
		if mk.Night >= past {
			return nil, &ephem.InputError{Field: fmt.Sprintf("marks[%d].night", i), Value: fmt.Sprint(mk.Night), Accepted: fmt.Sprintf("a night before %d (the nights now over)", past)}
		}
	}
	more, err := rp.MarkedExposures(marks)
	if err != nil {
		return nil, err
	}
	req.Observed = append(append([]Exposure(nil), req.Observed...), more...)
	req.Past = past
	return PlanRun(ctx, req, progress)
}

// PastThrough returns the number of nights (windows as RunNightWindows
// gives them) up to and including the last one holding an observed
// exposure's mid-time: the nights a log shows to be over. 0 for no
// exposure in any night.
func PastThrough(windows []Interval, obs []Exposure) int {
	past := 0
	for _, e := range obs {
		for k, w := range windows {
			if !e.Mid.Before(w.Start) && e.Mid.Before(w.End) {
				past = max(past, k+1)
			}
		}
	}
	return past
}

package web

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// residual returns the cycle and O−C, seconds, of a timing against e: the
// measured BJD_TDB minus the computed time of the same event in the nearest
// cycle (planner.TimingResidual). ok is false for an event whose phase the
// ephemeris cannot give (an eclipse contact without a duration).
func residual(e planner.Ephemeris, tm store.Timing) (cycle int64, ocS float64, ok bool) {
	return planner.TimingResidual(e, tm.BJD, planner.Event(tm.Event))
}

// timingRows formats the timings and builds the O−C chart's points.
func timingRows(t store.StoredTarget, timings []store.Timing) ([]page.TimingRow, chart.OC) {
	e := t.Ephemeris.Ephem
	oc := chart.OC{Title: "O−C of " + t.Target.Name}
	var rows []page.TimingRow
	for _, tm := range timings {
		ev := "T0 event"
		if tm.Event != "" {
			ev = tm.Event
		}
		row := page.TimingRow{ID: tm.ID, Version: tm.Version, Event: ev, Time: tm.T.Text + " " + string(tm.T.Standard),
			BJD: planner.FormatEpoch(tm.BJD, planner.FormJD, 6), Err: sigFig(tm.ErrDays*86400, 2),
			Observer: tm.Observer, Note: tm.Note, OC: "—"}
		if c, r, ok := residual(e, tm); ok {
			row.OC = strconv.FormatFloat(r, 'f', 1, 64)
			oc.Points = append(oc.Points, chart.OCPoint{Cycle: float64(c), OCSec: r, ErrSec: tm.ErrDays * 86400,
				Label: fmt.Sprintf("E=%d, %s, %s", c, tm.T.Text, tm.Observer), Excluded: tm.Event != ""})
		}
		rows = append(rows, row)
	}
	return rows, oc
}

// proposeFit refines the ephemeris from the timings of its reference event
// (planner.RefineEphemeris: linear weighted least squares), or says why not.
func proposeFit(t store.StoredTarget, timings []store.Timing) (*planner.FitResult, string) {
	var in []planner.EphemTiming
	for _, tm := range timings {
		if tm.Event == "" {
			in = append(in, planner.EphemTiming{Value: tm.BJD, Std: planner.StdBJDTDB, ErrDays: tm.ErrDays})
		}
	}
	if len(in) < 2 {
		return nil, "A refinement needs at least two timings of the T0 event (the reference event of the ephemeris)."
	}
	res, err := planner.RefineEphemeris(in, t.Ephemeris.Ephem, false)
	if err != nil {
		var ae *planner.AmbiguityError
		if errors.As(err, &ae) {
			return nil, "The timings cannot be refined without guessing cycle numbers: " + ae.Error()
		}
		return nil, "The timings cannot be fitted: " + err.Error()
	}
	return &res, ""
}

// fitLines describes a proposed refinement against the current ephemeris.
func fitLines(t store.StoredTarget, f planner.FitResult) []string {
	cur, e := t.Ephemeris.Ephem, f.Ephem
	return []string{
		fmt.Sprintf("T0 = %s BJD_TDB ± %s", planner.FormatEpoch(e.T0, planner.FormJD, 7), fmtSeconds(e.T0ErrDays*86400)),
		fmt.Sprintf("P = %.10f d ± %s (now %.10f d; change %+.3g s)", e.PeriodDays, fmtSeconds(e.PeriodErr*86400), cur.PeriodDays,
			(e.PeriodDays-cur.PeriodDays)*86400),
		fmt.Sprintf("χ² = %.2f, reduced χ² = %.2f, from %d timings", f.ChiSq, f.RedChiSq, len(f.Residuals)),
		f.Note,
	}
}

// fitLine is the refined ephemeris minus the current one, seconds, over
// the cycles of the points: the line the O−C points should follow.
func fitLine(cur planner.Ephemeris, f planner.FitResult, pts []chart.OCPoint) chart.OCLine {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range pts {
		lo, hi = math.Min(lo, p.Cycle), math.Max(hi, p.Cycle)
	}
	l := chart.OCLine{Label: "refined ephemeris"}
	if math.IsInf(lo, 0) {
		return l
	}
	for i := 0; i <= 20; i++ {
		c := int64(math.Round(lo + (hi-lo)*float64(i)/20))
		d := planner.RefinedMinusCurrentS(f.Ephem, f.CycleShift, cur, c)
		l.Cycles, l.OCSec = append(l.Cycles, float64(c)), append(l.OCSec, d)
	}
	return l
}

package planner

import (
	"slices"
	"time"

	"phasecast/ephem"
)

// TargetPrecision is one target's predicted precision over a run: now (the
// usable exposures of the observing log), after the plan (observed and
// planned), and after each night of the run in turn.
type TargetPrecision struct {
	Target      string
	TargetIndex int
	Priority    int
	RV          *RVForecast     // nil when the target has no RV goal
	Timing      *TimingForecast // nil when the target has no measured timings
	// TimingNote says why a target with measured timings has no timing
	// forecast (the fit cannot number its timings, for one).
	TimingNote string
}

// RVForecast is the predicted precision of a target's RV goal.
type RVForecast struct {
	Goal       RVGoal
	Now, After RVPrecision
	// PerNight[k] is the precision with the exposures of nights 0..k
	// (observed on past nights, planned on the others).
	PerNight []RVPrecision
	// PhaseSigma is the prior σ of the phase zero point used, cycles: the
	// ephemeris' phase uncertainty at the exposures' mean epoch (0: known).
	PhaseSigma float64
	// NeedNow and NeedAfter are the exposures still needed, beyond the log
	// and beyond the plan, to reach Goal.WantRelK at the curve's velocity
	// extremes (RVCurve.ExposuresNeeded, a lower bound); NeedOK is false when
	// no wanted precision is set or MaxExposuresNeeded would not reach it.
	NeedNow, NeedAfter int
	NeedOK             bool
}

// TimingForecast is the predicted precision of a target's ephemeris from
// timings of its reference event.
type TimingForecast struct {
	Now, After TimingPrecision
	PerNight   []TimingPrecision
	// Planned is the number of planned timings: occurrences of the
	// reference event (phase 0, T0 + n·P) inside a planned block of the
	// target, each timed with ErrDays, the median error of the measured
	// timings.
	Planned   int
	ErrDays   float64
	Quadratic bool // the ephemeris has a period change (Ṗ or σṖ > 0)
}

// Precision predicts, for every target of the run with an RV goal or with
// measured timings (timings[name], BJD_TDB), what the observed exposures
// measure now and what the run's plan will measure (notes in precision.go).
// Targets with neither are left out. A target whose timings the fit cannot
// use (PredictTimings' errors: a cycle count it cannot make, a bad timing)
// gets TimingNote instead of a timing forecast; the error returned is an RV
// goal's that does not fit the target's ephemeris.
func (rp *RunPlan) Precision(timings map[string][]ephem.Timing) ([]TargetPrecision, error) {
	var out []TargetPrecision
	site := rp.Request.Site
	for ti, t := range rp.Request.Targets {
		tp := TargetPrecision{Target: t.Name, TargetIndex: ti, Priority: t.Priority}
		if t.RV != nil {
			f, err := rp.rvForecast(ti, t)
			if err != nil {
				return nil, err
			}
			tp.RV = f
		}
		if tm := timings[t.Name]; len(tm) > 0 {
			f, err := rp.timingForecast(site, t, tm)
			if err != nil {
				tp.TimingNote = "timing precision not predicted: " + err.Error()
			}
			tp.Timing = f
		}
		if tp.RV != nil || tp.Timing != nil || tp.TimingNote != "" {
			out = append(out, tp)
		}
	}
	return out, nil
}

// rvForecast predicts target ti's RV precision.
func (rp *RunPlan) rvForecast(ti int, t Target) (*RVForecast, error) {
	c, err := NewRVCurve(*t.RV, t.Ephem)
	if err != nil {
		return nil, err
	}
	f := &RVForecast{Goal: *t.RV, PerNight: make([]RVPrecision, len(rp.Nights))}
	var now, all []RVExposure
	var nights []int
	var mids []time.Time
	for _, e := range rp.Exposures {
		if e.TargetIndex != ti || e.Failed {
			continue
		}
		x := RVExposure{Phase: e.Phase, Smear: ephem.PhaseSmear(e.ExposureS, t.Ephem)}
		all = append(all, x)
		nights = append(nights, e.Night)
		mids = append(mids, e.Mid)
		if !e.Planned {
			now = append(now, x)
		}
	}
	f.PhaseSigma = meanEpochPhaseSigma(rp.Request.Site, t, mids)
	f.Now = c.Predict(now, f.PhaseSigma)
	f.After = c.Predict(all, f.PhaseSigma)
	// Night by night: each exposure's information is added once, to its
	// night, and the nights are summed in order.
	perNight := make([]fisher, len(rp.Nights))
	count := make([]int, len(rp.Nights))
	for i, x := range all {
		c.add(&perNight[nights[i]], x, 1)
		count[nights[i]]++
	}
	var cum fisher
	n := 0
	for k := range rp.Nights {
		for a := range 3 {
			for b := range 3 {
				cum[a][b] += perNight[k][a][b]
			}
		}
		n += count[k]
		f.PerNight[k] = c.solve(cum, n, f.PhaseSigma)
	}
	if w := t.RV.WantRelK; w > 0 {
		smear := 0.0
		if len(t.Goals) > 0 {
			smear = ephem.PhaseSmear(t.Goals[0].ExposureS, t.Ephem)
		}
		var ok1, ok2 bool
		f.NeedNow, ok1 = c.ExposuresNeeded(now, f.PhaseSigma, smear, w)
		f.NeedAfter, ok2 = c.ExposuresNeeded(all, f.PhaseSigma, smear, w)
		f.NeedOK = ok1 && ok2
	}
	return f, nil
}

// meanEpochPhaseSigma is the ephemeris' phase σ at the mean of the mid-times
// (at the ephemeris' T0 when there are none).
func meanEpochPhaseSigma(site ephem.Site, t Target, mids []time.Time) float64 {
	if len(mids) == 0 {
		return t.Ephem.PhaseErr(t.Ephem.T0)
	}
	var sum float64
	for _, m := range mids {
		sum += float64(m.Sub(mids[0]))
	}
	mean := mids[0].Add(time.Duration(sum / float64(len(mids))))
	_, _, s := ephem.PhaseAtUTC(site, t.Star(), t.Ephem, mean)
	return s
}

// timingForecast predicts target t's timing precision from its measured
// timings and the reference events inside its planned blocks.
func (rp *RunPlan) timingForecast(site ephem.Site, t Target, measured []ephem.Timing) (*TimingForecast, error) {
	errs := make([]float64, len(measured))
	for i, m := range measured {
		errs[i] = m.ErrDays
	}
	slices.Sort(errs)
	med := errs[len(errs)/2]
	if len(errs)%2 == 0 {
		med = 0.5 * (errs[len(errs)/2-1] + errs[len(errs)/2])
	}
	f := &TimingForecast{ErrDays: med, Quadratic: t.Ephem.Pdot != 0 || t.Ephem.PdotErr > 0,
		PerNight: make([]TimingPrecision, len(rp.Nights))}
	var planned []ephem.JD2
	var nights []int
	st := t.Star()
	for k, np := range rp.Nights {
		if np.Plan == nil {
			continue
		}
		for _, b := range np.Plan.Blocks {
			if b.Target != t.Name {
				continue
			}
			from, to := ephem.BJDTDB(site, st, b.Start), ephem.BJDTDB(site, st, b.End)
			for _, ev := range t.Ephem.NextEvents(0, from, to) {
				planned = append(planned, ev)
				nights = append(nights, k)
			}
		}
	}
	f.Planned = len(planned)
	var err error
	f.Now, f.After, err = PredictTimings(measured, planned, med, t.Ephem, f.Quadratic)
	if err != nil {
		return nil, err
	}
	for k := range rp.Nights {
		var upTo []ephem.JD2
		for i, p := range planned {
			if nights[i] <= k {
				upTo = append(upTo, p)
			}
		}
		if _, f.PerNight[k], err = PredictTimings(measured, upTo, med, t.Ephem, f.Quadratic); err != nil {
			return nil, err
		}
	}
	return f, nil
}

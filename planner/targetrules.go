package planner

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"phasecast/ephem"
)

// The limits of the target rules (TargetProblems).
const (
	// MaxPMmasyr is the largest |proper motion| accepted in each
	// coordinate, mas/yr (the fastest known star moves about 10 400 mas/yr).
	MaxPMmasyr = 20000
	// MinMag and MaxMag bound a target's magnitude (0 = unknown).
	MinMag, MaxMag = -30.0, 40.0
	// MaxAcquireS is the longest acquisition overhead per visit, seconds.
	MaxAcquireS = 3600.0
	// MaxGoals is the most goals a target may have.
	MaxGoals = 20
	// MaxGoalExposures is the most exposures a goal may ask for per night.
	MaxGoalExposures = 10000
)

// TargetProblem is one rule a target breaks: Field as the files, forms, API
// and documents name it ("ra", "goals[1].phase_halfwidth"), Value as held
// (formatted), Accepted what the rule accepts.
type TargetProblem struct {
	Field, Value, Accepted string
}

// TargetProblems is the one rulebook for a target's own fields and goals,
// used by the planners (validateTarget), the store (every write and
// import) and so the forms and the API: it returns every rule t breaks, in
// field order, nil when none. The fields: ra (0 ≤ α < 360°), dec
// (−90..90°), pm_ra_masyr and pm_dec_masyr (±MaxPMmasyr), mag (MinMag..MaxMag),
// priority (1..5), acquire_s (0..MaxAcquireS), goals (at most MaxGoals) and
// per goal goals[k].event (a known event), .center (0 ≤ φ < 1 without an
// event), .phase_halfwidth (0 < w < 0.5), .exposure_s (0 < t ≤ MaxExposureS),
// .overhead_s (0..MaxExposureS), .n_exposures (NAsManyAsFit, 0 or
// 1..MaxGoalExposures), .min_block_s (0..86400 s),
// .min_nights (0..MaxRunNights) and .eclipse_duration_days (≥ 0 and shorter
// than the period). When t's ephemeris is valid each goal's event is also
// resolved against it, so that an impossible one (the periastron of a
// circular orbit, an eclipse contact without a duration) is refused. The
// name and the ephemeris itself are the callers' to check: their rules
// depend on where they come from (ephem.Ephemeris.Validate).
func TargetProblems(t Target) []TargetProblem {
	var ps []TargetProblem
	bad := func(field, value, accepted string) {
		ps = append(ps, TargetProblem{Field: field, Value: value, Accepted: accepted})
	}
	if !finite(t.RADeg) || t.RADeg < 0 || t.RADeg >= 360 {
		bad("ra", fmtNum(t.RADeg), "right ascension 0 ≤ RA < 360 degrees (ICRS)")
	}
	if !finite(t.DecDeg) || t.DecDeg < -90 || t.DecDeg > 90 {
		bad("dec", fmtNum(t.DecDeg), "declination −90..90 degrees (ICRS)")
	}
	if !finite(t.PMRAmasyr) || t.PMRAmasyr < -MaxPMmasyr || t.PMRAmasyr > MaxPMmasyr {
		bad("pm_ra_masyr", fmtNum(t.PMRAmasyr), fmt.Sprintf("proper motion in RA·cos δ, −%d..%d mas/yr", MaxPMmasyr, MaxPMmasyr))
	}
	if !finite(t.PMDecmasyr) || t.PMDecmasyr < -MaxPMmasyr || t.PMDecmasyr > MaxPMmasyr {
		bad("pm_dec_masyr", fmtNum(t.PMDecmasyr), fmt.Sprintf("proper motion in Dec, −%d..%d mas/yr", MaxPMmasyr, MaxPMmasyr))
	}
	if !finite(t.Mag) || t.Mag < MinMag || t.Mag > MaxMag {
		bad("mag", fmtNum(t.Mag), fmt.Sprintf("a magnitude %g..%g (0 = unknown)", MinMag, MaxMag))
	}
	if t.Priority < 1 || t.Priority > 5 {
		bad("priority", strconv.Itoa(t.Priority), "an integer 1 (highest) to 5")
	}
	if !finite(t.AcquireS) || t.AcquireS < 0 || t.AcquireS > MaxAcquireS {
		bad("acquire_s", fmtNum(t.AcquireS), fmt.Sprintf("acquisition overhead per visit, 0..%g seconds", MaxAcquireS))
	}
	if len(t.Goals) > MaxGoals {
		bad("goals", strconv.Itoa(len(t.Goals))+" goals", fmt.Sprintf("at most %d goals", MaxGoals))
		return ps
	}
	resolve := t.Ephem.Validate() == nil
	events := EventNames()
	for i, g := range t.Goals {
		f := fmt.Sprintf("goals[%d].", i)
		n0 := len(ps)
		switch {
		case g.Event != "" && !slices.Contains(events, g.Event):
			bad(f+"event", g.Event, "a phase, or one of "+strings.Join(events, ", "))
		case g.Event == "" && (!finite(g.Center) || g.Center < 0 || g.Center >= 1):
			bad(f+"center", fmtNum(g.Center), "a phase 0 ≤ φ < 1")
		}
		if !finite(g.HalfWidth) || g.HalfWidth <= 0 || g.HalfWidth >= 0.5 {
			bad(f+"phase_halfwidth", fmtNum(g.HalfWidth), "a phase half-width 0 < w < 0.5")
		}
		if !finite(g.ExposureS) || g.ExposureS <= 0 || g.ExposureS > MaxExposureS {
			bad(f+"exposure_s", fmtNum(g.ExposureS), fmt.Sprintf("one exposure, 0 < t ≤ %g seconds", MaxExposureS))
		}
		if !finite(g.OverheadS) || g.OverheadS < 0 || g.OverheadS > MaxExposureS {
			bad(f+"overhead_s", fmtNum(g.OverheadS), fmt.Sprintf("readout per exposure, 0 ≤ t ≤ %g seconds", MaxExposureS))
		}
		if g.NExposures < NAsManyAsFit || g.NExposures > MaxGoalExposures {
			bad(f+"n_exposures", strconv.Itoa(g.NExposures), NExposuresAccepted)
		}
		if !finite(g.MinBlockS) || g.MinBlockS < 0 || g.MinBlockS > 86400 {
			bad(f+"min_block_s", fmtNum(g.MinBlockS), "0 (none) to 86400 seconds")
		}
		if g.MinNights < 0 || g.MinNights > MaxRunNights {
			bad(f+"min_nights", strconv.Itoa(g.MinNights), fmt.Sprintf("0 to %d nights", MaxRunNights))
		}
		if !finite(g.EclipseDurDays) || g.EclipseDurDays < 0 || (t.Ephem.PeriodDays > 0 && g.EclipseDurDays >= t.Ephem.PeriodDays) {
			bad(f+"eclipse_duration_days", fmtNum(g.EclipseDurDays), "the eclipse's full duration in days, ≥ 0 and shorter than the period")
		}
		if resolve && len(ps) == n0 && g.Event != "" {
			one := Target{Name: t.Name, Ephem: t.Ephem, Goals: []Goal{g}}
			if _, err := one.ResolveGoals(); err != nil {
				var ie *ephem.InputError
				if errors.As(err, &ie) {
					bad(f+"event", g.Event, ie.Field+": "+ie.Accepted)
				} else {
					bad(f+"event", g.Event, err.Error())
				}
			}
		}
	}
	if t.RV != nil {
		var ie *ephem.InputError
		if err := t.RV.Validate(); errors.As(err, &ie) {
			bad(ie.Field, ie.Value, ie.Accepted)
		}
	}
	return ps
}

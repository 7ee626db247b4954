package main

import (
	"context"
	"fmt"
	"io"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// phaseJSON is the `phase --json` contract.
type phaseJSON struct {
	BJDTDB   jdValue `json:"bjd_tdb"`
	Cycle    int64   `json:"cycle"`     // floor((BJD_TDB − T0)/P) for a linear ephemeris
	Phase    float64 `json:"phase"`     // 0 ≤ phase < 1, from T0
	PhaseErr float64 `json:"phase_err"` // 1σ, in phase
	// TimeScaleNote: see skyJSON.
	TimeScaleNote string `json:"time_scale_note,omitempty"`
	// Warning says in words when the uncertainty makes the phase
	// meaningless or the planner would refuse it (planner.UncertaintyRule).
	Warning string `json:"warning,omitempty"`
}

// uncertaintyWarning is the warning of phase and events for a 1σ phase
// uncertainty sigma (cycles) of an orbit of periodDays: the planner's rule
// at its default limit, with the timing error in seconds.
func uncertaintyWarning(sigma, periodDays float64) string {
	if planner.UncertaintyRule(sigma, 0, planner.DefaultMaxPhaseErr) < planner.PhaseRefused {
		return ""
	}
	return fmt.Sprintf("%s (1σ of a predicted time: %.0f s, the period %.0f s)", planner.UncertaintyNote(sigma, 0, planner.DefaultMaxPhaseErr), sigma*periodDays*86400, periodDays*86400)
}

const phaseSynopsis = `The orbital cycle and phase of a binary at an instant: the instant is turned
into BJD_TDB for the target and site, then cycle = floor((BJD_TDB − T0)/P) and
phase = the fraction of the cycle since T0 (0 ≤ phase < 1), with its 1σ
uncertainty propagated from those of T0 and P. Phase 0 is the event T0 marks.`

func runPhase(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("phase", phaseSynopsis)
	sg := addSightingFlags(fl, "instant of observation, RFC 3339; UTC unless an offset is given")
	ef := addEphemFlags(fl)
	asJSON := fl.boolean("json", "print one JSON object")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return err
	}
	site, star, t, err := sg.read(now)
	if err != nil {
		return err
	}
	e, err := ef.ephemeris(site, star)
	if err != nil {
		return err
	}
	b, err := ephem.BarycentricTimes(site, star, t)
	if err != nil {
		return err
	}
	cycle, ph, err := e.Locate(b.BJDTDB)
	if err != nil {
		return fromInputError(err, "has no orbital phase", map[string]*textValue{"bjd": sg.at})
	}
	out := phaseJSON{BJDTDB: jdValue(b.BJDTDB), Cycle: cycle, Phase: ph, PhaseErr: e.PhaseErr(b.BJDTDB), TimeScaleNote: ephem.TimeScaleNote(t)}
	if err := checkFinite([]string{"phase", "phase uncertainty"}, out.Phase, out.PhaseErr); err != nil {
		return err
	}
	out.Warning = uncertaintyWarning(out.PhaseErr, e.PeriodDays)
	if *asJSON {
		return writeJSON(stdout, out)
	}
	tb := newTable(stdout)
	tb.row("site", siteLine(site))
	tb.row("target", starLine(star))
	tb.row("instant", utcMillis(t).String()+" (UTC)")
	tb.row("BJD_TDB", out.BJDTDB.String())
	tb.row("T0 (BJD_TDB)", jdValue(e.T0).String(), "± "+f(e.T0ErrDays, 9)+" d")
	tb.row("period", f(e.PeriodDays, 10)+" d", "± "+f(e.PeriodErr, 10)+" d")
	tb.row("cycle", fmt.Sprint(out.Cycle))
	tb.row("phase", f(out.Phase, 5), fmt.Sprintf("± %.5f (1σ, %.1f s)", out.PhaseErr, out.PhaseErr*e.PeriodDays*86400))
	if err := tb.flush(); err != nil {
		return err
	}
	if out.Warning != "" {
		fmt.Fprintln(stdout, "Warning: "+out.Warning)
	}
	if err := printTimeScaleNote(stdout, out.TimeScaleNote); err != nil {
		return err
	}
	_, err = fmt.Fprintln(stdout, safetyNote)
	return err
}

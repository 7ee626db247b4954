package web

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// targetDetail gathers the detail page of target id.
func (s *Server) targetDetail(ctx context.Context, u *user, id int64) (page.TargetView, error) {
	t, err := s.store.GetTarget(ctx, u.actor, id)
	if err != nil {
		return page.TargetView{}, err
	}
	list, err := s.store.GetList(ctx, u.actor, t.ListID)
	if err != nil {
		return page.TargetView{}, err
	}
	hist, err := s.store.ListEphemerides(ctx, u.actor, id)
	if err != nil {
		return page.TargetView{}, err
	}
	timings, err := s.store.ListTimings(ctx, u.actor, id)
	if err != nil {
		return page.TargetView{}, err
	}
	sites, err := s.store.ListSites(ctx, u.actor, u.team.TeamID)
	if err != nil {
		return page.TargetView{}, err
	}
	site, where := phaseSite(sites)
	now := s.now()
	tg, e := t.Target, t.Ephemeris.Ephem
	v := page.TargetView{ID: t.ID, ListID: t.ListID, ListName: list.Name, Version: t.Version, Name: tg.Name, Notes: tg.Notes,
		CanEdit: u.can(store.ActUpdate, store.EntTarget), SiteNote: "Phase and events seen from " + where + "."}
	v.Facts = targetFacts(t)
	v.Ephemeris = ephemFacts(t.Ephemeris)
	for i, h := range hist {
		v.History = append(v.History, historyRow(h, i == 0))
	}
	_, ph, phErr := planner.PhaseNow(site, tg.Star(), e, now)
	v.PhaseNow = fmt.Sprintf("Phase now %.4f ± %s (%s)", ph, fmtPhaseErr(phErr), fmtUTC(now))
	v.Events = upcomingEvents(site, t, now)
	goals, err := tg.ResolveGoals()
	if err != nil {
		goals = tg.Goals
	}
	for _, g := range goals {
		v.Goals = append(v.Goals, goalLabelConv(g, t.Ephemeris.Ephem.Convention)+fmt.Sprintf(": %s s exposures + %s s readout, %s", num(g.ExposureS), num(g.OverheadS), wantLabel(g.NExposures)))
	}
	v.Sigma = sigmaChart(site, t, now)
	v.Altitude, v.HasAltitude = altitudeTonight(sites, tg, now)
	v.Timings, v.OC = timingRows(t, timings)
	fit, note := proposeFit(t, timings)
	if fit != nil {
		v.Fit = &page.FitView{Lines: fitLines(t, *fit)}
		v.OC.Lines = append(v.OC.Lines, fitLine(e, *fit, v.OC.Points))
	}
	v.FitNote = note
	v.TimingForm = timingForm(page.TimingForm{ErrS: "10", Errs: page.Errs{}})
	return v, nil
}

func wantLabel(n int) string { return planner.Goal{NExposures: n}.WantedLabel() }

// targetFacts lists a target's position and settings.
func targetFacts(t store.StoredTarget) []page.KV {
	tg := t.Target
	kv := []page.KV{
		{Key: "RA, Dec (ICRS)", Value: planner.FormatRAHours(tg.RADeg, 2) + "  " + planner.FormatDecDeg(tg.DecDeg, 1)},
		{Key: "Degrees", Value: fmt.Sprintf("%.6f  %+.6f", tg.RADeg, tg.DecDeg)},
	}
	if tg.PMRAmasyr != 0 || tg.PMDecmasyr != 0 {
		kv = append(kv, page.KV{Key: "Proper motion", Value: fmt.Sprintf("%s, %s mas/yr", num(tg.PMRAmasyr), num(tg.PMDecmasyr))})
	}
	if tg.Mag != 0 {
		mag := num(tg.Mag)
		if tg.Band != "" {
			mag += " (" + tg.Band + ")"
		}
		kv = append(kv, page.KV{Key: "Magnitude", Value: mag})
	}
	if tg.Variable() {
		kv = append(kv, page.KV{Key: "Variable", Value: fmt.Sprintf("%s at phase %s, %s at phase %s (%s)",
			num(tg.FaintMag), num(tg.FaintPhase), num(tg.BrightMag), num(tg.BrightPhase), tg.Band)})
	}
	kv = append(kv, page.KV{Key: "Priority", Value: strconv.Itoa(tg.Priority) + " (1 highest)"},
		page.KV{Key: "Acquisition", Value: num(tg.AcquireS) + " s per visit"})
	if len(tg.Tags) > 0 {
		kv = append(kv, page.KV{Key: "Tags", Value: strings.Join(tg.Tags, ", ")})
	}
	if g := tg.RV; g != nil {
		v := fmt.Sprintf("%s, K %s km/s, σv %s km/s per exposure", g.Model, num(g.KKms), num(g.SigmaVKms))
		if g.WantRelK > 0 {
			v += ", wanted σK/K ≤ " + planner.FormatRelPercent(g.WantRelK, true)
		}
		kv = append(kv, page.KV{Key: "Radial-velocity goal", Value: v})
	}
	return append(kv, page.KV{Key: "Saved", Value: fmtUTC(t.UpdatedAt) + " (version " + strconv.FormatInt(t.Version, 10) + ")"})
}

// ephemFacts lists an ephemeris as it was given and as used.
func ephemFacts(r store.EphemerisRecord) []page.KV {
	e := r.Ephem
	kv := []page.KV{
		{Key: "T0 as given", Value: r.T0.Text + " " + string(r.T0.Form) + " " + string(r.T0.Standard)},
		{Key: "T0 (BJD_TDB)", Value: planner.FormatEpoch(e.T0, planner.FormJD, 8) + " ± " + fmtSeconds(e.T0ErrDays*86400)},
		{Key: "T0 marks", Value: strings.ReplaceAll(string(e.Convention), "_", " ")},
		{Key: "Period", Value: fmtPeriod(e.PeriodDays) + " ± " + fmtSeconds(e.PeriodErr*86400)},
	}
	if e.Pdot != 0 {
		kv = append(kv, page.KV{Key: "Ṗ", Value: strconv.FormatFloat(e.Pdot, 'g', 4, 64) + " ± " + strconv.FormatFloat(e.PdotErr, 'g', 2, 64)})
	}
	if e.Ecc != 0 {
		kv = append(kv, page.KV{Key: "e, ω", Value: fmt.Sprintf("%s, %s°", num(e.Ecc), num(e.OmegaDeg))})
	}
	src := string(r.Source)
	if r.Note != "" {
		src += ": " + r.Note
	}
	return append(kv, page.KV{Key: "Source", Value: src + " (" + fmtUTC(r.CreatedAt) + by(r.CreatedByName) + ")"})
}

func by(name string) string {
	if name == "" {
		return ""
	}
	return ", " + name
}

// fmtSeconds writes an uncertainty in seconds with two significant
// digits, in plain decimals ("0.43 s", "0.000086 s", "430 s").
func fmtSeconds(s float64) string {
	return sigFig(s, 2) + " s"
}

func historyRow(h store.EphemerisRecord, current bool) page.EphemRow {
	e := h.Ephem
	note := h.Note
	if h.Fit != nil {
		note = strings.TrimSpace(fmt.Sprintf("%s; %d timings, χ²ᵣ %.2f %s", h.Fit.Method, len(h.Fit.TimingIDs), h.Fit.RedChiSq, note))
	}
	return page.EphemRow{When: fmtUTC(h.CreatedAt), By: h.CreatedByName, Source: string(h.Source), Current: current,
		T0: h.T0.Text + " " + string(h.T0.Standard), Period: strconv.FormatFloat(e.PeriodDays, 'f', 10, 64) + " d",
		Sigma: "T0 " + fmtSeconds(e.T0ErrDays*86400) + ", P " + fmtSeconds(e.PeriodErr*86400), Note: note}
}

// upcomingEvents lists the next occurrences of each named orbital event
// that the ephemeris defines (an eclipse contact needs the eclipse length,
// periastron an eccentric orbit).
func upcomingEvents(site planner.Site, t store.StoredTarget, now time.Time) []page.UpcomingRow {
	e := t.Ephemeris.Ephem
	dur := 0.0
	for _, g := range t.Target.Goals {
		dur = math.Max(dur, g.EclipseDurDays)
	}
	span := time.Duration(math.Min(3*e.PeriodDays*24, 24*400)*float64(time.Hour)) + time.Hour
	var out []page.UpcomingRow
	for _, ev := range planner.Events {
		ph, err := planner.EventPhase(e, ev, dur)
		if err != nil {
			continue
		}
		row := page.UpcomingRow{Event: eventName(string(ev), e.Convention), Phase: strconv.FormatFloat(ph, 'f', 4, 64)}
		for i, at := range planner.UpcomingEvents(site, t.Target.Star(), e, ph, now, now.Add(span)) {
			if i == 3 {
				break
			}
			sigma := planner.PhaseSigmaAt(site, t.Target.Star(), e, at)
			next := at.UTC().Format("2006-01-02 15:04:05") + " ± " + fmtSigmaS(sigma*e.PeriodDays*86400) + " (in " + fmtDuration(at.Sub(now)) + ")"
			if planner.UncertaintyRule(sigma, 0, planner.DefaultMaxPhaseErr) >= planner.PhaseRefused {
				next += ": " + planner.UncertaintyNote(sigma, 0, planner.DefaultMaxPhaseErr)
			}
			row.Next = append(row.Next, next)
		}
		out = append(out, row)
	}
	return out
}

// fmtSigmaS writes a predicted time's 1σ, seconds: "0.8 s (1σ)", "42 s (1σ)".
func fmtSigmaS(x float64) string {
	if x < 10 {
		return strconv.FormatFloat(x, 'f', 1, 64) + " s (1σ)"
	}
	return strconv.FormatFloat(x, 'f', 0, 64) + " s (1σ)"
}

// sigmaChart is the phase uncertainty from a year before now to three
// years ahead, with the goals' half-widths.
func sigmaChart(site planner.Site, t store.StoredTarget, now time.Time) chart.Uncertainty {
	e := t.Ephemeris.Ephem
	c := chart.Uncertainty{Title: "Phase uncertainty of " + t.Target.Name, PeriodDays: e.PeriodDays, Now: now}
	from, to := now.AddDate(-1, 0, 0), now.AddDate(3, 0, 0)
	for i := 0; i <= 80; i++ {
		at := from.Add(time.Duration(float64(to.Sub(from)) * float64(i) / 80))
		c.Points = append(c.Points, chart.UncertaintyPoint{T: at, SigmaPhase: planner.PhaseSigmaAt(site, t.Target.Star(), e, at)})
	}
	seen := map[float64]bool{}
	for _, g := range t.Target.Goals {
		if !seen[g.HalfWidth] {
			seen[g.HalfWidth] = true
			c.Limits = append(c.Limits, chart.Limit{Value: g.HalfWidth, Label: "goal half-width " + num(g.HalfWidth)})
		}
	}
	return c
}

// timingForm adds the select options to a timing form.
func timingForm(f page.TimingForm) page.TimingForm {
	sel := ""
	for _, o := range f.Events {
		if o.Selected {
			sel = o.Value
		}
	}
	f.Events = []page.Option{{Value: "", Label: "the T0 event (reference)", Selected: sel == ""}}
	for _, ev := range planner.Events {
		f.Events = append(f.Events, page.Option{Value: string(ev), Label: strings.ReplaceAll(string(ev), "_", " "), Selected: sel == string(ev)})
	}
	std, form := "", ""
	for _, o := range f.Std {
		if o.Selected {
			std = o.Value
		}
	}
	for _, o := range f.Forms {
		if o.Selected {
			form = o.Value
		}
	}
	f.Std = options(planner.TimeStandards, std, string(planner.StdBJDTDB))
	f.Forms = options(planner.EpochForms, form, string(planner.FormJD))
	return f
}

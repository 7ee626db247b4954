package web

import (
	"errors"
	"fmt"
	"net/http"
	"regexp"
	"strconv"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// goalFields are the per-goal inputs of the target form, in table order.
var goalFields = []string{"center", "phase_halfwidth", "exposure_s", "overhead_s", "n_exposures", "min_nights", "eclipse_duration_days", "snr", "max_smear"}

// targetFormIn is a parsed target form: the store input, the form as typed
// (to show again), messages for values that do not even parse, and which
// form row each kept goal came from.
type targetFormIn struct {
	in      store.TargetInput
	form    page.TargetForm
	errs    page.Errs
	goalRow []int
}

// parseTargetForm reads the target form of r.
func parseTargetForm(r *http.Request) targetFormIn {
	f := func(k string) string { return strings.TrimSpace(r.PostFormValue(k)) }
	p := targetFormIn{errs: page.Errs{}}
	p.form = page.TargetForm{Name: f("name"), RA: f("ra"), Dec: f("dec"), PMRA: f("pm_ra_masyr"), PMDec: f("pm_dec_masyr"), Mag: f("mag"),
		T0: f("t0"), T0Std: f("t0_standard"), T0Form: f("t0_form"), T0Err: f("t0_err_days"), Period: f("period_days"),
		PerErr: f("period_err_days"), Pdot: f("pdot"), Conv: f("t0_convention"), PhOffset: f("phase_offset"), Ecc: f("ecc"),
		Omega: f("omega_deg"), Priority: f("priority"), AcquireS: f("acquire_s"), Tags: f("tags"), Notes: r.PostFormValue("notes"),
		EphNote: f("ephem_note"), Band: f("band"), FaintMag: f("faint_mag"), FaintPh: f("faint_phase"), BriMag: f("bright_mag"),
		BriPh: f("bright_phase"), RVModel: f("rv_model"), RVK: f("rv_k_kms"), RVSigma: f("rv_sigma_kms"), RVWant: f("rv_want_rel_k")}
	t := planner.Target{Name: p.form.Name, Notes: p.form.Notes, Band: p.form.Band}
	if v, err := planner.ParseRA(p.form.RA); err != nil {
		p.errs["ra"] = fmt.Sprintf("“%s” is not a right ascension; accepted: hours as 12:34:56.7 or degrees 0 ≤ RA < 360", p.form.RA)
	} else {
		t.RADeg = v
	}
	if v, err := planner.ParseDec(p.form.Dec); err != nil {
		p.errs["dec"] = fmt.Sprintf("“%s” is not a declination; accepted: degrees −90..90 as -05:06:07.8 or -5.1022", p.form.Dec)
	} else {
		t.DecDeg = v
	}
	p.num("pm_ra_masyr", p.form.PMRA, &t.PMRAmasyr)
	p.num("pm_dec_masyr", p.form.PMDec, &t.PMDecmasyr)
	p.num("mag", p.form.Mag, &t.Mag)
	p.num("faint_mag", p.form.FaintMag, &t.FaintMag)
	p.num("faint_phase", p.form.FaintPh, &t.FaintPhase)
	p.num("bright_mag", p.form.BriMag, &t.BrightMag)
	p.num("bright_phase", p.form.BriPh, &t.BrightPhase)
	p.num("acquire_s", p.form.AcquireS, &t.AcquireS)
	p.num("t0_err_days", p.form.T0Err, &t.Ephem.T0ErrDays)
	p.num("period_days", p.form.Period, &t.Ephem.PeriodDays)
	p.num("period_err_days", p.form.PerErr, &t.Ephem.PeriodErr)
	p.num("pdot", p.form.Pdot, &t.Ephem.Pdot)
	p.num("phase_offset", p.form.PhOffset, &t.Ephem.PhaseOffset)
	p.num("ecc", p.form.Ecc, &t.Ephem.Ecc)
	p.num("omega_deg", p.form.Omega, &t.Ephem.OmegaDeg)
	t.Ephem.Convention = planner.Convention(p.form.Conv)
	if n, err := strconv.Atoi(p.form.Priority); err != nil {
		p.errs["priority"] = fmt.Sprintf("“%s” is not accepted; accepted: an integer 1 (highest) to 5", p.form.Priority)
	} else {
		t.Priority = n
	}
	for _, tag := range strings.Split(p.form.Tags, ",") {
		if tag = strings.TrimSpace(tag); tag != "" {
			t.Tags = append(t.Tags, tag)
		}
	}
	t.Goals = p.goals(r)
	t.RV = p.rvGoal()
	epoch, err := store.ParseEpoch(p.form.T0, planner.TimeStandard(p.form.T0Std), planner.EpochForm(p.form.T0Form))
	if err != nil {
		var ie *planner.InputError
		if errors.As(err, &ie) {
			p.errs["t0"] = fmt.Sprintf("“%s” is not accepted; accepted: %s", p.form.T0, ie.Accepted)
		} else {
			p.errs["t0"] = fmt.Sprintf("“%s” is not an epoch; accepted: a Julian date such as 2460123.45678", p.form.T0)
		}
	}
	p.in = store.TargetInput{Target: t, T0: epoch, EphemNote: p.form.EphNote}
	if len(p.errs) > 0 {
		p.addStoreChecks()
	}
	return p
}

// rvGoal reads the RV goal's inputs: none when the model is empty and the
// numbers too; numbers without a model are refused by name.
func (p *targetFormIn) rvGoal() *planner.RVGoal {
	f := p.form
	if f.RVModel == "" {
		if f.RVK != "" || f.RVSigma != "" || f.RVWant != "" {
			p.errs["rv_model"] = "an RV goal needs its model: choose circular or eccentric, or clear K, σv and σK/K"
		}
		return nil
	}
	g := &planner.RVGoal{Model: planner.RVModel(f.RVModel)}
	p.num("rv_k_kms", f.RVK, &g.KKms)
	p.num("rv_sigma_kms", f.RVSigma, &g.SigmaVKms)
	p.num("rv_want_rel_k", f.RVWant, &g.WantRelK)
	return g
}

// addStoreChecks adds the store's messages for the fields that parsed but
// are out of range, so that one submission lists every bad field; a field
// that did not parse keeps its own message.
func (p *targetFormIn) addStoreChecks() {
	errs, _, ok := p.storeErrs(store.CheckTargetInput(p.in))
	if !ok {
		return
	}
	for k, msg := range errs {
		if !p.errs.Has(k) && k != "" {
			p.errs[k] = msg
		}
	}
}

// num parses an optional number (empty is 0) into dst.
func (p *targetFormIn) num(field, s string, dst *float64) {
	if s == "" {
		return
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		p.errs[field] = fmt.Sprintf("“%s” is not a number", s)
		return
	}
	*dst = v
}

// goals reads the goal rows, skipping empty ones.
func (p *targetFormIn) goals(r *http.Request) []planner.Goal {
	var out []planner.Goal
	for i := 0; i < 50; i++ {
		row := page.GoalRow{}
		vals := make([]string, len(goalFields))
		any := false
		present := false
		for k, name := range goalFields {
			if _, ok := r.PostForm[page.GoalField(i, name)]; ok {
				present = true
			}
			vals[k] = strings.TrimSpace(r.PostFormValue(page.GoalField(i, name)))
			any = any || vals[k] != ""
		}
		if !present {
			break
		}
		row = page.GoalRow{Center: vals[0], HalfWidth: vals[1], ExposureS: vals[2], OverheadS: vals[3], N: vals[4], MinNights: vals[5], EclDur: vals[6], SNR: vals[7], MaxSmear: vals[8]}
		p.form.Goals = append(p.form.Goals, row)
		if !any {
			continue
		}
		g := planner.Goal{}
		if c, err := strconv.ParseFloat(vals[0], 64); err == nil {
			g.Center = c
		} else {
			g.Event = vals[0]
		}
		fld := func(k int) string { return page.GoalField(i, goalFields[k]) }
		p.num(fld(1), vals[1], &g.HalfWidth)
		p.num(fld(2), vals[2], &g.ExposureS)
		p.num(fld(3), vals[3], &g.OverheadS)
		p.num(fld(6), vals[6], &g.EclipseDurDays)
		p.num(fld(7), vals[7], &g.SNR)
		p.num(fld(8), vals[8], &g.MaxSmear)
		var n, nights float64
		p.num(fld(4), vals[4], &n)
		p.num(fld(5), vals[5], &nights)
		g.NExposures, g.MinNights = int(n), int(nights)
		out = append(out, g)
		p.goalRow = append(p.goalRow, i)
	}
	return out
}

var goalFieldRE = regexp.MustCompile(`^goals\[(\d+)\]\.(\w+)$`)

// storeErrs turns the store's rejection of the input into messages on the
// form's fields: goal k is on form row goalRow[k], and a goal's event is
// typed in its centre cell.
func (p *targetFormIn) storeErrs(err error) (page.Errs, int, bool) {
	errs, status, ok := formErrs(err)
	if !ok {
		return nil, status, false
	}
	out := page.Errs{}
	for k, msg := range errs {
		if m := goalFieldRE.FindStringSubmatch(k); m != nil {
			n, err := strconv.Atoi(m[1])
			if err != nil {
				n = len(p.goalRow) // digits too many for an int: no such goal row
			}
			field := m[2]
			if field == "event" {
				field = "center"
			}
			if n < len(p.goalRow) {
				k = page.GoalField(p.goalRow[n], field)
			}
		}
		switch k {
		case "t0_standard", "t0_form", "t0_convention", "goals":
		default:
			if !strings.HasPrefix(k, "goals[") && !knownTargetField[k] {
				k = ""
			}
		}
		out[k] = msg
	}
	return out, status, true
}

// knownTargetField lists the target form's top-level inputs.
var knownTargetField = map[string]bool{
	"name": true, "ra": true, "dec": true, "pm_ra_masyr": true, "pm_dec_masyr": true, "mag": true, "priority": true,
	"band": true, "faint_mag": true, "faint_phase": true, "bright_mag": true, "bright_phase": true,
	"acquire_s": true, "tags": true, "notes": true, "ephem_note": true, "t0": true, "t0_err_days": true, "period_days": true,
	"period_err_days": true, "pdot": true, "phase_offset": true, "ecc": true, "omega_deg": true, "": true,
	"rv_model": true, "rv_k_kms": true, "rv_sigma_kms": true, "rv_want_rel_k": true,
}

// formFromTarget fills the form from a stored target.
func formFromTarget(t store.StoredTarget) page.TargetForm {
	tg, e := t.Target, t.Ephemeris.Ephem
	f := page.TargetForm{ID: t.ID, ListID: t.ListID, Version: t.Version, Name: tg.Name,
		RA: planner.FormatRAHours(tg.RADeg, 3), Dec: planner.FormatDecDeg(tg.DecDeg, 2),
		PMRA: optNum(tg.PMRAmasyr), PMDec: optNum(tg.PMDecmasyr), Mag: optNum(tg.Mag), Band: tg.Band,
		FaintMag: optNum(tg.FaintMag), BriMag: optNum(tg.BrightMag),
		T0: t.Ephemeris.T0.Text, T0Std: string(t.Ephemeris.T0.Standard), T0Form: string(t.Ephemeris.T0.Form),
		T0Err: optNum(e.T0ErrDays), Period: optNum(e.PeriodDays), PerErr: optNum(e.PeriodErr), Pdot: optNum(e.Pdot),
		Conv: string(e.Convention), PhOffset: optNum(e.PhaseOffset), Ecc: optNum(e.Ecc), Omega: optNum(e.OmegaDeg),
		Priority: strconv.Itoa(tg.Priority), AcquireS: optNum(tg.AcquireS), Tags: strings.Join(tg.Tags, ", "), Notes: tg.Notes}
	if g := tg.RV; g != nil {
		f.RVModel, f.RVK, f.RVSigma, f.RVWant = string(g.Model), optNum(g.KKms), optNum(g.SigmaVKms), optNum(g.WantRelK)
	}
	if tg.Variable() {
		f.FaintPh, f.BriPh = num(tg.FaintPhase), num(tg.BrightPhase)
	}
	for _, g := range tg.Goals {
		c := strconv.FormatFloat(g.Center, 'f', -1, 64)
		if g.Event != "" {
			c = g.Event
		}
		f.Goals = append(f.Goals, page.GoalRow{Center: c, HalfWidth: optNum(g.HalfWidth), ExposureS: optNum(g.ExposureS),
			OverheadS: optNum(g.OverheadS), N: strconv.Itoa(g.NExposures), MinNights: strconv.Itoa(g.MinNights), EclDur: optNum(g.EclipseDurDays),
			SNR: optNum(g.SNR), MaxSmear: optNum(g.MaxSmear)})
	}
	return f
}

// optNum writes a number, or "" for zero (optional fields).
func optNum(x float64) string {
	if x == 0 {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// withChoices adds the select options and spare goal rows to a form.
func withChoices(f page.TargetForm) page.TargetForm {
	f.Std = options(planner.TimeStandards, f.T0Std, string(planner.StdBJDTDB))
	f.Forms = options(planner.EpochForms, f.T0Form, string(planner.FormJD))
	f.Convs = options(planner.Conventions, f.Conv, string(planner.ConvInferiorConjunction))
	f.RVModels = append([]page.Option{{Value: "", Label: "none", Selected: f.RVModel == ""}}, options(planner.RVModels, f.RVModel, "")...)
	f.Events = planner.EventNames()
	for len(f.Goals) < 3 || f.Goals[len(f.Goals)-1] != (page.GoalRow{}) {
		f.Goals = append(f.Goals, page.GoalRow{})
	}
	if f.Errs == nil {
		f.Errs = page.Errs{}
	}
	return f
}

// options turns a list of named values into select options.
func options[T ~string](vals []T, sel, def string) []page.Option {
	if sel == "" {
		sel = def
	}
	out := make([]page.Option, len(vals))
	for i, v := range vals {
		out[i] = page.Option{Value: string(v), Label: strings.ReplaceAll(string(v), "_", " "), Selected: string(v) == sel}
	}
	return out
}

// conflictLines describes the current version of a target after a stale
// save ("someone else changed this; here is their version").
func conflictLines(err error) []string {
	var se *store.Error
	if !errors.As(err, &se) || se.Code != store.ECONFLICT {
		return nil
	}
	cur, ok := se.Current.(store.StoredTarget)
	if !ok {
		return nil
	}
	e := cur.Ephemeris.Ephem
	return []string{
		"name " + cur.Target.Name + ", RA " + planner.FormatRAHours(cur.Target.RADeg, 2) + ", Dec " + planner.FormatDecDeg(cur.Target.DecDeg, 1),
		"T0 " + cur.Ephemeris.T0.Text + " " + string(cur.Ephemeris.T0.Standard) + ", period " + fmtPeriod(e.PeriodDays),
		"goals " + goalSummary(cur.Target.Goals) + ", priority " + strconv.Itoa(cur.Target.Priority),
		"saved " + fmtUTC(cur.UpdatedAt) + " (version " + strconv.FormatInt(cur.Version, 10) + ")",
	}
}

// currentVersion returns the version of the row in a stale-version
// conflict, or 0.
func currentVersion(err error) int64 {
	var se *store.Error
	if errors.As(err, &se) {
		if cur, ok := se.Current.(store.StoredTarget); ok {
			return cur.Version
		}
	}
	return 0
}

package web

import (
	"errors"
	"fmt"
	"strings"

	"phasecast/planner"
	"phasecast/store"
)

// targetJSON is a target in the JSON API. Field names follow the team CSV
// columns (store/FORMAT.md).
type targetJSON struct {
	ID         int64   `json:"id,omitempty"`
	ListID     int64   `json:"list_id,omitempty"`
	Version    int64   `json:"version,omitempty"`
	Name       string  `json:"name"`
	RADeg      float64 `json:"ra_deg"`
	DecDeg     float64 `json:"dec_deg"`
	PMRAmasyr  float64 `json:"pm_ra_masyr,omitempty"`
	PMDecmasyr float64 `json:"pm_dec_masyr,omitempty"`
	Mag        float64 `json:"mag,omitempty"`
	// Band, FaintMag, FaintPhase, BrightMag and BrightPhase are the
	// target's brightness for S/N goals (planner.Target).
	Band        string     `json:"band,omitempty"`
	FaintMag    float64    `json:"faint_mag,omitempty"`
	FaintPhase  float64    `json:"faint_phase,omitempty"`
	BrightMag   float64    `json:"bright_mag,omitempty"`
	BrightPhase float64    `json:"bright_phase,omitempty"`
	Ephemeris   ephemJSON  `json:"ephemeris"`
	Goals       []goalJSON `json:"goals"`
	Priority    int        `json:"priority"`
	AcquireS    float64    `json:"acquire_s,omitempty"`
	Tags        []string   `json:"tags,omitempty"`
	Notes       string     `json:"notes,omitempty"`
	EphemNote   string     `json:"ephem_note,omitempty"`
	RV          *rvJSON    `json:"rv,omitempty"`
	UpdatedAt   string     `json:"updated_at,omitempty"`
}

// rvJSON is a target's radial-velocity goal (planner.RVGoal), with the
// member names of the JSON target file's "rv" object.
type rvJSON struct {
	Model     string  `json:"model"`
	KKms      float64 `json:"k_kms"`
	SigmaVKms float64 `json:"sigma_kms"`
	WantRelK  float64 `json:"want_rel_k,omitempty"`
}

// ephemJSON is an ephemeris in the JSON API: T0 as written (every digit
// kept) with its form, time standard and convention.
type ephemJSON struct {
	T0            string  `json:"t0"`
	T0Form        string  `json:"t0_form,omitempty"`
	T0Standard    string  `json:"t0_standard"`
	T0Convention  string  `json:"t0_convention"`
	T0BJDTDB      string  `json:"t0_bjd_tdb,omitempty"` // output only
	T0ErrDays     float64 `json:"t0_err_days,omitempty"`
	PeriodDays    float64 `json:"period_days"`
	PeriodErrDays float64 `json:"period_err_days,omitempty"`
	CovT0Period   float64 `json:"cov_t0_period,omitempty"`
	Pdot          float64 `json:"pdot,omitempty"`
	PdotErr       float64 `json:"pdot_err,omitempty"`
	PhaseOffset   float64 `json:"phase_offset,omitempty"`
	Ecc           float64 `json:"ecc,omitempty"`
	OmegaDeg      float64 `json:"omega_deg,omitempty"`
	Source        string  `json:"source,omitempty"` // output only
}

// goalJSON is a phase goal: a phase or an event name.
type goalJSON struct {
	Phase          *float64 `json:"phase,omitempty"`
	Event          string   `json:"event,omitempty"`
	PhaseHalfWidth float64  `json:"phase_halfwidth"`
	ExposureS      float64  `json:"exposure_s"`
	OverheadS      float64  `json:"overhead_s"`
	NExposures     int      `json:"n_exposures,omitempty"`
	MinNights      int      `json:"min_nights,omitempty"`
	EclipseDurDays float64  `json:"eclipse_duration_days,omitempty"`
	SNR            float64  `json:"snr,omitempty"`       // wanted S/N per exposure (0: exposure_s as given)
	MaxSmear       float64  `json:"max_smear,omitempty"` // phase one S/N-sized exposure may span (0: 0.02)
}

// targetToJSON converts a stored target.
func targetToJSON(t store.StoredTarget) targetJSON {
	tg, r := t.Target, t.Ephemeris
	e := r.Ephem
	out := targetJSON{ID: t.ID, ListID: t.ListID, Version: t.Version, Name: tg.Name, RADeg: tg.RADeg, DecDeg: tg.DecDeg,
		PMRAmasyr: tg.PMRAmasyr, PMDecmasyr: tg.PMDecmasyr, Mag: tg.Mag, Band: tg.Band, FaintMag: tg.FaintMag,
		FaintPhase: tg.FaintPhase, BrightMag: tg.BrightMag, BrightPhase: tg.BrightPhase, Priority: tg.Priority, AcquireS: tg.AcquireS,
		Tags: tg.Tags, Notes: tg.Notes, Goals: []goalJSON{}, UpdatedAt: utcString(t.UpdatedAt),
		Ephemeris: ephemJSON{T0: r.T0.Text, T0Form: string(r.T0.Form), T0Standard: string(r.T0.Standard),
			T0Convention: string(e.Convention), T0BJDTDB: planner.FormatEpoch(e.T0, planner.FormJD, 10), T0ErrDays: e.T0ErrDays,
			PeriodDays: e.PeriodDays, PeriodErrDays: e.PeriodErr, CovT0Period: e.CovT0P, Pdot: e.Pdot, PdotErr: e.PdotErr,
			PhaseOffset: e.PhaseOffset, Ecc: e.Ecc, OmegaDeg: e.OmegaDeg, Source: string(r.Source)}}
	if g := tg.RV; g != nil {
		out.RV = &rvJSON{Model: string(g.Model), KKms: g.KKms, SigmaVKms: g.SigmaVKms, WantRelK: g.WantRelK}
	}
	for _, g := range tg.Goals {
		gj := goalJSON{Event: g.Event, PhaseHalfWidth: g.HalfWidth, ExposureS: g.ExposureS, OverheadS: g.OverheadS,
			NExposures: g.NExposures, MinNights: g.MinNights, EclipseDurDays: g.EclipseDurDays, SNR: g.SNR, MaxSmear: g.MaxSmear}
		if g.Event == "" {
			c := g.Center
			gj.Phase = &c
		}
		out.Goals = append(out.Goals, gj)
	}
	return out
}

// checkIdentity refuses a body whose "id" or "list_id" names another
// target or list than the request's: those members are output only (a
// GET's answer may be sent back as it is), and a target cannot be moved
// to another list or written under another id. targetID is 0 for a new
// target.
func (j targetJSON) checkIdentity(targetID, listID int64) error {
	if j.ID != 0 && j.ID != targetID {
		accepted := "no id (the server gives it)"
		if targetID != 0 {
			accepted = fmt.Sprintf("absent or %d, the id in the address", targetID)
		}
		return errInvalid(fmt.Sprintf("id: %d is not accepted; accepted: %s", j.ID, accepted))
	}
	if j.ListID != 0 && j.ListID != listID {
		return errInvalid(fmt.Sprintf("list_id: %d is not accepted; accepted: absent or %d, the target's own list (a target is not moved between lists)", j.ListID, listID))
	}
	return nil
}

// input converts an API target to the store's input. The epoch is read as
// written; bad T0 text is EINVALID naming the field.
func (j targetJSON) input() (store.TargetInput, error) {
	e := j.Ephemeris
	t0, err := store.ParseEpoch(e.T0, planner.TimeStandard(e.T0Standard), planner.EpochForm(e.T0Form))
	if err != nil {
		return store.TargetInput{}, invalidField("ephemeris.t0", e.T0, err)
	}
	tg := planner.Target{Name: j.Name, RADeg: j.RADeg, DecDeg: j.DecDeg, PMRAmasyr: j.PMRAmasyr, PMDecmasyr: j.PMDecmasyr, Mag: j.Mag,
		Band: j.Band, FaintMag: j.FaintMag, FaintPhase: j.FaintPhase, BrightMag: j.BrightMag, BrightPhase: j.BrightPhase,
		Priority: j.Priority, AcquireS: j.AcquireS, Tags: j.Tags, Notes: j.Notes,
		Ephem: planner.Ephemeris{T0ErrDays: e.T0ErrDays, PeriodDays: e.PeriodDays, PeriodErr: e.PeriodErrDays, CovT0P: e.CovT0Period,
			Pdot: e.Pdot, PdotErr: e.PdotErr, Convention: planner.Convention(e.T0Convention), PhaseOffset: e.PhaseOffset, Ecc: e.Ecc, OmegaDeg: e.OmegaDeg}}
	for i, g := range j.Goals {
		if (g.Phase == nil) == (g.Event == "") {
			return store.TargetInput{}, &codedError{code: codeInvalid, msg: fmt.Sprintf("goals[%d]: give exactly one of phase and event", i)}
		}
		pg := planner.Goal{Event: g.Event, HalfWidth: g.PhaseHalfWidth, ExposureS: g.ExposureS, OverheadS: g.OverheadS,
			NExposures: g.NExposures, MinNights: g.MinNights, EclipseDurDays: g.EclipseDurDays, SNR: g.SNR, MaxSmear: g.MaxSmear}
		if g.Phase != nil {
			pg.Center = *g.Phase
		}
		tg.Goals = append(tg.Goals, pg)
	}
	if r := j.RV; r != nil {
		tg.RV = &planner.RVGoal{Model: planner.RVModel(r.Model), KKms: r.KKms, SigmaVKms: r.SigmaVKms, WantRelK: r.WantRelK}
	}
	return store.TargetInput{Target: tg, T0: t0, EphemNote: j.EphemNote}, nil
}

// invalidField is EINVALID for one field of a JSON body. The value is
// echoed clipped to planner.MaxShownValue characters, so that a huge value
// does not come back whole in the error.
func invalidField(field, value string, err error) error {
	msg := planner.ClipValue(err.Error())
	var ie *planner.InputError
	if errors.As(err, &ie) {
		msg = ie.Accepted
	}
	return &codedError{code: codeInvalid, msg: fmt.Sprintf("%s: %q is not accepted; accepted: %s", field, planner.ClipValue(value), strings.TrimSpace(msg))}
}

package planner

// PrecisionDoc is one target's predicted precision as the documents of a
// run (the CLI's `run --json`, the web's saved run and its API) carry it.
// Undetermined errors are 0 with "determined": false, never NaN.
type PrecisionDoc struct {
	Target   string             `json:"target"`
	Priority int                `json:"priority"`
	RV       *RVForecastDoc     `json:"rv,omitempty"`
	Timing   *TimingForecastDoc `json:"timing,omitempty"`
	// TimingNote says why measured timings gave no forecast.
	TimingNote string `json:"timing_note,omitempty"`
}

// RVForecastDoc is RVForecast in a document; km/s and cycles.
type RVForecastDoc struct {
	Model      RVModel          `json:"model"`
	KKms       float64          `json:"k_kms"`
	SigmaVKms  float64          `json:"sigma_v_kms"`
	WantRelK   float64          `json:"want_rel_k"`
	PhaseSigma float64          `json:"phase_prior_sigma"`
	Now        RVPrecisionDoc   `json:"now"`
	After      RVPrecisionDoc   `json:"after_plan"`
	PerNight   []RVPrecisionDoc `json:"after_night"`
	// NeedNow and NeedAfter are null without a wanted precision or when
	// MaxExposuresNeeded exposures would not reach it.
	NeedNow   *int `json:"exposures_needed_now"`
	NeedAfter *int `json:"exposures_needed_after_plan"`
}

// RVPrecisionDoc is RVPrecision in a document.
type RVPrecisionDoc struct {
	N           int     `json:"n_exposures"`
	Determined  bool    `json:"determined"`
	SigmaK      float64 `json:"sigma_k_kms"`
	SigmaGamma  float64 `json:"sigma_gamma_kms"`
	SigmaPhase0 float64 `json:"sigma_phase0"`
	RelK        float64 `json:"rel_k"`
}

// TimingForecastDoc is TimingForecast in a document; days.
type TimingForecastDoc struct {
	Planned   int                  `json:"planned_timings"`
	ErrDays   float64              `json:"timing_err_days"`
	Quadratic bool                 `json:"quadratic"`
	Now       TimingPrecisionDoc   `json:"now"`
	After     TimingPrecisionDoc   `json:"after_plan"`
	PerNight  []TimingPrecisionDoc `json:"after_night"`
}

// TimingPrecisionDoc is TimingPrecision in a document.
type TimingPrecisionDoc struct {
	N           int     `json:"n_timings"`
	Source      string  `json:"source"`
	SigmaT0Days float64 `json:"sigma_t0_days"`
	SigmaPDays  float64 `json:"sigma_p_days"`
	SigmaPdot   float64 `json:"sigma_pdot"`
	RelP        float64 `json:"rel_p"`
}

// NewPrecisionDocs converts forecasts for a document.
func NewPrecisionDocs(tps []TargetPrecision) []PrecisionDoc {
	out := make([]PrecisionDoc, 0, len(tps))
	rv := func(p RVPrecision) RVPrecisionDoc {
		return RVPrecisionDoc{N: p.N, Determined: p.Determined, SigmaK: p.SigmaK, SigmaGamma: p.SigmaGamma, SigmaPhase0: p.SigmaPhase0, RelK: p.RelK}
	}
	tm := func(p TimingPrecision) TimingPrecisionDoc {
		return TimingPrecisionDoc{N: p.N, Source: p.Source, SigmaT0Days: p.SigmaT0Days, SigmaPDays: p.SigmaPDays, SigmaPdot: p.SigmaPdot, RelP: p.RelP}
	}
	for _, tp := range tps {
		d := PrecisionDoc{Target: tp.Target, Priority: tp.Priority, TimingNote: tp.TimingNote}
		if f := tp.RV; f != nil {
			r := &RVForecastDoc{Model: f.Goal.Model, KKms: f.Goal.KKms, SigmaVKms: f.Goal.SigmaVKms, WantRelK: f.Goal.WantRelK,
				PhaseSigma: f.PhaseSigma, Now: rv(f.Now), After: rv(f.After), PerNight: []RVPrecisionDoc{}}
			for _, p := range f.PerNight {
				r.PerNight = append(r.PerNight, rv(p))
			}
			if f.NeedOK {
				a, b := f.NeedNow, f.NeedAfter
				r.NeedNow, r.NeedAfter = &a, &b
			}
			d.RV = r
		}
		if f := tp.Timing; f != nil {
			r := &TimingForecastDoc{Planned: f.Planned, ErrDays: f.ErrDays, Quadratic: f.Quadratic, Now: tm(f.Now), After: tm(f.After),
				PerNight: []TimingPrecisionDoc{}}
			for _, p := range f.PerNight {
				r.PerNight = append(r.PerNight, tm(p))
			}
			d.Timing = r
		}
		out = append(out, d)
	}
	return out
}

package export

import (
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"phasecast/planner"
)

// PlanDoc is the JSON document of one planned night, shared by
// `phasecast plan --json`, the night page's JSON export and
// GET /api/v1/night. Night is the object `phasecast night --json` prints,
// Blocks the exposure blocks in time order, Unscheduled every goal without a
// block and why (these three keys are the contract of the plan command; the
// others are extras that may grow but never lose a key).
type PlanDoc struct {
	Night       NightDoc         `json:"night"`
	Blocks      []BlockDoc       `json:"blocks"`
	Unscheduled []UnscheduledDoc `json:"unscheduled"`
	Warnings    []WarningDoc     `json:"warnings"`
	Dark        []IntervalDoc    `json:"dark"`
	Visibility  []VisibilityDoc  `json:"visibility"`
	Constraints ConstraintsDoc   `json:"constraints"`
	Objective   ObjectiveDoc     `json:"objective"`
	// Replan, present only for a night planned again from an instant
	// (planner.ReplanNight), says from when and what was already done.
	Replan  *ReplanDoc `json:"replan,omitempty"`
	Caution string     `json:"caution"`
}

// ReplanDoc is the part of a replanned night's document that says what was
// kept: the instant nothing new starts before, the exposures already taken
// (mid-time, length, failed or not) and each goal's exposures done, wanted
// (0 = as many as fit) and still wanted.
type ReplanDoc struct {
	Start  DocTime         `json:"start"`
	Done   []DoneDoc       `json:"done"`
	Served []GoalServedDoc `json:"served"`
}

// DoneDoc is one exposure already taken.
type DoneDoc struct {
	Target    string  `json:"target"`
	Mid       DocTime `json:"mid"`
	ExposureS float64 `json:"exposure_s"`
	Failed    bool    `json:"failed"`
}

// GoalServedDoc is one goal's standing before the replan.
type GoalServedDoc struct {
	Target    string  `json:"target"`
	PhaseGoal float64 `json:"phase_goal"`
	Done      int     `json:"done"`
	Wanted    int     `json:"wanted"`
	Remaining int     `json:"remaining"`
	Served    bool    `json:"served"`
}

// NewReplanDoc is the Replan part of a replanned night's document
// (planner.ReplanNight): set it on the PlanDoc of rp.Plan.
func NewReplanDoc(rp *planner.Replan) *ReplanDoc {
	r := &ReplanDoc{Start: DocTime(rp.Start), Done: []DoneDoc{}, Served: []GoalServedDoc{}}
	for _, e := range rp.Done {
		r.Done = append(r.Done, DoneDoc{Target: e.Target, Mid: DocTime(e.Mid), ExposureS: e.ExposureS, Failed: e.Failed})
	}
	for _, gs := range rp.Served {
		r.Served = append(r.Served, GoalServedDoc{Target: gs.Target, PhaseGoal: gs.Goal.Center, Done: gs.Done, Wanted: gs.Wanted,
			Remaining: gs.Remaining, Served: gs.Done > 0 && gs.Remaining == 0})
	}
	return r
}

// NightDoc is a night's Sun and Moon events (the `night --json` object):
// instants in RFC 3339 UTC to the nearest second, null for an event that
// does not happen between local noon and the next local noon;
// MoonIlluminated is the Moon's illuminated fraction 0..1 at local midnight.
type NightDoc struct {
	Sunset           *DocSecond `json:"sunset"`
	CivilDusk        *DocSecond `json:"civil_dusk"`
	NauticalDusk     *DocSecond `json:"nautical_dusk"`
	AstronomicalDusk *DocSecond `json:"astronomical_dusk"`
	AstronomicalDawn *DocSecond `json:"astronomical_dawn"`
	NauticalDawn     *DocSecond `json:"nautical_dawn"`
	CivilDawn        *DocSecond `json:"civil_dawn"`
	Sunrise          *DocSecond `json:"sunrise"`
	Moonrise         *DocSecond `json:"moonrise"`
	Moonset          *DocSecond `json:"moonset"`
	MoonIlluminated  float64    `json:"moon_illuminated"`
}

// BlockDoc is one exposure block with every figure. Start and End are UTC
// (fractions of a second only when the exposure setup makes them);
// End − Start = NExposures × (ExposureS + OverheadS). Phases are 0..1 at the
// instants named; PhaseGoal and PhaseHalfWidth are null for a filler.
// Event names the goal's orbital event when it has one (omitted otherwise).
type BlockDoc struct {
	Target         string   `json:"target"`
	PhaseGoal      *float64 `json:"phase_goal"`
	Event          string   `json:"event,omitempty"`
	Start          DocTime  `json:"start"`
	End            DocTime  `json:"end"`
	NExposures     int      `json:"n_exposures"`
	ExposureS      float64  `json:"exposure_s"`
	OverheadS      float64  `json:"overhead_s"`
	PhaseStart     float64  `json:"phase_start"`
	PhaseEnd       float64  `json:"phase_end"`
	AirmassMax     float64  `json:"airmass_max"`
	AirmassMin     float64  `json:"airmass_min"`
	PhaseMid       float64  `json:"phase_mid"`
	PhaseFirstMid  float64  `json:"phase_first_exposure_mid"`
	PhaseLastMid   float64  `json:"phase_last_exposure_mid"`
	PhaseHalfWidth *float64 `json:"phase_halfwidth"`
	Smear          float64  `json:"smear"`
	PhaseErr       float64  `json:"phase_err"`
	Cycle          int64    `json:"cycle"`
	AcquireS       float64  `json:"acquire_s"`
	MoonSepDeg     float64  `json:"moon_sep_deg"`
	MoonUp         bool     `json:"moon_up"`
	ParallacticDeg float64  `json:"parallactic_deg"`
	HourAngleHours float64  `json:"hour_angle_hours"`
	SunAltStartDeg float64  `json:"sun_alt_start_deg"`
	Priority       int      `json:"priority"`
	Filler         bool     `json:"filler"`
	Warnings       []string `json:"warnings"`
	// SNR is the S/N per exposure at the block's middle and SkyMag the sky
	// brightness used there, mag/arcsec² in the target's band; both omitted
	// without an instrument or a target band. SizedBySNR is true when the
	// exposure was sized for the goal's S/N.
	SNR        *float64 `json:"snr,omitempty"`
	SkyMag     *float64 `json:"sky_mag_arcsec2,omitempty"`
	SizedBySNR bool     `json:"sized_by_snr,omitempty"`
}

// UnscheduledDoc is a goal left without a block: Reason is the sentence,
// Code the UnscheduledReason.
type UnscheduledDoc struct {
	Target    string  `json:"target"`
	PhaseGoal float64 `json:"phase_goal"`
	Reason    string  `json:"reason"`
	Code      string  `json:"reason_code"`
}

// WarningDoc is one warning of the plan; Target is omitted for the whole
// plan, PhaseGoal when the warning is about no single goal.
type WarningDoc struct {
	Code      string   `json:"code"`
	Target    string   `json:"target,omitempty"`
	PhaseGoal *float64 `json:"phase_goal,omitempty"`
	Message   string   `json:"message"`
}

// IntervalDoc is a span of time, UTC.
type IntervalDoc struct {
	Start DocTime `json:"start"`
	End   DocTime `json:"end"`
}

// GapDoc is a span in which a target cannot be observed, with the reasons.
type GapDoc struct {
	Start   DocTime  `json:"start"`
	End     DocTime  `json:"end"`
	Reasons []string `json:"reasons"`
}

// VisibilityDoc is when one target can be observed and the gaps between.
type VisibilityDoc struct {
	Target    string        `json:"target"`
	Intervals []IntervalDoc `json:"intervals"`
	Gaps      []GapDoc      `json:"gaps"`
}

// ConstraintsDoc is the limits a plan obeyed: angles in degrees, hour angles
// in hours (null when not limited), HorizonPoints the size of the horizon
// mask, AcquireS the acquisition overhead per visit in seconds (see
// NewConstraintsDoc).
type ConstraintsDoc struct {
	Twilight      string   `json:"twilight"`
	SunAltMaxDeg  float64  `json:"sun_alt_max_deg"`
	MaxAirmass    float64  `json:"max_airmass"`
	MinAltDeg     float64  `json:"min_alt_deg"`
	MinMoonSepDeg float64  `json:"min_moon_sep_deg"`
	MaxMoonIllum  float64  `json:"max_moon_illum"`
	HAMinHours    *float64 `json:"ha_min_hours"`
	HAMaxHours    *float64 `json:"ha_max_hours"`
	ZenithExclDeg float64  `json:"zenith_excl_deg"`
	SunAvoidDeg   float64  `json:"sun_avoid_deg"`
	HorizonPoints int      `json:"horizon_points"`
	AcquireS      float64  `json:"acquire_s"`
}

// ObjectiveDoc is the schedule's value (planner.Plan.Value), the greedy baseline's,
// whether the optimum was proven, and the size of the search.
type ObjectiveDoc struct {
	Value       int64 `json:"value"`
	GreedyValue int64 `json:"greedy_value"`
	Optimal     bool  `json:"optimal"`
	Candidates  int   `json:"candidates"`
	Rounds      int   `json:"rounds"`
	States      int   `json:"states"`
}

// DocTime is an instant written in RFC 3339 UTC, with the fraction of a
// second only when there is one (to the microsecond).
type DocTime time.Time

// String writes t as RFC 3339 UTC.
func (t DocTime) String() string {
	return time.Time(t).UTC().Format("2006-01-02T15:04:05.999999Z07:00")
}

// MarshalJSON writes t as an RFC 3339 UTC string.
func (t DocTime) MarshalJSON() ([]byte, error) { return json.Marshal(t.String()) }

// UnmarshalJSON reads an RFC 3339 string (any offset; kept as UTC).
func (t *DocTime) UnmarshalJSON(b []byte) error {
	u, err := parseDocTime(b)
	if err != nil {
		return err
	}
	*t = DocTime(u)
	return nil
}

// DocSecond is an instant written in RFC 3339 UTC rounded to the nearest
// second; a nil *DocSecond marshals as null.
type DocSecond time.Time

// String writes t as RFC 3339 UTC to the nearest second.
func (t DocSecond) String() string {
	return time.Time(t).UTC().Round(time.Second).Format("2006-01-02T15:04:05Z")
}

// MarshalJSON writes t as an RFC 3339 UTC string to the second.
func (t DocSecond) MarshalJSON() ([]byte, error) { return json.Marshal(t.String()) }

// UnmarshalJSON reads an RFC 3339 string (any offset; kept as UTC).
func (t *DocSecond) UnmarshalJSON(b []byte) error {
	u, err := parseDocTime(b)
	if err != nil {
		return err
	}
	*t = DocSecond(u)
	return nil
}

func parseDocTime(b []byte) (time.Time, error) {
	var s string
	if err := json.Unmarshal(b, &s); err != nil {
		return time.Time{}, fmt.Errorf("time %s: not a JSON string; want RFC 3339", planner.ClipValue(string(b)))
	}
	u, err := planner.ParseTimeLayout(time.RFC3339Nano, s)
	if errors.Is(err, planner.ErrNotLeapSecond) {
		return time.Time{}, fmt.Errorf("time %q: %w", planner.ClipValue(s), err)
	}
	if err != nil {
		return time.Time{}, fmt.Errorf("time %q: not RFC 3339 (e.g. 2026-12-01T23:18:56Z)", planner.ClipValue(s))
	}
	return u.UTC(), nil
}

// optSecond is t as a *DocSecond, nil for nil.
func optSecond(t *time.Time) *DocSecond {
	if t == nil {
		return nil
	}
	u := DocSecond(*t)
	return &u
}

// NewNightDoc is the document of a night's events.
func NewNightDoc(ev planner.NightEvents) NightDoc {
	return NightDoc{
		Sunset: optSecond(ev.Sunset), CivilDusk: optSecond(ev.CivilDusk),
		NauticalDusk: optSecond(ev.NauticalDusk), AstronomicalDusk: optSecond(ev.AstronomicalDusk),
		AstronomicalDawn: optSecond(ev.AstronomicalDawn), NauticalDawn: optSecond(ev.NauticalDawn),
		CivilDawn: optSecond(ev.CivilDawn), Sunrise: optSecond(ev.Sunrise),
		Moonrise: optSecond(ev.Moonrise), Moonset: optSecond(ev.Moonset),
		MoonIlluminated: ev.MoonIlluminated,
	}
}

// NewBlockDoc is the document of one block, with every figure.
func NewBlockDoc(b planner.Block) BlockDoc {
	bd := BlockDoc{
		Target: b.Target, Event: b.Goal.Event, Start: DocTime(b.Start), End: DocTime(b.End), NExposures: b.N,
		ExposureS: b.ExposureS, OverheadS: b.OverheadS, PhaseStart: b.PhaseStart, PhaseEnd: b.PhaseEnd,
		AirmassMax: b.AirmassMax, AirmassMin: b.AirmassMin, PhaseMid: b.PhaseMid,
		PhaseFirstMid: b.PhaseFirstMid, PhaseLastMid: b.PhaseLastMid, Smear: b.Smear, PhaseErr: b.PhaseErr,
		Cycle: b.Cycle, AcquireS: b.AcquireS, MoonSepDeg: b.MoonSepDeg, MoonUp: b.MoonUp,
		ParallacticDeg: b.Parallactic, HourAngleHours: b.HourAngle, SunAltStartDeg: b.SunAltStart,
		Priority: b.Priority, Filler: b.Filler, Warnings: []string{},
	}
	if b.SNROK {
		snr, sky := b.SNR, b.SkyMag
		bd.SNR, bd.SkyMag = &snr, &sky
	}
	bd.SizedBySNR = b.SizedBySNR
	if b.Filler {
		bd.Event = ""
	} else {
		c, w := b.Goal.Center, b.Goal.HalfWidth
		bd.PhaseGoal, bd.PhaseHalfWidth = &c, &w
	}
	for _, w := range b.Warnings {
		bd.Warnings = append(bd.Warnings, w.Message)
	}
	return bd
}

// NewUnscheduledDoc is the document of a goal left out.
func NewUnscheduledDoc(u planner.Unscheduled) UnscheduledDoc {
	return UnscheduledDoc{Target: u.Target, PhaseGoal: u.Goal.Center, Reason: u.Detail, Code: string(u.Reason)}
}

// NewConstraintsDoc is the document of resolved constraints c; acquireS is
// the acquisition overhead per visit in seconds the caller applied to every
// target (each block carries its own in BlockDoc.AcquireS).
func NewConstraintsDoc(c planner.Constraints, acquireS float64) ConstraintsDoc {
	d := ConstraintsDoc{Twilight: string(c.Twilight), SunAltMaxDeg: c.SunAltMaxDeg, MaxAirmass: c.MaxAirmass,
		MinAltDeg: c.MinAltDeg, MinMoonSepDeg: c.MinMoonSepDeg, MaxMoonIllum: c.MaxMoonIllum, ZenithExclDeg: c.ZenithExclDeg,
		SunAvoidDeg: c.SunAvoidDeg, HorizonPoints: len(c.Horizon), AcquireS: acquireS}
	if c.HAMinHours != 0 || c.HAMaxHours != 0 {
		lo, hi := c.HAMinHours, c.HAMaxHours
		d.HAMinHours, d.HAMaxHours = &lo, &hi
	}
	return d
}

// NewPlanDoc is the document of plan p, whose night has events ev;
// acquireS is as for NewConstraintsDoc. Repeated warnings (same code, target
// and message) are given once; a warning about one goal carries its centre.
// Caution is the package's Caution.
func NewPlanDoc(p *planner.Plan, ev planner.NightEvents, acquireS float64) PlanDoc {
	d := PlanDoc{
		Night:       NewNightDoc(ev),
		Blocks:      []BlockDoc{},
		Unscheduled: []UnscheduledDoc{},
		Warnings:    []WarningDoc{},
		Dark:        []IntervalDoc{},
		Visibility:  []VisibilityDoc{},
		Constraints: NewConstraintsDoc(p.Constraints, acquireS),
		Objective: ObjectiveDoc{Value: p.Value, GreedyValue: p.GreedyValue, Optimal: p.Optimal,
			Candidates: p.Candidates, Rounds: p.Rounds, States: p.States},
		Caution: Caution,
	}
	for _, dk := range p.Dark {
		d.Dark = append(d.Dark, IntervalDoc{DocTime(dk.Start), DocTime(dk.End)})
	}
	for _, b := range p.Blocks {
		d.Blocks = append(d.Blocks, NewBlockDoc(b))
	}
	for _, u := range p.Unscheduled {
		d.Unscheduled = append(d.Unscheduled, NewUnscheduledDoc(u))
	}
	type goalKey struct {
		target string
		goal   int
	}
	centers := map[goalKey]float64{}
	for _, b := range p.Blocks {
		if !b.Filler {
			centers[goalKey{b.Target, b.GoalIndex}] = b.Goal.Center
		}
	}
	for _, u := range p.Unscheduled {
		centers[goalKey{u.Target, u.GoalIndex}] = u.Goal.Center
	}
	seen := map[string]bool{}
	for _, w := range p.Warnings {
		k := string(w.Code) + "\x00" + w.Target + "\x00" + w.Message
		if seen[k] {
			continue
		}
		seen[k] = true
		wd := WarningDoc{Code: string(w.Code), Target: w.Target, Message: w.Message}
		if c, ok := centers[goalKey{w.Target, w.GoalIndex}]; ok && w.Target != "" {
			wd.PhaseGoal = &c
		}
		d.Warnings = append(d.Warnings, wd)
	}
	for _, v := range p.Visibility {
		vd := VisibilityDoc{Target: v.Target, Intervals: []IntervalDoc{}, Gaps: []GapDoc{}}
		for _, iv := range v.Intervals {
			vd.Intervals = append(vd.Intervals, IntervalDoc{DocTime(iv.Start), DocTime(iv.End)})
		}
		for _, g := range v.Gaps {
			gd := GapDoc{Start: DocTime(g.Start), End: DocTime(g.End)}
			for _, r := range g.Reasons {
				gd.Reasons = append(gd.Reasons, string(r))
			}
			vd.Gaps = append(vd.Gaps, gd)
		}
		d.Visibility = append(d.Visibility, vd)
	}
	return d
}

// UnmarshalJSON reads a warning, or a bare message (the saved run plans
// of earlier versions gave a night's warnings as messages only).
func (w *WarningDoc) UnmarshalJSON(b []byte) error {
	var msg string
	if json.Unmarshal(b, &msg) == nil {
		*w = WarningDoc{Message: msg}
		return nil
	}
	type plain WarningDoc
	return json.Unmarshal(b, (*plain)(w))
}

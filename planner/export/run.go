package export

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"time"

	"phasecast/planner"
)

// Run is the document of a planned run of nights, written by `phasecast
// run --json`, the run page's JSON download and the saved plans of the web
// (GET /api/v1/runs/{id}/plan): the run's name (omitted when it has none),
// the site, the IANA zone of local dates, how many nights were over, every
// night with its events and blocks, every target's coverage and best
// nights, the objective, the limits, the observed exposures.
type Run struct {
	Run         string         `json:"run,omitempty"`
	Site        Site           `json:"site"`
	Zone        string         `json:"zone"`
	Past        int            `json:"past_nights"`
	Nights      []RunNight     `json:"nights"`
	Targets     []RunTarget    `json:"targets"`
	Objective   RunObjective   `json:"objective"`
	Constraints ConstraintsDoc `json:"constraints"`
	Observed    []RunObserved  `json:"observed"`
	// Precision is the predicted precision of the targets with an RV goal
	// or measured timings (planner.RunPlan.Precision).
	Precision []planner.PrecisionDoc `json:"precision"`
	Caution   string                 `json:"caution"`
}

// RunNight is one night of a run: its local date and part (full, first,
// second), planning window (UTC), whether it was over, its Sun and Moon
// events and dark time, and (for nights still to come) its blocks,
// unscheduled goals and warnings as in the night document.
type RunNight struct {
	Date        string           `json:"date"`
	Part        string           `json:"part"`
	From        DocTime          `json:"from"`
	To          DocTime          `json:"to"`
	Past        bool             `json:"past"`
	Night       NightDoc         `json:"night"`
	Dark        []IntervalDoc    `json:"dark"`
	Blocks      []RunBlock       `json:"blocks"`
	Unscheduled []UnscheduledDoc `json:"unscheduled"`
	Warnings    []WarningDoc     `json:"warnings"`
}

// RunBlock is a block of a run night; TargetID is the target's id: its
// id in the web's database, in `phasecast run` its row in the targets
// file (from 1); omitted when the caller gives none.
type RunBlock struct {
	BlockDoc
	TargetID int64 `json:"target_id,omitempty"`
}

// RunTarget is one target's coverage over the run: its goals, phase bins
// (when asked for), the phases of its planned and observed exposures, for
// each night the number of its goals the night can reach, and its best
// nights, best first.
type RunTarget struct {
	TargetID   int64        `json:"target_id,omitempty"`
	Target     string       `json:"target"`
	Priority   int          `json:"priority"`
	Goals      []RunGoal    `json:"goals"`
	Bins       []RunBin     `json:"bins,omitempty"`
	Planned    []float64    `json:"planned_phases"`
	Observed   []float64    `json:"observed_phases"`
	ReachGoals []int        `json:"reach_goals"`
	BestNights []RunRanking `json:"best_nights"`
}

// RunGoal is one goal's coverage: the exposures it wants per night and on
// how many nights, what was observed and planned in its window (in total
// and per night), on how many nights it is met, its status (met, partial,
// none, unreachable), its value in the objective, and the nights on which
// it can be reached, best first (Unreachable says why there are none).
type RunGoal struct {
	PhaseGoal       float64         `json:"phase_goal"`
	PhaseHalfWidth  float64         `json:"phase_halfwidth"`
	Event           string          `json:"event,omitempty"`
	NeedExposures   int             `json:"need_exposures"`
	NeedNights      int             `json:"need_nights"`
	Observed        int             `json:"observed"`
	Planned         int             `json:"planned"`
	PerNight        []RunNightCount `json:"per_night"`
	NightsMet       int             `json:"nights_met"`
	Status          string          `json:"status"`
	Value           float64         `json:"value"`
	ReachableNights int             `json:"reachable_nights"`
	Nights          []RunGoalNight  `json:"nights"`
	Unreachable     string          `json:"unreachable,omitempty"`
	// Shortfall says in numbers why a goal not met falls short
	// (planner.GoalCoverage.Shortfall).
	Shortfall string `json:"shortfall,omitempty"`
}

// RunNightCount is a goal's exposures on one night.
type RunNightCount struct {
	Observed int `json:"observed"`
	Planned  int `json:"planned"`
}

// RunGoalNight is a night on which a goal can be reached: its windows
// (UTC), how long they last in minutes, the most exposures one block can
// hold, the airmass range over the windows and the 1σ phase uncertainty.
type RunGoalNight struct {
	Date        string        `json:"date"`
	Capacity    int           `json:"capacity"`
	DurationMin float64       `json:"duration_min"`
	AirmassMin  float64       `json:"airmass_min"`
	AirmassMax  float64       `json:"airmass_max"`
	PhaseErr    float64       `json:"phase_err"`
	Windows     []IntervalDoc `json:"windows"`
}

// RunRanking is one of a target's best nights: how many of its goals the
// night reaches, the fraction of its goals' need it can hold, and the
// lowest airmass.
type RunRanking struct {
	Date       string  `json:"date"`
	Goals      int     `json:"goals"`
	Fraction   float64 `json:"fraction"`
	AirmassMin float64 `json:"airmass_min"`
}

// UnmarshalJSON reads a ranking entry, or a bare date (the saved plans of
// earlier versions listed best nights as dates only).
func (r *RunRanking) UnmarshalJSON(b []byte) error {
	var date string
	if json.Unmarshal(b, &date) == nil {
		*r = RunRanking{Date: date}
		return nil
	}
	type plain RunRanking
	return json.Unmarshal(b, (*plain)(r))
}

// RunBin is a phase bin's exposures (observed, planned) and on how many
// nights it got one.
type RunBin struct {
	Lo       float64 `json:"phase_lo"`
	Hi       float64 `json:"phase_hi"`
	Observed int     `json:"observed"`
	Planned  int     `json:"planned"`
	Nights   int     `json:"nights"`
}

// RunObjective is the run objective J (planner.RunPlan), as a fraction of
// what meeting every requirement exactly is worth (RequiredValue; above 1
// with coverage beyond the requirements, which does not mean every
// requirement is met), the largest J the run's nights allow (MaxValue,
// never below Value), and the raw values in millionths; IndependentValue
// (each night planned on its own) is null when it was not computed.
type RunObjective struct {
	Fraction         float64  `json:"fraction"`
	Value            int64    `json:"value"`
	RequiredValue    int64    `json:"required_value"`
	MaxValue         int64    `json:"max_value"`
	GreedyValue      int64    `json:"greedy_value"`
	IndependentValue *int64   `json:"independent_value"`
	IndependentFrac  *float64 `json:"independent_fraction"`
	Rounds           int      `json:"rounds"`
	Solves           int      `json:"solves"`
}

// RunObserved is one observed exposure: its mid-time (UTC), the phase
// there, and whether it failed (then it counts for nothing).
type RunObserved struct {
	Target    string  `json:"target"`
	Night     string  `json:"date"`
	Mid       DocTime `json:"mid"`
	ExposureS float64 `json:"exposure_s"`
	Phase     float64 `json:"phase"`
	Failed    bool    `json:"failed"`
}

// RunInput is what the run document says besides the plan: the run's name
// (may be empty), the site, its zone, the acquisition overhead the
// constraints show (as for NewConstraintsDoc), the callers' ids of the
// request's targets, by index (see RunBlock; nil when there are none), and
// the targets' measured timings for the predicted precision.
type RunInput struct {
	Name      string
	Site      Site
	Loc       *time.Location
	AcquireS  float64
	TargetIDs []int64
	// Timings are the measured timings of the targets' reference events
	// (BJD_TDB), by target name, for the timing precision (nil: none).
	Timings map[string][]planner.EphemTiming
}

// nightDate is a run night's local date, YYYY-MM-DD.
func nightDate(n planner.RunNight) string {
	return fmt.Sprintf("%04d-%02d-%02d", n.Year, int(n.Month), n.Day)
}

// NewRun is the document of the run plan rp, with the predicted precision
// of its targets (planner.RunPlan.Precision with in.Timings); the error is
// the request's constraints' (planner.Constraints.Resolved) or an RV goal's
// that does not fit its target's ephemeris.
func NewRun(in RunInput, rp *planner.RunPlan) (Run, error) {
	id := func(ti int) int64 {
		if ti < len(in.TargetIDs) {
			return in.TargetIDs[ti]
		}
		return 0
	}
	rc, err := rp.Request.Constraints.Resolved()
	if err != nil {
		return Run{}, err
	}
	d := Run{Run: in.Name, Site: in.Site, Zone: in.Loc.String(), Past: rp.Request.Past, Nights: []RunNight{}, Targets: []RunTarget{},
		Constraints: NewConstraintsDoc(rc, in.AcquireS), Observed: []RunObserved{}, Caution: Caution}
	for _, np := range rp.Nights {
		nt := np.Night
		ev := planner.NightEventsOn(rp.Request.Site, nt.Year, nt.Month, nt.Day, in.Loc)
		nd := RunNight{Date: nightDate(nt), Part: string(nt.Part), From: DocTime(np.From), To: DocTime(np.To), Past: np.Past,
			Night: NewNightDoc(ev), Dark: []IntervalDoc{}, Blocks: []RunBlock{}, Unscheduled: []UnscheduledDoc{}, Warnings: []WarningDoc{}}
		if nd.Part == "" {
			nd.Part = string(planner.PartFull)
		}
		if np.Plan != nil {
			pd := NewPlanDoc(np.Plan, ev, in.AcquireS)
			nd.Dark, nd.Unscheduled, nd.Warnings = pd.Dark, pd.Unscheduled, pd.Warnings
			for i, b := range pd.Blocks {
				nd.Blocks = append(nd.Blocks, RunBlock{BlockDoc: b, TargetID: id(np.Plan.Blocks[i].TargetIndex)})
			}
			d.Constraints = pd.Constraints
		}
		d.Nights = append(d.Nights, nd)
	}
	for ti, tc := range rp.Coverage {
		td := RunTarget{TargetID: id(tc.TargetIndex), Target: tc.Target, Priority: tc.Priority, Goals: []RunGoal{}, Planned: []float64{},
			Observed: []float64{}, ReachGoals: make([]int, len(rp.Nights)), BestNights: []RunRanking{}}
		for _, g := range tc.Goals {
			gd := RunGoal{PhaseGoal: g.Goal.Center, PhaseHalfWidth: g.Goal.HalfWidth, Event: g.Goal.Event, NeedExposures: g.NeedExposures,
				NeedNights: g.NeedNights, Observed: g.Observed, Planned: g.Planned, PerNight: []RunNightCount{}, NightsMet: g.NightsMet,
				Status: string(g.Status), Value: g.Value, ReachableNights: g.ReachableNights, Nights: []RunGoalNight{}, Shortfall: g.Shortfall}
			for _, pn := range g.PerNight {
				gd.PerNight = append(gd.PerNight, RunNightCount{pn.Observed, pn.Planned})
			}
			td.Goals = append(td.Goals, gd)
		}
		for _, b := range tc.Bins {
			td.Bins = append(td.Bins, RunBin{Lo: b.Lo, Hi: b.Hi, Observed: b.Observed, Planned: b.Planned, Nights: b.Nights})
		}
		if ti < len(rp.Reach) {
			r := rp.Reach[ti]
			for gi, g := range r.Goals {
				if gi >= len(td.Goals) {
					continue
				}
				td.Goals[gi].Unreachable = g.Unreachable
				for _, gn := range g.Nights {
					gd := RunGoalNight{Date: rp.Nights[gn.Night].Night.String(), Capacity: gn.Capacity, DurationMin: gn.Duration.Minutes(),
						AirmassMin: gn.AirmassMin, AirmassMax: gn.AirmassMax, PhaseErr: gn.PhaseErr, Windows: []IntervalDoc{}}
					for _, w := range gn.Windows {
						gd.Windows = append(gd.Windows, IntervalDoc{Start: DocTime(w.Start), End: DocTime(w.End)})
					}
					td.Goals[gi].Nights = append(td.Goals[gi].Nights, gd)
					if gn.Night < len(td.ReachGoals) && gn.Capacity > 0 {
						td.ReachGoals[gn.Night]++
					}
				}
			}
			for _, rk := range r.Ranking {
				td.BestNights = append(td.BestNights, RunRanking{Date: rp.Nights[rk.Night].Night.String(), Goals: rk.Goals, Fraction: rk.Fraction,
					AirmassMin: rk.AirmassMin})
			}
		}
		d.Targets = append(d.Targets, td)
	}
	for _, e := range rp.Exposures {
		if !e.Planned {
			d.Observed = append(d.Observed, RunObserved{Target: e.Target, Night: rp.Nights[e.Night].Night.String(), Mid: DocTime(e.Mid),
				ExposureS: e.ExposureS, Phase: e.Phase, Failed: e.Failed})
		}
		if e.TargetIndex >= len(d.Targets) || e.Failed {
			continue
		}
		td := &d.Targets[e.TargetIndex]
		if e.Planned {
			td.Planned = append(td.Planned, e.Phase)
		} else {
			td.Observed = append(td.Observed, e.Phase)
		}
	}
	o := RunObjective{Value: rp.Value, RequiredValue: rp.RequiredValue, MaxValue: rp.MaxValue, GreedyValue: rp.GreedyValue,
		Rounds: rp.Rounds, Solves: rp.Solves}
	if rp.RequiredValue > 0 {
		o.Fraction = float64(rp.Value) / float64(rp.RequiredValue)
	}
	if rp.Request.CompareIndependent {
		v := rp.IndependentValue
		o.IndependentValue = &v
		if rp.RequiredValue > 0 {
			f := float64(v) / float64(rp.RequiredValue)
			o.IndependentFrac = &f
		}
	}
	d.Objective = o
	tps, err := rp.Precision(in.Timings)
	if err != nil {
		return Run{}, err
	}
	d.Precision = planner.NewPrecisionDocs(tps)
	return d, nil
}

// RunCSVHeader is the header of the run CSV: the night and its part, then
// the night CSV's block columns (BlockCSVHeader).
var RunCSVHeader = append([]string{"night", "part"}, BlockCSVHeader...)

// RunCSV lists every block of every night of d (RunCSVHeader), local times
// in loc.
func RunCSV(d Run, loc *time.Location) ([]byte, error) {
	var rows [][]string
	for _, n := range d.Nights {
		for _, b := range n.Blocks {
			rows = append(rows, append([]string{n.Date, n.Part}, blockRow(b.BlockDoc, loc)...))
		}
	}
	return writeCSV(RunCSVHeader, rows)
}

// RunICS writes every block of d as an event; UIDs come from runKey (a
// stable name of the run), the block's target and start, DTSTAMP is stamp
// (when the plan was made).
func RunICS(d Run, runKey string, stamp time.Time) ([]byte, error) {
	cal := Calendar{ProdID: "-//phasecast//run plan//EN", Name: "Run " + d.Run}
	for _, n := range d.Nights {
		for _, b := range n.Blocks {
			target := b.Target
			if b.TargetID != 0 {
				target = fmt.Sprint(b.TargetID)
			}
			sum := sha256.Sum256([]byte(fmt.Sprintf("%s|%s|%s", runKey, target, b.Start.String())))
			goal := "filler"
			if b.PhaseGoal != nil {
				goal = "φ " + num(*b.PhaseGoal)
			}
			cal.Events = append(cal.Events, Event{UID: "run-block-" + hex.EncodeToString(sum[:12]) + "@phasecast", Stamp: stamp,
				Start: time.Time(b.Start), End: time.Time(b.End), Summary: b.Target + " — " + goal,
				Description: fmt.Sprintf("%d × %s s; phases %.3f → %.3f; airmass %.2f–%.2f\n%s", b.NExposures, num(b.ExposureS), b.PhaseStart,
					b.PhaseEnd, b.AirmassMin, b.AirmassMax, Caution),
				Location: d.Site.Name, Categories: []string{"phasecast", "observing block"}})
		}
	}
	var buf bytes.Buffer
	err := EncodeICal(&buf, cal)
	return buf.Bytes(), err
}

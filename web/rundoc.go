package web

import (
	"fmt"
	"time"

	"phasecast/planner"
)

// engineVersion names the planner that made a saved run plan.
const engineVersion = "phasecast planner.PlanRun (web)"

// runDoc is a planned run as the web saves it (store.SavedPlan.Output) and
// exports it as JSON: every night's blocks with every figure, each goal's
// coverage, the best-night search, and each target's exposure phases.
type runDoc struct {
	Run       string         `json:"run"`
	RunID     int64          `json:"run_id"`
	Site      siteJSON       `json:"site"`
	Zone      string         `json:"zone"`
	MadeAt    string         `json:"made_at"`
	Past      int            `json:"past_nights"`
	Nights    []runNightDoc  `json:"nights"`
	Targets   []runTargetDoc `json:"targets"`
	Objective runObjective   `json:"objective"`
	// Precision is the predicted precision of the targets with an RV goal
	// or measured timings (planner.RunPlan.Precision).
	Precision []planner.PrecisionDoc `json:"precision"`
	Caution   string                 `json:"caution"`
}

type runNightDoc struct {
	Date        string                   `json:"date"`
	Part        string                   `json:"part"`
	From        string                   `json:"from"`
	To          string                   `json:"to"`
	Past        bool                     `json:"past"`
	Blocks      []runBlockDoc            `json:"blocks"`
	Unscheduled []planner.UnscheduledDoc `json:"unscheduled"`
	Warnings    []string                 `json:"warnings"`
}

type runBlockDoc struct {
	planner.BlockDoc
	TargetID int64 `json:"target_id"`
}

type runTargetDoc struct {
	TargetID int64        `json:"target_id"`
	Target   string       `json:"target"`
	Priority int          `json:"priority"`
	Goals    []runGoalDoc `json:"goals"`
	Bins     []runBinDoc  `json:"bins,omitempty"`
	Planned  []float64    `json:"planned_phases"`
	Observed []float64    `json:"observed_phases"`
	// ReachGoals[k] is the number of the target's goals night k can reach.
	ReachGoals []int    `json:"reach_goals"`
	Ranking    []string `json:"best_nights"`
}

type runGoalDoc struct {
	PhaseGoal       float64         `json:"phase_goal"`
	PhaseHalfWidth  float64         `json:"phase_halfwidth"`
	Event           string          `json:"event,omitempty"`
	NeedExposures   int             `json:"need_exposures"`
	NeedNights      int             `json:"need_nights"`
	Observed        int             `json:"observed"`
	Planned         int             `json:"planned"`
	NightsMet       int             `json:"nights_met"`
	Status          string          `json:"status"`
	PerNight        []runNightCount `json:"per_night"`
	ReachableNights int             `json:"reachable_nights"`
	Unreachable     string          `json:"unreachable,omitempty"`
}

type runNightCount struct {
	Observed int `json:"observed"`
	Planned  int `json:"planned"`
}

type runBinDoc struct {
	Lo       float64 `json:"phase_lo"`
	Hi       float64 `json:"phase_hi"`
	Observed int     `json:"observed"`
	Planned  int     `json:"planned"`
}

// runObjective is the run objective J in millionths: value, what meeting
// every requirement exactly is worth (required_value; value is above it
// with coverage beyond the requirements) and the largest J the run's
// nights allow (max_value, never below value); see planner.RunPlan.
type runObjective struct {
	Value            int64 `json:"value"`
	RequiredValue    int64 `json:"required_value"`
	MaxValue         int64 `json:"max_value"`
	GreedyValue      int64 `json:"greedy_value"`
	IndependentValue int64 `json:"independent_value"`
	Rounds           int   `json:"rounds"`
}

// newRunDoc converts a planned run.
func newRunDoc(in *runInputs, rp *planner.RunPlan, now time.Time) runDoc {
	d := runDoc{Run: in.run.Name, RunID: in.run.ID, Site: siteJSON{in.site.Name, in.site.Site.LatDeg, in.site.Site.LonEastDeg, in.site.Site.ElevM},
		Zone: in.site.Zone, MadeAt: utcString(now), Past: rp.Request.Past, Caution: cautionText + " " + planner.SafetyCaution,
		Objective: runObjective{rp.Value, rp.RequiredValue, rp.MaxValue, rp.GreedyValue, rp.IndependentValue, rp.Rounds}}
	ids := make([]int64, len(in.targets))
	for i, t := range in.targets {
		ids[i] = t.ID
	}
	for _, np := range rp.Nights {
		nd := runNightDoc{Date: fmt.Sprintf("%04d-%02d-%02d", np.Night.Year, np.Night.Month, np.Night.Day), Part: string(np.Night.Part),
			From: utcString(np.From), To: utcString(np.To), Past: np.Past, Blocks: []runBlockDoc{}, Unscheduled: []planner.UnscheduledDoc{}}
		if nd.Part == "" {
			nd.Part = string(planner.PartFull)
		}
		if np.Plan != nil {
			for _, b := range np.Plan.Blocks {
				nd.Blocks = append(nd.Blocks, runBlockDoc{BlockDoc: planner.NewBlockDoc(b), TargetID: ids[b.TargetIndex]})
			}
			for _, u := range np.Plan.Unscheduled {
				nd.Unscheduled = append(nd.Unscheduled, planner.NewUnscheduledDoc(u))
			}
			for _, w := range np.Plan.Warnings {
				nd.Warnings = append(nd.Warnings, warningText(w))
			}
		}
		d.Nights = append(d.Nights, nd)
	}
	for ti, tc := range rp.Coverage {
		td := runTargetDoc{TargetID: ids[tc.TargetIndex], Target: tc.Target, Priority: tc.Priority, Planned: []float64{}, Observed: []float64{},
			ReachGoals: make([]int, len(rp.Nights))}
		for _, g := range tc.Goals {
			gd := runGoalDoc{PhaseGoal: g.Goal.Center, PhaseHalfWidth: g.Goal.HalfWidth, Event: g.Goal.Event, NeedExposures: g.NeedExposures,
				NeedNights: g.NeedNights, Observed: g.Observed, Planned: g.Planned, NightsMet: g.NightsMet, Status: string(g.Status),
				ReachableNights: g.ReachableNights}
			for _, pn := range g.PerNight {
				gd.PerNight = append(gd.PerNight, runNightCount{pn.Observed, pn.Planned})
			}
			td.Goals = append(td.Goals, gd)
		}
		for _, b := range tc.Bins {
			td.Bins = append(td.Bins, runBinDoc{b.Lo, b.Hi, b.Observed, b.Planned})
		}
		if ti < len(rp.Reach) {
			r := rp.Reach[ti]
			for gi, g := range r.Goals {
				if gi < len(td.Goals) {
					td.Goals[gi].Unreachable = g.Unreachable
				}
				for _, gn := range g.Nights {
					if gn.Night < len(td.ReachGoals) && gn.Capacity > 0 {
						td.ReachGoals[gn.Night]++
					}
				}
			}
			for _, rk := range r.Ranking {
				td.Ranking = append(td.Ranking, d.Nights[rk.Night].Date)
			}
		}
		d.Targets = append(d.Targets, td)
	}
	for _, e := range rp.Exposures {
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
	return d
}

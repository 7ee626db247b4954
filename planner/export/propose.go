package export

import (
	"math"

	"phasecast/planner"
)

// ProposalModel states the weather model of a proposal in one sentence, for
// every document that shows one.
const ProposalModel = "Each candidate night is planned on its own by the night planner (every goal wanting its N); " +
	"each chosen night is clear independently with probability 1 − loss and then gives its plan's exposures, else none; " +
	"expected coverage E[min(X, N)]/N and P(X ≥ N) are exact (dynamic programming over the chosen nights)."

// ProposalDoc is the document of a proposal (`phasecast propose --json`,
// the proposal page's JSON): the range, the weather model, the two night
// counts with their dates in calendar order, each goal's standing, the
// nights in the order chosen, and the hours per night under the airmass
// limit of each target over the chart's year (HoursFrom, one value a
// night, hours). Fractions are 0..1; all_reach_probability is null when
// it was not computed (more than MaxJointStates count vectors).
type ProposalDoc struct {
	From          string            `json:"from"`
	To            string            `json:"to"`
	Nights        int               `json:"nights"`
	Zone          string            `json:"zone"`
	Loss          float64           `json:"loss"`
	Confidence    float64           `json:"confidence"`
	Model         string            `json:"model"`
	ClearNights   int               `json:"clear_nights"`
	ClearDates    []string          `json:"clear_dates"`
	WeatherNights int               `json:"weather_nights"`
	WeatherMet    bool              `json:"weather_met"`
	WeatherDates  []string          `json:"weather_dates"`
	Goals         []ProposalGoalDoc `json:"goals"`
	Picks         []ProposalPickDoc `json:"picks"`
	HoursFrom     string            `json:"hours_from"`
	Hours         []YearHoursDoc    `json:"hours"`
	Constraints   ConstraintsDoc    `json:"constraints"`
	Caution       string            `json:"caution"`
}

// ProposalGoalDoc is one goal: what it needs, what the range offers, and
// its clear-sky count, expected coverage and probability of reaching N
// once the weather nights are in.
type ProposalGoalDoc struct {
	Target           string  `json:"target"`
	PhaseGoal        float64 `json:"phase_goal"`
	PhaseHalfWidth   float64 `json:"phase_halfwidth"`
	Event            string  `json:"event,omitempty"`
	Need             int     `json:"need"`
	NightsOffering   int     `json:"nights_offering"`
	Available        int     `json:"available"`
	Reachable        bool    `json:"reachable"`
	Clear            int     `json:"clear"`
	ExpectedCoverage float64 `json:"expected_coverage"`
	ReachProbability float64 `json:"reach_probability"`
}

// ProposalPickDoc is one chosen night (see ProposalPick).
type ProposalPickDoc struct {
	Order               int      `json:"order"`
	Date                string   `json:"date"`
	Margin              bool     `json:"margin"`
	Gives               []int    `json:"gives"`
	ClearCoverage       float64  `json:"clear_coverage"`
	ExpectedCoverage    float64  `json:"expected_coverage"`
	AllReachProbability *float64 `json:"all_reach_probability"`
}

// YearHoursDoc is one target's hours per night.
type YearHoursDoc struct {
	Target string    `json:"target"`
	Hours  []float64 `json:"hours"`
}

// NewProposalDoc is the document of proposal p with the year chart's hours
// (nights from hoursFrom, as ObservableHours returned them; may be nil);
// zone names the site's zone; acquireS is as for NewConstraintsDoc. Hours
// are rounded to 0.001 h.
func NewProposalDoc(p *planner.Proposal, hoursFrom planner.RunNight, hours []planner.YearHours, zone string, acquireS float64) ProposalDoc {
	req := p.Request
	rc, _ := req.Constraints.Resolved() // dropped: Propose refused the constraints if they did not resolve
	d := ProposalDoc{From: req.Nights[0].String(), To: req.Nights[len(req.Nights)-1].String(), Nights: len(req.Nights), Zone: zone,
		Loss: req.Loss, Confidence: req.Confidence, Model: ProposalModel, ClearNights: p.ClearNights, WeatherNights: p.WeatherNights,
		WeatherMet: p.WeatherMet, ClearDates: nightStrings(p.Dates(p.ClearNights)), WeatherDates: nightStrings(p.Dates(p.WeatherNights)),
		Goals: []ProposalGoalDoc{}, Picks: []ProposalPickDoc{}, Hours: []YearHoursDoc{},
		Constraints: NewConstraintsDoc(rc, acquireS), Caution: Caution}
	unmet := map[int]bool{}
	for _, g := range p.Unmet {
		unmet[g] = true
	}
	var last *planner.ProposalPick
	if p.WeatherNights > 0 {
		last = &p.Picks[p.WeatherNights-1]
	}
	for g, pg := range p.Goals {
		gd := ProposalGoalDoc{Target: pg.Target, PhaseGoal: pg.Goal.Center, PhaseHalfWidth: pg.Goal.HalfWidth, Event: pg.Goal.Event,
			Need: pg.Need, NightsOffering: pg.NightsOffering, Available: pg.Available, Reachable: !unmet[g]}
		if last != nil {
			gd.Clear, gd.ExpectedCoverage, gd.ReachProbability = last.Clear[g], round6(last.Expected[g]), round6(last.ReachProb[g])
		}
		d.Goals = append(d.Goals, gd)
	}
	for i, pk := range p.Picks {
		pd := ProposalPickDoc{Order: i + 1, Date: pk.Date.String(), Margin: pk.Margin, Gives: append([]int{}, pk.Gives...),
			ClearCoverage: round6(pk.ClearCoverage), ExpectedCoverage: round6(pk.ExpectedCoverage)}
		if pk.AllReachProb >= 0 {
			v := round6(pk.AllReachProb)
			pd.AllReachProbability = &v
		}
		d.Picks = append(d.Picks, pd)
	}
	if len(hours) > 0 {
		d.HoursFrom = hoursFrom.String()
		for _, yh := range hours {
			hd := YearHoursDoc{Target: yh.Target, Hours: make([]float64, len(yh.Hours))}
			for k, h := range yh.Hours {
				hd.Hours[k] = math.Round(h*1000) / 1000
			}
			d.Hours = append(d.Hours, hd)
		}
	}
	return d
}

func nightStrings(ns []planner.RunNight) []string {
	out := make([]string, len(ns))
	for i, n := range ns {
		out[i] = n.String()
	}
	return out
}

// round6 rounds a fraction to 1e-6, so that documents do not carry float
// noise.
func round6(x float64) float64 { return math.Round(x*1e6) / 1e6 }

package web

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/url"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// proposeReq is a proposal request: the night query's site, list and
// targets and constraint overrides, the candidate nights (?semester= or
// ?from=&to=, local dates), the exposures per goal (?n=), the weather-loss
// fraction (?loss=) and the confidence (?confidence=).
type proposeReq struct {
	nightQuery
	semester, from, to  string
	n, loss, confidence string
}

// proposal is a computed proposal with its year chart.
type proposal struct {
	*night
	req    proposeReq
	nights []planner.RunNight
	p      *planner.Proposal
	year   []planner.RunNight
	hours  []planner.YearHours
}

// loadProposal resolves a proposal request; it computes only when ?n= is
// given, and returns messages for fields to fix.
func (s *Server) loadProposal(ctx context.Context, a store.Actor, teamID int64, q url.Values) (*proposal, page.Errs, error) {
	nq, err := parseNightQuery(q)
	if err != nil {
		return nil, nil, err
	}
	n, errs, err := s.loadNight(ctx, a, teamID, nq)
	if err != nil {
		return nil, nil, err
	}
	get := func(k string) string { return strings.TrimSpace(q.Get(k)) }
	pr := &proposal{night: n, req: proposeReq{nightQuery: n.q, semester: get("semester"), from: get("from"), to: get("to"),
		n: get("n"), loss: get("loss"), confidence: get("confidence")}}
	delete(errs, "date") // a proposal has no night of its own
	if len(n.sites) == 0 || len(n.lists) == 0 || pr.req.n == "" {
		return pr, errs, nil
	}
	pr.nights = pr.parseNights(errs)
	N, err := strconv.Atoi(pr.req.n)
	if err != nil || N < 1 || N > 10000 {
		errs["n"] = fmt.Sprintf("“%s” is not accepted; accepted: a whole number of exposures 1..10000", planner.ClipValue(pr.req.n))
	}
	loss := parseFraction(pr.req.loss, 0, 0, planner.MaxProposalLoss, "loss", "a fraction of nights lost 0..0.95", errs)
	conf := parseFraction(pr.req.confidence, planner.DefaultProposalConfidence, 0.5, 0.999, "confidence", "a probability 0.5..0.999", errs)
	c := n.constraints(errs)
	if len(errs) > 0 {
		return pr, errs, nil
	}
	req := planner.ProposalRequest{Site: n.site.Site, Zone: n.loc, Nights: pr.nights, Constraints: c, Loss: loss, Confidence: conf}
	for _, t := range n.targets {
		for k := range t.Target.Goals {
			t.Target.Goals[k].NExposures = N
		}
		req.Targets = append(req.Targets, t.Target)
	}
	if pr.p, err = planner.Propose(ctx, req); err == nil {
		pr.year = planner.YearOf(pr.nights[0])
		pr.hours, err = planner.ObservableHours(ctx, n.site.Site, n.loc, c, planner.Options{}, req.Targets, pr.year)
	}
	if err != nil {
		pr.p = nil
		if fe, _, ok := formErrs(err); ok {
			for k, v := range fe {
				if _, known := constraintField[k]; known {
					k = constraintField[k]
				} else if k != "loss" && k != "confidence" {
					k = ""
				}
				errs[k] = v
			}
			return pr, errs, nil
		}
		return nil, nil, err
	}
	return pr, errs, nil
}

// parseNights reads ?semester= or ?from=&to=.
func (pr *proposal) parseNights(errs page.Errs) []planner.RunNight {
	r := pr.req
	switch {
	case r.semester != "" && (r.from != "" || r.to != ""):
		errs["semester"] = "give a semester, or the dates from and to, not both"
	case r.semester != "":
		ns, err := planner.Semester(r.semester)
		if err != nil {
			fe, _, _ := formErrs(err)
			errs["semester"] = fe["semester"]
		}
		return ns
	case r.from == "" || r.to == "":
		errs["from"] = "give a semester, or both dates from and to (local dates of the first and last evening)"
	default:
		y1, m1, d1, err1 := planner.ParseDate(r.from)
		y2, m2, d2, err2 := planner.ParseDate(r.to)
		if err1 != nil {
			errs["from"] = fmt.Sprintf("“%s” is not a date; accepted: YYYY-MM-DD", planner.ClipValue(r.from))
		}
		if err2 != nil {
			errs["to"] = fmt.Sprintf("“%s” is not a date; accepted: YYYY-MM-DD", planner.ClipValue(r.to))
		}
		if err1 != nil || err2 != nil {
			return nil
		}
		ns, err := planner.NightsBetween(y1, m1, d1, y2, m2, d2)
		if err != nil {
			errs["to"] = fmt.Sprintf("“%s” is not accepted; accepted: a date from %s to %d days after it", r.to, r.from, planner.MaxRunNights-1)
		}
		return ns
	}
	return nil
}

// parseFraction reads an optional number in lo..hi (def when empty); a bad
// value becomes a message on field.
func parseFraction(s string, def, lo, hi float64, field, accepted string, errs page.Errs) float64 {
	if s == "" {
		return def
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || v < lo || v > hi {
		errs[field] = fmt.Sprintf("“%s” is not accepted; accepted: %s", planner.ClipValue(s), accepted)
		return def
	}
	return v
}

// encode writes the request as a query string.
func (pr *proposal) encode() string {
	q := pr.req.nightQuery.values()
	q.Del("date")
	for k, v := range map[string]string{"semester": pr.req.semester, "from": pr.req.from, "to": pr.req.to, "n": pr.req.n,
		"loss": pr.req.loss, "confidence": pr.req.confidence} {
		if v != "" {
			q.Set(k, v)
		}
	}
	return q.Encode()
}

// doc is the proposal's JSON document (the CLI's `propose --json`).
func (pr *proposal) doc() export.ProposalDoc {
	return export.NewProposalDoc(pr.p, pr.year[0], pr.hours, pr.loc.String(), 0)
}

func (pr *proposal) exportJSON() ([]byte, error) {
	return json.MarshalIndent(pr.doc(), "", "  ")
}

// view builds the page.
func (pr *proposal) view(errs page.Errs) page.ProposeView {
	n := pr.night
	v := page.ProposeView{Semester: pr.req.semester, From: pr.req.from, To: pr.req.to, N: pr.req.n, Loss: pr.req.loss,
		Confidence: pr.req.confidence, Errs: errs}
	f := n.form(errs)
	v.Sites, v.Lists, v.Targets = f.Sites, f.Lists, f.Targets
	if pr.p == nil {
		return v
	}
	d := pr.doc()
	v.Done, v.Query = true, pr.encode()
	v.Title = fmt.Sprintf("Proposal at %s, %s to %s (%d nights)", n.site.Name, d.From, d.To, d.Nights)
	v.Model = d.Model
	v.Lossy = d.Loss > 0
	v.LossText = fmt.Sprintf("%s %% of nights lost: each night clear with probability %s; confidence %s", num(100*d.Loss), num(1-d.Loss), num(d.Confidence))
	v.ClearNights, v.ClearDates = d.ClearNights, strings.Join(d.ClearDates, ", ")
	v.WeatherNights, v.WeatherMet, v.WeatherDates = d.WeatherNights, d.WeatherMet, strings.Join(d.WeatherDates, ", ")
	for _, g := range d.Goals {
		v.Goals = append(v.Goals, page.ProposeGoalRow{Target: g.Target, Goal: export.PhaseText(g.PhaseGoal) + " ± " + export.PhaseText(g.PhaseHalfWidth),
			Need: strconv.Itoa(g.Need), Offering: strconv.Itoa(g.NightsOffering), Available: strconv.Itoa(g.Available), Reachable: g.Reachable,
			Clear: strconv.Itoa(g.Clear), Expected: strconv.FormatFloat(g.ExpectedCoverage, 'f', 3, 64), Reach: strconv.FormatFloat(g.ReachProbability, 'f', 3, 64)})
	}
	for _, pk := range d.Picks {
		row := page.ProposePickRow{Order: strconv.Itoa(pk.Order), Date: pk.Date, Margin: pk.Margin,
			Clear: strconv.FormatFloat(pk.ClearCoverage, 'f', 3, 64), Expected: strconv.FormatFloat(pk.ExpectedCoverage, 'f', 3, 64), All: "—"}
		for _, g := range pk.Gives {
			row.Gives = append(row.Gives, strconv.Itoa(g))
		}
		if pk.AllReachProbability != nil {
			row.All = strconv.FormatFloat(*pk.AllReachProbability, 'f', 3, 64)
		}
		v.Picks = append(v.Picks, row)
	}
	v.Chart = pr.chart()
	return v
}

// chart is the year chart: hours per night of each target, the candidate
// nights shaded, the nights to ask for ticked.
func (pr *proposal) chart() chart.Year {
	first := pr.year[0]
	y := chart.Year{Title: fmt.Sprintf("Hours per night under airmass %s in dark time, %d", num(pr.p.Request.Constraints.MaxAirmass), first.Year),
		First: dateOf(first), RangeFrom: dayIndex(first, pr.nights[0]), RangeTo: dayIndex(first, pr.nights[len(pr.nights)-1])}
	for _, h := range pr.hours {
		y.Series = append(y.Series, chart.YearSeries{Label: h.Target, Hours: h.Hours})
	}
	for _, pk := range pr.p.Picks[:pr.p.WeatherNights] {
		y.Chosen = append(y.Chosen, dayIndex(first, pk.Date))
	}
	return y
}

// dateOf is a night's local date as a time at noon UTC.
func dateOf(n planner.RunNight) time.Time {
	return time.Date(n.Year, n.Month, n.Day, 12, 0, 0, 0, time.UTC)
}

// dayIndex is the number of days from night a to night b.
func dayIndex(a, b planner.RunNight) int {
	return int(math.Round(dateOf(b).Sub(dateOf(a)).Hours() / 24))
}

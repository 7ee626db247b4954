package web

import (
	"context"
	"fmt"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// nightQuery is a night request as the Night page's GET form sends it:
// ?site=&date=&list=&t=&t=&twilight=&max_airmass=&min_alt=&min_moon_sep=
// &max_moon_illum=&sun_avoid=&fill=1&part=&run=. Empty fields take
// defaults: the team's first site and list, tonight at the site, the
// site's constraints, the whole night. run= names a run: its site, list and
// constraints, and, for one of its nights, the part of it the run holds.
type nightQuery struct {
	siteID, listID int64
	runID          int64
	part           planner.NightPart // "" = the run's part, else the full night
	date           string            // YYYY-MM-DD; "" = tonight at the site
	targetIDs      []int64
	twilight       string
	maxAirmass     string
	minAlt         string
	minMoonSep     string
	maxMoonIllum   string
	sunAvoid       string
	fill           bool
	instrument     string // the site's instrument by name; "" = its first
}

// parseNightQuery reads a night request; ids that do not parse are
// malformed (the form writes them).
func parseNightQuery(q url.Values) (nightQuery, error) {
	n := nightQuery{date: strings.TrimSpace(q.Get("date")), twilight: q.Get("twilight"), maxAirmass: strings.TrimSpace(q.Get("max_airmass")),
		minAlt: strings.TrimSpace(q.Get("min_alt")), minMoonSep: strings.TrimSpace(q.Get("min_moon_sep")),
		maxMoonIllum: strings.TrimSpace(q.Get("max_moon_illum")), sunAvoid: strings.TrimSpace(q.Get("sun_avoid")), fill: q.Get("fill") == "1",
		instrument: strings.TrimSpace(q.Get("instrument"))}
	var err error
	if n.siteID, err = optID(q.Get("site")); err != nil {
		return n, err
	}
	if n.listID, err = optID(q.Get("list")); err != nil {
		return n, err
	}
	if n.runID, err = optID(q.Get("run")); err != nil {
		return n, err
	}
	if n.part, err = parsePart(q.Get("part")); err != nil {
		return n, err
	}
	for _, t := range q["t"] {
		id, err := optID(t)
		if err != nil {
			return n, err
		}
		n.targetIDs = append(n.targetIDs, id)
	}
	return n, nil
}

// parsePart reads the part query parameter: "" (the run's part, else the
// full night), full, first or second.
func parsePart(s string) (planner.NightPart, error) {
	switch p := planner.NightPart(strings.TrimSpace(s)); p {
	case "", planner.PartFull, planner.PartFirst, planner.PartSecond:
		return p, nil
	}
	return "", errInvalid(fmt.Sprintf("part: “%s” is not accepted; accepted: full, first or second", s))
}

// queryID reads the optional id parameter name of a query: 0 when absent
// or empty, else a positive whole number, or EINVALID naming the parameter
// and the value.
func queryID(q url.Values, name string) (int64, error) {
	s := q.Get(name)
	if s == "" {
		return 0, nil
	}
	id, err := strconv.ParseInt(s, 10, 64)
	if err != nil || id <= 0 {
		return 0, errInvalid(fmt.Sprintf("%s: %q is not accepted; accepted: an id (a whole number above 0)", name, planner.ClipValue(s)))
	}
	return id, nil
}

func optID(s string) (int64, error) {
	if s == "" {
		return 0, nil
	}
	id, err := strconv.ParseInt(s, 10, 64)
	if err != nil || id <= 0 {
		return 0, fmt.Errorf("%w: id %q", errMalformed, s)
	}
	return id, nil
}

// encode writes the request back as a query string (with the defaults it
// resolved to, so that exports plan the same night).
func (n nightQuery) encode() string {
	return n.values().Encode()
}

// values is the request as query values (see encode).
func (n nightQuery) values() url.Values {
	q := url.Values{}
	q.Set("site", i64s(n.siteID))
	q.Set("date", n.date)
	q.Set("list", i64s(n.listID))
	if n.runID != 0 {
		q.Set("run", i64s(n.runID))
	}
	if n.part != "" {
		q.Set("part", string(n.part))
	}
	for _, id := range n.targetIDs {
		q.Add("t", i64s(id))
	}
	for k, v := range map[string]string{"twilight": n.twilight, "max_airmass": n.maxAirmass, "min_alt": n.minAlt,
		"min_moon_sep": n.minMoonSep, "max_moon_illum": n.maxMoonIllum, "sun_avoid": n.sunAvoid, "instrument": n.instrument} {
		if v != "" {
			q.Set(k, v)
		}
	}
	if n.fill {
		q.Set("fill", "1")
	}
	return q
}

// night is a planned night with what the pages and exports show.
type night struct {
	cache   *planCache
	now     func() time.Time // the server's clock: the plan cache's ages
	q       nightQuery
	base    *planner.Constraints // a run's constraints, replacing the site's defaults
	site    store.SiteRecord
	sites   []store.SiteRecord
	lists   []store.TargetList
	list    store.TargetList
	all     []store.StoredTarget // the whole list
	targets []store.StoredTarget // the ones planned
	loc     *time.Location
	y       int
	m       time.Month
	d       int
	run     *store.Run
	part    planner.NightPart // the part planned: full, first or second
	whole   planner.Interval  // the whole night's planning window (UTC)
	req     planner.NightRequest
	plan    *planner.Plan
	events  planner.NightEvents
	source  string // Tonight: whose blocks are shown (a run's saved plan, or planned now)
	// replanned: Tonight shows the rest of the night planned again from now
	replanned bool
}

// loadNight resolves the request's site, list and targets for the actor
// and fills in defaults. It plans nothing yet. errs holds messages for
// form fields the user must fix.
func (s *Server) loadNight(ctx context.Context, a store.Actor, teamID int64, q nightQuery) (*night, page.Errs, error) {
	n := &night{q: q, cache: &s.plans, now: s.now}
	errs := page.Errs{}
	var err error
	if q.runID != 0 {
		run, err := s.store.GetRun(ctx, a, q.runID)
		if err != nil {
			return nil, nil, err
		}
		if run.TeamID != teamID {
			return nil, nil, errNotFound("The team has no such run.")
		}
		n.run = &run
		c := run.Constraints
		n.base = &c
		q.siteID, q.listID = run.SiteID, run.ListID
	}
	if n.sites, err = s.store.ListSites(ctx, a, teamID); err != nil {
		return nil, nil, err
	}
	if n.lists, err = s.store.ListLists(ctx, a, teamID); err != nil {
		return nil, nil, err
	}
	if len(n.sites) == 0 || len(n.lists) == 0 {
		return n, errs, nil
	}
	var okSite, okList bool
	n.site, n.q.siteID, okSite = pick(n.sites, q.siteID, func(r store.SiteRecord) int64 { return r.ID })
	n.list, n.q.listID, okList = pick(n.lists, q.listID, func(l store.TargetList) int64 { return l.ID })
	switch {
	case !okSite:
		return nil, nil, errNotFound(fmt.Sprintf("The team has no site %d.", q.siteID))
	case !okList:
		return nil, nil, errNotFound(fmt.Sprintf("The team has no list %d.", q.listID))
	}
	if n.loc, err = time.LoadLocation(n.site.Zone); err != nil {
		n.loc = time.UTC
	}
	if q.date == "" {
		n.q.date = tonight(s.now(), n.loc)
	}
	y, m, d, err := planner.ParseDate(n.q.date)
	if err != nil {
		errs["date"] = fmt.Sprintf("“%s” is not a date; accepted: YYYY-MM-DD", n.q.date)
	}
	n.y, n.m, n.d = y, m, d
	n.part = q.part
	if n.part == "" && n.run != nil {
		for _, rn := range n.run.Nights {
			if rn.Date == n.q.date {
				n.part = runPart(rn.Part)
			}
		}
	}
	if n.part == "" {
		n.part = planner.PartFull
	}
	if n.all, err = s.store.ListTargets(ctx, a, n.list.ID); err != nil {
		return nil, nil, err
	}
	n.targets = n.all
	if len(q.targetIDs) > 0 {
		n.targets = nil
		for _, t := range n.all {
			if slices.Contains(q.targetIDs, t.ID) {
				n.targets = append(n.targets, t)
			}
		}
		for _, id := range q.targetIDs {
			if !slices.ContainsFunc(n.targets, func(t store.StoredTarget) bool { return t.ID == id }) {
				return nil, nil, errNotFound(fmt.Sprintf("Target %d is not on the list %s.", id, n.list.Name))
			}
		}
	}
	return n, errs, nil
}

// pick returns the element with id want, or the first one when want is 0;
// ok is false when want is not among xs.
func pick[T any](xs []T, want int64, id func(T) int64) (x T, got int64, ok bool) {
	for _, x := range xs {
		if id(x) == want {
			return x, want, true
		}
	}
	return xs[0], id(xs[0]), want == 0
}

// tonight is the local date of the evening of the night in progress or
// coming at now: before local noon, the night that began yesterday.
func tonight(now time.Time, loc *time.Location) string {
	l := now.In(loc)
	if l.Hour() < 12 {
		l = l.AddDate(0, 0, -1)
	}
	return l.Format("2006-01-02")
}

// constraints returns the site's constraints with the request's overrides,
// and messages for overrides that do not parse.
func (n *night) constraints(errs page.Errs) planner.Constraints {
	c := n.site.PlanConstraints()
	if n.base != nil {
		c = *n.base
		c.Horizon = n.site.Horizon
	}
	if n.q.twilight != "" {
		if tw, err := planner.ParseTwilight(n.q.twilight); err != nil {
			errs["twilight"] = fmt.Sprintf("“%s” is not accepted; accepted: civil, nautical or astronomical", n.q.twilight)
		} else {
			c.Twilight = tw
		}
	}
	for _, o := range []struct {
		field, text string
		dst         *float64
	}{{"max_airmass", n.q.maxAirmass, &c.MaxAirmass}, {"min_alt", n.q.minAlt, &c.MinAltDeg}, {"min_moon_sep", n.q.minMoonSep, &c.MinMoonSepDeg},
		{"max_moon_illum", n.q.maxMoonIllum, &c.MaxMoonIllum}, {"sun_avoid", n.q.sunAvoid, &c.SunAvoidDeg}} {
		if o.text == "" {
			continue
		}
		v, err := strconv.ParseFloat(o.text, 64)
		if err != nil {
			errs[o.field] = fmt.Sprintf("“%s” is not a number", o.text)
			continue
		}
		*o.dst = v
	}
	n.checkEach(c, errs)
	return c
}

// checkEach puts the planner's message on every override it refuses, not
// only the first: each typed value is checked alone on the site's
// constraints.
func (n *night) checkEach(c planner.Constraints, errs page.Errs) {
	base := n.site.PlanConstraints()
	if n.base != nil {
		base = *n.base
		base.Horizon = n.site.Horizon
	}
	for _, o := range []struct {
		field, text string
		set         func(*planner.Constraints)
	}{{"max_airmass", n.q.maxAirmass, func(b *planner.Constraints) { b.MaxAirmass = c.MaxAirmass }},
		{"min_alt", n.q.minAlt, func(b *planner.Constraints) { b.MinAltDeg = c.MinAltDeg }},
		{"min_moon_sep", n.q.minMoonSep, func(b *planner.Constraints) { b.MinMoonSepDeg = c.MinMoonSepDeg }},
		{"max_moon_illum", n.q.maxMoonIllum, func(b *planner.Constraints) { b.MaxMoonIllum = c.MaxMoonIllum }},
		{"sun_avoid", n.q.sunAvoid, func(b *planner.Constraints) { b.SunAvoidDeg = c.SunAvoidDeg }}} {
		if o.text == "" || errs.Has(o.field) {
			continue
		}
		one := base
		o.set(&one)
		if _, err := one.Resolved(); err != nil {
			if fe, _, ok := formErrs(err); ok {
				if msg, ok := fe[o.field]; ok {
					errs[o.field] = msg
				}
			}
		}
	}
}

// instrument is the site's instrument the request names (the first when
// it names none; nil for a site without instruments). An unknown name is a
// message on the instrument field.
func (n *night) instrument(errs page.Errs) (*planner.Instrument, error) {
	inst, err := n.site.Instrument(n.q.instrument)
	if err != nil {
		fe, _, ok := formErrs(err)
		if !ok {
			return nil, err
		}
		for k, v := range fe {
			errs[k] = v
		}
	}
	return inst, nil
}

// planIt plans the night. Constraint values the planner refuses become
// messages on their fields.
func (n *night) planIt(errs page.Errs) error {
	c := n.constraints(errs)
	if len(errs) > 0 {
		return nil
	}
	from, to := planner.NightWindow(n.y, n.m, n.d, n.loc)
	n.whole = planner.Interval{Start: from, End: to}
	if n.part != planner.PartFull {
		ws, err := planner.RunNightWindows(n.site.Site, n.loc, c, []planner.RunNight{{Year: n.y, Month: n.m, Day: n.d, Part: n.part}})
		if err != nil {
			if fe, _, ok := formErrs(err); ok {
				for k, v := range fe {
					errs[k] = v
				}
				return nil
			}
			return err
		}
		from, to = ws[0].Start, ws[0].End
	}
	n.req = planner.NightRequest{Site: n.site.Site, From: from, To: to, Constraints: c, Options: planner.Options{Fill: n.q.fill, Telescope: n.site.Telescope}}
	inst, err := n.instrument(errs)
	if err != nil || len(errs) > 0 {
		return err
	}
	n.req.Instrument = inst
	for _, t := range n.targets {
		n.req.Targets = append(n.req.Targets, t.Target)
	}
	key := n.key()
	if c, ok := n.cache.get(key, n.now()); ok {
		n.plan, n.events = c.plan, c.events
		return nil
	}
	plan, err := planner.PlanNight(n.req)
	if err != nil {
		if fe, _, ok := formErrs(err); ok {
			for k, v := range fe {
				if _, known := constraintField[k]; known {
					k = constraintField[k]
				} else {
					k = ""
				}
				errs[k] = v
			}
			return nil
		}
		return err
	}
	n.plan = plan
	n.events = planner.NightEventsOn(n.site.Site, n.y, n.m, n.d, n.loc)
	n.cache.put(key, cachedPlan{plan: plan, events: n.events, at: n.now()})
	return nil
}

// constraintField maps the planner's constraint field names to the form's.
var constraintField = map[string]string{
	"twilight": "twilight", "max_airmass": "max_airmass", "min_alt": "min_alt", "min_moon_sep": "min_moon_sep",
	"max_moon_illum": "max_moon_illum", "sun_avoid": "sun_avoid",
}

// title names the night: "Night of 2026-03-14 at Mount Example", with
// " (first half)" or " (second half)" for half a night.
func (n *night) title() string {
	t := "Night of " + n.q.date + " at " + n.site.Name
	if n.half() {
		t += " (" + string(n.part) + " half)"
	}
	return t
}

// half reports whether only half of the night is planned.
func (n *night) half() bool {
	return n.part == planner.PartFirst || n.part == planner.PartSecond
}

// runPart is the planner's part for a stored run night's part.
func runPart(p store.NightPart) planner.NightPart {
	switch p {
	case store.NightFirstHalf:
		return planner.PartFirst
	case store.NightSecondHalf:
		return planner.PartSecond
	}
	return planner.PartFull
}

// partNote says which half is planned: "first half of the night:
// 20:14–00:53 local"; "" for the whole night.
func (n *night) partNote() string {
	if !n.half() {
		return ""
	}
	return fmt.Sprintf("%s half of the night: %s–%s local (%s–%s UTC); only this part is planned.", n.part,
		n.req.From.In(n.loc).Format("15:04"), n.req.To.In(n.loc).Format("15:04"), n.req.From.UTC().Format("15:04"), n.req.To.UTC().Format("15:04"))
}

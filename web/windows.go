package web

import (
	"context"
	"fmt"
	"net/url"
	"strconv"
	"strings"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/store"
	"phasecast/web/page"
)

// windowsReq is a queue-windows request: the night query's site, list and
// targets, a range of local dates (?from=&to=) and optionally one goal of
// a single target (?goal=N, its number in the target's goal list from 1;
// empty = every goal).
type windowsReq struct {
	nightQuery
	from, to string
	goal     string // as given
	goalN    int    // 1-based; 0 = every goal
}

// windows is a computed list of queue windows.
type windows struct {
	*night
	req    windowsReq
	groups []planner.GoalWindows
	from   time.Time
	to     time.Time
}

// loadWindows resolves a windows request; it computes only when both dates
// are given, and returns messages for fields to fix.
func (s *Server) loadWindows(ctx context.Context, a store.Actor, teamID int64, q url.Values) (*windows, page.Errs, error) {
	nq, err := parseNightQuery(q)
	if err != nil {
		return nil, nil, err
	}
	n, errs, err := s.loadNight(ctx, a, teamID, nq)
	if err != nil {
		return nil, nil, err
	}
	w := &windows{night: n, req: windowsReq{nightQuery: n.q, from: strings.TrimSpace(q.Get("from")), to: strings.TrimSpace(q.Get("to")),
		goal: strings.TrimSpace(q.Get("goal"))}}
	if len(n.sites) == 0 || len(n.lists) == 0 {
		return w, errs, nil
	}
	if msg := w.parseGoal(); msg != "" {
		errs["goal"] = msg
	}
	if w.req.from == "" {
		w.req.from = n.q.date
	}
	if w.req.to == "" {
		w.req.to = w.req.from
		if d, err := time.Parse("2006-01-02", w.req.from); err == nil {
			w.req.to = d.AddDate(0, 0, 30).Format("2006-01-02")
		}
	}
	y1, m1, d1, err1 := planner.ParseDate(w.req.from)
	y2, m2, d2, err2 := planner.ParseDate(w.req.to)
	if err1 != nil {
		errs["from"] = fmt.Sprintf("“%s” is not a date; accepted: YYYY-MM-DD", w.req.from)
	}
	if err2 != nil {
		errs["to"] = fmt.Sprintf("“%s” is not a date; accepted: YYYY-MM-DD", w.req.to)
	}
	if len(errs) > 0 || q.Get("from") == "" {
		return w, errs, nil
	}
	w.from, _ = planner.NightWindow(y1, m1, d1, n.loc)
	_, w.to = planner.NightWindow(y2, m2, d2, n.loc)
	req := planner.WindowRequest{Site: n.site.Site, From: w.from, To: w.to, Constraints: n.constraints(errs)}
	if req.Instrument, err = n.instrument(errs); err != nil {
		return nil, nil, err
	}
	for _, t := range n.targets {
		if w.req.goalN > 0 {
			t.Target.Goals = []planner.Goal{t.Target.Goals[w.req.goalN-1]}
		}
		req.Targets = append(req.Targets, t.Target)
	}
	if len(errs) > 0 {
		return w, errs, nil
	}
	w.groups, err = planner.QueueWindows(ctx, req, nil)
	if err != nil {
		if fe, _, ok := formErrs(err); ok {
			for k, v := range fe {
				if k != "from" && k != "to" {
					k = ""
				}
				errs[k] = v
			}
			return w, errs, nil
		}
		return nil, nil, err
	}
	return w, errs, nil
}

// parseGoal checks ?goal= against the chosen targets: a goal is chosen
// by its number (1 = the first) among the goals of exactly one target. It
// returns a message for the field, or "".
func (w *windows) parseGoal() string {
	if w.req.goal == "" {
		return ""
	}
	if len(w.targets) != 1 {
		return fmt.Sprintf("“%s” needs exactly one target (t), and %d are chosen; accepted: empty (every goal) with several targets", w.req.goal, len(w.targets))
	}
	goals := w.targets[0].Target.Goals
	k, err := strconv.Atoi(w.req.goal)
	if err != nil || k < 1 || k > len(goals) {
		return fmt.Sprintf("“%s” is not a goal of %s; accepted: 1 to %d (its goals in order), or empty for every goal", w.req.goal, w.targets[0].Target.Name, len(goals))
	}
	w.req.goalN = k
	return ""
}

// encode writes the request as a query string.
func (w *windows) encode() string {
	q := w.req.nightQuery.values()
	q.Del("date")
	q.Set("from", w.req.from)
	q.Set("to", w.req.to)
	if w.req.goalN > 0 {
		q.Set("goal", strconv.Itoa(w.req.goalN))
	}
	return q.Encode()
}

// view builds the page.
func (w *windows) view(errs page.Errs) page.WindowsView {
	n := w.night
	v := page.WindowsView{From: w.req.from, To: w.req.to, Errs: errs}
	f := n.form(errs)
	v.Sites, v.Lists, v.Targets = f.Sites, f.Lists, f.Targets
	if len(n.targets) == 1 {
		v.Goals = []page.Option{{Value: "", Label: "every goal", Selected: w.req.goal == ""}}
		for i, g := range n.targets[0].Target.Goals {
			k := strconv.Itoa(i + 1)
			label := export.GoalLabel(g)
			if g.Event != "" { // an event goal's phase is found per window, not stored
				label = fmt.Sprintf("%s ± %s", strings.ReplaceAll(g.Event, "_", " "), export.PhaseText(g.HalfWidth))
			}
			v.Goals = append(v.Goals, page.Option{Value: k, Label: k + ": " + label, Selected: w.req.goal == k})
		}
	}
	if w.groups == nil {
		return v
	}
	v.Done, v.Query = true, w.encode()
	v.Title = fmt.Sprintf("Windows at %s, %s to %s", n.site.Name, w.req.from, w.req.to)
	if w.req.goalN > 0 {
		v.Title = fmt.Sprintf("Windows of %s, goal %d, at %s, %s to %s", n.targets[0].Target.Name, w.req.goalN, n.site.Name, w.req.from, w.req.to)
	}
	v.Zone = zoneLabel(n.loc, w.from)
	for _, g := range w.groups {
		grp := page.WindowGroup{Target: g.Target, Goal: export.GoalLabel(g.Goal)}
		if g.Refused > 0 {
			grp.Refused = fmt.Sprintf("%d window(s) left out: %s", g.Refused, g.RefusedNote)
		}
		for _, qw := range g.Windows {
			grp.Rows = append(grp.Rows, page.WindowRow{StartUTC: qw.Start.UTC().Format("2006-01-02 15:04:05"), EndUTC: qw.End.UTC().Format("15:04:05"),
				Local:  qw.Start.In(n.loc).Format("Jan 02 15:04") + "–" + qw.End.In(n.loc).Format("15:04"),
				Length: fmtDuration(qw.End.Sub(qw.Start)), Cycle: strconv.FormatInt(qw.Cycle, 10),
				Airmass: fmt.Sprintf("%.2f–%.2f", qw.AirmassMin, qw.AirmassMax), PhaseErr: fmtPhaseErr(qw.PhaseErr), Uncertain: qw.Uncertain,
				Exposures: strconv.Itoa(qw.Exposures) + sizingText(qw.Sizing), Night: nightOf(qw.Start, n.loc)})
			v.Total++
		}
		v.Groups = append(v.Groups, grp)
	}
	return v
}

// sizingText describes a window's S/N sizing for the table: "" without
// one.
func sizingText(sz *planner.ExposureSizing) string {
	switch {
	case sz == nil:
		return ""
	case !sz.Reached:
		return fmt.Sprintf(" (S/N not reached within the smear limit: best %.1f in %.1f s, sky %.2f mag/arcsec²)", sz.SNR, sz.ExposureS, sz.SkyMag)
	}
	return fmt.Sprintf(" × %.1f s (S/N %.0f, sky %.2f mag/arcsec²)", sz.ExposureS, sz.SNR, sz.SkyMag)
}

// doc is the windows' document (export.Windows).
func (w *windows) doc() export.Windows {
	return export.NewWindows(w.site.Name, w.site.Zone, w.from, w.to, w.req.goalN, w.groups)
}

func (w *windows) exportJSON() ([]byte, error) { return export.JSON(w.doc()) }

// exportCSV adds the sizing columns when the site has an instrument.
func (w *windows) exportCSV() ([]byte, error) {
	return export.WindowsCSV(w.doc(), len(w.site.Instruments) > 0)
}

// exportICS writes the windows as events; DTSTAMP is the inputs' last
// change.
func (w *windows) exportICS() ([]byte, error) { return export.WindowsICS(w.doc(), w.lastChange()) }

func (w *windows) exportName(ext string) string {
	name := w.site.Name + "-" + w.req.from + "-" + w.req.to
	if w.req.goalN > 0 {
		name = w.site.Name + "-" + w.targets[0].Target.Name + "-goal" + strconv.Itoa(w.req.goalN) + "-" + w.req.from + "-" + w.req.to
	}
	return fileName(name, "windows", ext)
}

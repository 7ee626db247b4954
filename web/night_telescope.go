package web

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/http"
	"strconv"
	"time"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/web/page"
)

// telescopeDoc is the telescope sheet of the request's planned night: the
// document `phasecast plan --sheet json` prints.
func (s *Server) telescopeDoc(r *http.Request, u *user) (*night, export.SheetDoc, error) {
	n, err := s.plannedNight(r, u)
	if err != nil {
		return nil, export.SheetDoc{}, err
	}
	rows, err := planner.TelescopeSheet(n.req.Site, n.req.Targets, n.plan.Blocks)
	if err != nil {
		return nil, export.SheetDoc{}, err
	}
	return n, export.NewSheetDoc(rows), nil
}

// nightTelescope is the printable telescope sheet (GET /night/telescope):
// per block the coordinates and the target at start, middle and end.
func (s *Server) nightTelescope(w http.ResponseWriter, r *http.Request, u *user) {
	n, doc, err := s.telescopeDoc(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.TelescopeView{Title: "Telescope sheet: " + n.title(), Query: n.q.encode(), Caution: doc.Caution}
	f := func(x float64, d int) string { return strconv.FormatFloat(x, 'f', d, 64) }
	for _, row := range doc.Rows {
		tr := page.TelescopeRow{Target: row.Target, Goal: "filler", Exposures: fmt.Sprintf("%d × %s s", row.NExposures, num(row.ExposureS)),
			Mag: "—", ICRS: planner.FormatRAHours(row.RAICRSDeg, 2) + " " + planner.FormatDecDeg(row.DecICRSDeg, 1),
			OfDate:  planner.FormatRAHours(row.RADateDeg, 2) + " " + planner.FormatDecDeg(row.DecDateDeg, 1),
			Airmass: f(row.AirmassMin, 2) + "–" + f(row.AirmassMax, 2), Phase: f(row.PhaseStart, 3) + "→" + f(row.PhaseEnd, 3),
			Moon: f(row.MoonSepMinDeg, 0) + "°"}
		if row.GoalPhase != nil {
			tr.Goal = export.PhaseText(*row.GoalPhase)
		}
		if row.Mag != nil {
			tr.Mag = num(*row.Mag)
		}
		for _, p := range row.Points {
			tr.Points = append(tr.Points, page.TelescopePoint{Label: p.Label, UTC: time.Time(p.UTC).Format("15:04:05"),
				Local: time.Time(p.UTC).In(n.loc).Format("15:04:05"), LST: planner.FormatHours(p.LSTHours), HA: f(p.HourAngleHours, 3),
				Alt: f(p.AltDeg, 2), Az: f(p.AzDeg, 2), Par: f(p.ParallacticDeg, 1)})
		}
		v.Rows = append(v.Rows, tr)
	}
	s.render(w, r, http.StatusOK, page.Telescope(s.chromeFor(r, u, v.Title, "night"), v))
}

// nightTelescopeExport downloads the telescope sheet as CSV or JSON (GET
// /night/telescope.csv, .json with the Night page's query).
func (s *Server) nightTelescopeExport(ext string) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		n, doc, err := s.telescopeDoc(r, u)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var buf bytes.Buffer
		ctype := "text/csv; charset=utf-8"
		if ext == "json" {
			ctype = "application/json"
			enc := json.NewEncoder(&buf)
			enc.SetIndent("", "  ")
			err = enc.Encode(doc)
		} else {
			var b []byte
			if b, err = export.SheetCSV(doc); err == nil {
				buf.Write(b)
			}
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		download(w, ctype, fileName(n.site.Name+"-"+n.q.date, "telescope", ext), buf.Bytes())
	}
}

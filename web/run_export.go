package web

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"net/http"
	"strconv"
	"time"

	"phasecast/planner"
	"phasecast/web/ical"
)

// runExport downloads a saved run plan as CSV (every block of every night),
// JSON (the whole document) or iCalendar (GET /runs/{id}/plan.csv, .json,
// .ics[?plan=ID]).
func (s *Server) runExport(ext string) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		id, err := pathID(r, "id")
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		want, err := queryID(r.URL.Query(), "plan")
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		plans, doc, planID, err := s.runPlanDoc(r.Context(), u.actor, id, want)
		if err == nil && doc == nil {
			err = errNotFound("This run has no saved plan yet.")
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var stamp time.Time
		for _, p := range plans {
			if p.ID == planID {
				stamp = p.CreatedAt
			}
		}
		var body []byte
		switch ext {
		case "json":
			body, err = json.MarshalIndent(doc, "", "  ")
		case "csv":
			body, err = runCSV(doc)
		default:
			body, err = runICS(doc, planID, stamp)
		}
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		ctype := map[string]string{"csv": "text/csv; charset=utf-8", "json": "application/json", "ics": "text/calendar; charset=utf-8"}[ext]
		download(w, ctype, fileName(doc.Run, "run-plan", ext), body)
	}
}

// runCSV lists every block of every night.
func runCSV(doc *runDoc) ([]byte, error) {
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	if err := cw.Write([]string{"night", "part", "target", "phase_goal", "event", "start_utc", "end_utc", "n_exposures", "exposure_s", "overhead_s",
		"phase_start", "phase_end", "airmass_min", "airmass_max", "priority", "filler"}); err != nil {
		return nil, err
	}
	f := func(x float64) string { return strconv.FormatFloat(x, 'f', 4, 64) }
	for _, n := range doc.Nights {
		for _, b := range n.Blocks {
			goal := ""
			if b.PhaseGoal != nil {
				goal = num(*b.PhaseGoal)
			}
			if err := cw.Write([]string{n.Date, n.Part, planner.SafeCSVCell(b.Target), goal, planner.SafeCSVCell(b.Event), b.Start.String(), b.End.String(), strconv.Itoa(b.NExposures),
				num(b.ExposureS), num(b.OverheadS), f(b.PhaseStart), f(b.PhaseEnd), f(b.AirmassMin), f(b.AirmassMax),
				strconv.Itoa(b.Priority), strconv.FormatBool(b.Filler)}); err != nil {
				return nil, err
			}
		}
	}
	cw.Flush()
	return buf.Bytes(), cw.Error()
}

// runICS writes every block as an event; UIDs come from the plan and the
// block, DTSTAMP is when the plan was made.
func runICS(doc *runDoc, planID int64, stamp time.Time) ([]byte, error) {
	cal := ical.Calendar{ProdID: "-//phasecast//run plan//EN", Name: "Run " + doc.Run}
	for _, n := range doc.Nights {
		for _, b := range n.Blocks {
			start, end := time.Time(b.Start), time.Time(b.End)
			sum := sha256.Sum256([]byte(fmt.Sprintf("%d|%d|%s", doc.RunID, b.TargetID, b.Start.String())))
			goal := "filler"
			if b.PhaseGoal != nil {
				goal = "φ " + num(*b.PhaseGoal)
			}
			cal.Events = append(cal.Events, ical.Event{UID: "run-block-" + hex.EncodeToString(sum[:12]) + "@phasecast", Stamp: stamp,
				Start: start, End: end, Summary: b.Target + " — " + goal,
				Description: fmt.Sprintf("%d × %s s; phases %.3f → %.3f; airmass %.2f–%.2f\n%s", b.NExposures, num(b.ExposureS), b.PhaseStart,
					b.PhaseEnd, b.AirmassMin, b.AirmassMax, cautionText),
				Location: doc.Site.Name, Categories: []string{"phasecast", "observing block"}})
		}
	}
	var buf bytes.Buffer
	err := ical.Encode(&buf, cal)
	return buf.Bytes(), err
}

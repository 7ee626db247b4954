package web

import (
	"errors"
	"fmt"
	"net/http"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// runObserved adds an observing log (CSV) to a run (POST
// /runs/{id}/observed): every row is checked (planner.ParseObservedCSV,
// and each target must be on the run's list) and the whole log is added,
// or nothing with every problem by line.
func (s *Server) runObserved(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	content, _, err := readImport(w, r)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	in, err := s.loadRun(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	obs, problems := logObservations(in, content)
	if len(problems) == 0 {
		if _, err := s.store.AddObservations(r.Context(), u.actor, obs); err != nil {
			if _, _, ok := formErrs(err); !ok {
				s.renderError(w, r, err)
				return
			}
			problems = []string{store.ErrorMessage(err)}
		}
	}
	v, err := s.memberRunView(r, u, in)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	status := http.StatusOK
	if len(problems) > 0 {
		v.LogErrs, v.LogText, status = problems, content, http.StatusUnprocessableEntity
	} else {
		v.LogMsg = fmt.Sprintf("%d exposures added to the run; replan to count them.", len(obs))
	}
	s.render(w, r, status, page.Run(s.chromeFor(r, u, "Run "+in.run.Name, "runs"), v))
}

// logObservations reads a log into observations of the run's targets, or
// the problems by line.
func logObservations(in *runInputs, content string) ([]store.ObservationInput, []string) {
	if strings.TrimSpace(content) == "" {
		return nil, []string{"Choose a file or paste the log."}
	}
	exps, err := planner.ParseObservedCSV(strings.NewReader(content))
	if err != nil {
		var te *planner.TableError
		if errors.As(err, &te) {
			var out []string
			for _, c := range te.Cells {
				out = append(out, c.String())
			}
			return nil, out
		}
		return nil, []string{err.Error()}
	}
	ids := map[string]int64{}
	for _, t := range in.targets {
		ids[t.Target.Name] = t.ID
	}
	var obs []store.ObservationInput
	var problems []string
	for _, e := range exps {
		id, ok := ids[e.Target]
		if !ok {
			problems = append(problems, fmt.Sprintf("line %d, column target: %q is not on the run's list %q", e.Line, e.Target, in.run.Name))
			continue
		}
		st := store.ObsDone
		if e.Failed {
			st = store.ObsFailed
		}
		obs = append(obs, store.ObservationInput{TargetID: id, RunID: in.run.ID, MidUTC: e.Mid, ExposureS: e.ExposureS, Status: st,
			Source: store.ObsFromLog, Note: fmt.Sprintf("observing log line %d", e.Line)})
	}
	return obs, problems
}

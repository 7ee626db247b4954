package web

import (
	"fmt"
	"io"
	"net/http"
	"strings"

	"phasecast/planner"
	"phasecast/store"
)

// maxTimingsBody bounds an uploaded timings file (16 MiB).
const maxTimingsBody = 16 << 20

// apiTimingsUpload adds the timings of a CSV body to a target, all or
// nothing (POST /api/v1/targets/{id}/timings, Content-Type text/csv;
// ?dry_run=1 validates and converts without writing). The format is
// store/FORMAT.md's "Timings CSV"; a bad file is 422 with every bad cell
// in error.cells.
func (s *Server) apiTimingsUpload(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	body, err := io.ReadAll(http.MaxBytesReader(w, r.Body, maxTimingsBody))
	if tl := bodyLimitError(err, "the timings file"); tl != nil {
		s.apiError(w, r, tl)
		return
	}
	if err != nil {
		s.apiError(w, r, fmt.Errorf("%w: read body: %v", errMalformed, err))
		return
	}
	if ct := r.Header.Get("Content-Type"); !strings.HasPrefix(ct, "text/csv") {
		s.apiError(w, r, errInvalid(fmt.Sprintf("Content-Type %q is not accepted; accepted: text/csv (the timings file)", ct)))
		return
	}
	dry := r.URL.Query().Get("dry_run")
	if dry != "" && dry != "0" && dry != "1" {
		s.apiError(w, r, errInvalid(fmt.Sprintf("dry_run %q is not accepted; accepted: 1 (validate only), 0 or empty", dry)))
		return
	}
	got, err := s.store.ImportTimingsCSV(r.Context(), u.actor, id, strings.NewReader(string(body)), dry == "1")
	if err != nil {
		s.apiError(w, r, err)
		return
	}
	out := struct {
		DryRun  bool            `json:"dry_run"`
		Timings []apiTimingJSON `json:"timings"`
	}{DryRun: dry == "1", Timings: []apiTimingJSON{}}
	for _, tm := range got {
		out.Timings = append(out.Timings, timingToJSON(tm))
	}
	status := http.StatusCreated
	if dry == "1" {
		status = http.StatusOK
	}
	writeJSON(w, status, out)
}

// apiTimingJSON is one timing in the API: id (0 in a dry run), the event
// ("" = the reference event of T0), the time as given with its standard and
// form, the same instant on BJD_TDB (a string, every digit kept), the 1σ in
// days, the observer and the note.
type apiTimingJSON struct {
	ID       int64   `json:"id"`
	Event    string  `json:"event"`
	Time     string  `json:"time"`
	Std      string  `json:"std"`
	Form     string  `json:"form"`
	BJDTDB   string  `json:"bjd_tdb"`
	ErrDays  float64 `json:"err_days"`
	Observer string  `json:"observer"`
	Note     string  `json:"note"`
}

func timingToJSON(tm store.Timing) apiTimingJSON {
	return apiTimingJSON{ID: tm.ID, Event: tm.Event, Time: tm.T.Text, Std: string(tm.T.Standard), Form: string(tm.T.Form),
		BJDTDB: planner.FormatEpoch(tm.BJD, planner.FormJD, 10), ErrDays: tm.ErrDays, Observer: tm.Observer, Note: tm.Note}
}

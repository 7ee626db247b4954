package web

import (
	"net/http"
	"strconv"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// timingsPreview shows what uploading a timings file would add to a target,
// writing nothing (POST /targets/{id}/timings/preview): every row converted
// to BJD_TDB, or every bad cell by line and column.
func (s *Server) timingsPreview(w http.ResponseWriter, r *http.Request, u *user) {
	s.timingsUpload(w, r, u, true)
}

// timingsCommit adds the timings of a previewed file to a target, all or
// nothing (POST /targets/{id}/timings/upload).
func (s *Server) timingsCommit(w http.ResponseWriter, r *http.Request, u *user) {
	s.timingsUpload(w, r, u, false)
}

func (s *Server) timingsUpload(w http.ResponseWriter, r *http.Request, u *user, dryRun bool) {
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
	t, err := s.store.GetTarget(r.Context(), u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v := page.TimingsUploadView{TargetID: id, TargetName: t.Target.Name, Content: content, Errs: page.Errs{}}
	status := http.StatusOK
	if strings.TrimSpace(content) == "" {
		v.Errs[""], status = "Choose a file or paste its text.", http.StatusUnprocessableEntity
	} else if got, err := s.store.ImportTimingsCSV(r.Context(), u.actor, id, strings.NewReader(content), dryRun); err != nil {
		var ok bool
		if v.CellErrs, v.Errs, status, ok = importProblems(err); !ok {
			s.renderError(w, r, err)
			return
		}
	} else if !dryRun {
		http.Redirect(w, r, "/targets/"+i64s(id)+"?m=target-saved#timings", http.StatusSeeOther)
		return
	} else {
		v.Rows = timingPreviewRows(got)
	}
	s.render(w, r, status, page.TimingsUpload(s.chromeFor(r, u, "Upload timings", "targets"), v))
}

// timingPreviewRows formats timings for the upload preview.
func timingPreviewRows(tms []store.Timing) []page.TimingPreviewRow {
	out := make([]page.TimingPreviewRow, len(tms))
	for i, tm := range tms {
		ev := "T0 event"
		if tm.Event != "" {
			ev = tm.Event
		}
		out[i] = page.TimingPreviewRow{Event: ev, Time: tm.T.Text + " " + string(tm.T.Standard) + " (" + string(tm.T.Form) + ")",
			BJD: planner.FormatEpoch(tm.BJD, planner.FormJD, 7), ErrS: strconv.FormatFloat(tm.ErrDays*86400, 'g', 4, 64),
			Observer: tm.Observer, Note: tm.Note}
	}
	return out
}

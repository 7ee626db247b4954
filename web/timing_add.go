package web

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// timingAdd adds a measured event time to a target (POST
// /targets/{id}/timings); bad values are shown beside their fields.
func (s *Server) timingAdd(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	f := func(k string) string { return strings.TrimSpace(r.PostFormValue(k)) }
	form := page.TimingForm{Time: f("t"), ErrS: f("err_s"), Obs: f("observer"), Note: f("note"), Errs: page.Errs{},
		Events: []page.Option{{Value: f("event"), Selected: true}}, Std: []page.Option{{Value: f("t_standard"), Selected: true}},
		Forms: []page.Option{{Value: f("t_form"), Selected: true}}}
	in := store.TimingInput{Event: f("event"), Observer: form.Obs, Note: form.Note}
	in.T, err = store.ParseEpoch(form.Time, planner.TimeStandard(f("t_standard")), planner.EpochForm(f("t_form")))
	if err != nil {
		form.Errs["t"] = fmt.Sprintf("“%s” is not accepted: %v", form.Time, err)
	}
	if e, perr := strconv.ParseFloat(form.ErrS, 64); perr != nil {
		form.Errs["err_s"] = fmt.Sprintf("“%s” is not a number of seconds", form.ErrS)
	} else {
		in.ErrDays = e / 86400
	}
	if len(form.Errs) == 0 {
		if _, err = s.store.AddTimings(r.Context(), u.actor, id, []store.TimingInput{in}); err == nil {
			http.Redirect(w, r, "/targets/"+i64s(id)+"?m=target-saved#timings", http.StatusSeeOther)
			return
		}
		errs, _, ok := formErrs(err)
		if !ok {
			s.renderError(w, r, err)
			return
		}
		for k, msg := range errs {
			form.Errs[timingField(k)] = msg
		}
	}
	v, err := s.targetDetail(r.Context(), u, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	v.TimingForm = timingForm(form)
	s.render(w, r, http.StatusUnprocessableEntity, page.TargetDetail(s.chromeFor(r, u, v.Name, "targets"), v))
}

// timingField names the form field of the store's "timings[0].…" field.
func timingField(k string) string {
	switch k = strings.TrimPrefix(k, "timings[0]."); k {
	case "err_days":
		return "err_s"
	case "t", "t_standard", "t_form", "event", "observer", "note":
		return k
	}
	return ""
}

package web

import (
	"fmt"
	"net/http"

	"phasecast/store"
)

// targetRefine adopts the ephemeris refined from the target's timings
// (POST /targets/{id}/refine). The fit is made again here from the stored
// timings, so what is saved is exactly what they support; the old
// ephemeris stays in the history.
func (s *Server) targetRefine(w http.ResponseWriter, r *http.Request, u *user) {
	id, err := pathID(r, "id")
	if err == nil {
		err = parseForm(w, r)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	version, err := formInt64(r, "version")
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	ctx := r.Context()
	t, err := s.store.GetTarget(ctx, u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	timings, err := s.store.ListTimings(ctx, u.actor, id)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	fit, why := proposeFit(t, timings)
	if fit == nil {
		s.renderError(w, r, errInvalid(why))
		return
	}
	prov := store.FitProvenance{Method: "ephem.FitEphemeris, linear weighted least squares", ChiSq: fit.ChiSq, RedChiSq: fit.RedChiSq, Note: fit.Note}
	for _, tm := range timings {
		if tm.Event == "" {
			prov.TimingIDs = append(prov.TimingIDs, tm.ID)
		}
	}
	in := store.EphemerisInput{Ephem: fit.Ephem, T0: store.EpochBJD(fit.Ephem.T0), Source: store.SourceFit, Fit: &prov,
		Note: fmt.Sprintf("refined from %d timings in the web interface", len(prov.TimingIDs))}
	if _, err := s.store.AddEphemeris(ctx, u.actor, id, version, in); err != nil {
		s.renderError(w, r, err)
		return
	}
	http.Redirect(w, r, "/targets/"+i64s(id)+"?m=target-saved", http.StatusSeeOther)
}

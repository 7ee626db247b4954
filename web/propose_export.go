package web

import "net/http"

// proposeExport downloads the proposal as JSON (GET /propose.json with the
// page's query): the document of `phasecast propose --json`.
func (s *Server) proposeExport(w http.ResponseWriter, r *http.Request, u *user) {
	pr, errs, err := s.loadProposal(r.Context(), u.actor, u.team.TeamID, r.URL.Query())
	if err == nil && pr.p == nil && len(errs) == 0 {
		err = errInvalid("Give the candidate nights (semester, or from and to), the exposures per goal (n) and a site and list.")
	}
	for k, v := range errs {
		err = errInvalid(k + ": " + v)
	}
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	body, err := pr.exportJSON()
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	download(w, "application/json", fileName(pr.site.Name+"-"+pr.p.Request.Nights[0].String(), "proposal", "json"), body)
}

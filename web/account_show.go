package web

import (
	"net/http"

	"phasecast/web/page"
)

// accountShow shows the account page (GET /account).
func (s *Server) accountShow(w http.ResponseWriter, r *http.Request, u *user) {
	v, err := s.accountView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.Account(s.chromeFor(r, u, "Account", ""), v))
}

// accountView loads the profile and the API tokens of the account page.
func (s *Server) accountView(r *http.Request, u *user) (page.AccountView, error) {
	me, err := s.store.Me(r.Context(), u.actor)
	if err != nil {
		return page.AccountView{}, err
	}
	toks, err := s.store.ListAPITokens(r.Context(), u.actor)
	if err != nil {
		return page.AccountView{}, err
	}
	v := page.AccountView{Name: me.Name, Email: me.Email, Version: me.Version, HasPassword: me.HasPassword,
		ProfileErrs: page.Errs{}, PassErrs: page.Errs{}, TokenErrs: page.Errs{}}
	for _, t := range toks {
		exp := "never"
		if !t.ExpiresAt.IsZero() {
			exp = fmtUTC(t.ExpiresAt)
		}
		v.Tokens = append(v.Tokens, page.TokenRow{ID: t.ID, Name: t.Name, Created: fmtUTC(t.CreatedAt), Expires: exp,
			LastUsed: fmtUTC(t.LastUsedAt), Revoked: !t.RevokedAt.IsZero()})
	}
	return v, nil
}

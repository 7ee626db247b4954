package web

import (
	"net/http"

	"phasecast/store"
	"phasecast/web/page"
)

// teamShow shows the current team (GET /team).
func (s *Server) teamShow(w http.ResponseWriter, r *http.Request, u *user) {
	v, err := s.teamView(r, u)
	if err != nil {
		s.renderError(w, r, err)
		return
	}
	s.render(w, r, http.StatusOK, page.Team(s.chromeFor(r, u, "Team", "team"), v))
}

// teamView loads the members, invitations (owners) and recent changes.
func (s *Server) teamView(r *http.Request, u *user) (page.TeamView, error) {
	ctx, tid := r.Context(), u.team.TeamID
	members, err := s.store.ListMembers(ctx, u.actor, tid)
	if err != nil {
		return page.TeamView{}, err
	}
	v := page.TeamView{TeamID: tid, TeamName: u.team.TeamName, MyRole: string(u.team.Role),
		IsOwner: u.can(store.ActCreate, store.EntInvitation), Errs: page.Errs{}}
	for _, m := range members {
		v.Members = append(v.Members, page.MemberRow{UserID: m.UserID, Name: m.UserName, Email: m.Email, Role: string(m.Role),
			Version: m.Version, IsMe: m.UserID == u.actor.UserID})
	}
	if v.IsOwner {
		invs, err := s.store.ListInvitations(ctx, u.actor, tid)
		if err != nil {
			return page.TeamView{}, err
		}
		for _, i := range invs {
			v.Invites = append(v.Invites, page.InviteRow{ID: i.ID, Role: string(i.Role), Note: i.Note,
				Created: fmtUTC(i.CreatedAt), Expires: fmtUTC(i.ExpiresAt), State: inviteState(i, s.now())})
		}
	}
	for _, m := range u.actor.Teams {
		v.Teams = append(v.Teams, page.Option{Value: i64s(m.TeamID), Label: m.TeamName + " (" + string(m.Role) + ")", Selected: m.TeamID == tid})
	}
	audit, err := s.store.ListAudit(ctx, u.actor, tid, store.AuditQuery{Limit: 20})
	if err != nil {
		return page.TeamView{}, err
	}
	for _, a := range audit {
		v.Audit = append(v.Audit, page.AuditRow{At: fmtUTC(a.At), Actor: a.Actor, Action: string(a.Action), Entity: a.Entity})
	}
	return v, nil
}

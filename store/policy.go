package store

import (
	"database/sql"
	"errors"
	"fmt"
	"time"
)

// Role is a member's role in a team.
type Role string

// Roles, from most to least powerful. RoleShare is not stored: it is the
// role of a read-only share link within its scope. RoleNone means no
// membership.
const (
	RoleOwner  Role = "owner"
	RoleEditor Role = "editor"
	RoleViewer Role = "viewer"
	RoleShare  Role = "share"
	RoleNone   Role = ""
)

// Valid reports whether r is a role a membership or invitation can have.
func (r Role) Valid() bool { return r == RoleOwner || r == RoleEditor || r == RoleViewer }

// rank orders the member roles; RoleShare and RoleNone rank 0.
func (r Role) rank() int {
	switch r {
	case RoleOwner:
		return 3
	case RoleEditor:
		return 2
	case RoleViewer:
		return 1
	}
	return 0
}

// Action is what an actor wants to do.
type Action string

// Actions.
const (
	ActRead   Action = "read"
	ActCreate Action = "create"
	ActUpdate Action = "update"
	ActDelete Action = "delete"
)

// Entity names a kind of team data.
type Entity string

// Entities. Every one belongs to exactly one team.
const (
	EntTeam        Entity = "team"
	EntMember      Entity = "member"
	EntInvitation  Entity = "invitation"
	EntSite        Entity = "site"
	EntList        Entity = "list"
	EntTarget      Entity = "target"
	EntEphemeris   Entity = "ephemeris"
	EntTiming      Entity = "timing"
	EntRun         Entity = "run"
	EntPlan        Entity = "plan"
	EntObservation Entity = "observation"
	EntShareLink   Entity = "share_link"
	EntAudit       Entity = "audit"
)

// Entities lists every Entity, for tests and documentation.
var Entities = []Entity{EntTeam, EntMember, EntInvitation, EntSite, EntList, EntTarget, EntEphemeris,
	EntTiming, EntRun, EntPlan, EntObservation, EntShareLink, EntAudit}

// Actions lists every Action.
var Actions = []Action{ActRead, ActCreate, ActUpdate, ActDelete}

// grant gives, per action, the least member role allowed ("" = nobody).
type grant struct{ read, create, update, delete Role }

// policy is THE authorization table. Owners run the team (members,
// invitations, renaming, deleting it); editors change the science data and
// share it; viewers read. Ephemerides and saved plans are never updated in
// place (history is kept), so nobody may "update" them.
var policy = map[Entity]grant{
	EntTeam:        {RoleViewer, RoleNone, RoleOwner, RoleOwner}, // creating a team is open to every signed-in user, outside any team
	EntMember:      {RoleViewer, RoleOwner, RoleOwner, RoleOwner},
	EntInvitation:  {RoleOwner, RoleOwner, RoleNone, RoleOwner},
	EntSite:        {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntList:        {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntTarget:      {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntEphemeris:   {RoleViewer, RoleEditor, RoleNone, RoleNone},
	EntTiming:      {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntRun:         {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntPlan:        {RoleViewer, RoleEditor, RoleNone, RoleEditor},
	EntObservation: {RoleViewer, RoleEditor, RoleEditor, RoleEditor},
	EntShareLink:   {RoleEditor, RoleEditor, RoleNone, RoleEditor},
	EntAudit:       {RoleViewer, RoleNone, RoleNone, RoleNone},
}

// shareReadable are the entities a share link may show, within its scope
// (one list, or one run with its site and list).
var shareReadable = map[Entity]bool{
	EntSite: true, EntList: true, EntTarget: true, EntEphemeris: true, EntTiming: true,
	EntRun: true, EntPlan: true, EntObservation: true,
}

// Can is the single policy function: whether a holder of role may perform
// action on entity of a team. Membership (which team) and a share link's
// scope (which list or run) are checked by the store around it; Can decides
// only by role.
func Can(role Role, action Action, entity Entity) bool {
	if role == RoleShare {
		return action == ActRead && shareReadable[entity]
	}
	g, ok := policy[entity]
	if !ok || role.rank() == 0 {
		return false
	}
	var need Role
	switch action {
	case ActRead:
		need = g.read
	case ActCreate:
		need = g.create
	case ActUpdate:
		need = g.update
	case ActDelete:
		need = g.delete
	default:
		return false
	}
	return need != RoleNone && role.rank() >= need.rank()
}

// ActorKind says who is calling.
type ActorKind string

// Actor kinds.
const (
	ActorAnonymous ActorKind = ""
	ActorUser      ActorKind = "user"
	ActorShare     ActorKind = "share"
)

// Actor is the caller of a store method: a signed-in user (through a
// session or an API token), a holder of a share link, or nobody. The web
// layer gets one from SessionActor, APITokenActor or ShareActor and passes
// it to every method; the store decides from it, inside each transaction,
// what the caller may see and do. Teams is a snapshot taken when the actor
// was made, for display only: membership is re-read in every transaction.
type Actor struct {
	Kind      ActorKind
	UserID    int64
	Name      string       // the user's name, or the share link's label
	Via       string       // "session", "api_token", "share_link", "signin_link"
	SessionID int64        // the session the actor came from (0 otherwise)
	Teams     []Membership // user actors: memberships at authentication
	Share     *ShareScope  // share actors: what the link shows
}

// ShareScope is what a share link shows: one list or one run of a team.
type ShareScope struct {
	LinkID    int64
	TeamID    int64
	ListID    int64 // 0 unless the link shows a list
	RunID     int64 // 0 unless the link shows a run
	ExpiresAt time.Time
}

// Anonymous returns the actor of an unauthenticated request.
func Anonymous() Actor { return Actor{} }

// label returns how the actor appears in the audit log.
func (a Actor) label() string {
	switch a.Kind {
	case ActorUser:
		s := fmt.Sprintf("user %d", a.UserID)
		if a.Name != "" {
			s = fmt.Sprintf("%s (user %d)", a.Name, a.UserID)
		}
		if a.Via != "" {
			s += " via " + a.Via
		}
		return s
	case ActorShare:
		if a.Share != nil {
			return fmt.Sprintf("share link %d", a.Share.LinkID)
		}
		return "share link"
	}
	return "system"
}

// userID returns the acting user's id, or nil for the audit log.
func (a Actor) userID() any {
	if a.Kind == ActorUser && a.UserID > 0 {
		return a.UserID
	}
	return nil
}

// scopeRef says where a row sits: its team, and the list, run and site it
// belongs to (0 where not applicable). Share scopes match on these.
type scopeRef struct {
	TeamID, ListID, RunID, SiteID int64
}

// role returns the actor's role for team teamID, read inside the
// transaction: RoleNone for non-members and anonymous callers, RoleShare for
// a live share link of that team.
func (t *txn) role(teamID int64) (Role, error) {
	switch t.actor.Kind {
	case ActorUser:
		var r string
		err := t.queryRow("SELECT role FROM memberships WHERE team_id = ? AND user_id = ?", teamID, t.actor.UserID).Scan(&r)
		if errors.Is(err, sql.ErrNoRows) {
			return RoleNone, nil
		}
		if err != nil {
			return RoleNone, fmt.Errorf("read role: %w", err)
		}
		return Role(r), nil
	case ActorShare:
		if t.actor.Share == nil || t.actor.Share.TeamID != teamID {
			return RoleNone, nil
		}
		live, err := t.shareLinkLive(t.actor.Share.LinkID)
		if err != nil || !live {
			return RoleNone, err
		}
		return RoleShare, nil
	}
	return RoleNone, nil
}

// shareCovers reports whether the actor's share scope includes ref: the
// shared list and its contents, or the shared run with its plans, its list
// (and that list's contents) and its site.
func (t *txn) shareCovers(ref scopeRef) (bool, error) {
	sc := t.actor.Share
	if sc == nil || sc.TeamID != ref.TeamID {
		return false, nil
	}
	if sc.ListID != 0 {
		return ref.ListID == sc.ListID, nil
	}
	if ref.RunID != 0 && ref.RunID == sc.RunID {
		return true, nil
	}
	var listID, siteID int64
	err := t.queryRow("SELECT list_id, site_id FROM runs WHERE id = ?", sc.RunID).Scan(&listID, &siteID)
	if errors.Is(err, sql.ErrNoRows) {
		return false, nil
	}
	if err != nil {
		return false, fmt.Errorf("read shared run: %w", err)
	}
	return (ref.ListID != 0 && ref.ListID == listID) || (ref.SiteID != 0 && ref.SiteID == siteID), nil
}

// authorize decides whether the actor may perform action on entity at ref,
// consulting Can with the actor's role in ref's team (and, for share links,
// the link's scope). A caller who may not even read it gets ENOTFOUND, so
// that nothing outside one's teams is revealed; a caller who may read it
// but not do this gets EFORBIDDEN. what and id name the row for messages.
func (t *txn) authorize(action Action, entity Entity, ref scopeRef, what string, id int64) (Role, error) {
	r, err := t.role(ref.TeamID)
	if err != nil {
		return RoleNone, err
	}
	if r == RoleShare {
		ok, err := t.shareCovers(ref)
		if err != nil {
			return RoleNone, err
		}
		if !ok {
			r = RoleNone
		}
	}
	if Can(r, action, entity) {
		return r, nil
	}
	if !Can(r, ActRead, entity) && !Can(r, ActRead, EntTeam) {
		return r, errNotFound(what, id)
	}
	return r, errForbidden("your role (%s) may not %s this %s", roleName(r), action, entity)
}

func roleName(r Role) string {
	if r == RoleNone {
		return "none"
	}
	return string(r)
}

package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// Team is a group of people sharing targets, sites and runs.
type Team struct {
	ID        int64
	Name      string
	CreatedAt time.Time
	UpdatedAt time.Time
	Version   int64
}

// Membership is a user's role in a team, with names for display.
type Membership struct {
	TeamID    int64
	TeamName  string
	UserID    int64
	UserName  string
	Email     string
	Role      Role
	CreatedAt time.Time
	UpdatedAt time.Time
	Version   int64
}

// Invitation is a one-time link to join a team with a role. The token is
// returned once, by CreateInvitation.
type Invitation struct {
	ID         int64
	TeamID     int64
	TeamName   string
	Role       Role
	Note       string
	CreatedBy  int64
	CreatedAt  time.Time
	ExpiresAt  time.Time
	AcceptedBy int64     // 0 until accepted
	AcceptedAt time.Time // zero until accepted
	RevokedAt  time.Time // zero unless revoked
}

func validName(v *ValidationError, field, name string) {
	if n := utf8.RuneCountInString(name); n < 1 || n > 200 || strings.TrimSpace(name) != name || !validText(name, false) {
		v.add(field, name, "a name of 1 to 200 characters (UTF-8, no control characters) without leading or trailing blanks")
	}
}

// validText reports whether s is valid UTF-8 without control characters
// (NUL included: SQLite's text functions stop at it); multiline text may
// hold line breaks and tabs.
func validText(s string, multiline bool) bool {
	if !utf8.ValidString(s) {
		return false
	}
	for _, r := range s {
		if unicode.IsControl(r) && !(multiline && (r == '\n' || r == '\r' || r == '\t')) {
			return false
		}
	}
	return true
}

// validNotes checks free text of at most max characters.
func validNotes(v *ValidationError, field, s string, max int) {
	if utf8.RuneCountInString(s) > max || !validText(s, true) {
		v.add(field, s, fmt.Sprintf("text of at most %d characters (UTF-8, no control characters other than line breaks and tabs)", max))
	}
}

func scanTeam(sc interface{ Scan(...any) error }) (Team, error) {
	var tm Team
	var c, u string
	if err := sc.Scan(&tm.ID, &tm.Name, &c, &u, &tm.Version); err != nil {
		return Team{}, err
	}
	var err error
	if tm.CreatedAt, err = parseTime(c); err != nil {
		return Team{}, err
	}
	if tm.UpdatedAt, err = parseTime(u); err != nil {
		return Team{}, err
	}
	return tm, nil
}

func getTeam(t *txn, id int64) (Team, error) {
	tm, err := scanTeam(t.queryRow("SELECT id, name, created_at, updated_at, version FROM teams WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return Team{}, errNotFound("team", id)
	}
	if err != nil {
		return Team{}, fmt.Errorf("read team: %w", err)
	}
	return tm, nil
}

// CreateTeam makes a team with the acting user as its owner. Any signed-in
// user may make teams.
func (s *Store) CreateTeam(ctx context.Context, a Actor, name string) (Team, error) {
	const op = "store.CreateTeam"
	if a.Kind != ActorUser {
		return Team{}, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in to make a team"}
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	tm, err := createTeam(t, name)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	return tm, commit(t, op)
}

func createTeam(t *txn, name string) (Team, error) {
	v := &ValidationError{}
	validName(v, "name", name)
	if err := v.err(); err != nil {
		return Team{}, err
	}
	now := fmtTime(t.now)
	id, err := t.insertID("INSERT INTO teams (name, created_at, updated_at, version) VALUES (?, ?, ?, 1)", name, now, now)
	if err != nil {
		return Team{}, fmt.Errorf("insert team: %w", err)
	}
	tm, err := getTeam(t, id)
	if err != nil {
		return Team{}, err
	}
	if err := t.audit(id, EntTeam, id, ActCreate, nil, tm); err != nil {
		return Team{}, err
	}
	if _, err := addMember(t, id, t.actor.UserID, RoleOwner); err != nil {
		return Team{}, err
	}
	return tm, nil
}

// GetTeam returns a team the actor belongs to.
func (s *Store) GetTeam(ctx context.Context, a Actor, id int64) (Team, error) {
	const op = "store.GetTeam"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActRead, EntTeam, scopeRef{TeamID: id}, "team", id); err != nil {
		return Team{}, wrap(op, err)
	}
	tm, err := getTeam(t, id)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	return tm, commit(t, op)
}

// MyTeams returns the acting user's memberships (team, role), by team name.
func (s *Store) MyTeams(ctx context.Context, a Actor) ([]Membership, error) {
	const op = "store.MyTeams"
	if a.Kind != ActorUser {
		return nil, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in first"}
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	ms, err := membershipsOfUser(t, a.UserID)
	if err != nil {
		return nil, wrap(op, err)
	}
	return ms, commit(t, op)
}

// RenameTeam renames a team (owners).
func (s *Store) RenameTeam(ctx context.Context, a Actor, id, version int64, name string) (Team, error) {
	const op = "store.RenameTeam"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActUpdate, EntTeam, scopeRef{TeamID: id}, "team", id); err != nil {
		return Team{}, wrap(op, err)
	}
	before, err := getTeam(t, id)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	if before.Version != version {
		return Team{}, wrap(op, errStale("team", id, version, before.Version, before))
	}
	v := &ValidationError{}
	validName(v, "name", name)
	if err := v.err(); err != nil {
		return Team{}, wrap(op, err)
	}
	if _, err := t.exec("UPDATE teams SET name = ?, updated_at = ?, version = version + 1 WHERE id = ? AND version = ?",
		name, fmtTime(t.now), id, version); err != nil {
		return Team{}, wrap(op, err)
	}
	after, err := getTeam(t, id)
	if err != nil {
		return Team{}, wrap(op, err)
	}
	if err := t.audit(id, EntTeam, id, ActUpdate, before, after); err != nil {
		return Team{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteTeam deletes a team and everything in it (owners): members,
// invitations, sites, lists, targets with their history, runs, plans,
// observations and share links. The audit log keeps its entries.
func (s *Store) DeleteTeam(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteTeam"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActDelete, EntTeam, scopeRef{TeamID: id}, "team", id); err != nil {
		return wrap(op, err)
	}
	before, err := getTeam(t, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("team", id, version, before.Version, before))
	}
	if _, err := t.exec("DELETE FROM teams WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(id, EntTeam, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

const membershipSelect = `SELECT m.team_id, t.name, m.user_id, u.name, u.email, m.role, m.created_at, m.updated_at, m.version
	FROM memberships m JOIN teams t ON t.id = m.team_id JOIN users u ON u.id = m.user_id`

func scanMembership(sc interface{ Scan(...any) error }) (Membership, error) {
	var m Membership
	var role, c, u string
	if err := sc.Scan(&m.TeamID, &m.TeamName, &m.UserID, &m.UserName, &m.Email, &role, &c, &u, &m.Version); err != nil {
		return Membership{}, err
	}
	m.Role = Role(role)
	var err error
	if m.CreatedAt, err = parseTime(c); err != nil {
		return Membership{}, err
	}
	if m.UpdatedAt, err = parseTime(u); err != nil {
		return Membership{}, err
	}
	return m, nil
}

func queryMemberships(t *txn, where string, args ...any) ([]Membership, error) {
	rows, err := t.query(membershipSelect+" WHERE "+where, args...)
	if err != nil {
		return nil, fmt.Errorf("list memberships: %w", err)
	}
	defer rows.Close()
	var out []Membership
	for rows.Next() {
		m, err := scanMembership(rows)
		if err != nil {
			return nil, fmt.Errorf("scan membership: %w", err)
		}
		out = append(out, m)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("list memberships: %w", err)
	}
	return out, nil
}

func membershipsOfUser(t *txn, uid int64) ([]Membership, error) {
	return queryMemberships(t, "m.user_id = ? ORDER BY t.name, t.id", uid)
}

func getMembership(t *txn, teamID, userID int64) (Membership, error) {
	ms, err := queryMemberships(t, "m.team_id = ? AND m.user_id = ?", teamID, userID)
	if err != nil {
		return Membership{}, err
	}
	if len(ms) == 0 {
		return Membership{}, &Error{Code: ENOTFOUND, Message: fmt.Sprintf("user %d is not a member of team %d", userID, teamID)}
	}
	return ms[0], nil
}

func addMember(t *txn, teamID, userID int64, role Role) (Membership, error) {
	now := fmtTime(t.now)
	if _, err := t.exec("INSERT INTO memberships (team_id, user_id, role, created_at, updated_at, version) VALUES (?, ?, ?, ?, ?, 1)",
		teamID, userID, string(role), now, now); err != nil {
		return Membership{}, fmt.Errorf("insert membership: %w", err)
	}
	m, err := getMembership(t, teamID, userID)
	if err != nil {
		return Membership{}, err
	}
	return m, t.audit(teamID, EntMember, userID, ActCreate, nil, m)
}

// ListMembers returns a team's members by name.
func (s *Store) ListMembers(ctx context.Context, a Actor, teamID int64) ([]Membership, error) {
	const op = "store.ListMembers"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActRead, EntMember, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return nil, wrap(op, err)
	}
	ms, err := queryMemberships(t, "m.team_id = ? ORDER BY u.name, u.id", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	return ms, commit(t, op)
}

// ownerCount returns how many owners a team has.
func ownerCount(t *txn, teamID int64) (int, error) {
	var n int
	err := t.queryRow("SELECT count(*) FROM memberships WHERE team_id = ? AND role = 'owner'", teamID).Scan(&n)
	return n, err
}

// SetMemberRole changes a member's role (owners). The last owner cannot
// step down: a team always has an owner.
func (s *Store) SetMemberRole(ctx context.Context, a Actor, teamID, userID, version int64, role Role) (Membership, error) {
	const op = "store.SetMemberRole"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Membership{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActUpdate, EntMember, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return Membership{}, wrap(op, err)
	}
	if !role.Valid() {
		return Membership{}, wrap(op, errInvalid("role: %q is not accepted; accepted: owner, editor, viewer", role))
	}
	before, err := getMembership(t, teamID, userID)
	if err != nil {
		return Membership{}, wrap(op, err)
	}
	if before.Version != version {
		return Membership{}, wrap(op, errStale("membership of user", userID, version, before.Version, before))
	}
	if before.Role == RoleOwner && role != RoleOwner {
		n, err := ownerCount(t, teamID)
		if err != nil {
			return Membership{}, wrap(op, err)
		}
		if n <= 1 {
			return Membership{}, wrap(op, errConflict("the team's last owner cannot step down; make someone else owner first"))
		}
	}
	if _, err := t.exec("UPDATE memberships SET role = ?, updated_at = ?, version = version + 1 WHERE team_id = ? AND user_id = ? AND version = ?",
		string(role), fmtTime(t.now), teamID, userID, version); err != nil {
		return Membership{}, wrap(op, err)
	}
	after, err := getMembership(t, teamID, userID)
	if err != nil {
		return Membership{}, wrap(op, err)
	}
	if err := t.audit(teamID, EntMember, userID, ActUpdate, before, after); err != nil {
		return Membership{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// RemoveMember removes a member from a team: owners may remove anyone, and
// every member may leave. The last owner cannot leave.
func (s *Store) RemoveMember(ctx context.Context, a Actor, teamID, userID int64) error {
	const op = "store.RemoveMember"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	leaving := a.Kind == ActorUser && a.UserID == userID
	action := ActDelete
	if leaving {
		action = ActRead // leaving needs only membership
	}
	if _, err := t.authorize(action, EntMember, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return wrap(op, err)
	}
	before, err := getMembership(t, teamID, userID)
	if err != nil {
		return wrap(op, err)
	}
	if before.Role == RoleOwner {
		n, err := ownerCount(t, teamID)
		if err != nil {
			return wrap(op, err)
		}
		if n <= 1 {
			return wrap(op, errConflict("the team's last owner cannot leave; make someone else owner first, or delete the team"))
		}
	}
	if _, err := t.exec("DELETE FROM memberships WHERE team_id = ? AND user_id = ?", teamID, userID); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(teamID, EntMember, userID, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

const invitationSelect = `SELECT i.id, i.team_id, t.name, i.role, i.note, coalesce(i.created_by, 0), i.created_at, i.expires_at,
	coalesce(i.accepted_by, 0), i.accepted_at, i.revoked_at FROM invitations i JOIN teams t ON t.id = i.team_id`

func scanInvitation(sc interface{ Scan(...any) error }) (Invitation, error) {
	var iv Invitation
	var role, c, e string
	var acc, rev sql.NullString
	if err := sc.Scan(&iv.ID, &iv.TeamID, &iv.TeamName, &role, &iv.Note, &iv.CreatedBy, &c, &e, &iv.AcceptedBy, &acc, &rev); err != nil {
		return Invitation{}, err
	}
	iv.Role = Role(role)
	var err error
	if iv.CreatedAt, err = parseTime(c); err != nil {
		return Invitation{}, err
	}
	if iv.ExpiresAt, err = parseTime(e); err != nil {
		return Invitation{}, err
	}
	if iv.AcceptedAt, err = parseNullTime(acc); err != nil {
		return Invitation{}, err
	}
	if iv.RevokedAt, err = parseNullTime(rev); err != nil {
		return Invitation{}, err
	}
	return iv, nil
}

// CreateInvitation makes a one-time link to join team teamID with role,
// valid for ttl (0 < ttl ≤ MaxInvitationTTL). Owners only. The token is
// returned once; the web layer puts it in a URL.
func (s *Store) CreateInvitation(ctx context.Context, a Actor, teamID int64, role Role, ttl time.Duration, note string) (Invitation, string, error) {
	const op = "store.CreateInvitation"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActCreate, EntInvitation, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	v := &ValidationError{}
	if !role.Valid() {
		v.add("role", string(role), "owner, editor or viewer")
	}
	if ttl <= 0 || ttl > MaxInvitationTTL {
		v.add("ttl", ttl.String(), fmt.Sprintf("more than 0 and at most %v", MaxInvitationTTL))
	}
	validNotes(v, "note", note, 500)
	if err := v.err(); err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	token, hash, err := newToken(prefixInvitation)
	if err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	id, err := t.insertID(`INSERT INTO invitations (team_id, token_hash, role, note, created_by, created_at, expires_at)
		VALUES (?, ?, ?, ?, ?, ?, ?)`, teamID, hash, string(role), note, a.userID(), fmtTime(t.now), fmtTime(t.now.Add(ttl)))
	if err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	iv, err := scanInvitation(t.queryRow(invitationSelect+" WHERE i.id = ?", id))
	if err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	if err := t.audit(teamID, EntInvitation, id, ActCreate, nil, iv); err != nil {
		return Invitation{}, "", wrap(op, err)
	}
	return iv, token, commit(t, op)
}

// ListInvitations returns a team's invitations, newest first (owners).
func (s *Store) ListInvitations(ctx context.Context, a Actor, teamID int64) ([]Invitation, error) {
	const op = "store.ListInvitations"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActRead, EntInvitation, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return nil, wrap(op, err)
	}
	rows, err := t.query(invitationSelect+" WHERE i.team_id = ? ORDER BY i.id DESC", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []Invitation
	for rows.Next() {
		iv, err := scanInvitation(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, iv)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// RevokeInvitation revokes an unused invitation (owners).
func (s *Store) RevokeInvitation(ctx context.Context, a Actor, id int64) error {
	const op = "store.RevokeInvitation"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := scanInvitation(t.queryRow(invitationSelect+" WHERE i.id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return wrap(op, errNotFound("invitation", id))
	}
	if err != nil {
		return wrap(op, err)
	}
	if _, err := t.authorize(ActDelete, EntInvitation, scopeRef{TeamID: before.TeamID}, "invitation", id); err != nil {
		return wrap(op, err)
	}
	if !before.RevokedAt.IsZero() {
		return commit(t, op)
	}
	if before.AcceptedBy != 0 {
		return wrap(op, errConflict("invitation %d was already accepted", id))
	}
	if _, err := t.exec("UPDATE invitations SET revoked_at = ? WHERE id = ?", fmtTime(t.now), id); err != nil {
		return wrap(op, err)
	}
	after := before
	after.RevokedAt = t.now
	if err := t.audit(before.TeamID, EntInvitation, id, ActUpdate, before, after); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// liveInvitation finds the invitation of token if it can still be used.
func liveInvitation(t *txn, token string) (Invitation, error) {
	iv, err := scanInvitation(t.queryRow(invitationSelect+" WHERE i.token_hash = ?", hashToken(token)))
	bad := errForbidden("this invitation link is unknown, used, revoked or expired; ask the team's owner for a new one")
	if errors.Is(err, sql.ErrNoRows) {
		return Invitation{}, bad
	}
	if err != nil {
		return Invitation{}, err
	}
	if iv.AcceptedBy != 0 || !iv.AcceptedAt.IsZero() || !iv.RevokedAt.IsZero() || !t.now.Before(iv.ExpiresAt) {
		return Invitation{}, bad
	}
	return iv, nil
}

// InvitationByToken shows what an invitation link offers (team, role,
// expiry), for the page the link opens. Anyone holding the token may look.
func (s *Store) InvitationByToken(ctx context.Context, token string) (Invitation, error) {
	const op = "store.InvitationByToken"
	t, err := s.beginRead(ctx, Anonymous())
	if err != nil {
		return Invitation{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	iv, err := liveInvitation(t, token)
	if err != nil {
		return Invitation{}, wrap(op, err)
	}
	return iv, commit(t, op)
}

// AcceptInvitation makes the signed-in actor a member of the invitation's
// team with its role. The link is then used up. A current member gets
// ECONFLICT (and the link stays usable for someone else).
func (s *Store) AcceptInvitation(ctx context.Context, a Actor, token string) (Membership, error) {
	const op = "store.AcceptInvitation"
	if a.Kind != ActorUser {
		return Membership{}, &Error{Code: EFORBIDDEN, Op: op, Message: "sign in or make an account to accept"}
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Membership{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	m, err := acceptInvitation(t, token, a.UserID)
	if err != nil {
		return Membership{}, wrap(op, err)
	}
	return m, commit(t, op)
}

func acceptInvitation(t *txn, token string, uid int64) (Membership, error) {
	iv, err := liveInvitation(t, token)
	if err != nil {
		return Membership{}, err
	}
	if _, err := getMembership(t, iv.TeamID, uid); err == nil {
		return Membership{}, errConflict("you are already a member of %s", iv.TeamName)
	}
	if _, err := t.exec("UPDATE invitations SET accepted_by = ?, accepted_at = ? WHERE id = ?", uid, fmtTime(t.now), iv.ID); err != nil {
		return Membership{}, fmt.Errorf("use invitation: %w", err)
	}
	after := iv
	after.AcceptedBy, after.AcceptedAt = uid, t.now
	if err := t.audit(iv.TeamID, EntInvitation, iv.ID, ActUpdate, iv, after); err != nil {
		return Membership{}, err
	}
	return addMember(t, iv.TeamID, uid, iv.Role)
}

// AcceptInvitationNewUser makes an account from nu, accepts the invitation
// for it and opens a session, all in one transaction. It returns the user,
// the membership and the session token.
func (s *Store) AcceptInvitationNewUser(ctx context.Context, token string, nu NewUser) (User, Membership, string, error) {
	const op = "store.AcceptInvitationNewUser"
	if _, err := s.InvitationByToken(ctx, token); err != nil { // before the slow password hash
		return User{}, Membership{}, "", wrap(op, err)
	}
	nu, hash, err := prepareUser(s.pw, nu)
	if err != nil {
		return User{}, Membership{}, "", wrap(op, err)
	}
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return User{}, Membership{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	u, err := createUser(t, nu, hash)
	if err != nil {
		return User{}, Membership{}, "", wrap(op, err)
	}
	t.actor = Actor{Kind: ActorUser, UserID: u.ID, Name: u.Name, Via: "invitation"}
	m, err := acceptInvitation(t, token, u.ID)
	if err != nil {
		return User{}, Membership{}, "", wrap(op, err)
	}
	sess, _, err := createSession(t, u.ID, s.sessionTTL)
	if err != nil {
		return User{}, Membership{}, "", wrap(op, err)
	}
	return u, m, sess, commit(t, op)
}

package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"
	"unicode/utf8"
)

// ShareLink is a read-only link to one list or one run of a team. The
// token is returned once, by CreateShareLink.
type ShareLink struct {
	ID        int64
	TeamID    int64
	ListID    int64 // exactly one of ListID and RunID is set
	RunID     int64
	Label     string
	CreatedBy int64
	CreatedAt time.Time
	ExpiresAt time.Time
	RevokedAt time.Time // zero while live
}

// ShareInput is what a share link is made from: one of ListID and RunID,
// a label, and how long it lives (0 < TTL ≤ MaxShareLinkTTL).
type ShareInput struct {
	ListID int64
	RunID  int64
	Label  string
	TTL    time.Duration
}

const shareCols = `id, team_id, coalesce(list_id, 0), coalesce(run_id, 0), label, coalesce(created_by, 0), created_at,
	expires_at, revoked_at`

func scanShare(sc interface{ Scan(...any) error }) (ShareLink, error) {
	var l ShareLink
	var c, e string
	var r sql.NullString
	if err := sc.Scan(&l.ID, &l.TeamID, &l.ListID, &l.RunID, &l.Label, &l.CreatedBy, &c, &e, &r); err != nil {
		return ShareLink{}, err
	}
	var err error
	if l.CreatedAt, err = parseTime(c); err != nil {
		return ShareLink{}, err
	}
	if l.ExpiresAt, err = parseTime(e); err != nil {
		return ShareLink{}, err
	}
	if l.RevokedAt, err = parseNullTime(r); err != nil {
		return ShareLink{}, err
	}
	return l, nil
}

// shareLinkLive reports whether link id exists, is not revoked and has not
// expired at the transaction's instant.
func (t *txn) shareLinkLive(id int64) (bool, error) {
	l, err := scanShare(t.queryRow("SELECT "+shareCols+" FROM share_links WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return false, nil
	}
	if err != nil {
		return false, fmt.Errorf("read share link: %w", err)
	}
	return l.RevokedAt.IsZero() && t.now.Before(l.ExpiresAt), nil
}

// CreateShareLink makes a read-only link to one list or one run (editors
// and owners).
func (s *Store) CreateShareLink(ctx context.Context, a Actor, in ShareInput) (ShareLink, string, error) {
	const op = "store.CreateShareLink"
	v := &ValidationError{}
	if (in.ListID == 0) == (in.RunID == 0) {
		v.add("scope", "", "exactly one list or one run")
	}
	if utf8.RuneCountInString(in.Label) > MaxNameLen || !validText(in.Label, false) {
		v.add("label", in.Label, fmt.Sprintf("at most %d characters, no control characters", MaxNameLen))
	}
	if in.TTL <= 0 || in.TTL > MaxShareLinkTTL {
		v.add("ttl", in.TTL.String(), fmt.Sprintf("more than 0 and at most %v", MaxShareLinkTTL))
	}
	if err := v.err(); err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	defer t.tx.Rollback()
	var teamID int64
	var list, run any
	if in.ListID != 0 {
		l, err := getList(t, in.ListID)
		if err != nil {
			return ShareLink{}, "", wrap(op, err)
		}
		teamID, list = l.TeamID, in.ListID
	} else {
		r, err := getRun(t, in.RunID)
		if err != nil {
			return ShareLink{}, "", wrap(op, err)
		}
		teamID, run = r.TeamID, in.RunID
	}
	if _, err := t.authorize(ActCreate, EntShareLink, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	token, hash, err := newToken(prefixShare)
	if err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	id, err := t.insertID(`INSERT INTO share_links (team_id, token_hash, list_id, run_id, label, created_by, created_at, expires_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?)`, teamID, hash, list, run, in.Label, a.userID(), fmtTime(t.now), fmtTime(t.now.Add(in.TTL)))
	if err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	l, err := scanShare(t.queryRow("SELECT "+shareCols+" FROM share_links WHERE id = ?", id))
	if err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	if err := t.audit(teamID, EntShareLink, id, ActCreate, nil, l); err != nil {
		return ShareLink{}, "", wrap(op, err)
	}
	return l, token, commit(t, op)
}

// ListShareLinks returns a team's share links, newest first (editors and
// owners).
func (s *Store) ListShareLinks(ctx context.Context, a Actor, teamID int64) ([]ShareLink, error) {
	const op = "store.ListShareLinks"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActRead, EntShareLink, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return nil, wrap(op, err)
	}
	rows, err := t.query("SELECT "+shareCols+" FROM share_links WHERE team_id = ? ORDER BY id DESC", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []ShareLink
	for rows.Next() {
		l, err := scanShare(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, l)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// RevokeShareLink revokes a share link at once (editors and owners).
// Revoking twice is not an error.
func (s *Store) RevokeShareLink(ctx context.Context, a Actor, id int64) error {
	const op = "store.RevokeShareLink"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := scanShare(t.queryRow("SELECT "+shareCols+" FROM share_links WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return wrap(op, errNotFound("share link", id))
	}
	if err != nil {
		return wrap(op, err)
	}
	if _, err := t.authorize(ActDelete, EntShareLink, scopeRef{TeamID: before.TeamID}, "share link", id); err != nil {
		return wrap(op, err)
	}
	if !before.RevokedAt.IsZero() {
		return commit(t, op)
	}
	if _, err := t.exec("UPDATE share_links SET revoked_at = ? WHERE id = ?", fmtTime(t.now), id); err != nil {
		return wrap(op, err)
	}
	after := before
	after.RevokedAt = t.now
	if err := t.audit(before.TeamID, EntShareLink, id, ActUpdate, before, after); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// ShareActor returns the actor of a share-link token: read-only access to
// the link's list or run. An unknown, expired or revoked token is
// EFORBIDDEN. Revocation takes effect at once: every transaction re-checks
// the link.
func (s *Store) ShareActor(ctx context.Context, token string) (Actor, error) {
	const op = "store.ShareActor"
	t, err := s.beginRead(ctx, Anonymous())
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	l, err := scanShare(t.queryRow("SELECT "+shareCols+" FROM share_links WHERE token_hash = ?", hashToken(token)))
	bad := &Error{Code: EFORBIDDEN, Op: op, Message: "this share link is unknown, revoked or expired"}
	if errors.Is(err, sql.ErrNoRows) {
		return Actor{}, bad
	}
	if err != nil {
		return Actor{}, wrap(op, err)
	}
	if !l.RevokedAt.IsZero() || !t.now.Before(l.ExpiresAt) {
		return Actor{}, bad
	}
	a := Actor{Kind: ActorShare, Name: l.Label, Via: "share_link",
		Share: &ShareScope{LinkID: l.ID, TeamID: l.TeamID, ListID: l.ListID, RunID: l.RunID, ExpiresAt: l.ExpiresAt}}
	return a, commit(t, op)
}

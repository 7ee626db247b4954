package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"time"
)

// AuditEntry is one recorded change: who, when, what (entity and id), the
// action, and the row before and after as JSON (null for a create's before
// and a delete's after). Secrets and password hashes never appear.
type AuditEntry struct {
	ID       int64
	At       time.Time
	TeamID   int64 // 0 for account-level changes
	UserID   int64 // 0 for the system
	Actor    string
	Entity   string
	EntityID int64
	Action   Action
	Before   json.RawMessage
	After    json.RawMessage
}

// audit records a change in the same transaction as the change itself, so
// that the two are committed or rolled back together. before and after are
// the row values (nil for none).
func (t *txn) audit(teamID int64, entity Entity, id int64, action Action, before, after any) error {
	bj, err := auditJSON(before)
	if err != nil {
		return err
	}
	aj, err := auditJSON(after)
	if err != nil {
		return err
	}
	var team any
	if teamID > 0 {
		team = teamID
	}
	_, err = t.exec(`INSERT INTO audit_log (at, team_id, user_id, actor, entity, entity_id, action, before_json, after_json)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		fmtTime(t.now), team, t.actor.userID(), t.actor.label(), string(entity), id, string(action), bj, aj)
	if err != nil {
		return fmt.Errorf("write audit entry: %w", err)
	}
	return nil
}

func auditJSON(v any) (any, error) {
	if v == nil {
		return nil, nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return nil, fmt.Errorf("audit JSON: %w", err)
	}
	return string(b), nil
}

// AuditQuery filters ListAudit. Zero fields do not filter.
type AuditQuery struct {
	Entity   Entity
	EntityID int64
	BeforeID int64 // entries with id < BeforeID (paging, newest first)
	Limit    int   // default 100, at most 1000
}

// ListAudit returns a team's audit entries, newest first. Members of every
// role may read it.
func (s *Store) ListAudit(ctx context.Context, a Actor, teamID int64, q AuditQuery) ([]AuditEntry, error) {
	const op = "store.ListAudit"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := t.authorize(ActRead, EntAudit, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return nil, wrap(op, err)
	}
	es, err := listAudit(t, teamID, q)
	if err != nil {
		return nil, wrap(op, err)
	}
	return es, commit(t, op)
}

func listAudit(t *txn, teamID int64, q AuditQuery) ([]AuditEntry, error) {
	if q.Limit <= 0 {
		q.Limit = 100
	}
	if q.Limit > 1000 {
		return nil, errInvalid("limit %d is not accepted; accepted: 1..1000", q.Limit)
	}
	query := `SELECT id, at, coalesce(team_id, 0), coalesce(user_id, 0), actor, entity, entity_id, action,
		before_json, after_json FROM audit_log WHERE team_id = ?`
	args := []any{teamID}
	if q.Entity != "" {
		query += " AND entity = ?"
		args = append(args, string(q.Entity))
	}
	if q.EntityID != 0 {
		query += " AND entity_id = ?"
		args = append(args, q.EntityID)
	}
	if q.BeforeID != 0 {
		query += " AND id < ?"
		args = append(args, q.BeforeID)
	}
	query += " ORDER BY id DESC LIMIT ?"
	args = append(args, q.Limit)
	rows, err := t.query(query, args...)
	if err != nil {
		return nil, fmt.Errorf("list audit: %w", err)
	}
	defer rows.Close()
	var out []AuditEntry
	for rows.Next() {
		var e AuditEntry
		var at, action string
		var before, after sql.NullString
		if err := rows.Scan(&e.ID, &at, &e.TeamID, &e.UserID, &e.Actor, &e.Entity, &e.EntityID, &action, &before, &after); err != nil {
			return nil, fmt.Errorf("scan audit: %w", err)
		}
		if e.At, err = parseTime(at); err != nil {
			return nil, err
		}
		e.Action = Action(action)
		if before.Valid {
			e.Before = json.RawMessage(before.String)
		}
		if after.Valid {
			e.After = json.RawMessage(after.String)
		}
		out = append(out, e)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("list audit: %w", err)
	}
	return out, nil
}

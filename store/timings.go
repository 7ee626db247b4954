package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"phasecast/ephem"
	"phasecast/planner"
)

// Timing is a measured time of an orbital event of a target, kept for
// refining its ephemeris.
type Timing struct {
	ID       int64
	TargetID int64
	// Event is the event timed: "" for the reference event of the target's
	// T0 convention, or a goal event name (planner.EventNames).
	Event     string
	T         Epoch     // as given
	BJD       ephem.JD2 // the same instant on BJD_TDB
	ErrDays   float64   // 1σ, days
	Observer  string
	Note      string
	CreatedBy int64
	CreatedAt time.Time
	UpdatedAt time.Time
	Version   int64
}

// TimingInput is what a timing is made or changed from.
type TimingInput struct {
	Event    string
	T        Epoch
	ErrDays  float64
	Observer string
	Note     string
}

// MaxTimingErrDays bounds a timing's uncertainty (one day).
const MaxTimingErrDays = 1.0

func validateTiming(v *ValidationError, prefix string, in TimingInput, st ephem.Star) (TimingInput, ephem.JD2) {
	if in.Event != "" && !slices.Contains(planner.EventNames(), in.Event) {
		v.add(prefix+"event", in.Event, "empty (the reference event of T0) or one of "+strings.Join(planner.EventNames(), ", "))
	}
	if !finite(in.ErrDays) || in.ErrDays <= 0 || in.ErrDays > MaxTimingErrDays {
		v.add(prefix+"err_days", num(in.ErrDays), fmt.Sprintf("the 1σ uncertainty in days, 0 < σ ≤ %g", MaxTimingErrDays))
	}
	if utf8.RuneCountInString(in.Observer) > MaxNameLen || !validText(in.Observer, false) {
		v.add(prefix+"observer", in.Observer, fmt.Sprintf("at most %d characters, no control characters", MaxNameLen))
	}
	validNotes(v, prefix+"note", in.Note, MaxNotes)
	sub := &ValidationError{}
	e, bjd, ok := resolveEpoch(sub, "time", in.T, st)
	for _, f := range sub.Fields {
		v.add(prefix+f.Field, f.Value, f.Accepted)
	}
	if ok {
		in.T = e
	}
	return in, bjd
}

const timingCols = `id, target_id, event, t_day, t_frac, t_in_day, t_in_frac, t_in_form, t_in_standard, t_in_text, err_days,
	observer, note, coalesce(created_by, 0), created_at, updated_at, version`

func scanTiming(sc interface{ Scan(...any) error }) (Timing, error) {
	var tm Timing
	var form, std, c, u string
	if err := sc.Scan(&tm.ID, &tm.TargetID, &tm.Event, &tm.BJD.Day, &tm.BJD.Frac, &tm.T.JD.Day, &tm.T.JD.Frac, &form, &std,
		&tm.T.Text, &tm.ErrDays, &tm.Observer, &tm.Note, &tm.CreatedBy, &c, &u, &tm.Version); err != nil {
		return Timing{}, err
	}
	tm.T.Form, tm.T.Standard = ephem.EpochForm(form), ephem.TimeStandard(std)
	var err error
	if tm.CreatedAt, err = parseTime(c); err != nil {
		return Timing{}, err
	}
	if tm.UpdatedAt, err = parseTime(u); err != nil {
		return Timing{}, err
	}
	return tm, nil
}

func getTiming(t *txn, id int64) (Timing, error) {
	tm, err := scanTiming(t.queryRow("SELECT "+timingCols+" FROM timings WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return Timing{}, errNotFound("timing", id)
	}
	if err != nil {
		return Timing{}, fmt.Errorf("read timing: %w", err)
	}
	return tm, nil
}

// AddTimings adds timings to a target, all or none (editors and owners).
// Every bad input is reported, as fields "timings[i].…".
func (s *Store) AddTimings(ctx context.Context, a Actor, targetID int64, in []TimingInput) ([]Timing, error) {
	const op = "store.AddTimings"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	out, err := addTimings(t, targetID, in)
	if err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

func addTimings(t *txn, targetID int64, in []TimingInput) ([]Timing, error) {
	st, err := authorizedTarget(t, ActCreate, EntTiming, targetID)
	if err != nil {
		return nil, err
	}
	if len(in) == 0 || len(in) > 100000 {
		return nil, errInvalid("timings: %d given; accepted: 1 to 100000", len(in))
	}
	v := &ValidationError{}
	bjds := make([]ephem.JD2, len(in))
	for i := range in {
		in[i], bjds[i] = validateTiming(v, fmt.Sprintf("timings[%d].", i), in[i], st.Target.Star())
	}
	if err := v.err(); err != nil {
		return nil, err
	}
	now := fmtTime(t.now)
	out := make([]Timing, 0, len(in))
	for i, x := range in {
		id, err := t.insertID(`INSERT INTO timings (target_id, event, t_day, t_frac, t_in_day, t_in_frac, t_in_form, t_in_standard,
			t_in_text, err_days, observer, note, created_by, created_at, updated_at, version)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1)`,
			targetID, x.Event, bjds[i].Day, bjds[i].Frac, x.T.JD.Day, x.T.JD.Frac, string(x.T.Form), string(x.T.Standard),
			x.T.Text, x.ErrDays, x.Observer, x.Note, t.actor.userID(), now, now)
		if err != nil {
			return nil, fmt.Errorf("insert timing: %w", err)
		}
		tm, err := getTiming(t, id)
		if err != nil {
			return nil, err
		}
		if err := t.audit(st.TeamID, EntTiming, id, ActCreate, nil, tm); err != nil {
			return nil, err
		}
		out = append(out, tm)
	}
	return out, nil
}

// ListTimings returns a target's timings in time order.
func (s *Store) ListTimings(ctx context.Context, a Actor, targetID int64) ([]Timing, error) {
	const op = "store.ListTimings"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := authorizedTarget(t, ActRead, EntTiming, targetID); err != nil {
		return nil, wrap(op, err)
	}
	rows, err := t.query("SELECT "+timingCols+" FROM timings WHERE target_id = ? ORDER BY t_day, t_frac, id", targetID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []Timing
	for rows.Next() {
		tm, err := scanTiming(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, tm)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// authorizedTiming reads timing id and checks the actor may do action.
func authorizedTiming(t *txn, action Action, id int64) (Timing, StoredTarget, error) {
	tm, err := getTiming(t, id)
	if err != nil {
		return Timing{}, StoredTarget{}, err
	}
	st, err := getTarget(t, tm.TargetID)
	if err != nil {
		return Timing{}, StoredTarget{}, err
	}
	if _, err := t.authorize(action, EntTiming, scopeRef{TeamID: st.TeamID, ListID: st.ListID}, "timing", id); err != nil {
		return Timing{}, StoredTarget{}, err
	}
	return tm, st, nil
}

// UpdateTiming changes a timing (editors and owners); version must be
// current.
func (s *Store) UpdateTiming(ctx context.Context, a Actor, id, version int64, in TimingInput) (Timing, error) {
	const op = "store.UpdateTiming"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Timing{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, st, err := authorizedTiming(t, ActUpdate, id)
	if err != nil {
		return Timing{}, wrap(op, err)
	}
	if before.Version != version {
		return Timing{}, wrap(op, errStale("timing", id, version, before.Version, before))
	}
	v := &ValidationError{}
	in, bjd := validateTiming(v, "", in, st.Target.Star())
	if err := v.err(); err != nil {
		return Timing{}, wrap(op, err)
	}
	if _, err := t.exec(`UPDATE timings SET event = ?, t_day = ?, t_frac = ?, t_in_day = ?, t_in_frac = ?, t_in_form = ?,
		t_in_standard = ?, t_in_text = ?, err_days = ?, observer = ?, note = ?, updated_at = ?, version = version + 1
		WHERE id = ? AND version = ?`,
		in.Event, bjd.Day, bjd.Frac, in.T.JD.Day, in.T.JD.Frac, string(in.T.Form), string(in.T.Standard), in.T.Text,
		in.ErrDays, in.Observer, in.Note, fmtTime(t.now), id, version); err != nil {
		return Timing{}, wrap(op, err)
	}
	after, err := getTiming(t, id)
	if err != nil {
		return Timing{}, wrap(op, err)
	}
	if err := t.audit(st.TeamID, EntTiming, id, ActUpdate, before, after); err != nil {
		return Timing{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteTiming deletes a timing (editors and owners). Fitted ephemerides
// that used it keep its id in their provenance.
func (s *Store) DeleteTiming(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteTiming"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, st, err := authorizedTiming(t, ActDelete, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("timing", id, version, before.Version, before))
	}
	if _, err := t.exec("DELETE FROM timings WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(st.TeamID, EntTiming, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

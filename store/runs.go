package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"
	"unicode/utf8"

	"phasecast/ephem"
	"phasecast/planner"
)

// NightPart says which part of a night is allocated.
type NightPart string

// Night parts. The halves split the night at the middle of the dark time.
const (
	NightFull       NightPart = "full"
	NightFirstHalf  NightPart = "first_half"
	NightSecondHalf NightPart = "second_half"
)

// RunNight is one allocated night: the local calendar date at the site on
// which the night begins (evening), and the part allocated.
type RunNight struct {
	Date string    `json:"date"` // YYYY-MM-DD
	Part NightPart `json:"part"`
}

// Run is an observing run: nights at one site on one target list, with
// constraints.
type Run struct {
	ID          int64
	TeamID      int64
	Name        string
	SiteID      int64
	ListID      int64
	Nights      []RunNight // in date order
	Constraints planner.Constraints
	Notes       string
	CreatedAt   time.Time
	UpdatedAt   time.Time
	Version     int64
}

// RunInput is what a run is made or changed from.
type RunInput struct {
	Name        string
	SiteID      int64
	ListID      int64
	Nights      []RunNight
	Constraints planner.Constraints
	Notes       string
}

// MaxRunNights is the most nights a run may hold (a year and a day).
const MaxRunNights = 366

// validateNights checks dates (YYYY-MM-DD), parts, order (ascending) and
// overlap: a date appears once, or twice as its two halves.
func validateNights(v *ValidationError, nights []RunNight) {
	if len(nights) == 0 || len(nights) > MaxRunNights {
		v.add("nights", fmt.Sprintf("%d nights", len(nights)), fmt.Sprintf("1 to %d nights", MaxRunNights))
		return
	}
	prev := ""
	prevPart := NightPart("")
	for i, n := range nights {
		f := fmt.Sprintf("nights[%d]", i)
		if _, _, _, err := ephem.ParseDate(n.Date); err != nil || len(n.Date) != 10 {
			v.add(f+".date", n.Date, "a date YYYY-MM-DD (the local evening the night begins)")
			continue
		}
		switch n.Part {
		case NightFull, NightFirstHalf, NightSecondHalf:
		default:
			v.add(f+".part", string(n.Part), "full, first_half or second_half")
			continue
		}
		switch {
		case n.Date < prev:
			v.add(f+".date", n.Date, "nights in date order (after "+prev+")")
		case n.Date == prev && !(prevPart == NightFirstHalf && n.Part == NightSecondHalf):
			v.add(f+".date", n.Date, "each night once; the same date twice only as first_half then second_half")
		}
		prev, prevPart = n.Date, n.Part
	}
}

func validateRun(in RunInput) *ValidationError {
	v := &ValidationError{}
	validName(v, "name", in.Name)
	validateNights(v, in.Nights)
	validateConstraints(v, "constraints.", in.Constraints)
	validNotes(v, "notes", in.Notes, MaxNotes)
	return v
}

const runCols = `id, team_id, name, site_id, list_id, nights_json, constraints_json, notes, created_at, updated_at, version`

func scanRun(sc interface{ Scan(...any) error }) (Run, error) {
	var r Run
	var nj, cj, c, u string
	if err := sc.Scan(&r.ID, &r.TeamID, &r.Name, &r.SiteID, &r.ListID, &nj, &cj, &r.Notes, &c, &u, &r.Version); err != nil {
		return Run{}, err
	}
	if err := json.Unmarshal([]byte(nj), &r.Nights); err != nil {
		return Run{}, fmt.Errorf("run %d nights: %w", r.ID, err)
	}
	if err := json.Unmarshal([]byte(cj), &r.Constraints); err != nil {
		return Run{}, fmt.Errorf("run %d constraints: %w", r.ID, err)
	}
	var err error
	if r.CreatedAt, err = parseTime(c); err != nil {
		return Run{}, err
	}
	if r.UpdatedAt, err = parseTime(u); err != nil {
		return Run{}, err
	}
	return r, nil
}

func getRun(t *txn, id int64) (Run, error) {
	r, err := scanRun(t.queryRow("SELECT "+runCols+" FROM runs WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return Run{}, errNotFound("run", id)
	}
	if err != nil {
		return Run{}, fmt.Errorf("read run: %w", err)
	}
	return r, nil
}

// authorizedRun reads run id and checks the actor may do action on entity
// (EntRun, or EntPlan for its plans).
func authorizedRun(t *txn, action Action, entity Entity, id int64) (Run, error) {
	r, err := getRun(t, id)
	if err != nil {
		return Run{}, err
	}
	if _, err := t.authorize(action, entity, scopeRef{TeamID: r.TeamID, RunID: id}, "run", id); err != nil {
		return Run{}, err
	}
	return r, nil
}

// checkRunRefs checks that the site and the list are the team's (an
// invisible one is reported as not found).
func checkRunRefs(t *txn, teamID int64, in RunInput) error {
	var n int
	if err := t.queryRow("SELECT count(*) FROM sites WHERE id = ? AND team_id = ?", in.SiteID, teamID).Scan(&n); err != nil {
		return err
	}
	if n == 0 {
		return &Error{Code: EINVALID, Message: fmt.Sprintf("site_id: %d is not a site of this team", in.SiteID)}
	}
	if err := t.queryRow("SELECT count(*) FROM target_lists WHERE id = ? AND team_id = ?", in.ListID, teamID).Scan(&n); err != nil {
		return err
	}
	if n == 0 {
		return &Error{Code: EINVALID, Message: fmt.Sprintf("list_id: %d is not a list of this team", in.ListID)}
	}
	return nil
}

func runNameTaken(t *txn, teamID int64, name string, except int64) error {
	var n int
	if err := t.queryRow("SELECT count(*) FROM runs WHERE team_id = ? AND name = ? AND id != ?", teamID, name, except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return errConflict("the team already has a run named %q", name)
	}
	return nil
}

func runJSON(in RunInput) (string, string, error) {
	nights := append([]RunNight(nil), in.Nights...)
	nj, err := json.Marshal(nights)
	if err != nil {
		return "", "", err
	}
	cj, err := json.Marshal(in.Constraints)
	if err != nil {
		return "", "", err
	}
	return string(nj), string(cj), nil
}

// CreateRun makes a run (editors and owners). Its site and list must be the
// team's.
func (s *Store) CreateRun(ctx context.Context, a Actor, teamID int64, in RunInput) (Run, error) {
	const op = "store.CreateRun"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	r, err := createRun(t, teamID, in)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	return r, commit(t, op)
}

func createRun(t *txn, teamID int64, in RunInput) (Run, error) {
	if _, err := t.authorize(ActCreate, EntRun, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return Run{}, err
	}
	if err := validateRun(in).err(); err != nil {
		return Run{}, err
	}
	if err := checkRunRefs(t, teamID, in); err != nil {
		return Run{}, err
	}
	if err := runNameTaken(t, teamID, in.Name, 0); err != nil {
		return Run{}, err
	}
	nj, cj, err := runJSON(in)
	if err != nil {
		return Run{}, err
	}
	now := fmtTime(t.now)
	id, err := t.insertID(`INSERT INTO runs (team_id, name, site_id, list_id, nights_json, constraints_json, notes, created_at,
		updated_at, version) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, 1)`,
		teamID, in.Name, in.SiteID, in.ListID, nj, cj, in.Notes, now, now)
	if err != nil {
		return Run{}, fmt.Errorf("insert run: %w", err)
	}
	r, err := getRun(t, id)
	if err != nil {
		return Run{}, err
	}
	return r, t.audit(teamID, EntRun, id, ActCreate, nil, r)
}

// GetRun returns one run.
func (s *Store) GetRun(ctx context.Context, a Actor, id int64) (Run, error) {
	const op = "store.GetRun"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	r, err := authorizedRun(t, ActRead, EntRun, id)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	return r, commit(t, op)
}

// ListRuns returns a team's runs, latest first night first (for a share
// link: only the shared run).
func (s *Store) ListRuns(ctx context.Context, a Actor, teamID int64) ([]Run, error) {
	const op = "store.ListRuns"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	role, err := t.role(teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	if !Can(role, ActRead, EntRun) {
		return nil, wrap(op, errNotFound("team", teamID))
	}
	rows, err := t.query("SELECT "+runCols+" FROM runs WHERE team_id = ? ORDER BY id", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []Run
	for rows.Next() {
		r, err := scanRun(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	if role == RoleShare {
		if out, err = filterCovered(t, out, func(r Run) scopeRef { return scopeRef{TeamID: teamID, RunID: r.ID} }); err != nil {
			return nil, wrap(op, err)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return firstNight(out[i]) > firstNight(out[j]) })
	return out, commit(t, op)
}

func firstNight(r Run) string {
	if len(r.Nights) == 0 {
		return ""
	}
	return r.Nights[0].Date
}

// UpdateRun changes a run (editors and owners); version must be current.
func (s *Store) UpdateRun(ctx context.Context, a Actor, id, version int64, in RunInput) (Run, error) {
	const op = "store.UpdateRun"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedRun(t, ActUpdate, EntRun, id)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	if before.Version != version {
		return Run{}, wrap(op, errStale("run", id, version, before.Version, before))
	}
	if err := validateRun(in).err(); err != nil {
		return Run{}, wrap(op, err)
	}
	if err := checkRunRefs(t, before.TeamID, in); err != nil {
		return Run{}, wrap(op, err)
	}
	if err := runNameTaken(t, before.TeamID, in.Name, id); err != nil {
		return Run{}, wrap(op, err)
	}
	nj, cj, err := runJSON(in)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	if _, err := t.exec(`UPDATE runs SET name = ?, site_id = ?, list_id = ?, nights_json = ?, constraints_json = ?, notes = ?,
		updated_at = ?, version = version + 1 WHERE id = ? AND version = ?`,
		in.Name, in.SiteID, in.ListID, nj, cj, in.Notes, fmtTime(t.now), id, version); err != nil {
		return Run{}, wrap(op, err)
	}
	after, err := getRun(t, id)
	if err != nil {
		return Run{}, wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntRun, id, ActUpdate, before, after); err != nil {
		return Run{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteRun deletes a run with its saved plans and share links (editors
// and owners). Observations made during it are kept, no longer tied to it.
func (s *Store) DeleteRun(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteRun"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedRun(t, ActDelete, EntRun, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("run", id, version, before.Version, before))
	}
	if _, err := t.exec("DELETE FROM runs WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntRun, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// --- saved plans ---

// SavedPlan is a plan kept as it was made: the inputs given to the planner,
// its output, and the engine version that made it. Plans are never changed.
type SavedPlan struct {
	ID            int64
	RunID         int64
	Name          string
	EngineVersion string
	Inputs        json.RawMessage // empty in ListPlans
	Output        json.RawMessage // empty in ListPlans
	CreatedBy     int64
	CreatedAt     time.Time
}

// SavedPlanInput is what a saved plan is made from.
type SavedPlanInput struct {
	Name          string
	EngineVersion string
	Inputs        json.RawMessage
	Output        json.RawMessage
}

// MaxPlanJSON bounds the inputs and the output of a saved plan (bytes each).
const MaxPlanJSON = 32 << 20

func scanPlan(sc interface{ Scan(...any) error }, full bool) (SavedPlan, error) {
	var p SavedPlan
	var in, out, c string
	dest := []any{&p.ID, &p.RunID, &p.Name, &p.EngineVersion, &p.CreatedBy, &c}
	if full {
		dest = append(dest, &in, &out)
	}
	if err := sc.Scan(dest...); err != nil {
		return SavedPlan{}, err
	}
	if full {
		p.Inputs, p.Output = json.RawMessage(in), json.RawMessage(out)
	}
	var err error
	p.CreatedAt, err = parseTime(c)
	return p, err
}

const planCols = "id, run_id, name, engine_version, coalesce(created_by, 0), created_at"

// MaxPlansPerRun is how many saved plans a run keeps: saving one more
// deletes the oldest (each deletion audited), so that repeated planning
// cannot fill the disk. Observations belong to the run, not to a plan, so
// nothing marked is lost; an old plan can be made again from its inputs.
const MaxPlansPerRun = 50

// SavePlan keeps a plan for a run (editors and owners); a run keeps its
// newest MaxPlansPerRun plans.
func (s *Store) SavePlan(ctx context.Context, a Actor, runID int64, in SavedPlanInput) (SavedPlan, error) {
	const op = "store.SavePlan"
	v := &ValidationError{}
	if utf8.RuneCountInString(in.Name) > MaxNameLen || !validText(in.Name, false) {
		v.add("name", in.Name, fmt.Sprintf("at most %d characters, no control characters", MaxNameLen))
	}
	if n := len(in.EngineVersion); n < 1 || n > 100 || !validText(in.EngineVersion, false) {
		v.add("engine_version", in.EngineVersion, "the planner version that made the plan, 1 to 100 characters")
	}
	for _, f := range []struct {
		name string
		raw  json.RawMessage
	}{{"inputs", in.Inputs}, {"output", in.Output}} {
		if len(f.raw) == 0 || len(f.raw) > MaxPlanJSON || !json.Valid(f.raw) {
			v.add(f.name, "", fmt.Sprintf("a JSON document of at most %d bytes", MaxPlanJSON))
		}
	}
	if err := v.err(); err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	r, err := authorizedRun(t, ActCreate, EntPlan, runID)
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	id, err := t.insertID(`INSERT INTO saved_plans (run_id, name, engine_version, inputs_json, output_json, created_by, created_at)
		VALUES (?, ?, ?, ?, ?, ?, ?)`, runID, in.Name, in.EngineVersion, string(in.Inputs), string(in.Output), a.userID(), fmtTime(t.now))
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	p, err := scanPlan(t.queryRow("SELECT "+planCols+", inputs_json, output_json FROM saved_plans WHERE id = ?", id), true)
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	// The audit keeps the plan's identity, not its (large) documents.
	if err := t.audit(r.TeamID, EntPlan, id, ActCreate, nil, planSummary(p)); err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	if err := prunePlans(t, r); err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	return p, commit(t, op)
}

// prunePlans deletes the plans of run r beyond its newest MaxPlansPerRun.
func prunePlans(t *txn, r Run) error {
	rows, err := t.query("SELECT "+planCols+" FROM saved_plans WHERE run_id = ? ORDER BY id DESC "+t.d.offsetOnly(), r.ID, MaxPlansPerRun)
	if err != nil {
		return err
	}
	var old []SavedPlan
	for rows.Next() {
		p, err := scanPlan(rows, false)
		if err != nil {
			rows.Close()
			return err
		}
		old = append(old, p)
	}
	if err := rows.Err(); err != nil {
		rows.Close()
		return err
	}
	if err := rows.Close(); err != nil {
		return err
	}
	for _, p := range old {
		if _, err := t.exec("DELETE FROM saved_plans WHERE id = ?", p.ID); err != nil {
			return err
		}
		if err := t.audit(r.TeamID, EntPlan, p.ID, ActDelete, p, nil); err != nil {
			return fmt.Errorf("prune plan %d of run %d: %w", p.ID, r.ID, err)
		}
	}
	return nil
}

func planSummary(p SavedPlan) SavedPlan {
	p.Inputs, p.Output = nil, nil
	return p
}

// ListPlans returns a run's saved plans, newest first, without their
// documents (GetPlan has them).
func (s *Store) ListPlans(ctx context.Context, a Actor, runID int64) ([]SavedPlan, error) {
	const op = "store.ListPlans"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := authorizedRun(t, ActRead, EntPlan, runID); err != nil {
		return nil, wrap(op, err)
	}
	rows, err := t.query("SELECT "+planCols+" FROM saved_plans WHERE run_id = ? ORDER BY id DESC", runID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []SavedPlan
	for rows.Next() {
		p, err := scanPlan(rows, false)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, p)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// GetPlan returns a saved plan with its inputs and output.
func (s *Store) GetPlan(ctx context.Context, a Actor, id int64) (SavedPlan, error) {
	const op = "store.GetPlan"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	p, _, err := authorizedPlan(t, ActRead, id)
	if err != nil {
		return SavedPlan{}, wrap(op, err)
	}
	return p, commit(t, op)
}

func authorizedPlan(t *txn, action Action, id int64) (SavedPlan, Run, error) {
	p, err := scanPlan(t.queryRow("SELECT "+planCols+", inputs_json, output_json FROM saved_plans WHERE id = ?", id), true)
	if errors.Is(err, sql.ErrNoRows) {
		return SavedPlan{}, Run{}, errNotFound("plan", id)
	}
	if err != nil {
		return SavedPlan{}, Run{}, err
	}
	r, err := getRun(t, p.RunID)
	if err != nil {
		return SavedPlan{}, Run{}, err
	}
	if _, err := t.authorize(action, EntPlan, scopeRef{TeamID: r.TeamID, RunID: r.ID}, "plan", id); err != nil {
		return SavedPlan{}, Run{}, err
	}
	return p, r, nil
}

// DeletePlan deletes a saved plan (editors and owners).
func (s *Store) DeletePlan(ctx context.Context, a Actor, id int64) error {
	const op = "store.DeletePlan"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	p, r, err := authorizedPlan(t, ActDelete, id)
	if err != nil {
		return wrap(op, err)
	}
	if _, err := t.exec("DELETE FROM saved_plans WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(r.TeamID, EntPlan, id, ActDelete, planSummary(p), nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// --- observations ---

// ObsStatus says whether an exposure was taken or lost.
type ObsStatus string

// Observation statuses.
const (
	ObsDone   ObsStatus = "done"
	ObsFailed ObsStatus = "failed" // lost: clouds, fault, …
)

// ObsSource says how an observation was recorded.
type ObsSource string

// Observation sources.
const (
	ObsFromLog    ObsSource = "log"    // read from an observing log
	ObsFromBlock  ObsSource = "block"  // a planned block marked done or failed
	ObsFromManual ObsSource = "manual" // entered by hand
	ObsFromDemo   ObsSource = "demo"   // the invented demo scenario
)

// Observation is one exposure of a target, as taken (or lost).
type Observation struct {
	ID        int64
	TargetID  int64
	RunID     int64     // 0 when not tied to a run
	MidUTC    time.Time // mid-exposure, UTC
	ExposureS float64   // length, s (0 if unknown)
	Status    ObsStatus
	Source    ObsSource
	// GoalCenter is the phase-goal centre the exposure was meant for, if
	// known (nil otherwise).
	GoalCenter *float64
	Note       string
	CreatedBy  int64
	CreatedAt  time.Time
	UpdatedAt  time.Time
	Version    int64
}

// Start returns the exposure's start (mid-time minus half its length).
func (o Observation) Start() time.Time {
	return o.MidUTC.Add(-time.Duration(o.ExposureS * 0.5 * float64(time.Second)))
}

// ObservationInput is what an observation is made or changed from. Give
// MidUTC, or StartUTC with ExposureS; not both.
type ObservationInput struct {
	TargetID   int64
	RunID      int64
	MidUTC     time.Time
	StartUTC   time.Time
	ExposureS  float64
	Status     ObsStatus
	Source     ObsSource
	GoalCenter *float64
	Note       string
}

// Observation time limits: years MinYear..MaxYear of ephem.
func validateObservation(v *ValidationError, prefix string, in ObservationInput) (mid time.Time) {
	if !finite(in.ExposureS) || in.ExposureS < 0 || in.ExposureS > planner.MaxExposureS {
		v.add(prefix+"exposure_s", num(in.ExposureS), fmt.Sprintf("exposure length 0..%g seconds (0 = unknown)", planner.MaxExposureS))
	}
	switch {
	case !in.MidUTC.IsZero() && !in.StartUTC.IsZero():
		v.add(prefix+"start_utc", fmtTime(in.StartUTC), "either the mid-time or the start (with the length), not both")
	case !in.MidUTC.IsZero():
		mid = in.MidUTC.UTC()
	case !in.StartUTC.IsZero():
		mid = in.StartUTC.UTC().Add(time.Duration(in.ExposureS * 0.5 * float64(time.Second)))
	default:
		v.add(prefix+"mid_utc", "", "the mid-exposure time (or the start time and the length), UTC")
	}
	if !mid.IsZero() && (mid.Year() < ephem.MinYear || mid.Year() > ephem.MaxYear) {
		v.add(prefix+"mid_utc", fmtTime(mid), fmt.Sprintf("a time in the years %d to %d", ephem.MinYear, ephem.MaxYear))
	}
	switch in.Status {
	case ObsDone, ObsFailed:
	default:
		v.add(prefix+"status", string(in.Status), "done or failed")
	}
	switch in.Source {
	case ObsFromLog, ObsFromBlock, ObsFromManual, ObsFromDemo:
	default:
		v.add(prefix+"source", string(in.Source), "log, block, manual or demo")
	}
	if g := in.GoalCenter; g != nil && (!finite(*g) || *g < 0 || *g >= 1) {
		v.add(prefix+"goal_center", num(*g), "a phase 0 ≤ φ < 1, or none")
	}
	validNotes(v, prefix+"note", in.Note, MaxNotes)
	return mid
}

const obsCols = `id, target_id, coalesce(run_id, 0), mid_utc, exposure_s, status, source, goal_center, note,
	coalesce(created_by, 0), created_at, updated_at, version`

func scanObservation(sc interface{ Scan(...any) error }) (Observation, error) {
	var o Observation
	var mid, status, source, c, u string
	var gc sql.NullFloat64
	if err := sc.Scan(&o.ID, &o.TargetID, &o.RunID, &mid, &o.ExposureS, &status, &source, &gc, &o.Note, &o.CreatedBy,
		&c, &u, &o.Version); err != nil {
		return Observation{}, err
	}
	o.Status, o.Source = ObsStatus(status), ObsSource(source)
	if gc.Valid {
		g := gc.Float64
		o.GoalCenter = &g
	}
	var err error
	if o.MidUTC, err = parseTime(mid); err != nil {
		return Observation{}, err
	}
	if o.CreatedAt, err = parseTime(c); err != nil {
		return Observation{}, err
	}
	if o.UpdatedAt, err = parseTime(u); err != nil {
		return Observation{}, err
	}
	return o, nil
}

func getObservation(t *txn, id int64) (Observation, error) {
	o, err := scanObservation(t.queryRow("SELECT "+obsCols+" FROM observations WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return Observation{}, errNotFound("observation", id)
	}
	if err != nil {
		return Observation{}, fmt.Errorf("read observation: %w", err)
	}
	return o, nil
}

// obsRef returns where an observation of targetID (during runID) sits,
// checking that the run, if any, is of the target's team and uses its list.
func obsRef(t *txn, targetID, runID int64, prefix string) (scopeRef, error) {
	var ref scopeRef
	err := t.queryRow("SELECT l.team_id, t.list_id FROM targets t JOIN target_lists l ON l.id = t.list_id WHERE t.id = ?", targetID).
		Scan(&ref.TeamID, &ref.ListID)
	if errors.Is(err, sql.ErrNoRows) {
		return scopeRef{}, errNotFound("target", targetID)
	}
	if err != nil {
		return scopeRef{}, err
	}
	if runID != 0 {
		var team, list int64
		err := t.queryRow("SELECT team_id, list_id FROM runs WHERE id = ?", runID).Scan(&team, &list)
		if errors.Is(err, sql.ErrNoRows) || (err == nil && team != ref.TeamID) {
			return scopeRef{}, errInvalid("%srun_id: %d is not a run of the target's team", prefix, runID)
		}
		if err != nil {
			return scopeRef{}, err
		}
		if list != ref.ListID {
			return scopeRef{}, errInvalid("%srun_id: run %d does not observe the target's list", prefix, runID)
		}
		ref.RunID = runID
	}
	return ref, nil
}

// AddObservations records exposures, all or none (editors and owners).
// Every bad input is reported, as fields "observations[i].…".
func (s *Store) AddObservations(ctx context.Context, a Actor, in []ObservationInput) ([]Observation, error) {
	const op = "store.AddObservations"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	out, err := addObservations(t, in)
	if err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

func addObservations(t *txn, in []ObservationInput) ([]Observation, error) {
	if len(in) == 0 || len(in) > 100000 {
		return nil, errInvalid("observations: %d given; accepted: 1 to 100000", len(in))
	}
	v := &ValidationError{}
	mids := make([]time.Time, len(in))
	refs := make([]scopeRef, len(in))
	for i, x := range in {
		prefix := fmt.Sprintf("observations[%d].", i)
		mids[i] = validateObservation(v, prefix, x)
		ref, err := obsRef(t, x.TargetID, x.RunID, prefix)
		if err != nil {
			var e *Error
			if errors.As(err, &e) && e.Code == EINVALID {
				v.add(prefix+"run_id", fmt.Sprint(x.RunID), strings.TrimPrefix(e.Message, prefix+"run_id: "))
				continue
			}
			return nil, err // ENOTFOUND for a missing target, as for an invisible one below
		}
		if _, err := t.authorize(ActCreate, EntObservation, ref, "target", x.TargetID); err != nil {
			return nil, err
		}
		refs[i] = ref
	}
	if err := v.err(); err != nil {
		return nil, err
	}
	now := fmtTime(t.now)
	out := make([]Observation, 0, len(in))
	for i, x := range in {
		var run any
		if x.RunID != 0 {
			run = x.RunID
		}
		id, err := t.insertID(`INSERT INTO observations (target_id, run_id, mid_utc, exposure_s, status, source, goal_center, note,
			created_by, created_at, updated_at, version) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1)`,
			x.TargetID, run, fmtTime(mids[i]), x.ExposureS, string(x.Status), string(x.Source), x.GoalCenter, x.Note,
			t.actor.userID(), now, now)
		if err != nil {
			return nil, fmt.Errorf("insert observation: %w", err)
		}
		o, err := getObservation(t, id)
		if err != nil {
			return nil, err
		}
		if err := t.audit(refs[i].TeamID, EntObservation, id, ActCreate, nil, o); err != nil {
			return nil, err
		}
		out = append(out, o)
	}
	return out, nil
}

// ObservationFilter selects observations: of one target, of every target of
// one list, or of one run (exactly one of the three), optionally within
// [From, To) of mid-time.
type ObservationFilter struct {
	TargetID int64
	ListID   int64
	RunID    int64
	From, To time.Time
}

// ListObservations returns observations in mid-time order.
func (s *Store) ListObservations(ctx context.Context, a Actor, f ObservationFilter) ([]Observation, error) {
	const op = "store.ListObservations"
	n := 0
	for _, id := range []int64{f.TargetID, f.ListID, f.RunID} {
		if id != 0 {
			n++
		}
	}
	if n != 1 {
		return nil, &Error{Code: EINVALID, Op: op, Message: "give exactly one of target, list or run"}
	}
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	q := "SELECT " + obsCols + " FROM observations WHERE "
	var arg int64
	switch {
	case f.TargetID != 0:
		if _, err := authorizedTarget(t, ActRead, EntObservation, f.TargetID); err != nil {
			return nil, wrap(op, err)
		}
		q, arg = q+"target_id = ?", f.TargetID
	case f.ListID != 0:
		if _, err := authorizedList(t, ActRead, EntObservation, f.ListID); err != nil {
			return nil, wrap(op, err)
		}
		q, arg = q+"target_id IN (SELECT id FROM targets WHERE list_id = ?)", f.ListID
	default:
		if _, err := authorizedRun(t, ActRead, EntObservation, f.RunID); err != nil {
			return nil, wrap(op, err)
		}
		q, arg = q+"run_id = ?", f.RunID
	}
	args := []any{arg}
	if !f.From.IsZero() {
		q += " AND mid_utc >= ?"
		args = append(args, fmtTime(f.From))
	}
	if !f.To.IsZero() {
		q += " AND mid_utc < ?"
		args = append(args, fmtTime(f.To))
	}
	rows, err := t.query(q+" ORDER BY mid_utc, id", args...)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []Observation
	for rows.Next() {
		o, err := scanObservation(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, o)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

func authorizedObservation(t *txn, action Action, id int64) (Observation, scopeRef, error) {
	o, err := getObservation(t, id)
	if err != nil {
		return Observation{}, scopeRef{}, err
	}
	ref, err := obsRef(t, o.TargetID, 0, "")
	if err != nil {
		return Observation{}, scopeRef{}, err
	}
	ref.RunID = o.RunID
	if _, err := t.authorize(action, EntObservation, ref, "observation", id); err != nil {
		return Observation{}, scopeRef{}, err
	}
	return o, ref, nil
}

// UpdateObservation changes an observation (editors and owners), e.g. to
// mark it failed; version must be current. Its target cannot change.
func (s *Store) UpdateObservation(ctx context.Context, a Actor, id, version int64, in ObservationInput) (Observation, error) {
	const op = "store.UpdateObservation"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return Observation{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, ref, err := authorizedObservation(t, ActUpdate, id)
	if err != nil {
		return Observation{}, wrap(op, err)
	}
	if before.Version != version {
		return Observation{}, wrap(op, errStale("observation", id, version, before.Version, before))
	}
	if in.TargetID != 0 && in.TargetID != before.TargetID {
		return Observation{}, wrap(op, errInvalid("target_id: an observation cannot move to another target; delete it and add a new one"))
	}
	v := &ValidationError{}
	mid := validateObservation(v, "", in)
	if err := v.err(); err != nil {
		return Observation{}, wrap(op, err)
	}
	if _, err := obsRef(t, before.TargetID, in.RunID, ""); err != nil {
		return Observation{}, wrap(op, err)
	}
	var run any
	if in.RunID != 0 {
		run = in.RunID
	}
	if _, err := t.exec(`UPDATE observations SET run_id = ?, mid_utc = ?, exposure_s = ?, status = ?, source = ?, goal_center = ?,
		note = ?, updated_at = ?, version = version + 1 WHERE id = ? AND version = ?`,
		run, fmtTime(mid), in.ExposureS, string(in.Status), string(in.Source), in.GoalCenter, in.Note, fmtTime(t.now), id, version); err != nil {
		return Observation{}, wrap(op, err)
	}
	after, err := getObservation(t, id)
	if err != nil {
		return Observation{}, wrap(op, err)
	}
	if err := t.audit(ref.TeamID, EntObservation, id, ActUpdate, before, after); err != nil {
		return Observation{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteObservation deletes an observation (editors and owners).
func (s *Store) DeleteObservation(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteObservation"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, ref, err := authorizedObservation(t, ActDelete, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("observation", id, version, before.Version, before))
	}
	if _, err := t.exec("DELETE FROM observations WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(ref.TeamID, EntObservation, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"phasecast/ephem"
	"phasecast/planner"
)

// TargetList is a team's named list of targets.
type TargetList struct {
	ID          int64
	TeamID      int64
	Name        string
	Description string
	NTargets    int
	CreatedAt   time.Time
	UpdatedAt   time.Time
	Version     int64
}

// ListInput is what a list is made or changed from.
type ListInput struct {
	Name        string
	Description string
}

// EphemerisSource says where an ephemeris came from.
type EphemerisSource string

// Ephemeris sources.
const (
	SourceEntered EphemerisSource = "entered" // typed in a form or sent through the API
	SourceImport  EphemerisSource = "import"  // from an imported file
	SourceFit     EphemerisSource = "fit"     // refined from timings (see Fit)
	SourceDemo    EphemerisSource = "demo"    // the invented demo scenario
)

// FitProvenance records how a refined ephemeris was made. When and by whom
// are the record's CreatedAt and CreatedBy.
type FitProvenance struct {
	Method    string  `json:"method"`    // e.g. "ephem.FitEphemeris, linear weighted least squares"
	Quadratic bool    `json:"quadratic"` // Ṗ fitted
	TimingIDs []int64 `json:"timing_ids"`
	ChiSq     float64 `json:"chi_sq"`
	RedChiSq  float64 `json:"red_chi_sq"`
	Note      string  `json:"note"` // e.g. the fit's note on moving T0
}

// EphemerisRecord is one ephemeris in a target's history. Records are only
// ever added; the newest is the target's current ephemeris.
type EphemerisRecord struct {
	ID            int64
	TargetID      int64
	Ephem         ephem.Ephemeris // T0 on BJD_TDB
	T0            Epoch           // T0 as it was given
	Source        EphemerisSource
	Fit           *FitProvenance // set when Source is SourceFit
	Note          string
	CreatedBy     int64 // 0 for the system
	CreatedByName string
	CreatedAt     time.Time
}

// StoredTarget is a target on a list, with its current ephemeris.
type StoredTarget struct {
	ID     int64
	ListID int64
	TeamID int64
	// Target is the planner's view; Target.Ephem is Ephemeris.Ephem.
	Target    planner.Target
	Ephemeris EphemerisRecord
	CreatedAt time.Time
	UpdatedAt time.Time
	Version   int64
}

// TargetInput is what a target is made or changed from. Target.Ephem.T0 is
// ignored: T0 (with its standard) is converted into it.
type TargetInput struct {
	Target planner.Target
	T0     Epoch
	// EphemNote is kept with the ephemeris record when this input makes a
	// new one (a new target, or a changed ephemeris).
	EphemNote string
}

// EphemerisInput is a new ephemeris for a target (a refinement). Ephem.T0
// is ignored: T0 is converted into it.
type EphemerisInput struct {
	Ephem  ephem.Ephemeris
	T0     Epoch
	Source EphemerisSource
	Fit    *FitProvenance
	Note   string
}

// Limits on targets.
const (
	MaxTags    = 30
	MaxTagLen  = 40
	MaxNameLen = 200
	MaxTargets = planner.MaxTargetRows // per list, and per imported file (50000)
)

// ephemField maps ephem.Ephemeris.Validate's field names to the names the
// store uses in forms, files and errors.
var ephemField = map[string]string{
	"t0": "t0", "t0_err": "t0_err_days", "period": "period_days", "period_err": "period_err_days",
	"cov_t0_p": "cov_t0_period", "pdot": "pdot", "pdot_err": "pdot_err", "cov_t0_pdot": "cov_t0_pdot",
	"cov_p_pdot": "cov_period_pdot", "convention": "t0_convention", "phase_offset": "phase_offset",
	"ecc": "ecc", "omega": "omega_deg",
}

// addEphemError adds ephem's error for a field under the store's name.
func addEphemError(v *ValidationError, err error) {
	var ie *ephem.InputError
	if errors.As(err, &ie) {
		f := ie.Field
		if n, ok := ephemField[f]; ok {
			f = n
		}
		v.add(f, strings.Trim(ie.Value, `"`), ie.Accepted)
		return
	}
	v.add("ephemeris", "", err.Error())
}

// resolveEpoch validates an epoch and returns it with its BJD_TDB value.
func resolveEpoch(v *ValidationError, field string, e Epoch, st ephem.Star) (Epoch, ephem.JD2, bool) {
	out, bjd, err := e.resolve(st)
	if err != nil {
		var ie *ephem.InputError
		if errors.As(err, &ie) {
			f, val := field, e.Text
			switch ie.Field {
			case "standard", "from standard":
				f, val = field+"_standard", string(e.Standard)
			case "form":
				f, val = field+"_form", string(e.Form)
			}
			v.add(f, val, ie.Accepted)
		} else {
			v.add(field, e.Text, err.Error())
		}
		return Epoch{}, ephem.JD2{}, false
	}
	return out, bjd, true
}

// CheckTargetInput validates in without storing it: nil, or the EINVALID
// error CreateTarget would return, carrying every rejected field (a
// *ValidationError). Forms call it to report all bad fields at once.
func CheckTargetInput(in TargetInput) error {
	_, v := validateTargetInput(in)
	return v.err()
}

// validateTargetInput checks every field, and returns the input with T0
// resolved: Target.Ephem.T0 is set to the BJD_TDB value and T0 to the epoch
// as given. Field names are those of the target file format (FORMAT.md).
func validateTargetInput(in TargetInput) (TargetInput, *ValidationError) {
	v := &ValidationError{}
	t := &in.Target
	validName(v, "name", t.Name)
	addProblems(v, planner.TargetProblems(*t), false) // the target's own fields; its goals after the ephemeris
	validateTags(v, t.Tags)
	validNotes(v, "notes", t.Notes, MaxNotes)
	ephemOK := false
	if e, bjd, ok := resolveEpoch(v, "t0", in.T0, t.Star()); ok {
		in.T0 = e
		t.Ephem.T0 = bjd
		if err := t.Ephem.Validate(); err != nil {
			addEphemError(v, err)
		} else {
			ephemOK = true
		}
	} else if err := (ephem.Ephemeris{T0: ephem.JD2{Day: 2451544.5, Frac: 0.5}, T0ErrDays: t.Ephem.T0ErrDays, PeriodDays: t.Ephem.PeriodDays,
		PeriodErr: t.Ephem.PeriodErr, CovT0P: t.Ephem.CovT0P, Pdot: t.Ephem.Pdot, PdotErr: t.Ephem.PdotErr, Convention: t.Ephem.Convention,
		PhaseOffset: t.Ephem.PhaseOffset, Ecc: t.Ephem.Ecc, OmegaDeg: t.Ephem.OmegaDeg, CovT0Pdot: t.Ephem.CovT0Pdot,
		CovPPdot: t.Ephem.CovPPdot}).Validate(); err != nil {
		addEphemError(v, err) // the rest of the ephemeris, checked with a stand-in T0
	}
	// The goals once T0 is resolved: the rulebook resolves goal events
	// against a valid ephemeris only, so without one it must resolve none.
	checked := *t
	if !ephemOK {
		checked.Ephem.T0 = ephem.JD2{}
	}
	addProblems(v, planner.TargetProblems(checked), true)
	// The brightness after the rulebook, as the planner checks it.
	if b, err := ephem.ParseBand(t.Band); err == nil {
		t.Band = string(b) // stored as the trade writes it, without blanks
	}
	if err := planner.ValidateBrightness(*t); err != nil {
		addInputError(v, "", err)
	}
	validNotes(v, "ephem_note", in.EphemNote, MaxNotes)
	return in, v
}

func validateTags(v *ValidationError, tags []string) {
	if len(tags) > MaxTags {
		v.add("tags", strconv.Itoa(len(tags))+" tags", fmt.Sprintf("at most %d tags", MaxTags))
		return
	}
	seen := map[string]bool{}
	for _, tag := range tags {
		if n := utf8.RuneCountInString(tag); n < 1 || n > MaxTagLen || strings.TrimSpace(tag) != tag ||
			strings.ContainsAny(tag, ";,") || !validText(tag, false) || seen[tag] {
			v.add("tags", tag, fmt.Sprintf("tags of 1 to %d characters, without ';', ',' or surrounding blanks, each once", MaxTagLen))
		}
		seen[tag] = true
	}
}

// addProblems adds to v the rules a target breaks (planner.TargetProblems,
// the one rulebook for targets): those of its goals, or of its own fields.
func addProblems(v *ValidationError, ps []planner.TargetProblem, goals bool) {
	for _, p := range ps {
		if strings.HasPrefix(p.Field, "goals") == goals {
			v.add(p.Field, p.Value, p.Accepted)
		}
	}
}

// validateEphemerisInput checks a new ephemeris for a target at st.
func validateEphemerisInput(in EphemerisInput, st ephem.Star) (EphemerisInput, *ValidationError) {
	v := &ValidationError{}
	if e, bjd, ok := resolveEpoch(v, "t0", in.T0, st); ok {
		in.T0 = e
		in.Ephem.T0 = bjd
		if err := in.Ephem.Validate(); err != nil {
			addEphemError(v, err)
		}
	}
	switch in.Source {
	case SourceEntered, SourceImport, SourceDemo:
		if in.Fit != nil {
			v.add("fit", "", "fit provenance only with source fit")
		}
	case SourceFit:
		if in.Fit == nil || strings.TrimSpace(in.Fit.Method) == "" {
			v.add("fit", "", "the fit's provenance (method, timings used) for source fit")
		}
	default:
		v.add("source", string(in.Source), "entered, import, fit or demo")
	}
	validNotes(v, "note", in.Note, MaxNotes)
	return in, v
}

// --- lists ---

const listSelect = `SELECT l.id, l.team_id, l.name, l.description,
	(SELECT count(*) FROM targets t WHERE t.list_id = l.id), l.created_at, l.updated_at, l.version FROM target_lists l`

func scanList(sc interface{ Scan(...any) error }) (TargetList, error) {
	var l TargetList
	var c, u string
	if err := sc.Scan(&l.ID, &l.TeamID, &l.Name, &l.Description, &l.NTargets, &c, &u, &l.Version); err != nil {
		return TargetList{}, err
	}
	var err error
	if l.CreatedAt, err = parseTime(c); err != nil {
		return TargetList{}, err
	}
	if l.UpdatedAt, err = parseTime(u); err != nil {
		return TargetList{}, err
	}
	return l, nil
}

func getList(t *txn, id int64) (TargetList, error) {
	l, err := scanList(t.queryRow(listSelect+" WHERE l.id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return TargetList{}, errNotFound("list", id)
	}
	if err != nil {
		return TargetList{}, fmt.Errorf("read list: %w", err)
	}
	return l, nil
}

// authorizedList reads list id and checks the actor may do action on
// entity (EntList, or EntTarget for the list's contents) in it.
func authorizedList(t *txn, action Action, entity Entity, id int64) (TargetList, error) {
	l, err := getList(t, id)
	if err != nil {
		return TargetList{}, err
	}
	if _, err := t.authorize(action, entity, scopeRef{TeamID: l.TeamID, ListID: id}, "list", id); err != nil {
		return TargetList{}, err
	}
	return l, nil
}

func validateList(in ListInput) error {
	v := &ValidationError{}
	validName(v, "name", in.Name)
	validNotes(v, "description", in.Description, MaxNotes)
	return v.err()
}

func listNameTaken(t *txn, teamID int64, name string, except int64) error {
	var n int
	if err := t.queryRow("SELECT count(*) FROM target_lists WHERE team_id = ? AND name = ? AND id != ?", teamID, name, except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return errConflict("the team already has a list named %q", name)
	}
	return nil
}

// CreateList makes an empty target list (editors and owners).
func (s *Store) CreateList(ctx context.Context, a Actor, teamID int64, in ListInput) (TargetList, error) {
	const op = "store.CreateList"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	l, err := createList(t, teamID, in)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	return l, commit(t, op)
}

func createList(t *txn, teamID int64, in ListInput) (TargetList, error) {
	if _, err := t.authorize(ActCreate, EntList, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return TargetList{}, err
	}
	if err := validateList(in); err != nil {
		return TargetList{}, err
	}
	if err := listNameTaken(t, teamID, in.Name, 0); err != nil {
		return TargetList{}, err
	}
	now := fmtTime(t.now)
	id, err := t.insertID("INSERT INTO target_lists (team_id, name, description, created_at, updated_at, version) VALUES (?, ?, ?, ?, ?, 1)",
		teamID, in.Name, in.Description, now, now)
	if err != nil {
		return TargetList{}, fmt.Errorf("insert list: %w", err)
	}
	l, err := getList(t, id)
	if err != nil {
		return TargetList{}, err
	}
	return l, t.audit(teamID, EntList, id, ActCreate, nil, l)
}

// GetList returns one list.
func (s *Store) GetList(ctx context.Context, a Actor, id int64) (TargetList, error) {
	const op = "store.GetList"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	l, err := authorizedList(t, ActRead, EntList, id)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	return l, commit(t, op)
}

// ListLists returns a team's lists by name (for a share link: only what it
// shows).
func (s *Store) ListLists(ctx context.Context, a Actor, teamID int64) ([]TargetList, error) {
	const op = "store.ListLists"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	role, err := t.role(teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	if !Can(role, ActRead, EntList) {
		return nil, wrap(op, errNotFound("team", teamID))
	}
	rows, err := t.query(listSelect+" WHERE l.team_id = ? ORDER BY l.name, l.id", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []TargetList
	for rows.Next() {
		l, err := scanList(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, l)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	if role == RoleShare {
		if out, err = filterCovered(t, out, func(l TargetList) scopeRef { return scopeRef{TeamID: teamID, ListID: l.ID} }); err != nil {
			return nil, wrap(op, err)
		}
	}
	return out, commit(t, op)
}

// UpdateList renames or redescribes a list (editors and owners).
func (s *Store) UpdateList(ctx context.Context, a Actor, id, version int64, in ListInput) (TargetList, error) {
	const op = "store.UpdateList"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedList(t, ActUpdate, EntList, id)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	if before.Version != version {
		return TargetList{}, wrap(op, errStale("list", id, version, before.Version, before))
	}
	if err := validateList(in); err != nil {
		return TargetList{}, wrap(op, err)
	}
	if err := listNameTaken(t, before.TeamID, in.Name, id); err != nil {
		return TargetList{}, wrap(op, err)
	}
	if _, err := t.exec("UPDATE target_lists SET name = ?, description = ?, updated_at = ?, version = version + 1 WHERE id = ? AND version = ?",
		in.Name, in.Description, fmtTime(t.now), id, version); err != nil {
		return TargetList{}, wrap(op, err)
	}
	after, err := getList(t, id)
	if err != nil {
		return TargetList{}, wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntList, id, ActUpdate, before, after); err != nil {
		return TargetList{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteList deletes a list with its targets, their ephemeris history,
// timings and observations, and the share links that show it (editors and
// owners). A list that a run uses is ECONFLICT.
func (s *Store) DeleteList(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteList"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedList(t, ActDelete, EntList, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("list", id, version, before.Version, before))
	}
	if err := notUsedByRuns(t, "list_id", id, "list"); err != nil {
		return wrap(op, err)
	}
	if _, err := t.exec("DELETE FROM target_lists WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntList, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// --- targets ---

const ephemCols = `e.id, e.target_id, e.t0_day, e.t0_frac, e.t0_in_day, e.t0_in_frac, e.t0_in_form, e.t0_in_standard,
	e.t0_in_text, e.t0_err_days, e.period_days, e.period_err_days, e.cov_t0_period, e.pdot, e.pdot_err, e.cov_t0_pdot,
	e.cov_p_pdot, e.convention, e.phase_offset, e.ecc, e.omega_deg, e.source, e.fit_json, e.note,
	coalesce(e.created_by, 0), coalesce(u.name, ''), e.created_at`

const targetSelect = `SELECT t.id, t.list_id, l.team_id, t.name, t.ra_deg, t.dec_deg, t.pm_ra_masyr, t.pm_dec_masyr, t.mag,
	t.band, t.faint_mag, t.faint_phase, t.bright_mag, t.bright_phase,
	t.priority, t.acquire_s, t.goals_json, t.tags_json, t.notes, t.rv_model, t.rv_k_kms, t.rv_sigma_kms, t.rv_want_rel_k,
	t.created_at, t.updated_at, t.version, ` + ephemCols + `
	FROM targets t
	JOIN target_lists l ON l.id = t.list_id
	JOIN ephemerides e ON e.id = (SELECT max(id) FROM ephemerides WHERE target_id = t.id)
	LEFT JOIN users u ON u.id = e.created_by`

// ephemDest returns the scan destinations of ephemCols into r; finish
// completes r after the scan.
func ephemDest(r *EphemerisRecord, s *ephemScan) []any {
	e := &r.Ephem
	return []any{&r.ID, &r.TargetID, &e.T0.Day, &e.T0.Frac, &r.T0.JD.Day, &r.T0.JD.Frac, &s.form, &s.std, &r.T0.Text,
		&e.T0ErrDays, &e.PeriodDays, &e.PeriodErr, &e.CovT0P, &e.Pdot, &e.PdotErr, &e.CovT0Pdot, &e.CovPPdot, &s.conv,
		&e.PhaseOffset, &e.Ecc, &e.OmegaDeg, &s.source, &s.fit, &r.Note, &r.CreatedBy, &r.CreatedByName, &s.created}
}

type ephemScan struct{ form, std, conv, source, fit, created string }

func (s *ephemScan) finish(r *EphemerisRecord) error {
	r.T0.Form = ephem.EpochForm(s.form)
	r.T0.Standard = ephem.TimeStandard(s.std)
	r.Ephem.Convention = ephem.Convention(s.conv)
	r.Source = EphemerisSource(s.source)
	if r.Source == SourceFit {
		r.Fit = &FitProvenance{}
		if err := json.Unmarshal([]byte(s.fit), r.Fit); err != nil {
			return fmt.Errorf("ephemeris %d fit: %w", r.ID, err)
		}
	}
	var err error
	r.CreatedAt, err = parseTime(s.created)
	return err
}

func scanTarget(sc interface{ Scan(...any) error }) (StoredTarget, error) {
	var st StoredTarget
	var goals, tags, c, u, rvModel string
	var rv planner.RVGoal
	var es ephemScan
	tg := &st.Target
	dest := []any{&st.ID, &st.ListID, &st.TeamID, &tg.Name, &tg.RADeg, &tg.DecDeg, &tg.PMRAmasyr, &tg.PMDecmasyr, &tg.Mag,
		&tg.Band, &tg.FaintMag, &tg.FaintPhase, &tg.BrightMag, &tg.BrightPhase,
		&tg.Priority, &tg.AcquireS, &goals, &tags, &tg.Notes, &rvModel, &rv.KKms, &rv.SigmaVKms, &rv.WantRelK, &c, &u, &st.Version}
	dest = append(dest, ephemDest(&st.Ephemeris, &es)...)
	if err := sc.Scan(dest...); err != nil {
		return StoredTarget{}, err
	}
	if err := es.finish(&st.Ephemeris); err != nil {
		return StoredTarget{}, err
	}
	if err := json.Unmarshal([]byte(goals), &tg.Goals); err != nil {
		return StoredTarget{}, fmt.Errorf("target %d goals: %w", st.ID, err)
	}
	if err := json.Unmarshal([]byte(tags), &tg.Tags); err != nil {
		return StoredTarget{}, fmt.Errorf("target %d tags: %w", st.ID, err)
	}
	if rvModel != "" {
		rv.Model = planner.RVModel(rvModel)
		tg.RV = &rv
	}
	tg.Ephem = st.Ephemeris.Ephem
	var err error
	if st.CreatedAt, err = parseTime(c); err != nil {
		return StoredTarget{}, err
	}
	if st.UpdatedAt, err = parseTime(u); err != nil {
		return StoredTarget{}, err
	}
	return st, nil
}

func getTarget(t *txn, id int64) (StoredTarget, error) {
	st, err := scanTarget(t.queryRow(targetSelect+" WHERE t.id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return StoredTarget{}, errNotFound("target", id)
	}
	if err != nil {
		return StoredTarget{}, fmt.Errorf("read target: %w", err)
	}
	return st, nil
}

// authorizedTarget reads target id and checks the actor may do action on
// entity (EntTarget, or EntEphemeris/EntTiming for its parts).
func authorizedTarget(t *txn, action Action, entity Entity, id int64) (StoredTarget, error) {
	st, err := getTarget(t, id)
	if err != nil {
		return StoredTarget{}, err
	}
	if _, err := t.authorize(action, entity, scopeRef{TeamID: st.TeamID, ListID: st.ListID}, "target", id); err != nil {
		return StoredTarget{}, err
	}
	return st, nil
}

func listTargets(t *txn, listID int64) ([]StoredTarget, error) {
	rows, err := t.query(targetSelect+" WHERE t.list_id = ? ORDER BY t.name, t.id", listID)
	if err != nil {
		return nil, fmt.Errorf("list targets: %w", err)
	}
	defer rows.Close()
	var out []StoredTarget
	for rows.Next() {
		st, err := scanTarget(rows)
		if err != nil {
			return nil, fmt.Errorf("scan target: %w", err)
		}
		out = append(out, st)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("list targets: %w", err)
	}
	return out, nil
}

func targetJSON(tg planner.Target) (goals, tags string, err error) {
	g := tg.Goals
	if g == nil {
		g = []planner.Goal{}
	}
	tg.Tags = append([]string{}, tg.Tags...)
	gb, err := json.Marshal(g)
	if err != nil {
		return "", "", err
	}
	tb, err := json.Marshal(tg.Tags)
	if err != nil {
		return "", "", err
	}
	return string(gb), string(tb), nil
}

// rvColumns returns the rv_ columns of a target's RV goal (model ” and
// zeros for none).
func rvColumns(g *planner.RVGoal) [4]any {
	if g == nil {
		return [4]any{"", 0.0, 0.0, 0.0}
	}
	return [4]any{string(g.Model), g.KKms, g.SigmaVKms, g.WantRelK}
}

func targetNameTaken(t *txn, listID int64, name string, except int64) error {
	var n int
	if err := t.queryRow("SELECT count(*) FROM targets WHERE list_id = ? AND name = ? AND id != ?", listID, name, except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return errConflict("the list already has a target named %q", name)
	}
	return nil
}

// insertTarget inserts a validated target and its first ephemeris; it
// checks neither permission nor names.
func insertTarget(t *txn, listID int64, in TargetInput, src EphemerisSource) (int64, error) {
	goals, tags, err := targetJSON(in.Target)
	if err != nil {
		return 0, err
	}
	now := fmtTime(t.now)
	tg := in.Target
	rv := rvColumns(tg.RV)
	id, err := t.insertID(`INSERT INTO targets (list_id, name, ra_deg, dec_deg, pm_ra_masyr, pm_dec_masyr, mag, band, faint_mag,
		faint_phase, bright_mag, bright_phase, priority, acquire_s, goals_json, tags_json, notes, rv_model, rv_k_kms, rv_sigma_kms,
		rv_want_rel_k, created_at, updated_at, version)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1)`,
		listID, tg.Name, tg.RADeg, tg.DecDeg, tg.PMRAmasyr, tg.PMDecmasyr, tg.Mag, tg.Band, tg.FaintMag, tg.FaintPhase,
		tg.BrightMag, tg.BrightPhase, tg.Priority, tg.AcquireS, goals, tags, tg.Notes, rv[0], rv[1], rv[2], rv[3], now, now)
	if err != nil {
		return 0, fmt.Errorf("insert target: %w", err)
	}
	if _, err := insertEphemeris(t, id, EphemerisInput{Ephem: tg.Ephem, T0: in.T0, Source: src, Note: in.EphemNote}); err != nil {
		return 0, err
	}
	return id, nil
}

// insertEphemeris appends a validated ephemeris record.
func insertEphemeris(t *txn, targetID int64, in EphemerisInput) (int64, error) {
	fit := "{}"
	if in.Fit != nil {
		b, err := json.Marshal(in.Fit)
		if err != nil {
			return 0, err
		}
		fit = string(b)
	}
	e := in.Ephem
	id, err := t.insertID(`INSERT INTO ephemerides (target_id, t0_day, t0_frac, t0_in_day, t0_in_frac, t0_in_form, t0_in_standard,
		t0_in_text, t0_err_days, period_days, period_err_days, cov_t0_period, pdot, pdot_err, cov_t0_pdot, cov_p_pdot,
		convention, phase_offset, ecc, omega_deg, source, fit_json, note, created_by, created_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		targetID, e.T0.Day, e.T0.Frac, in.T0.JD.Day, in.T0.JD.Frac, string(in.T0.Form), string(in.T0.Standard), in.T0.Text,
		e.T0ErrDays, e.PeriodDays, e.PeriodErr, e.CovT0P, e.Pdot, e.PdotErr, e.CovT0Pdot, e.CovPPdot,
		string(e.Convention), e.PhaseOffset, e.Ecc, e.OmegaDeg, string(in.Source), fit, in.Note, t.actor.userID(), fmtTime(t.now))
	if err != nil {
		return 0, fmt.Errorf("insert ephemeris: %w", err)
	}
	return id, nil
}

// CreateTarget adds a target to a list (editors and owners). Its
// ephemeris becomes the first record of its history.
func (s *Store) CreateTarget(ctx context.Context, a Actor, listID int64, in TargetInput) (StoredTarget, error) {
	const op = "store.CreateTarget"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	st, err := createTarget(t, listID, in, SourceEntered)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	return st, commit(t, op)
}

func createTarget(t *txn, listID int64, in TargetInput, src EphemerisSource) (StoredTarget, error) {
	l, err := authorizedList(t, ActCreate, EntTarget, listID)
	if err != nil {
		return StoredTarget{}, err
	}
	in, v := validateTargetInput(in)
	if err := v.err(); err != nil {
		return StoredTarget{}, err
	}
	if err := targetNameTaken(t, listID, in.Target.Name, 0); err != nil {
		return StoredTarget{}, err
	}
	if l.NTargets >= MaxTargets {
		return StoredTarget{}, errConflict("the list already holds the most targets a list may (%d)", MaxTargets)
	}
	id, err := insertTarget(t, listID, in, src)
	if err != nil {
		return StoredTarget{}, err
	}
	st, err := getTarget(t, id)
	if err != nil {
		return StoredTarget{}, err
	}
	return st, t.audit(st.TeamID, EntTarget, id, ActCreate, nil, st)
}

// GetTarget returns one target with its current ephemeris.
func (s *Store) GetTarget(ctx context.Context, a Actor, id int64) (StoredTarget, error) {
	const op = "store.GetTarget"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	st, err := authorizedTarget(t, ActRead, EntTarget, id)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	return st, commit(t, op)
}

// ListTargets returns a list's targets by name, each with its current
// ephemeris.
func (s *Store) ListTargets(ctx context.Context, a Actor, listID int64) ([]StoredTarget, error) {
	const op = "store.ListTargets"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := authorizedList(t, ActRead, EntTarget, listID); err != nil {
		return nil, wrap(op, err)
	}
	out, err := listTargets(t, listID)
	if err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

// sameEphemeris reports whether a new input leaves the ephemeris as it is
// (same values and same epoch as given).
func sameEphemeris(cur EphemerisRecord, e ephem.Ephemeris, t0 Epoch) bool {
	return cur.Ephem == e && cur.T0.Standard == t0.Standard && cur.T0.Form == t0.Form && cur.T0.Text == t0.Text
}

// UpdateTarget changes a target (editors and owners); version must be
// current. If the ephemeris differs from the current one, a new record is
// added to the history; the old one is kept.
func (s *Store) UpdateTarget(ctx context.Context, a Actor, id, version int64, in TargetInput) (StoredTarget, error) {
	const op = "store.UpdateTarget"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	st, err := updateTarget(t, id, version, in, SourceEntered)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	return st, commit(t, op)
}

func updateTarget(t *txn, id, version int64, in TargetInput, src EphemerisSource) (StoredTarget, error) {
	before, err := authorizedTarget(t, ActUpdate, EntTarget, id)
	if err != nil {
		return StoredTarget{}, err
	}
	if before.Version != version {
		return StoredTarget{}, errStale("target", id, version, before.Version, before)
	}
	in, v := validateTargetInput(in)
	if err := v.err(); err != nil {
		return StoredTarget{}, err
	}
	if err := targetNameTaken(t, before.ListID, in.Target.Name, id); err != nil {
		return StoredTarget{}, err
	}
	return applyTargetUpdate(t, before, in, src)
}

// applyTargetUpdate writes a validated input over before (whose version
// was checked), appending an ephemeris record if it changed, and audits.
func applyTargetUpdate(t *txn, before StoredTarget, in TargetInput, src EphemerisSource) (StoredTarget, error) {
	if !sameEphemeris(before.Ephemeris, in.Target.Ephem, in.T0) {
		if _, err := insertEphemeris(t, before.ID, EphemerisInput{Ephem: in.Target.Ephem, T0: in.T0, Source: src, Note: in.EphemNote}); err != nil {
			return StoredTarget{}, err
		}
	}
	goals, tags, err := targetJSON(in.Target)
	if err != nil {
		return StoredTarget{}, err
	}
	tg := in.Target
	rv := rvColumns(tg.RV)
	if _, err := t.exec(`UPDATE targets SET name = ?, ra_deg = ?, dec_deg = ?, pm_ra_masyr = ?, pm_dec_masyr = ?, mag = ?,
		band = ?, faint_mag = ?, faint_phase = ?, bright_mag = ?, bright_phase = ?,
		priority = ?, acquire_s = ?, goals_json = ?, tags_json = ?, notes = ?, rv_model = ?, rv_k_kms = ?, rv_sigma_kms = ?,
		rv_want_rel_k = ?, updated_at = ?, version = version + 1
		WHERE id = ? AND version = ?`,
		tg.Name, tg.RADeg, tg.DecDeg, tg.PMRAmasyr, tg.PMDecmasyr, tg.Mag, tg.Band, tg.FaintMag, tg.FaintPhase, tg.BrightMag,
		tg.BrightPhase, tg.Priority, tg.AcquireS, goals, tags, tg.Notes,
		rv[0], rv[1], rv[2], rv[3], fmtTime(t.now), before.ID, before.Version); err != nil {
		return StoredTarget{}, fmt.Errorf("update target: %w", err)
	}
	after, err := getTarget(t, before.ID)
	if err != nil {
		return StoredTarget{}, err
	}
	return after, t.audit(before.TeamID, EntTarget, before.ID, ActUpdate, before, after)
}

// DeleteTarget deletes a target with its ephemeris history, timings and
// observations (editors and owners).
func (s *Store) DeleteTarget(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteTarget"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedTarget(t, ActDelete, EntTarget, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("target", id, version, before.Version, before))
	}
	if _, err := t.exec("DELETE FROM targets WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntTarget, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// AddEphemeris adds a refined ephemeris to a target's history (editors and
// owners); it becomes the current one, and the target's version moves on
// (version must be current). The old ephemeris is kept.
func (s *Store) AddEphemeris(ctx context.Context, a Actor, targetID, version int64, in EphemerisInput) (StoredTarget, error) {
	const op = "store.AddEphemeris"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	st, err := addEphemeris(t, targetID, version, in)
	if err != nil {
		return StoredTarget{}, wrap(op, err)
	}
	return st, commit(t, op)
}

func addEphemeris(t *txn, targetID, version int64, in EphemerisInput) (StoredTarget, error) {
	before, err := authorizedTarget(t, ActCreate, EntEphemeris, targetID)
	if err != nil {
		return StoredTarget{}, err
	}
	if before.Version != version {
		return StoredTarget{}, errStale("target", targetID, version, before.Version, before)
	}
	in, v := validateEphemerisInput(in, before.Target.Star())
	if err := v.err(); err != nil {
		return StoredTarget{}, err
	}
	if in.Fit != nil {
		if err := timingsBelong(t, targetID, in.Fit.TimingIDs); err != nil {
			return StoredTarget{}, err
		}
	}
	eid, err := insertEphemeris(t, targetID, in)
	if err != nil {
		return StoredTarget{}, err
	}
	if _, err := t.exec("UPDATE targets SET updated_at = ?, version = version + 1 WHERE id = ?", fmtTime(t.now), targetID); err != nil {
		return StoredTarget{}, err
	}
	after, err := getTarget(t, targetID)
	if err != nil {
		return StoredTarget{}, err
	}
	return after, t.audit(before.TeamID, EntEphemeris, eid, ActCreate, before.Ephemeris, after.Ephemeris)
}

// timingsBelong checks that every id is a timing of the target.
func timingsBelong(t *txn, targetID int64, ids []int64) error {
	for _, id := range ids {
		var n int
		if err := t.queryRow("SELECT count(*) FROM timings WHERE id = ? AND target_id = ?", id, targetID).Scan(&n); err != nil {
			return err
		}
		if n == 0 {
			return errInvalid("fit.timing_ids: timing %d is not a timing of target %d", id, targetID)
		}
	}
	return nil
}

// ListEphemerides returns a target's ephemeris history, newest (current)
// first.
func (s *Store) ListEphemerides(ctx context.Context, a Actor, targetID int64) ([]EphemerisRecord, error) {
	const op = "store.ListEphemerides"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	if _, err := authorizedTarget(t, ActRead, EntEphemeris, targetID); err != nil {
		return nil, wrap(op, err)
	}
	rows, err := t.query("SELECT "+ephemCols+" FROM ephemerides e LEFT JOIN users u ON u.id = e.created_by WHERE e.target_id = ? ORDER BY e.id DESC", targetID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []EphemerisRecord
	for rows.Next() {
		var r EphemerisRecord
		var es ephemScan
		if err := rows.Scan(ephemDest(&r, &es)...); err != nil {
			return nil, wrap(op, err)
		}
		if err := es.finish(&r); err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	return out, commit(t, op)
}

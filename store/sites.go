package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	_ "time/tzdata" // zone names validate on machines without zoneinfo

	"phasecast/ephem"
	"phasecast/planner"
)

// SiteRecord is a team's observatory: its position, time zone, horizon mask
// and default observing constraints.
type SiteRecord struct {
	ID      int64
	TeamID  int64
	Name    string
	Site    ephem.Site
	Zone    string // IANA time-zone name, e.g. "America/Denver"
	Horizon []planner.HorizonPoint
	// Constraints are the site's defaults for new nights and runs. Their
	// Horizon field is not stored: the site's mask (Horizon above) is
	// the one that applies; PlanConstraints joins the two.
	Constraints planner.Constraints
	// Instruments are the site's telescopes and detectors, for exposures
	// sized by S/N; the first is the default of a night, run or windows
	// request. Empty: no instrument, exposures as typed.
	Instruments []planner.Instrument
	// Telescope is the site's telescope motion (nil: none; each visit is
	// then charged the fixed acquisition time).
	Telescope *planner.Telescope
	Notes     string
	CreatedAt time.Time
	UpdatedAt time.Time
	Version   int64
}

// PlanConstraints returns the site's default constraints with its horizon
// mask, ready for the planner.
func (r SiteRecord) PlanConstraints() planner.Constraints {
	c := r.Constraints
	c.Horizon = append([]planner.HorizonPoint(nil), r.Horizon...)
	return c
}

// SiteInput is what a site is made or changed from.
type SiteInput struct {
	Name        string
	Site        ephem.Site
	Zone        string
	Horizon     []planner.HorizonPoint
	Constraints planner.Constraints
	Instruments []planner.Instrument // see SiteRecord.Instruments; at most MaxInstruments, names unique
	Telescope   *planner.Telescope   // nil: none
	Notes       string
}

// MaxInstruments bounds a site's instruments.
const MaxInstruments = 20

// Instrument returns the site's instrument named name, the first when name
// is "", or an EINVALID error naming the field "instrument", the value and
// the names accepted. A site without instruments returns nil for "".
func (r SiteRecord) Instrument(name string) (*planner.Instrument, error) {
	if name == "" {
		if len(r.Instruments) == 0 {
			return nil, nil
		}
		return &r.Instruments[0], nil
	}
	names := make([]string, len(r.Instruments))
	for i := range r.Instruments {
		if r.Instruments[i].Name == name {
			return &r.Instruments[i], nil
		}
		names[i] = strconv.Quote(r.Instruments[i].Name)
	}
	accepted := "the site has no instruments"
	if len(names) > 0 {
		accepted = "one of the site's instruments: " + strings.Join(names, ", ")
	}
	v := &ValidationError{}
	v.add("instrument", name, accepted)
	return nil, v.err()
}

// validateInstruments checks a site's instruments with the planner's own
// validator (planner.Instrument.Validate): a name of 1..200 characters,
// each name once.
func validateInstruments(v *ValidationError, ins []planner.Instrument) {
	if len(ins) > MaxInstruments {
		v.add("instruments", strconv.Itoa(len(ins))+" instruments", fmt.Sprintf("at most %d instruments", MaxInstruments))
		return
	}
	seen := map[string]bool{}
	for i, in := range ins {
		pre := fmt.Sprintf("instruments[%d]", i)
		if seen[in.Name] {
			v.add(pre+".name", in.Name, "a name used once among the site's instruments")
		}
		seen[in.Name] = true
		validName(v, pre+".name", in.Name)
		if err := in.Validate(); err != nil {
			var ie *ephem.InputError
			if errors.As(err, &ie) {
				v.add(pre+strings.TrimPrefix(ie.Field, "instrument"), strings.Trim(ie.Value, `"`), ie.Accepted)
			} else {
				v.add(pre, "", err.Error())
			}
		}
	}
}

// MaxHorizonPoints bounds a horizon mask (one point per degree of azimuth).
const MaxHorizonPoints = 360

// MaxNotes is the longest notes text, in characters.
const MaxNotes = 10000

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// validateSite checks every field of in, adding to v.
func validateSite(v *ValidationError, in SiteInput) {
	validName(v, "name", in.Name)
	if err := in.Site.Validate(); err != nil {
		addInputError(v, "", err)
	}
	if in.Zone == "" {
		v.add("zone", in.Zone, "an IANA time-zone name such as America/Denver or UTC")
	} else if _, err := time.LoadLocation(in.Zone); err != nil || in.Zone == "Local" {
		v.add("zone", in.Zone, "an IANA time-zone name such as America/Denver or UTC")
	}
	if len(in.Horizon) > MaxHorizonPoints {
		v.add("horizon", strconv.Itoa(len(in.Horizon))+" points", fmt.Sprintf("at most %d points", MaxHorizonPoints))
	} else if err := planner.ValidateHorizon(in.Horizon); err != nil {
		addInputError(v, "", err)
	}
	c := in.Constraints
	c.Horizon = nil // the site's own mask applies
	validateConstraints(v, "", c)
	validateInstruments(v, in.Instruments)
	if in.Telescope != nil {
		if err := in.Telescope.Validate(); err != nil {
			addInputError(v, "", err)
		}
	}
	validNotes(v, "notes", in.Notes, MaxNotes)
}

// validateConstraints checks observing limits with the planner's own rules
// (planner.Constraints.Resolved, which includes the horizon mask), adding
// the first bad field to v; prefix is put before the field name.
func validateConstraints(v *ValidationError, prefix string, c planner.Constraints) {
	if _, err := c.Resolved(); err != nil {
		addInputError(v, prefix, err)
	}
}

// addInputError adds an *ephem.InputError (or any error) to v.
func addInputError(v *ValidationError, prefix string, err error) {
	var ie *ephem.InputError
	if errors.As(err, &ie) {
		v.add(prefix+ie.Field, strings.Trim(ie.Value, `"`), ie.Accepted)
		return
	}
	v.add(strings.TrimSuffix(prefix, "."), "", err.Error())
}

const siteCols = `id, team_id, name, lat_deg, lon_east_deg, elev_m, pressure_hpa, temp_c, zone, horizon_json,
	constraints_json, instruments_json, notes, created_at, updated_at, version, telescope_json`

func scanSite(sc interface{ Scan(...any) error }) (SiteRecord, error) {
	var r SiteRecord
	var hj, cj, ij, c, u, tj string
	if err := sc.Scan(&r.ID, &r.TeamID, &r.Name, &r.Site.LatDeg, &r.Site.LonEastDeg, &r.Site.ElevM, &r.Site.PressureHPa,
		&r.Site.TempC, &r.Zone, &hj, &cj, &ij, &r.Notes, &c, &u, &r.Version, &tj); err != nil {
		return SiteRecord{}, err
	}
	if tj != "" {
		var j planner.TelescopeJSON
		if err := json.Unmarshal([]byte(tj), &j); err != nil {
			return SiteRecord{}, fmt.Errorf("site %d telescope: %w", r.ID, err)
		}
		tel := j.Telescope()
		r.Telescope = &tel
	}
	if err := json.Unmarshal([]byte(hj), &r.Horizon); err != nil {
		return SiteRecord{}, fmt.Errorf("site %d horizon: %w", r.ID, err)
	}
	if err := json.Unmarshal([]byte(cj), &r.Constraints); err != nil {
		return SiteRecord{}, fmt.Errorf("site %d constraints: %w", r.ID, err)
	}
	if err := json.Unmarshal([]byte(ij), &r.Instruments); err != nil {
		return SiteRecord{}, fmt.Errorf("site %d instruments: %w", r.ID, err)
	}
	var err error
	if r.CreatedAt, err = parseTime(c); err != nil {
		return SiteRecord{}, err
	}
	if r.UpdatedAt, err = parseTime(u); err != nil {
		return SiteRecord{}, err
	}
	return r, nil
}

func getSite(t *txn, id int64) (SiteRecord, error) {
	r, err := scanSite(t.queryRow("SELECT "+siteCols+" FROM sites WHERE id = ?", id))
	if errors.Is(err, sql.ErrNoRows) {
		return SiteRecord{}, errNotFound("site", id)
	}
	if err != nil {
		return SiteRecord{}, fmt.Errorf("read site: %w", err)
	}
	return r, nil
}

// authorizedSite reads site id and checks the actor may do action on it.
// An invisible site is ENOTFOUND, like a missing one.
func authorizedSite(t *txn, action Action, id int64) (SiteRecord, error) {
	r, err := getSite(t, id)
	if err != nil {
		return SiteRecord{}, err
	}
	if _, err := t.authorize(action, EntSite, scopeRef{TeamID: r.TeamID, SiteID: id}, "site", id); err != nil {
		return SiteRecord{}, err
	}
	return r, nil
}

// telescopeJSON is the stored form of a site's telescope (” for none).
func telescopeJSON(tel *planner.Telescope) (string, error) {
	if tel == nil {
		return "", nil
	}
	b, err := json.Marshal(tel.JSON())
	return string(b), err
}

func siteJSON(in SiteInput) (hj, cj, ij string, err error) {
	h := in.Horizon
	if h == nil {
		h = []planner.HorizonPoint{}
	}
	hb, err := json.Marshal(h)
	if err != nil {
		return "", "", "", err
	}
	c := in.Constraints
	c.Horizon = nil
	cb, err := json.Marshal(c)
	if err != nil {
		return "", "", "", err
	}
	ins := in.Instruments
	if ins == nil {
		ins = []planner.Instrument{}
	}
	ib, err := json.Marshal(ins)
	if err != nil {
		return "", "", "", err
	}
	return string(hb), string(cb), string(ib), nil
}

// siteNameTaken reports whether another site of the team has name.
func siteNameTaken(t *txn, teamID int64, name string, except int64) error {
	var n int
	if err := t.queryRow("SELECT count(*) FROM sites WHERE team_id = ? AND name = ? AND id != ?", teamID, name, except).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return errConflict("the team already has a site named %q", name)
	}
	return nil
}

// CreateSite adds a site to a team (editors and owners).
func (s *Store) CreateSite(ctx context.Context, a Actor, teamID int64, in SiteInput) (SiteRecord, error) {
	const op = "store.CreateSite"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	r, err := createSite(t, teamID, in)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	return r, commit(t, op)
}

func createSite(t *txn, teamID int64, in SiteInput) (SiteRecord, error) {
	if _, err := t.authorize(ActCreate, EntSite, scopeRef{TeamID: teamID}, "team", teamID); err != nil {
		return SiteRecord{}, err
	}
	v := &ValidationError{}
	validateSite(v, in)
	if err := v.err(); err != nil {
		return SiteRecord{}, err
	}
	if err := siteNameTaken(t, teamID, in.Name, 0); err != nil {
		return SiteRecord{}, err
	}
	hj, cj, ij, err := siteJSON(in)
	if err != nil {
		return SiteRecord{}, err
	}
	tj, err := telescopeJSON(in.Telescope)
	if err != nil {
		return SiteRecord{}, err
	}
	now := fmtTime(t.now)
	id, err := t.insertID(`INSERT INTO sites (team_id, name, lat_deg, lon_east_deg, elev_m, pressure_hpa, temp_c, zone,
		horizon_json, constraints_json, instruments_json, notes, created_at, updated_at, version, telescope_json)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1, ?)`,
		teamID, in.Name, in.Site.LatDeg, in.Site.LonEastDeg, in.Site.ElevM, in.Site.PressureHPa, in.Site.TempC, in.Zone,
		hj, cj, ij, in.Notes, now, now, tj)
	if err != nil {
		return SiteRecord{}, fmt.Errorf("insert site: %w", err)
	}
	r, err := getSite(t, id)
	if err != nil {
		return SiteRecord{}, err
	}
	return r, t.audit(teamID, EntSite, id, ActCreate, nil, r)
}

// GetSite returns one site.
func (s *Store) GetSite(ctx context.Context, a Actor, id int64) (SiteRecord, error) {
	const op = "store.GetSite"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	r, err := authorizedSite(t, ActRead, id)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	return r, commit(t, op)
}

// ListSites returns a team's sites by name (for a share link: only the
// shared run's site).
func (s *Store) ListSites(ctx context.Context, a Actor, teamID int64) ([]SiteRecord, error) {
	const op = "store.ListSites"
	t, err := s.beginRead(ctx, a)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer t.tx.Rollback()
	role, err := t.role(teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	if !Can(role, ActRead, EntSite) {
		return nil, wrap(op, errNotFound("team", teamID))
	}
	rows, err := t.query("SELECT "+siteCols+" FROM sites WHERE team_id = ? ORDER BY name, id", teamID)
	if err != nil {
		return nil, wrap(op, err)
	}
	defer rows.Close()
	var out []SiteRecord
	for rows.Next() {
		r, err := scanSite(rows)
		if err != nil {
			return nil, wrap(op, err)
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		return nil, wrap(op, err)
	}
	if role == RoleShare {
		if out, err = filterCovered(t, out, func(r SiteRecord) scopeRef { return scopeRef{TeamID: teamID, SiteID: r.ID} }); err != nil {
			return nil, wrap(op, err)
		}
	}
	return out, commit(t, op)
}

// filterCovered keeps the rows a share actor's scope covers.
func filterCovered[T any](t *txn, rows []T, ref func(T) scopeRef) ([]T, error) {
	var out []T
	for _, r := range rows {
		ok, err := t.shareCovers(ref(r))
		if err != nil {
			return nil, err
		}
		if ok {
			out = append(out, r)
		}
	}
	return out, nil
}

// UpdateSite changes a site (editors and owners); version must be current.
func (s *Store) UpdateSite(ctx context.Context, a Actor, id, version int64, in SiteInput) (SiteRecord, error) {
	const op = "store.UpdateSite"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedSite(t, ActUpdate, id)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	if before.Version != version {
		return SiteRecord{}, wrap(op, errStale("site", id, version, before.Version, before))
	}
	v := &ValidationError{}
	validateSite(v, in)
	if err := v.err(); err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	if err := siteNameTaken(t, before.TeamID, in.Name, id); err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	hj, cj, ij, err := siteJSON(in)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	tj, err := telescopeJSON(in.Telescope)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	if _, err := t.exec(`UPDATE sites SET name = ?, lat_deg = ?, lon_east_deg = ?, elev_m = ?, pressure_hpa = ?, temp_c = ?,
		zone = ?, horizon_json = ?, constraints_json = ?, instruments_json = ?, notes = ?, telescope_json = ?, updated_at = ?,
		version = version + 1
		WHERE id = ? AND version = ?`,
		in.Name, in.Site.LatDeg, in.Site.LonEastDeg, in.Site.ElevM, in.Site.PressureHPa, in.Site.TempC, in.Zone,
		hj, cj, ij, in.Notes, tj, fmtTime(t.now), id, version); err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	after, err := getSite(t, id)
	if err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntSite, id, ActUpdate, before, after); err != nil {
		return SiteRecord{}, wrap(op, err)
	}
	return after, commit(t, op)
}

// DeleteSite deletes a site (editors and owners). A site that a run uses is
// ECONFLICT: delete or move the run first.
func (s *Store) DeleteSite(ctx context.Context, a Actor, id, version int64) error {
	const op = "store.DeleteSite"
	t, err := s.beginWrite(ctx, a)
	if err != nil {
		return wrap(op, err)
	}
	defer t.tx.Rollback()
	before, err := authorizedSite(t, ActDelete, id)
	if err != nil {
		return wrap(op, err)
	}
	if before.Version != version {
		return wrap(op, errStale("site", id, version, before.Version, before))
	}
	if err := notUsedByRuns(t, "site_id", id, "site"); err != nil {
		return wrap(op, err)
	}
	if _, err := t.exec("DELETE FROM sites WHERE id = ?", id); err != nil {
		return wrap(op, err)
	}
	if err := t.audit(before.TeamID, EntSite, id, ActDelete, before, nil); err != nil {
		return wrap(op, err)
	}
	return commit(t, op)
}

// notUsedByRuns returns ECONFLICT naming the runs whose column refers to id.
func notUsedByRuns(t *txn, column string, id int64, what string) error {
	rows, err := t.query("SELECT name FROM runs WHERE "+column+" = ? ORDER BY name", id)
	if err != nil {
		return err
	}
	defer rows.Close()
	var names []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			return err
		}
		names = append(names, strconv.Quote(n))
	}
	if err := rows.Err(); err != nil {
		return err
	}
	if len(names) > 0 {
		return errConflict("this %s is used by run(s) %v; delete those runs or change them first", what, names)
	}
	return nil
}

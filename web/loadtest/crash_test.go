package loadtest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"maps"
	"math"
	"math/rand/v2"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testdb"
)

// crashWriters is how many clients write at once between kills.
const crashWriters = 4

// importRowsN is the size of one all-or-nothing import in the crash test.
const importRowsN = 8

// row is a target as the test wrote it.
type row struct {
	name          string
	raDeg, decDeg float64
	periodDays    float64
	notes         string // as last acknowledged (or found committed)
	id, version   int64  // known once the creation is acknowledged or found committed
	pendingNotes  string // an update sent whose answer never came
	hasPending    bool
	group         int  // import group (0: made by the form)
	acked         bool // the creation was acknowledged (303)
	inFlight      bool // the creation was sent and its outcome is not known yet
}

// ledger is what the writers know: every write sent, and which were
// acknowledged (a 303 came back). A row is written by the writer that made
// it only; the maps are shared and locked. verify runs between cycles,
// when no writer is running.
type ledger struct {
	mu     sync.Mutex
	rows   map[string]*row // by name
	groups map[int][]*row  // import groups
	owned  map[int][]*row  // writer -> rows it may update (id known)
	counts map[string]int  // what happened, for the report
	errors []string        // failures seen by the writers
	serial atomic.Int64    // names, positions and notes
	group  atomic.Int64    // import group numbers
	killed atomic.Bool     // set just before each SIGKILL
}

func newLedger() *ledger {
	return &ledger{rows: map[string]*row{}, groups: map[int][]*row{}, owned: map[int][]*row{}, counts: map[string]int{}}
}

func (l *ledger) count(what string, n int) {
	l.mu.Lock()
	l.counts[what] += n
	l.mu.Unlock()
}

func (l *ledger) fail(msg string) {
	l.mu.Lock()
	if len(l.errors) < 20 {
		l.errors = append(l.errors, msg)
	}
	l.mu.Unlock()
}

// ownedRow returns one of writer's rows at random, or nil.
func (l *ledger) ownedRow(writer int, rng *rand.Rand) *row {
	l.mu.Lock()
	defer l.mu.Unlock()
	own := l.owned[writer]
	if len(own) == 0 {
		return nil
	}
	return own[rng.IntN(len(own))]
}

// newRow makes the next target to write, far from every other one.
func (l *ledger) newRow(writer, group int, rng *rand.Rand) *row {
	k := l.serial.Add(1)
	r := &row{
		name:       fmt.Sprintf("crash w%d n%d", writer, k),
		raDeg:      float64(k%3000)*0.12 + 0.0123,
		decDeg:     -60 + float64(k/3000)*0.12 + 0.0071,
		periodDays: math.Round((0.05+rng.Float64()*0.5)*1e6) / 1e6,
		notes:      fmt.Sprintf("created n%d", k),
		group:      group,
		inFlight:   true,
	}
	l.mu.Lock()
	l.rows[r.name] = r
	if group != 0 {
		l.groups[group] = append(l.groups[group], r)
	}
	l.mu.Unlock()
	return r
}

// crashWriter writes until the server dies or ctx ends.
type crashWriter struct {
	id   int
	c    *client
	rng  *rand.Rand
	l    *ledger
	list int64
}

// transportFailed reports whether err ends the writer's cycle: expected
// once the server has been killed, a failure before that.
func (w *crashWriter) transportFailed(what string, err error) bool {
	if err == nil {
		return false
	}
	if !w.l.killed.Load() && !errors.Is(err, context.Canceled) {
		w.l.fail(fmt.Sprintf("writer %d: %s failed while the server was running: %v", w.id, what, err))
	}
	return true
}

func (w *crashWriter) run(ctx context.Context) {
	for ctx.Err() == nil {
		var stop bool
		k := w.rng.IntN(100)
		switch r := w.l.ownedRow(w.id, w.rng); {
		case k < 50 && r != nil:
			stop = w.update(ctx, r)
		case k < 85:
			stop = w.create(ctx)
		default:
			stop = w.importGroup(ctx)
		}
		if stop {
			return
		}
	}
}

// create adds one target, through the form (a 303 acknowledges it) or,
// half the time, through the JSON API (a 201).
func (w *crashWriter) create(ctx context.Context) bool {
	r := w.l.newRow(w.id, 0, w.rng)
	if w.rng.IntN(2) == 0 {
		return w.apiCreate(ctx, r)
	}
	form := url.Values{
		"list": {fmt.Sprint(w.list)}, "name": {r.name}, "ra": {strconv.FormatFloat(r.raDeg, 'f', 4, 64)},
		"dec": {strconv.FormatFloat(r.decDeg, 'f', 4, 64)}, "priority": {"3"},
		"t0": {"2460000.51234"}, "t0_standard": {"BJD_TDB"}, "t0_form": {"JD"}, "t0_convention": {"inferior_conjunction"},
		"period_days": {strconv.FormatFloat(r.periodDays, 'f', 6, 64)}, "notes": {r.notes},
		"goals[0].center": {"0.5"}, "goals[0].phase_halfwidth": {"0.05"}, "goals[0].exposure_s": {"60"},
	}
	resp, err := w.c.post(ctx, "/targets", form)
	if w.transportFailed("create "+r.name, err) {
		w.l.count("creates sent, no answer (server killed)", 1)
		return true
	}
	if resp.status != http.StatusSeeOther {
		w.l.fail(fmt.Sprintf("create %s: status %d: %s", r.name, resp.status, snippet(resp.body)))
		return true
	}
	id, err := locationID(resp.location, "/targets/")
	if err != nil {
		w.l.fail(err.Error())
		return true
	}
	w.l.mu.Lock()
	r.id, r.version, r.acked, r.inFlight = id, 1, true, false
	w.l.owned[w.id] = append(w.l.owned[w.id], r)
	w.l.mu.Unlock()
	w.l.count("creates acknowledged", 1)
	return false
}

// apiCreate adds one target through the JSON API; a 201 acknowledges it.
func (w *crashWriter) apiCreate(ctx context.Context, r *row) bool {
	resp, err := w.c.api(ctx, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", w.list), r.json(0, r.notes))
	if w.transportFailed("API create "+r.name, err) {
		w.l.count("creates sent, no answer (server killed)", 1)
		return true
	}
	if resp.status != http.StatusCreated {
		w.l.fail(fmt.Sprintf("API create %s: status %d: %s", r.name, resp.status, snippet(resp.body)))
		return true
	}
	var got struct{ ID, Version int64 }
	if err := json.Unmarshal(resp.body, &got); err != nil || got.ID == 0 || got.Version != 1 {
		w.l.fail(fmt.Sprintf("API create %s: answer %s (%v)", r.name, snippet(resp.body), err))
		return true
	}
	w.l.mu.Lock()
	r.id, r.version, r.acked, r.inFlight = got.ID, 1, true, false
	w.l.owned[w.id] = append(w.l.owned[w.id], r)
	w.l.mu.Unlock()
	w.l.count("creates acknowledged", 1)
	return false
}

// json is the row as a JSON API target with version and notes.
func (r *row) json(version int64, notes string) []byte {
	b, _ := json.Marshal(map[string]any{
		"version": version, "name": r.name, "ra_deg": r.raDeg, "dec_deg": r.decDeg, "priority": 3, "notes": notes,
		"ephemeris": map[string]any{"t0": "2460000.51234", "t0_standard": "BJD_TDB", "t0_form": "JD",
			"t0_convention": "inferior_conjunction", "period_days": r.periodDays},
		"goals": []any{map[string]any{"phase": 0.5, "phase_halfwidth": 0.05, "exposure_s": 60, "overhead_s": 0}},
	})
	return b
}

// update changes the notes of one of the writer's own targets with the
// version it knows, through the form (a 303 acknowledges it) or, half the
// time, the JSON API (a 200). No one else writes the row, so a 409 would
// mean a lost or phantom write.
func (w *crashWriter) update(ctx context.Context, r *row) bool {
	notes := fmt.Sprintf("updated by w%d, %d", w.id, w.l.serial.Add(1))
	w.l.mu.Lock()
	r.pendingNotes, r.hasPending = notes, true
	w.l.mu.Unlock()
	if w.rng.IntN(2) == 0 {
		return w.apiUpdate(ctx, r, notes)
	}
	form := url.Values{
		"version": {fmt.Sprint(r.version)}, "list": {fmt.Sprint(w.list)}, "name": {r.name},
		"ra": {strconv.FormatFloat(r.raDeg, 'f', 4, 64)}, "dec": {strconv.FormatFloat(r.decDeg, 'f', 4, 64)}, "priority": {"3"},
		"t0": {"2460000.51234"}, "t0_standard": {"BJD_TDB"}, "t0_form": {"JD"}, "t0_convention": {"inferior_conjunction"},
		"period_days": {strconv.FormatFloat(r.periodDays, 'f', 6, 64)}, "notes": {notes},
		"goals[0].center": {"0.5"}, "goals[0].phase_halfwidth": {"0.05"}, "goals[0].exposure_s": {"60"},
	}
	resp, err := w.c.post(ctx, fmt.Sprintf("/targets/%d", r.id), form)
	if w.transportFailed("update "+r.name, err) {
		w.l.count("updates sent, no answer (server killed)", 1)
		return true
	}
	if resp.status != http.StatusSeeOther {
		w.l.fail(fmt.Sprintf("update %s (id %d, version %d): status %d: %s", r.name, r.id, r.version, resp.status, snippet(resp.body)))
		return true
	}
	w.l.mu.Lock()
	r.notes, r.version, r.pendingNotes, r.hasPending = notes, r.version+1, "", false
	w.l.mu.Unlock()
	w.l.count("updates acknowledged", 1)
	return false
}

// apiUpdate puts the row back through the JSON API with new notes.
func (w *crashWriter) apiUpdate(ctx context.Context, r *row, notes string) bool {
	resp, err := w.c.api(ctx, http.MethodPut, fmt.Sprintf("/api/v1/targets/%d", r.id), r.json(r.version, notes))
	if w.transportFailed("API update "+r.name, err) {
		w.l.count("updates sent, no answer (server killed)", 1)
		return true
	}
	if resp.status != http.StatusOK {
		w.l.fail(fmt.Sprintf("API update %s (id %d, version %d): status %d: %s", r.name, r.id, r.version, resp.status, snippet(resp.body)))
		return true
	}
	w.l.mu.Lock()
	r.notes, r.version, r.pendingNotes, r.hasPending = notes, r.version+1, "", false
	w.l.mu.Unlock()
	w.l.count("updates acknowledged", 1)
	return false
}

// importGroup imports importRowsN new targets in one request; the import
// is all or nothing, acknowledged by a 303.
func (w *crashWriter) importGroup(ctx context.Context) bool {
	g := int(w.l.group.Add(1))
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days,notes\n")
	rows := make([]*row, importRowsN)
	for i := range rows {
		r := w.l.newRow(w.id, g, w.rng)
		rows[i] = r
		fmt.Fprintf(&b, "%s,%.4f,%.4f,2460000.51234,BJD_TDB,inferior_conjunction,%.6f,%s\n", r.name, r.raDeg, r.decDeg, r.periodDays, r.notes)
	}
	resp, err := w.c.post(ctx, fmt.Sprintf("/lists/%d/import", w.list), url.Values{"format": {"csv"}, "content": {b.String()}})
	if w.transportFailed(fmt.Sprintf("import group %d", g), err) {
		w.l.count("imports sent, no answer (server killed)", 1)
		return true
	}
	if resp.status != http.StatusSeeOther {
		w.l.fail(fmt.Sprintf("import group %d: status %d: %s", g, resp.status, snippet(resp.body)))
		return true
	}
	// The import answers with the list, not the ids: the writer learns
	// them at the next check and may update the rows after that.
	w.l.mu.Lock()
	for _, r := range rows {
		r.acked, r.inFlight = true, false
	}
	w.l.mu.Unlock()
	w.l.count("imports acknowledged", 1)
	return false
}

func TestCrashSafety(t *testing.T) {
	cfg := crashSettings(t)
	bin := buildServer(t)
	dir := t.TempDir()
	db, logPath := testdb.Target(t, "crash.db"), filepath.Join(dir, "server.log")
	rng := rand.New(rand.NewPCG(uint64(cfg.seed), 0xc4a5))
	start := time.Now()

	srv := startServer(t, bin, db, logPath)
	if srv.link == "" {
		t.Fatal("the server printed no sign-in link on first start")
	}
	session, err := redeem(context.Background(), srv.link)
	if err != nil {
		t.Fatal(err)
	}
	c := newClient(http.DefaultTransport, srv.base, session)
	resp, err := c.post(context.Background(), "/lists", url.Values{"name": {"Crash test list"}})
	if err != nil || resp.status != http.StatusSeeOther {
		t.Fatalf("create the crash list: status %d, %v", resp.status, err)
	}
	list, err := locationID(resp.location, "list=")
	if err != nil {
		t.Fatal(err)
	}
	token := apiToken(t, db, session)

	l := newLedger()
	var waits []time.Duration
	for k := 0; k < cfg.kills; k++ {
		if k > 0 {
			srv = startServer(t, bin, db, logPath)
			verify(t, db, session, list, l, fmt.Sprintf("restart %d", k))
			if t.Failed() {
				t.FailNow()
			}
		}
		l.killed.Store(false)
		ctx, cancel := context.WithCancel(context.Background())
		tr := newTransport(crashWriters)
		var wg sync.WaitGroup
		for i := 0; i < crashWriters; i++ {
			w := &crashWriter{id: i, c: newAPIClient(tr, srv.base, session, token), l: l, list: list,
				rng: rand.New(rand.NewPCG(uint64(cfg.seed), uint64(k*crashWriters+i)))}
			wg.Go(func() { w.run(ctx) })
		}
		wait := time.Duration(50+rng.IntN(1200)) * time.Millisecond
		waits = append(waits, wait)
		time.Sleep(wait)
		l.killed.Store(true)
		srv.kill()
		cancel()
		wg.Wait()
		tr.CloseIdleConnections()
		if fi, err := os.Stat(db + "-wal"); err == nil && fi.Size() > 0 {
			l.count("kills that left a non-empty WAL to recover", 1)
		}
	}
	srv = startServer(t, bin, db, logPath)
	verify(t, db, session, list, l, fmt.Sprintf("restart %d", cfg.kills))
	if err := srv.stop(15 * time.Second); err != nil {
		t.Errorf("graceful stop after the last restart: %v", err)
	}
	verify(t, db, session, list, l, "after the final graceful stop")

	l.mu.Lock()
	defer l.mu.Unlock()
	for _, e := range l.errors {
		t.Error(e)
	}
	for _, r := range l.rows {
		if r.inFlight {
			l.counts["rows sent, no answer, never committed"]++
		}
	}
	locked, logErrs, panics, examples, err := scanLog(logPath)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("crash: seed %d, %d SIGKILLs at %v after the writers started, %d writers, %v in all",
		cfg.seed, cfg.kills, waits, crashWriters, time.Since(start).Round(time.Millisecond))
	keys := slices.Sorted(maps.Keys(l.counts))
	for _, k := range keys {
		t.Logf("crash: %-50s %d", k, l.counts[k])
	}
	t.Logf("crash: %d checks (after each restart and after the final stop): integrity_check ok, no foreign key problems, every acknowledged write present as written, imports all or nothing, no target that was never sent",
		cfg.kills+1)
	t.Logf("server log: %d lines with \"database is locked\", %d ERROR lines, %d panics", locked, logErrs, panics)
	if locked+logErrs+panics > 0 {
		t.Errorf("server log shows trouble:\n%s", strings.Join(examples, "\n"))
	}
}

// apiToken makes an API token for the user of session through the store
// on the same file (as the account page would).
func apiToken(t *testing.T, db, session string) string {
	t.Helper()
	ctx := context.Background()
	st, err := store.Open(ctx, db, time.Now) // the child server runs on the wall clock
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	a, err := st.SessionActor(ctx, session)
	if err != nil {
		t.Fatal(err)
	}
	_, tok, err := st.CreateAPIToken(ctx, a, "crash test", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	return tok
}

// verify checks the database file against the ledger: SQLite's own checks
// pass, every acknowledged creation and update is there exactly as
// written, an update sent but unanswered is either there or not (never
// anything else), an import is all there or not at all, and no target
// appears that was never sent. Writes found committed without an answer
// are adopted (their ids and versions learned) so that the writers may go
// on updating them.
func verify(t *testing.T, db, session string, list int64, l *ledger, when string) {
	t.Helper()
	ctx := context.Background()
	integrity, fk, err := fileChecks(ctx, db)
	if err != nil {
		t.Fatalf("%s: %v", when, err)
	}
	if integrity != "ok" || fk != 0 {
		t.Fatalf("%s: integrity_check %q, %d foreign key problems", when, integrity, fk)
	}
	st, err := store.Open(ctx, db, time.Now) // the child server runs on the wall clock
	if err != nil {
		t.Fatalf("%s: open the store: %v", when, err)
	}
	defer st.Close()
	a, err := st.SessionActor(ctx, session)
	if err != nil {
		t.Fatalf("%s: the session did not survive: %v", when, err)
	}
	stored, err := st.ListTargets(ctx, a, list)
	if err != nil {
		t.Fatalf("%s: %v", when, err)
	}
	byName := map[string]store.StoredTarget{}
	for _, s := range stored {
		byName[s.Target.Name] = s
	}
	l.mu.Lock()
	defer l.mu.Unlock()
	for _, s := range stored {
		if _, ok := l.rows[s.Target.Name]; !ok {
			t.Errorf("%s: target %q (id %d) is in the database but was never sent", when, s.Target.Name, s.ID)
		}
	}
	for _, r := range l.rows {
		if r.group != 0 {
			continue
		}
		s, ok := byName[r.name]
		switch {
		case r.acked && !ok:
			t.Errorf("%s: target %q, whose creation was acknowledged (id %d), is missing", when, r.name, r.id)
		case r.inFlight && ok:
			adopt(l, r, s)
			l.counts["rows sent, no answer, found committed"]++
		}
		if ok {
			checkRow(t, when, l, r, s)
		}
	}
	for g, rows := range l.groups {
		n := 0
		for _, r := range rows {
			if _, ok := byName[r.name]; ok {
				n++
			}
		}
		if n != 0 && n != len(rows) {
			t.Errorf("%s: import group %d is partly there: %d of %d rows", when, g, n, len(rows))
			continue
		}
		acked := rows[0].acked
		if acked && n == 0 {
			t.Errorf("%s: import group %d was acknowledged but none of its %d rows is there", when, g, len(rows))
		}
		for _, r := range rows {
			s, ok := byName[r.name]
			if !ok {
				continue
			}
			if r.id == 0 {
				adopt(l, r, s)
				if !acked {
					l.counts["rows sent, no answer, found committed"]++
				}
			}
			checkRow(t, when, l, r, s)
		}
	}
}

// adopt records the id and version of a row found committed and hands it
// to its writer for updates.
func adopt(l *ledger, r *row, s store.StoredTarget) {
	r.id, r.version, r.inFlight = s.ID, s.Version, false
	var w int
	fmt.Sscanf(r.name, "crash w%d", &w)
	l.owned[w] = append(l.owned[w], r)
}

// checkRow compares a stored target with what was written: position,
// period and notes as acknowledged, or the notes of an update sent but
// unanswered (then adopted as the current state).
func checkRow(t *testing.T, when string, l *ledger, r *row, s store.StoredTarget) {
	t.Helper()
	if s.ID != r.id {
		t.Errorf("%s: %q has id %d, the acknowledgement named %d", when, r.name, s.ID, r.id)
	}
	if math.Abs(s.Target.RADeg-r.raDeg) > 1e-9 || math.Abs(s.Target.DecDeg-r.decDeg) > 1e-9 ||
		math.Abs(s.Ephemeris.Ephem.PeriodDays-r.periodDays) > 1e-12 {
		t.Errorf("%s: %q stored as RA %.6f Dec %.6f P %.7f, written RA %.6f Dec %.6f P %.7f", when, r.name,
			s.Target.RADeg, s.Target.DecDeg, s.Ephemeris.Ephem.PeriodDays, r.raDeg, r.decDeg, r.periodDays)
	}
	switch {
	case s.Target.Notes == r.notes && s.Version == r.version:
		if r.hasPending {
			l.counts["updates sent, no answer, never committed"]++
		}
		r.pendingNotes, r.hasPending = "", false
	case r.hasPending && s.Target.Notes == r.pendingNotes && s.Version == r.version+1:
		r.notes, r.version, r.pendingNotes, r.hasPending = r.pendingNotes, r.version+1, "", false
		l.counts["updates sent, no answer, found committed"]++
	default:
		t.Errorf("%s: %q (id %d) has notes %q at version %d; acknowledged %q at version %d (unanswered update: %q)",
			when, r.name, r.id, s.Target.Notes, s.Version, r.notes, r.version, r.pendingNotes)
	}
}

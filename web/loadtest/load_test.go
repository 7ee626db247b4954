package loadtest

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testdb"
)

// demo is what the load test learned about the seeded demo scenario.
type demo struct {
	sessions  map[store.Role]string // one signed-in session per role
	tokens    map[store.Role]string // one API token per role
	siteID    int64
	listID    int64   // the demo list (eleven targets)
	targetIDs []int64 // its targets
}

// signInDemo signs the demo owner in with the link the server printed at
// first start, then the editor and viewer with sign-in links made through
// the store on the same file (as `serve --signin-link` would), makes an
// API token for each (as the account page would), and reads the ids of the
// demo's site, list and targets.
func signInDemo(tb testing.TB, srv *server, db string) demo {
	tb.Helper()
	ctx := context.Background()
	if srv.link == "" {
		tb.Fatal("the server printed no sign-in link on first start")
	}
	owner, err := redeem(ctx, srv.link)
	if err != nil {
		tb.Fatal(err)
	}
	st, err := store.Open(ctx, db, time.Now) // the child server runs on the wall clock
	if err != nil {
		tb.Fatal(err)
	}
	defer st.Close()
	a, err := st.SessionActor(ctx, owner)
	if err != nil || len(a.Teams) == 0 {
		tb.Fatalf("owner session: %v (teams %d)", err, len(a.Teams))
	}
	team := a.Teams[0].TeamID
	d := demo{sessions: map[store.Role]string{store.RoleOwner: owner}, tokens: map[store.Role]string{}}
	members, err := st.ListMembers(ctx, a, team)
	if err != nil {
		tb.Fatal(err)
	}
	for _, m := range members {
		if _, done := d.sessions[m.Role]; done {
			continue
		}
		tok, err := st.CreateSignInLink(ctx, m.Email, 10*time.Minute)
		if err != nil {
			tb.Fatalf("sign-in link for %s: %v", m.Email, err)
		}
		if d.sessions[m.Role], err = redeem(ctx, srv.base+"/login/link/"+tok); err != nil {
			tb.Fatalf("sign in %s: %v", m.Email, err)
		}
	}
	for role, session := range d.sessions {
		ra, err := st.SessionActor(ctx, session)
		if err != nil {
			tb.Fatal(err)
		}
		if _, d.tokens[role], err = st.CreateAPIToken(ctx, ra, "load test", time.Hour); err != nil {
			tb.Fatalf("API token for the %s: %v", role, err)
		}
	}
	sites, err := st.ListSites(ctx, a, team)
	if err != nil || len(sites) == 0 {
		tb.Fatalf("demo sites: %v (%d)", err, len(sites))
	}
	lists, err := st.ListLists(ctx, a, team)
	if err != nil || len(lists) == 0 {
		tb.Fatalf("demo lists: %v (%d)", err, len(lists))
	}
	d.siteID, d.listID = sites[0].ID, lists[0].ID
	ts, err := st.ListTargets(ctx, a, d.listID)
	if err != nil || len(ts) == 0 {
		tb.Fatalf("demo targets: %v (%d)", err, len(ts))
	}
	for _, t := range ts {
		d.targetIDs = append(d.targetIDs, t.ID)
	}
	return d
}

// loadEnv is shared by the load clients.
type loadEnv struct {
	demo
	loadListID int64
	dates      []string // night dates planned: yesterday to two days ahead (UTC)
	positions  atomic.Int64
	mu         sync.Mutex
	created    []int64      // targets made during the run (by the form)
	imported   atomic.Int64 // rows of acknowledged imports
}

// maxCreated bounds the targets the run makes (creates then turn into
// edits), so that the load list stays a plausible size.
const maxCreated = 400

func (e *loadEnv) addCreated(id int64) {
	e.mu.Lock()
	e.created = append(e.created, id)
	e.mu.Unlock()
}

func (e *loadEnv) nCreated() int {
	e.mu.Lock()
	defer e.mu.Unlock()
	return len(e.created)
}

// anyTarget returns a demo target or, half the time, one made in the run.
func (e *loadEnv) anyTarget(rng *rand.Rand) int64 {
	e.mu.Lock()
	defer e.mu.Unlock()
	if len(e.created) > 0 && rng.IntN(2) == 0 {
		return e.created[rng.IntN(len(e.created))]
	}
	return e.targetIDs[rng.IntN(len(e.targetIDs))]
}

// position returns the next serial number of the run's new targets and a
// sky position for it that no other one of the run is near (0.12° apart,
// far beyond the 5″ duplicate radius), as RA and Dec degrees for a form.
func (e *loadEnv) position() (k int64, ra, dec string) {
	k = e.positions.Add(1)
	return k, fmt.Sprintf("%.4f", float64(k%3000)*0.12+0.0123), fmt.Sprintf("%.4f", -60+float64(k/3000)*0.12+0.0071)
}

// outcome classifies a response.
type outcome int

const (
	okOutcome outcome = iota
	conflictOutcome
	errorOutcome
	// busyOutcome is a heavy request the server refused with 429 or 503
	// and Retry-After (web/heavy.go): designed, not an error, as long as
	// some of the route's requests are answered.
	busyOutcome
)

// routeStats collects one route's latencies and outcomes.
type routeStats struct {
	lat       []time.Duration
	ok, conf  int
	busy      int
	errs      int
	transport int
}

// stats is one client's record, merged at the end.
type stats struct {
	routes  map[string]*routeStats
	samples []string // the first errors, for the failure message
	locked  int      // responses containing "database is locked"
}

func newStats() *stats { return &stats{routes: map[string]*routeStats{}} }

func (s *stats) route(name string) *routeStats {
	r := s.routes[name]
	if r == nil {
		r = &routeStats{}
		s.routes[name] = r
	}
	return r
}

// record files a request: ok for one of want, a conflict for 409 when
// conflictOK, an error otherwise (and for any transport error or a body
// that mentions a locked database).
func (s *stats) record(route string, r response, err error, conflictOK bool, want ...int) outcome {
	rs := s.route(route)
	if err != nil {
		rs.transport++
		rs.errs++
		s.sample(fmt.Sprintf("%s: transport: %v", route, err))
		return errorOutcome
	}
	rs.lat = append(rs.lat, r.elapsed)
	if bytes.Contains(r.body, []byte("database is locked")) {
		s.locked++
		rs.errs++
		s.sample(fmt.Sprintf("%s: status %d, body mentions \"database is locked\"", route, r.status))
		return errorOutcome
	}
	switch {
	case slices.Contains(want, r.status):
		rs.ok++
		return okOutcome
	case conflictOK && r.status == http.StatusConflict:
		rs.conf++
		return conflictOutcome
	case (r.status == http.StatusTooManyRequests || r.status == http.StatusServiceUnavailable) && r.retryAfter != "":
		rs.busy++
		return busyOutcome
	}
	rs.errs++
	s.sample(fmt.Sprintf("%s: status %d (want %v): %s", route, r.status, want, snippet(r.body)))
	return errorOutcome
}

func (s *stats) sample(msg string) {
	if len(s.samples) < 10 {
		s.samples = append(s.samples, msg)
	}
}

func (s *stats) merge(o *stats) {
	for name, r := range o.routes {
		m := s.route(name)
		m.lat = append(m.lat, r.lat...)
		m.ok += r.ok
		m.conf += r.conf
		m.busy += r.busy
		m.errs += r.errs
		m.transport += r.transport
	}
	for _, x := range o.samples {
		s.sample(x)
	}
	s.locked += o.locked
}

// snippet shortens a response body for a message: the first error text of
// a page if it has one, else its first bytes.
func snippet(b []byte) string {
	s := string(b)
	if i := strings.Index(s, `class="error"`); i >= 0 {
		s = s[i:]
	}
	if len(s) > 300 {
		s = s[:300] + "…"
	}
	return s
}

// percentile is the nearest-rank percentile p (0..100) of sorted.
func percentile(sorted []time.Duration, p float64) time.Duration {
	if len(sorted) == 0 {
		return 0
	}
	k := int(float64(len(sorted))*p/100+0.999999) - 1
	k = max(0, min(k, len(sorted)-1))
	return sorted[k]
}

// worker is one load client.
type worker struct {
	id    int
	role  store.Role
	c     *client
	rng   *rand.Rand
	env   *loadEnv
	st    *stats
	edits int
}

// op is one kind of request a client makes.
type op struct {
	weight int
	write  bool
	run    func(ctx context.Context, w *worker)
}

// ops is the mix of a load client: mostly page views, night plans and
// exports, with version-checked edits, creations and small imports.
var ops = []op{
	{12, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, fmt.Sprintf("/targets?list=%d", w.env.listID))
		w.st.record("GET /targets", r, err, false, 200)
	}},
	{4, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, fmt.Sprintf("/targets?list=%d&sort=name", w.env.loadListID))
		w.st.record("GET /targets (growing load list)", r, err, false, 200)
	}},
	{14, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, fmt.Sprintf("/targets/%d", w.env.anyTarget(w.rng)))
		w.st.record("GET /targets/{id}", r, err, false, 200)
	}},
	{8, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, "/tonight")
		w.st.record("GET /tonight", r, err, false, 200)
	}},
	{10, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, "/night?"+w.nightQuery())
		w.st.record("GET /night (plan)", r, err, false, 200)
	}},
	{4, false, func(ctx context.Context, w *worker) {
		ext := []string{"csv", "json", "ics"}[w.rng.IntN(3)]
		r, err := w.c.get(ctx, "/night."+ext+"?"+w.nightQuery())
		w.st.record("GET /night.{csv,json,ics} (plan)", r, err, false, 200)
	}},
	{3, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, fmt.Sprintf("/lists/%d/export.csv", w.env.listID))
		w.st.record("GET /lists/{id}/export.csv", r, err, false, 200)
	}},
	{2, false, func(ctx context.Context, w *worker) {
		r, err := w.c.get(ctx, "/healthz")
		w.st.record("GET /healthz", r, err, false, 200)
	}},
	{3, false, func(ctx context.Context, w *worker) {
		r, err := w.c.api(ctx, http.MethodGet, fmt.Sprintf("/api/v1/lists/%d/targets", w.env.listID), nil)
		w.st.record("API GET /api/v1/lists/{id}/targets", r, err, false, 200)
	}},
	{4, false, func(ctx context.Context, w *worker) {
		r, err := w.c.api(ctx, http.MethodGet, fmt.Sprintf("/api/v1/targets/%d", w.env.anyTarget(w.rng)), nil)
		w.st.record("API GET /api/v1/targets/{id}", r, err, false, 200)
	}},
	{3, false, func(ctx context.Context, w *worker) {
		r, err := w.c.api(ctx, http.MethodGet, "/api/v1/night?"+w.nightQuery(), nil)
		w.st.record("API GET /api/v1/night (plan)", r, err, false, 200)
	}},
	{3, true, func(ctx context.Context, w *worker) { w.apiEdit(ctx) }},
	{2, true, func(ctx context.Context, w *worker) { w.apiCreate(ctx) }},
	{8, true, func(ctx context.Context, w *worker) { w.edit(ctx) }},
	{4, true, func(ctx context.Context, w *worker) { w.create(ctx) }},
	{1, true, func(ctx context.Context, w *worker) { w.importRows(ctx) }},
}

// nightQuery is a night request on the demo site and list for one of
// the run's dates, with or without filling gaps.
func (w *worker) nightQuery() string {
	q := url.Values{}
	q.Set("site", fmt.Sprint(w.env.siteID))
	q.Set("list", fmt.Sprint(w.env.listID))
	q.Set("date", w.env.dates[w.rng.IntN(len(w.env.dates))])
	if w.rng.IntN(2) == 0 {
		q.Set("fill", "1")
	}
	return q.Encode()
}

// edit opens a target's edit form, changes its notes and saves it with
// the version the form carried: 303 when saved, 409 when someone saved in
// between (expected with a hundred clients on eleven targets).
func (w *worker) edit(ctx context.Context) {
	id := w.env.anyTarget(w.rng)
	r, err := w.c.get(ctx, fmt.Sprintf("/targets/%d/edit", id))
	if w.st.record("GET /targets/{id}/edit", r, err, false, 200) != okOutcome {
		return
	}
	action := fmt.Sprintf("/targets/%d", id)
	form, err := formValues(r.body, action)
	if err != nil {
		w.st.record("GET /targets/{id}/edit", response{status: -1}, fmt.Errorf("edit form: %w", err), false)
		return
	}
	w.edits++
	form.Set("notes", fmt.Sprintf("edited under load by client %d (edit %d)", w.id, w.edits))
	r, err = w.c.post(ctx, action, form)
	w.st.record("POST /targets/{id} (versioned)", r, err, true, http.StatusSeeOther)
}

// apiEdit reads a target through the API, changes its notes and puts it
// back with the version it read: 200 when saved, 409 when someone saved in
// between.
func (w *worker) apiEdit(ctx context.Context) {
	id := w.env.anyTarget(w.rng)
	path := fmt.Sprintf("/api/v1/targets/%d", id)
	r, err := w.c.api(ctx, http.MethodGet, path, nil)
	if w.st.record("API GET /api/v1/targets/{id}", r, err, false, 200) != okOutcome {
		return
	}
	var tg map[string]any
	if err := json.Unmarshal(r.body, &tg); err != nil {
		w.st.record("API GET /api/v1/targets/{id}", response{status: -1}, fmt.Errorf("decode: %w", err), false)
		return
	}
	w.edits++
	tg["notes"] = fmt.Sprintf("edited through the API under load by client %d (edit %d)", w.id, w.edits)
	body, _ := json.Marshal(tg)
	r, err = w.c.api(ctx, http.MethodPut, path, body)
	w.st.record("API PUT /api/v1/targets/{id} (versioned)", r, err, true, 200)
}

// apiCreate adds a target to the load list through the API (an API edit
// once maxCreated exist).
func (w *worker) apiCreate(ctx context.Context) {
	if w.env.nCreated() >= maxCreated {
		w.apiEdit(ctx)
		return
	}
	n, ra, dec := w.env.position()
	body := fmt.Sprintf(`{"name": "LT API client %d target %d", "ra_deg": %s, "dec_deg": %s, "priority": %d, "tags": ["load"],
 "ephemeris": {"t0": "2460000.51234", "t0_standard": "BJD_TDB", "t0_convention": "inferior_conjunction", "period_days": %.6f},
 "goals": [{"phase": 0.5, "phase_halfwidth": 0.05, "exposure_s": 60, "overhead_s": 5}], "notes": "made through the API by the load test"}`,
		w.id, n, ra, dec, 1+w.rng.IntN(5), 0.05+w.rng.Float64()*0.5)
	r, err := w.c.api(ctx, http.MethodPost, fmt.Sprintf("/api/v1/lists/%d/targets", w.env.loadListID), []byte(body))
	if w.st.record("API POST /api/v1/lists/{id}/targets", r, err, false, http.StatusCreated) != okOutcome {
		return
	}
	id, err := locationID(r.location, "/api/v1/targets/")
	if err != nil {
		w.st.record("API POST /api/v1/lists/{id}/targets", response{status: -1}, err, false)
		return
	}
	w.env.addCreated(id)
}

// create adds a target to the load list (an edit once maxCreated exist).
func (w *worker) create(ctx context.Context) {
	if w.env.nCreated() >= maxCreated {
		w.edit(ctx)
		return
	}
	n, ra, dec := w.env.position()
	form := url.Values{
		"list": {fmt.Sprint(w.env.loadListID)}, "name": {fmt.Sprintf("LT client %d target %d", w.id, n)},
		"ra": {ra}, "dec": {dec}, "mag": {"17.5"}, "priority": {fmt.Sprint(1 + w.rng.IntN(5))}, "tags": {"load"},
		"t0": {"2460000.51234"}, "t0_standard": {"BJD_TDB"}, "t0_form": {"JD"}, "t0_convention": {"inferior_conjunction"},
		"period_days": {fmt.Sprintf("%.6f", 0.05+w.rng.Float64()*0.5)}, "notes": {"made by the load test"},
		"goals[0].center": {"0.5"}, "goals[0].phase_halfwidth": {"0.05"}, "goals[0].exposure_s": {"60"},
	}
	r, err := w.c.post(ctx, "/targets", form)
	if w.st.record("POST /targets", r, err, false, http.StatusSeeOther) != okOutcome {
		return
	}
	id, err := locationID(r.location, "/targets/")
	if err != nil {
		w.st.record("POST /targets", response{status: -1}, err, false)
		return
	}
	w.env.addCreated(id)
}

// importRows imports five new targets into the load list in one
// all-or-nothing transaction.
func (w *worker) importRows(ctx context.Context) {
	if w.env.nCreated() >= maxCreated {
		w.edit(ctx)
		return
	}
	var b strings.Builder
	b.WriteString("name,ra,dec,t0,t0_standard,t0_convention,period_days,notes\n")
	for i := 0; i < 5; i++ {
		n, ra, dec := w.env.position()
		fmt.Fprintf(&b, "LT import %d-%d,%s,%s,2460000.5,BJD_TDB,inferior_conjunction,%.6f,imported by the load test\n",
			w.id, n, ra, dec, 0.05+w.rng.Float64()*0.5)
	}
	r, err := w.c.post(ctx, fmt.Sprintf("/lists/%d/import", w.env.loadListID), url.Values{"format": {"csv"}, "content": {b.String()}})
	if w.st.record("POST /lists/{id}/import (5 rows)", r, err, false, http.StatusSeeOther) == okOutcome {
		w.env.imported.Add(5)
	}
}

// pick chooses an op by weight; viewers only read.
func (w *worker) pick() op {
	total := 0
	for _, o := range ops {
		if !o.write || w.role != store.RoleViewer {
			total += o.weight
		}
	}
	k := w.rng.IntN(total)
	for _, o := range ops {
		if o.write && w.role == store.RoleViewer {
			continue
		}
		if k < o.weight {
			return o
		}
		k -= o.weight
	}
	return ops[0]
}

func TestLoad(t *testing.T) {
	cfg := loadSettings(t)
	bin := buildServer(t)
	dir := t.TempDir()
	db, logPath := testdb.Target(t, "load.db"), filepath.Join(dir, "server.log")
	srv := startServer(t, bin, db, logPath)
	env := &loadEnv{demo: signInDemo(t, srv, db)}
	now := time.Now().UTC()
	for k := -1; k <= 2; k++ {
		env.dates = append(env.dates, now.AddDate(0, 0, k).Format("2006-01-02"))
	}
	ctx := context.Background()
	owner := newAPIClient(http.DefaultTransport, srv.base, env.sessions[store.RoleOwner], env.tokens[store.RoleOwner])
	r, err := owner.post(ctx, "/lists", url.Values{"name": {"Load test list"}, "description": {"targets made by the load test"}})
	if err != nil || r.status != http.StatusSeeOther {
		t.Fatalf("create the load list: status %d, %v", r.status, err)
	}
	if env.loadListID, err = locationID(r.location, "list="); err != nil {
		t.Fatal(err)
	}
	single := warmUp(t, owner, env)

	rss0, _, err := memory(srv.pid())
	if err != nil {
		t.Fatal(err)
	}
	cpu0, err := cpuTime(srv.pid())
	if err != nil {
		t.Fatal(err)
	}
	self0, err := cpuTime(os.Getpid())
	if err != nil {
		t.Fatal(err)
	}
	load0 := loadAverage()
	tr := newTransport(cfg.clients)
	defer tr.CloseIdleConnections()
	roles := []store.Role{store.RoleOwner, store.RoleEditor, store.RoleViewer}
	workers := make([]*worker, cfg.clients)
	for i := range workers {
		role := roles[i%len(roles)]
		if env.sessions[role] == "" {
			role = store.RoleOwner
		}
		workers[i] = &worker{id: i, role: role, env: env, st: newStats(),
			c: newAPIClient(tr, srv.base, env.sessions[role], env.tokens[role]), rng: rand.New(rand.NewPCG(uint64(i), 0x10ad))}
	}
	t.Logf("load: %s against %s (pid %d), GOMAXPROCS %d, NumCPU %d, load average before %s",
		cfg.describe(), srv.base, srv.pid(), runtime.GOMAXPROCS(0), runtime.NumCPU(), load0)
	start := time.Now()
	deadline := start.Add(cfg.duration)
	// Requests already sent may finish after the deadline; ctx bounds them.
	runCtx, cancel := context.WithTimeout(ctx, cfg.duration+60*time.Second)
	defer cancel()
	var wg sync.WaitGroup
	for _, w := range workers {
		wg.Go(func() {
			for time.Now().Before(deadline) && runCtx.Err() == nil {
				w.pick().run(runCtx, w)
			}
		})
	}
	wg.Wait()
	elapsed := time.Since(start)
	rss, peak, err := memory(srv.pid())
	if err != nil {
		t.Fatal(err)
	}
	cpu1, err := cpuTime(srv.pid())
	if err != nil {
		t.Fatal(err)
	}
	self1, err := cpuTime(os.Getpid())
	if err != nil {
		t.Fatal(err)
	}
	load1 := loadAverage()

	all := newStats()
	for _, w := range workers {
		all.merge(w.st)
	}
	total := report(t, cfg, all, single, elapsed)
	cpu := cpu1 - cpu0
	t.Logf("CPU: server %.1f s user+system in %.1f s = %.2f of %d cores, %.1f ms per request; the test's clients on the same machine %.1f s",
		cpu.Seconds(), elapsed.Seconds(), cpu.Seconds()/elapsed.Seconds(), runtime.NumCPU(), float64(cpu.Milliseconds())/float64(max(total, 1)),
		(self1 - self0).Seconds())
	t.Logf("server memory: VmRSS %.1f MiB before the load, %.1f MiB at the end, peak (VmHWM) %.1f MiB; load average at the end %s",
		float64(rss0)/1024, float64(rss)/1024, float64(peak)/1024, load1)

	if err := srv.stop(15 * time.Second); err != nil {
		t.Errorf("graceful stop after the load: %v", err)
	}
	locked, logErrs, panics, examples, err := scanLog(logPath)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("server log: %d lines with \"database is locked\", %d ERROR lines, %d panics", locked, logErrs, panics)
	if locked+logErrs+panics > 0 {
		t.Errorf("server log shows trouble:\n%s", strings.Join(examples, "\n"))
	}
	checkAfterLoad(t, db, env)
}

// warmUpRounds is how many times warmUp runs every op.
const warmUpRounds = 3

// warmUp runs every op a few times from one client before the clock
// starts, so that a route broken outright fails at once with its own
// message; it returns the median latency of each route without
// concurrency, the cost of the request itself.
func warmUp(t *testing.T, c *client, env *loadEnv) map[string]time.Duration {
	t.Helper()
	ctx := context.Background()
	w := &worker{c: c, env: env, st: newStats(), rng: rand.New(rand.NewPCG(0, 0)), role: store.RoleOwner}
	for range warmUpRounds {
		for _, o := range ops {
			o.run(ctx, w)
		}
	}
	med := map[string]time.Duration{}
	for name, r := range w.st.routes {
		if r.errs > 0 {
			t.Fatalf("warm-up request %s failed: %s", name, strings.Join(w.st.samples, "\n"))
		}
		slices.Sort(r.lat)
		med[name] = percentile(r.lat, 50)
	}
	return med
}

// report logs the per-route table (with each route's latency with one
// client, from the warm-up) and fails the test on any error. It returns
// the number of requests.
func report(t *testing.T, cfg loadConfig, all *stats, single map[string]time.Duration, elapsed time.Duration) int {
	t.Helper()
	names := make([]string, 0, len(all.routes))
	total, errs, conf, busy := 0, 0, 0, 0
	var allBusy []string
	for name, r := range all.routes {
		names = append(names, name)
		total += r.ok + r.conf + r.busy + r.errs
		errs += r.errs
		conf += r.conf
		busy += r.busy
		if r.busy > 0 && r.ok == 0 {
			allBusy = append(allBusy, name)
		}
	}
	sort.Strings(names)
	var b strings.Builder
	fmt.Fprintf(&b, "\n| route | requests | ok | 409 | busy | errors | 1 client p50 ms | p50 ms | p95 ms | p99 ms | max ms |\n|---|--:|--:|--:|--:|--:|--:|--:|--:|--:|--:|\n")
	ms := func(d time.Duration) string { return fmt.Sprintf("%.1f", float64(d.Microseconds())/1000) }
	for _, name := range names {
		r := all.routes[name]
		slices.Sort(r.lat)
		var mx time.Duration
		if len(r.lat) > 0 {
			mx = r.lat[len(r.lat)-1]
		}
		fmt.Fprintf(&b, "| %s | %d | %d | %d | %d | %d | %s | %s | %s | %s | %s |\n", name, r.ok+r.conf+r.busy+r.errs, r.ok, r.conf, r.busy, r.errs,
			ms(single[name]), ms(percentile(r.lat, 50)), ms(percentile(r.lat, 95)), ms(percentile(r.lat, 99)), ms(mx))
	}
	t.Logf("load: %s; %d requests in %v = %.1f requests/s; %d errors, %d version conflicts (409, expected), %d heavy requests refused busy (429/503 with Retry-After, by design), %d responses mentioning \"database is locked\"%s",
		cfg.describe(), total, elapsed.Round(time.Millisecond), float64(total)/elapsed.Seconds(), errs, conf, busy, all.locked, b.String())
	if errs > 0 || all.locked > 0 {
		t.Errorf("%d errors under load; first ones:\n%s", errs, strings.Join(all.samples, "\n"))
	}
	if len(allBusy) > 0 {
		t.Errorf("every request of %v was refused busy: the heavy-work gate let none through", allBusy)
	}
	if total == 0 {
		t.Error("no request completed")
	}
	return total
}

// checkAfterLoad opens the stopped database: SQLite's checks pass and the
// load list holds exactly the targets whose creation was acknowledged.
func checkAfterLoad(t *testing.T, db string, env *loadEnv) {
	t.Helper()
	ctx := context.Background()
	integrity, fk, err := fileChecks(ctx, db)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("after the load: PRAGMA integrity_check = %q, foreign_key_check problems = %d", integrity, fk)
	if integrity != "ok" || fk != 0 {
		t.Errorf("database damaged after the load: integrity_check %q, %d foreign key problems", integrity, fk)
	}
	st, err := store.Open(ctx, db, time.Now) // the child server runs on the wall clock
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	a, err := st.SessionActor(ctx, env.sessions[store.RoleOwner])
	if err != nil {
		t.Fatal(err)
	}
	ts, err := st.ListTargets(ctx, a, env.loadListID)
	if err != nil {
		t.Fatal(err)
	}
	want := len(env.created) + int(env.imported.Load())
	if len(ts) != want {
		t.Errorf("load list holds %d targets, want %d (acknowledged creations and rows of acknowledged imports)", len(ts), want)
	}
	have := map[int64]bool{}
	for _, tg := range ts {
		have[tg.ID] = true
	}
	for _, id := range env.created {
		if !have[id] {
			t.Errorf("target %d, whose creation was acknowledged, is not in the load list", id)
		}
	}
}

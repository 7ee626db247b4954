package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
	"phasecast/web"
)

// docsTargets is an invented target list in the plan CSV form, which both
// the CLI (--targets) and the web's import read; in name order, the order
// the web lists a list's targets in.
const docsTargets = `name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority
Okapi-2,11:20:45,-51:12:00,2461121.10490,0.0958,0.0;0.5,0.06,180,15,2
Tarn-4,13:02:10,-38:40:00,2461120.41872,0.2311,0.25;0.75,0.05,300,20,1
`

// docsSite is an invented site: the CLI gets it as flags, the web as a
// site record.
var docsSite = struct {
	name, zone string
	site       ephem.Site
}{"Cerro Docs (invented)", "America/Santiago", ephem.Site{LatDeg: -27.85, LonEastDeg: -69.12, ElevM: 2650}}

// docsWeb is a web server over a fresh store holding docsSite and
// docsTargets, with a signed-in browser client and an API token.
type docsWeb struct {
	ts     *httptest.Server
	c      *http.Client
	token  string
	st     *store.Store
	actor  store.Actor
	teamID int64
	siteID int64
	listID int64
}

func newDocsWeb(t *testing.T) *docsWeb {
	t.Helper()
	ctx := context.Background()
	now := testClock(t)
	st, err := store.Open(ctx, filepath.Join(t.TempDir(), "docs.db"), now,
		store.WithPasswordParams(store.PasswordParams{Time: 1, MemoryKiB: 64, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	const email, password = "docs@example.org", "correct horse battery"
	if _, err := st.CreateUser(ctx, store.NewUser{Email: email, Name: "Docs", Password: password}); err != nil {
		t.Fatal(err)
	}
	_, sess, err := st.SignIn(ctx, email, password)
	if err != nil {
		t.Fatal(err)
	}
	d := &docsWeb{st: st}
	if d.actor, err = st.SessionActor(ctx, sess); err != nil {
		t.Fatal(err)
	}
	team, err := st.CreateTeam(ctx, d.actor, "Docs team")
	if err != nil {
		t.Fatal(err)
	}
	d.teamID = team.ID
	if d.actor, err = st.SessionActor(ctx, sess); err != nil {
		t.Fatal(err)
	}
	site, err := st.CreateSite(ctx, d.actor, team.ID, store.SiteInput{Name: docsSite.name, Site: docsSite.site, Zone: docsSite.zone,
		Constraints: planner.DefaultConstraints()})
	if err != nil {
		t.Fatal(err)
	}
	d.siteID = site.ID
	list, err := st.CreateList(ctx, d.actor, team.ID, store.ListInput{Name: "Docs list"})
	if err != nil {
		t.Fatal(err)
	}
	d.listID = list.ID
	if _, err := st.ImportTargets(ctx, d.actor, list.ID, strings.NewReader(docsTargets), store.FormatAuto); err != nil {
		t.Fatal(err)
	}
	if _, d.token, err = st.CreateAPIToken(ctx, d.actor, "docs", 24*time.Hour); err != nil {
		t.Fatal(err)
	}
	srv, err := web.New(web.Config{Store: st, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), Now: now})
	if err != nil {
		t.Fatal(err)
	}
	d.ts = httptest.NewServer(srv.Handler())
	t.Cleanup(d.ts.Close)
	jar, _ := cookiejar.New(nil)
	d.c = &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	form := url.Values{"email": {email}, "password": {password}}
	if code, _ := d.do(t, http.MethodPost, "/login", strings.NewReader(form.Encode()), http.Header{
		"Content-Type": {"application/x-www-form-urlencoded"}, "Sec-Fetch-Site": {"same-origin"}}); code != http.StatusSeeOther {
		t.Fatalf("sign in: %d", code)
	}
	return d
}

// do sends one request with the browser client and returns the status and
// body.
func (d *docsWeb) do(t *testing.T, method, path string, body io.Reader, header http.Header) (int, []byte) {
	t.Helper()
	req, err := http.NewRequest(method, d.ts.URL+path, body)
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range header {
		req.Header[k] = v
	}
	resp, err := d.c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatal(err)
	}
	return resp.StatusCode, b
}

// page is a download of the signed-in pages; api a call with the token.
func (d *docsWeb) page(t *testing.T, path string) []byte {
	t.Helper()
	code, b := d.do(t, http.MethodGet, path, nil, nil)
	if code != http.StatusOK {
		t.Fatalf("GET %s = %d: %.300s", path, code, b)
	}
	return b
}

func (d *docsWeb) api(t *testing.T, method, path string) []byte {
	t.Helper()
	code, b := d.do(t, method, path, nil, http.Header{"Authorization": {"Bearer " + d.token}})
	if code != http.StatusOK && code != http.StatusCreated {
		t.Fatalf("%s %s = %d: %.300s", method, path, code, b)
	}
	return b
}

// cli runs a phasecast command through run() at docsSite with the targets
// file and returns its output.
func cli(t *testing.T, targets string, argv ...string) []byte {
	t.Helper()
	site := []string{"--lat", fmt.Sprint(docsSite.site.LatDeg), "--lon", fmt.Sprint(docsSite.site.LonEastDeg),
		"--elev", fmt.Sprint(docsSite.site.ElevM), "--tz", docsSite.zone, "--site-name", docsSite.name, "--targets", targets}
	stdout, stderr, code := runCmd(t, append(append([]string{}, argv[0]), append(site, argv[1:]...)...)...)
	if code != 0 {
		t.Fatalf("phasecast %s: exit %d: %s", strings.Join(argv, " "), code, stderr)
	}
	return []byte(stdout)
}

// sameDoc fails unless every document in docs has the bytes of the first.
func sameDoc(t *testing.T, what string, docs map[string][]byte, first string) {
	t.Helper()
	want := docs[first]
	if len(want) < 200 {
		t.Fatalf("%s from %s is only %d bytes: %s", what, first, len(want), want)
	}
	for name, got := range docs {
		if !bytes.Equal(got, want) {
			t.Errorf("%s: %s differs from %s\n%s", what, name, first, firstDiff(got, want))
		}
	}
}

// firstDiff shows the first line where a and b differ.
func firstDiff(a, b []byte) string {
	al, bl := strings.Split(string(a), "\n"), strings.Split(string(b), "\n")
	for i := 0; i < len(al) || i < len(bl); i++ {
		var x, y string
		if i < len(al) {
			x = al[i]
		}
		if i < len(bl) {
			y = bl[i]
		}
		if x != y {
			return fmt.Sprintf("line %d:\n  %q\n  %q", i+1, x, y)
		}
	}
	return "(same lines)"
}

// TestDocumentsByteIdentical plans the same night, queue windows and run of
// nights at the same site for the same targets through the CLI (run()),
// the web pages' downloads and the JSON API (httptest), and checks that
// each document is the same bytes everywhere: the night as JSON and CSV,
// the windows as JSON, CSV and iCalendar, the run as JSON and CSV.
func TestDocumentsByteIdentical(t *testing.T) {
	d := newDocsWeb(t)
	targets := writeFile(t, "targets.csv", docsTargets)
	q := fmt.Sprintf("site=%d&list=%d", d.siteID, d.listID)

	t.Run("Night", func(t *testing.T) {
		const date = "2026-05-12"
		docs := map[string][]byte{
			"phasecast plan --json": cli(t, targets, "plan", "--date", date, "--acquire-s", "0", "--json"),
			"/night.json":           d.page(t, "/night.json?"+q+"&date="+date),
			"/api/v1/night":         d.api(t, http.MethodGet, "/api/v1/night?"+q+"&date="+date),
		}
		sameDoc(t, "night JSON", docs, "phasecast plan --json")
		csvDocs := map[string][]byte{
			"phasecast plan --format csv": cli(t, targets, "plan", "--date", date, "--acquire-s", "0", "--format", "csv"),
			"/night.csv":                  d.page(t, "/night.csv?"+q+"&date="+date),
		}
		sameDoc(t, "night CSV", csvDocs, "phasecast plan --format csv")
	})

	t.Run("Windows", func(t *testing.T) {
		loc, err := time.LoadLocation(docsSite.zone)
		if err != nil {
			t.Fatal(err)
		}
		// The web's range runs from the first date's local noon to the
		// noon after the last; the CLI takes those instants.
		from, _ := planner.NightWindow(2026, time.May, 12, loc)
		_, to := planner.NightWindow(2026, time.May, 14, loc)
		wq := q + "&from=2026-05-12&to=2026-05-14"
		argv := []string{"windows", "--from", from.Format(time.RFC3339), "--to", to.Format(time.RFC3339)}
		docs := map[string][]byte{
			"phasecast windows --json": cli(t, targets, append(argv, "--json")...),
			"/windows.json":            d.page(t, "/windows.json?"+wq),
			"/api/v1/windows":          d.api(t, http.MethodGet, "/api/v1/windows?"+wq),
		}
		sameDoc(t, "windows JSON", docs, "phasecast windows --json")
		csvDocs := map[string][]byte{
			"phasecast windows --format csv": cli(t, targets, append(argv, "--format", "csv")...),
			"/windows.csv":                   d.page(t, "/windows.csv?"+wq),
		}
		sameDoc(t, "windows CSV", csvDocs, "phasecast windows --format csv")
		// The web stamps its calendar with the inputs' last change; the CLI
		// takes that instant as --stamp.
		ts, err := d.st.ListTargets(context.Background(), d.actor, d.listID)
		if err != nil {
			t.Fatal(err)
		}
		sites, err := d.st.ListSites(context.Background(), d.actor, d.teamID)
		if err != nil {
			t.Fatal(err)
		}
		stamp := sites[0].UpdatedAt
		for _, tg := range ts {
			if tg.UpdatedAt.After(stamp) {
				stamp = tg.UpdatedAt
			}
		}
		icsDocs := map[string][]byte{
			"phasecast windows --format ics": cli(t, targets, append(argv, "--format", "ics",
				"--stamp", stamp.Format(time.RFC3339Nano))...),
			"/windows.ics": d.page(t, "/windows.ics?"+wq),
		}
		sameDoc(t, "windows iCalendar", icsDocs, "phasecast windows --format ics")
	})

	t.Run("Run", func(t *testing.T) {
		const name = "Docs run (invented)"
		nights := []store.RunNight{{Date: "2026-05-12", Part: store.NightFull}, {Date: "2026-05-13", Part: store.NightFirstHalf}}
		r, err := d.st.CreateRun(context.Background(), d.actor, d.teamID, store.RunInput{Name: name, SiteID: d.siteID, ListID: d.listID, Nights: nights,
			Constraints: planner.DefaultConstraints()})
		if err != nil {
			t.Fatal(err)
		}
		path := fmt.Sprintf("/api/v1/runs/%d/plan", r.ID)
		d.api(t, http.MethodPost, path+"?past=0")
		argv := []string{"run", "--dates", "2026-05-12,2026-05-13:first", "--name", name, "--past", "0", "--bins", "10", "--compare", "--acquire-s", "0"}
		docs := map[string][]byte{
			"phasecast run --json":   cli(t, targets, append(argv, "--json")...),
			"/runs/{id}/plan.json":   d.page(t, fmt.Sprintf("/runs/%d/plan.json", r.ID)),
			"/api/v1/runs/{id}/plan": d.api(t, http.MethodGet, path),
		}
		sameDoc(t, "run JSON", docs, "phasecast run --json")
		csvDocs := map[string][]byte{
			"phasecast run --format csv": cli(t, targets, append(argv, "--format", "csv")...),
			"/runs/{id}/plan.csv":        d.page(t, fmt.Sprintf("/runs/%d/plan.csv", r.ID)),
		}
		sameDoc(t, "run CSV", csvDocs, "phasecast run --format csv")
	})
}

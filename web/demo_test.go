package web

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"regexp"
	"strings"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testclock"
	"phasecast/store/testdb"
)

// demo is a server over the seeded demo scenario with a browser-like
// client signed in as the demo owner through the one-time link.
type demo struct {
	ts   *httptest.Server
	c    *http.Client
	info store.DemoInfo
	st   *store.Store
}

func newDemo(t *testing.T) *demo {
	t.Helper()
	ctx := context.Background()
	clk := testclock.Start(t, time.Date(2026, 12, 1, 18, 0, 0, 0, time.UTC))
	st, err := store.Open(ctx, testdb.Target(t, "demo.db"), clk.Now,
		store.WithPasswordParams(store.PasswordParams{Time: 1, MemoryKiB: 64, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	now := clk.Now()
	info, err := st.SeedDemo(ctx, now)
	if err != nil {
		t.Fatal(err)
	}
	srv, err := New(Config{Store: st, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), Now: clk.Now})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar}
	resp, _ := send(t, c, http.MethodPost, ts.URL+"/login/link/"+info.SignInToken, nil, http.Header{"Sec-Fetch-Site": {"same-origin"}})
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("sign in with the demo link: %d", resp.StatusCode)
	}
	return &demo{ts: ts, c: c, info: info, st: st}
}

// TestDemoPagesRender signs in to the seeded demo scenario with its
// one-time link and opens every page a newcomer meets, checking that each
// renders with its main element.
func TestDemoPagesRender(t *testing.T) {
	d := newDemo(t)
	ts, c, info := d.ts, d.c, d.info
	pages := []struct{ path, testid string }{
		{"/tonight", "tonight-table"},
		{"/runs", "runs"},
		{"/runs/" + i64s(info.Run.ID), "optimize-form"},
		{"/windows", "windows-form"},
		{"/tonight/body", "tonight-table"},
		{"/targets", "targets-table"},
		{"/night", "night-chart"},
		{"/sites", "sites"},
		{"/sites/" + i64s(info.Site.ID), "horizon-preview"},
		{"/team", "members"},
		{"/account", "token-form"},
		{"/lists/" + i64s(info.List.ID) + "/import", "import-form"},
		{"/targets/new?list=" + i64s(info.List.ID), "target-form"},
	}
	for _, tg := range info.Targets {
		pages = append(pages, struct{ path, testid string }{"/targets/" + i64s(tg.ID), "upcoming"},
			struct{ path, testid string }{"/targets/" + i64s(tg.ID) + "/edit", "target-form"})
	}
	for _, p := range pages {
		t.Run(strings.TrimPrefix(p.path, "/"), func(t *testing.T) {
			resp, b := send(t, c, http.MethodGet, ts.URL+p.path, nil, nil)
			if resp.StatusCode != http.StatusOK || !hasTestID(string(b), p.testid) {
				t.Errorf("GET %s = %d, %s present %v", p.path, resp.StatusCode, p.testid, hasTestID(string(b), p.testid))
			}
			if m := regexp.MustCompile(`NaN|Inf\b`).FindString(string(b)); m != "" {
				t.Errorf("GET %s shows %q", p.path, m)
			}
			if p.testid == "upcoming" {
				// Every predicted event time carries its ±.
				body := string(b)
				table := body[strings.Index(body, `data-testid="upcoming"`):]
				table = table[:strings.Index(table, "</table>")]
				times, sigmas := strings.Count(table, "(in "), strings.Count(table, " ± ")
				if times == 0 || times != sigmas {
					t.Errorf("GET %s: %d predicted event times, %d with their ±", p.path, times, sigmas)
				}
			}
		})
	}
}

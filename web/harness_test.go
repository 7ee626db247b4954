package web

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testclock"
	"phasecast/store/testdb"
)

// testNow is the fixed clock of the handler tests: an evening in March.
var testNow = testclock.Or(time.Date(2026, 3, 14, 20, 0, 0, 0, time.UTC))

// harness is a server over a real SQLite file with a team (owner, editor,
// viewer) and an outsider in another team.
type harness struct {
	t       testing.TB
	store   *store.Store
	srv     *Server
	ts      *httptest.Server
	teamID  int64
	otherID int64
	users   map[string]store.User // by role name, and "outsider"
}

const testPassword = "correct horse battery"

func newHarness(t testing.TB) *harness {
	t.Helper()
	ctx := context.Background()
	st, err := store.Open(ctx, testdb.Target(t, "test.db"), func() time.Time { return testNow },
		store.WithPasswordParams(store.PasswordParams{Time: 1, MemoryKiB: 64, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	h := &harness{t: t, store: st, users: map[string]store.User{}}
	for _, name := range []string{"owner", "editor", "viewer", "outsider"} {
		u, err := st.CreateUser(ctx, store.NewUser{Email: name + "@example.org", Name: "Test " + name, Password: testPassword})
		if err != nil {
			t.Fatal(err)
		}
		h.users[name] = u
	}
	owner := h.actor("owner")
	team, err := st.CreateTeam(ctx, owner, "Test team")
	if err != nil {
		t.Fatal(err)
	}
	h.teamID = team.ID
	for _, role := range []store.Role{store.RoleEditor, store.RoleViewer} {
		_, tok, err := st.CreateInvitation(ctx, owner, team.ID, role, 24*time.Hour, "")
		if err != nil {
			t.Fatal(err)
		}
		if _, err := st.AcceptInvitation(ctx, h.actor(string(role)), tok); err != nil {
			t.Fatal(err)
		}
	}
	other, err := st.CreateTeam(ctx, h.actor("outsider"), "Other team")
	if err != nil {
		t.Fatal(err)
	}
	h.otherID = other.ID
	logger := slog.New(slog.NewTextHandler(io.Discard, nil))
	if testing.Verbose() {
		logger = slog.New(slog.NewTextHandler(testWriter{t}, nil))
	}
	h.srv, err = New(Config{Store: st, Logger: logger, Now: func() time.Time { return testNow }})
	if err != nil {
		t.Fatal(err)
	}
	h.ts = httptest.NewServer(h.srv.Handler())
	t.Cleanup(h.ts.Close)
	return h
}

type testWriter struct{ t testing.TB }

func (w testWriter) Write(p []byte) (int, error) {
	w.t.Log(strings.TrimSpace(string(p)))
	return len(p), nil
}

// actor returns a fresh store actor of the named test user.
func (h *harness) actor(name string) store.Actor {
	h.t.Helper()
	_, tok, err := h.store.SignIn(context.Background(), name+"@example.org", testPassword)
	if err != nil {
		h.t.Fatal(err)
	}
	a, err := h.store.SessionActor(context.Background(), tok)
	if err != nil {
		h.t.Fatal(err)
	}
	return a
}

// client returns an HTTP client signed in as the named user ("" for a
// signed-out client). It does not follow redirects.
func (h *harness) client(name string) *http.Client {
	h.t.Helper()
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	if name == "" {
		return c
	}
	resp := h.post(c, "/login", url.Values{"email": {name + "@example.org"}, "password": {testPassword}})
	if resp.StatusCode != http.StatusSeeOther {
		h.t.Fatalf("sign in as %s: status %d", name, resp.StatusCode)
	}
	return c
}

// get fetches path and returns the response with its body read.
func (h *harness) get(c *http.Client, path string) (*http.Response, string) {
	h.t.Helper()
	return send(h.t, c, http.MethodGet, h.ts.URL+path, nil, nil)
}

// post submits a form as a same-origin browser would.
func (h *harness) post(c *http.Client, path string, form url.Values) *http.Response {
	h.t.Helper()
	resp, _ := h.postBody(c, path, form)
	return resp
}

// postBody is post with the response body read.
func (h *harness) postBody(c *http.Client, path string, form url.Values) (*http.Response, string) {
	h.t.Helper()
	return send(h.t, c, http.MethodPost, h.ts.URL+path, strings.NewReader(form.Encode()), formHeader())
}

// send is the one HTTP client of the web tests: it does method on target
// (a full URL) with c, body and the header fields given, and returns the
// response with its body read and closed.
func send(tb testing.TB, c *http.Client, method, target string, body io.Reader, header http.Header) (*http.Response, string) {
	tb.Helper()
	req, err := http.NewRequest(method, target, body)
	if err != nil {
		tb.Fatal(err)
	}
	for k, vs := range header {
		req.Header[k] = vs
	}
	resp, err := c.Do(req)
	if err != nil {
		tb.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		tb.Fatal(err)
	}
	return resp, string(b)
}

// formHeader is the header of a form a same-origin browser page submits
// (the cross-origin protection lets it through).
func formHeader() http.Header {
	return http.Header{"Content-Type": {"application/x-www-form-urlencoded"}, "Sec-Fetch-Site": {"same-origin"}}
}

// hasTestID reports whether body has an element with data-testid=id.
func hasTestID(body, id string) bool {
	return strings.Contains(body, `data-testid="`+id+`"`)
}

// signedRequest is a GET request carrying c's cookies, for calling
// handlers directly.
func signedRequest(tb testing.TB, h *harness, c *http.Client) *http.Request {
	tb.Helper()
	req := httptest.NewRequest(http.MethodGet, "/", nil)
	u, _ := url.Parse(h.ts.URL)
	for _, k := range c.Jar.Cookies(u) {
		req.AddCookie(k)
	}
	return req
}

package web

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"sync"
	"testing"
	"time"

	"phasecast/store"
	"phasecast/store/testdb"
)

// testClock is a clock the test moves; the store and the server share it.
type testClock struct {
	mu sync.Mutex
	t  time.Time
}

func (c *testClock) now() time.Time { c.mu.Lock(); defer c.mu.Unlock(); return c.t }

func (c *testClock) advance(d time.Duration) { c.mu.Lock(); c.t = c.t.Add(d); c.mu.Unlock() }

// newClockHarness is newHarness with a movable clock in both the store
// (expiry of share links, tokens, sessions) and the server (login limit).
func newClockHarness(t *testing.T) (*harness, *testClock) {
	t.Helper()
	ctx := context.Background()
	clk := &testClock{t: testNow}
	st, err := store.Open(ctx, testdb.Target(t, "clock.db"), clk.now,
		store.WithPasswordParams(store.PasswordParams{Time: 1, MemoryKiB: 64, Threads: 1, SaltLen: 16, KeyLen: 32}))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	h := &harness{t: t, store: st, users: map[string]store.User{}}
	for _, name := range []string{"owner", "outsider"} {
		u, err := st.CreateUser(ctx, store.NewUser{Email: name + "@example.org", Name: "Test " + name, Password: testPassword})
		if err != nil {
			t.Fatal(err)
		}
		h.users[name] = u
	}
	team, err := st.CreateTeam(ctx, h.actor("owner"), "Test team")
	if err != nil {
		t.Fatal(err)
	}
	h.teamID = team.ID
	other, err := st.CreateTeam(ctx, h.actor("outsider"), "Other team")
	if err != nil {
		t.Fatal(err)
	}
	h.otherID = other.ID
	h.srv, err = New(Config{Store: st, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), Now: clk.now})
	if err != nil {
		t.Fatal(err)
	}
	h.ts = httptest.NewServer(h.srv.Handler())
	t.Cleanup(h.ts.Close)
	return h, clk
}

// sessionOf returns the session cookie value c holds for the test server.
func (h *harness) sessionOf(c *http.Client) string {
	h.t.Helper()
	u, _ := url.Parse(h.ts.URL)
	for _, k := range c.Jar.Cookies(u) {
		if k.Name == sessionCookie {
			return k.Value
		}
	}
	return ""
}

// withSession returns a fresh client that carries only the given session
// cookie value (a replayed or planted cookie).
func (h *harness) withSession(value string) *http.Client {
	h.t.Helper()
	c := h.client("")
	u, _ := url.Parse(h.ts.URL)
	c.Jar.SetCookies(u, []*http.Cookie{{Name: sessionCookie, Value: value, Path: "/"}})
	return c
}

func signedOut(resp *http.Response) bool {
	return resp.StatusCode == http.StatusSeeOther && strings.HasPrefix(resp.Header.Get("Location"), "/login")
}

func TestSessionSecurity(t *testing.T) {
	h, clk := newClockHarness(t)
	ctx := context.Background()

	t.Run("FixationPlantedCookie", func(t *testing.T) {
		c := h.withSession("planted-by-someone-else")
		h.post(c, "/login", url.Values{"email": {"owner@example.org"}, "password": {testPassword}})
		got := h.sessionOf(c)
		if got == "" || got == "planted-by-someone-else" {
			t.Fatalf("session after sign-in = %q, want a new token", got)
		}
		if resp, _ := h.get(h.withSession("planted-by-someone-else"), "/account"); !signedOut(resp) {
			t.Errorf("the planted cookie is signed in: %d", resp.StatusCode)
		}
	})

	t.Run("FixationKnownSession", func(t *testing.T) {
		// A session the attacker holds (their own sign-in) planted in the
		// victim's browser: the victim's sign-in replaces and ends it.
		attacker := h.client("outsider")
		planted := h.sessionOf(attacker)
		victim := h.withSession(planted)
		h.post(victim, "/login", url.Values{"email": {"owner@example.org"}, "password": {testPassword}})
		if after := h.sessionOf(victim); after == planted || after == "" {
			t.Fatalf("session after sign-in = %q, the planted one was kept", after)
		}
		if resp, _ := h.get(h.withSession(planted), "/account"); !signedOut(resp) {
			t.Errorf("the planted session still works after the victim signed in over it: %d", resp.StatusCode)
		}
	})

	t.Run("LogoutEndsSessionServerSide", func(t *testing.T) {
		c := h.client("owner")
		old := h.sessionOf(c)
		if resp, _ := h.get(h.withSession(old), "/account"); resp.StatusCode != http.StatusOK {
			t.Fatalf("before logout, replayed cookie = %d, want 200", resp.StatusCode)
		}
		if resp := h.post(c, "/logout", nil); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("logout = %d", resp.StatusCode)
		}
		if resp, _ := h.get(h.withSession(old), "/account"); !signedOut(resp) {
			t.Errorf("after logout, replayed cookie = %d to %q, want a redirect to /login", resp.StatusCode, resp.Header.Get("Location"))
		}
	})

	l, err := h.store.CreateList(ctx, h.actor("owner"), h.teamID, store.ListInput{Name: "Shared list"})
	if err != nil {
		t.Fatal(err)
	}
	t.Run("ShareLinkExpires", func(t *testing.T) {
		_, tok, err := h.store.CreateShareLink(ctx, h.actor("owner"), store.ShareInput{ListID: l.ID, Label: "short", TTL: time.Hour})
		if err != nil {
			t.Fatal(err)
		}
		anon := h.client("")
		if resp, _ := h.get(anon, "/share/"+tok); resp.StatusCode != http.StatusOK {
			t.Fatalf("fresh share link = %d, want 200", resp.StatusCode)
		}
		clk.advance(time.Hour + time.Second)
		resp, body := h.get(anon, "/share/"+tok)
		if resp.StatusCode != http.StatusNotFound || strings.Contains(body, "Shared list") {
			t.Errorf("expired share link = %d (list name shown %v), want 404", resp.StatusCode, strings.Contains(body, "Shared list"))
		}
	})

	t.Run("ShareLinkRevoked", func(t *testing.T) {
		sl, tok, err := h.store.CreateShareLink(ctx, h.actor("owner"), store.ShareInput{ListID: l.ID, Label: "revoked", TTL: 24 * time.Hour})
		if err != nil {
			t.Fatal(err)
		}
		owner := h.client("owner")
		if resp := h.post(owner, "/shares/"+i64s(sl.ID)+"/revoke", nil); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("revoke = %d", resp.StatusCode)
		}
		if resp, _ := h.get(h.client(""), "/share/"+tok); resp.StatusCode != http.StatusNotFound {
			t.Errorf("revoked share link = %d, want 404", resp.StatusCode)
		}
	})

	api := func(tok, path string) (int, string) {
		t.Helper()
		req, _ := http.NewRequest(http.MethodGet, h.ts.URL+path, nil)
		req.Header.Set("Authorization", "Bearer "+tok)
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		return resp.StatusCode, resp.Header.Get("WWW-Authenticate")
	}

	t.Run("APITokenRevoked", func(t *testing.T) {
		k, tok, err := h.store.CreateAPIToken(ctx, h.actor("owner"), "to revoke", 24*time.Hour)
		if err != nil {
			t.Fatal(err)
		}
		if code, _ := api(tok, "/api/v1/teams"); code != http.StatusOK {
			t.Fatalf("fresh token = %d, want 200", code)
		}
		if resp := h.post(h.client("owner"), "/account/tokens/"+i64s(k.ID)+"/revoke", nil); resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("revoke = %d", resp.StatusCode)
		}
		// RFC 6750, section 3.1 and docs/api.md: an invalid token gets 401.
		if code, auth := api(tok, "/api/v1/teams"); code != http.StatusUnauthorized || !strings.Contains(auth, "invalid_token") {
			t.Errorf("revoked token = %d (WWW-Authenticate %q), want 401 with error=\"invalid_token\"", code, auth)
		}
	})

	t.Run("APITokenExpires", func(t *testing.T) {
		_, tok, err := h.store.CreateAPIToken(ctx, h.actor("owner"), "short lived", 24*time.Hour)
		if err != nil {
			t.Fatal(err)
		}
		clk.advance(24*time.Hour + time.Second)
		if code, _ := api(tok, "/api/v1/teams"); code != http.StatusUnauthorized {
			t.Errorf("expired token = %d, want 401", code)
		}
	})

	t.Run("APITokenOfAnotherTeam", func(t *testing.T) {
		_, tok, err := h.store.CreateAPIToken(ctx, h.actor("outsider"), "outsider", 24*time.Hour)
		if err != nil {
			t.Fatal(err)
		}
		for _, path := range []string{"/api/v1/lists/" + i64s(l.ID) + "/targets", "/api/v1/lists?team=" + i64s(h.teamID)} {
			if code, _ := api(tok, path); code != http.StatusNotFound {
				t.Errorf("GET %s with another team's token = %d, want 404", path, code)
			}
		}
	})

	t.Run("LoginRateLimit", func(t *testing.T) {
		c := h.client("")
		wrong := url.Values{"email": {"owner@example.org"}, "password": {"not the password"}}
		right := url.Values{"email": {"owner@example.org"}, "password": {testPassword}}
		// The burst is 10 attempts per address (the signed-in clients above
		// spent some): keep failing until refused.
		refusedAt := 0
		for i := 1; i <= 20; i++ {
			if resp := h.post(c, "/login", wrong); resp.StatusCode == http.StatusTooManyRequests {
				refusedAt = i
				break
			} else if resp.StatusCode != http.StatusForbidden {
				t.Fatalf("attempt %d = %d, want 403 or 429", i, resp.StatusCode)
			}
		}
		if refusedAt == 0 {
			t.Fatal("20 wrong passwords in a row were never refused with 429")
		}
		t.Logf("refused at attempt %d", refusedAt)
		if resp := h.post(c, "/login", right); resp.StatusCode != http.StatusTooManyRequests || h.sessionOf(c) != "" {
			t.Errorf("right password while limited = %d, want 429 and no session", resp.StatusCode)
		}
		clk.advance(29 * time.Second)
		if resp := h.post(c, "/login", right); resp.StatusCode != http.StatusTooManyRequests {
			t.Errorf("right password 29 s later = %d, want 429 (one attempt regained every 30 s)", resp.StatusCode)
		}
		clk.advance(31 * time.Second)
		if resp := h.post(c, "/login", right); resp.StatusCode != http.StatusSeeOther || h.sessionOf(c) == "" {
			t.Errorf("right password after the window = %d, want 303 and a session", resp.StatusCode)
		}
	})
}

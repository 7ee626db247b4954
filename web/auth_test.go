package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
	"time"
)

func TestSignIn(t *testing.T) {
	h := newHarness(t)
	t.Run("PageRenders", func(t *testing.T) {
		resp, body := h.get(h.client(""), "/login")
		if resp.StatusCode != http.StatusOK || !hasTestID(body, "signin-form") {
			t.Errorf("GET /login = %d, form present %v", resp.StatusCode, hasTestID(body, "signin-form"))
		}
	})
	t.Run("ErrWrongPassword", func(t *testing.T) {
		resp, body := h.postBody(h.client(""), "/login", url.Values{"email": {"owner@example.org"}, "password": {"wrong password!"}})
		if resp.StatusCode != http.StatusForbidden || !hasTestID(body, "form-error") {
			t.Errorf("status %d, inline error %v", resp.StatusCode, hasTestID(body, "form-error"))
		}
	})
	t.Run("ErrEmpty", func(t *testing.T) {
		resp, body := h.postBody(h.client(""), "/login", url.Values{"email": {""}})
		if resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Enter your email") {
			t.Errorf("status %d, body lacks the message", resp.StatusCode)
		}
	})
	t.Run("CookieFlags", func(t *testing.T) {
		resp := h.post(h.client(""), "/login", url.Values{"email": {"owner@example.org"}, "password": {testPassword}, "next": {"/team"}})
		if resp.StatusCode != http.StatusSeeOther || resp.Header.Get("Location") != "/team" {
			t.Fatalf("status %d to %q, want 303 to /team", resp.StatusCode, resp.Header.Get("Location"))
		}
		var c *http.Cookie
		for _, k := range resp.Cookies() {
			if k.Name == sessionCookie {
				c = k
			}
		}
		if c == nil || !c.HttpOnly || c.SameSite != http.SameSiteLaxMode || c.Path != "/" {
			t.Errorf("session cookie = %+v, want HttpOnly, SameSite=Lax, Path=/", c)
		}
	})
	t.Run("ErrOpenRedirect", func(t *testing.T) {
		for _, next := range []string{"//evil.example", "https://evil.example/", "/\\evil.example"} {
			resp := h.post(h.client(""), "/login", url.Values{"email": {"owner@example.org"}, "password": {testPassword}, "next": {next}})
			if loc := resp.Header.Get("Location"); loc != "/tonight" {
				t.Errorf("next=%q redirected to %q, want /tonight", next, loc)
			}
		}
	})
}

func TestSessionRotationAndSignOut(t *testing.T) {
	h := newHarness(t)
	c := h.client("editor")
	u, _ := url.Parse(h.ts.URL)
	first := c.Jar.Cookies(u)[0].Value
	// Signing in again with the same browser ends the old session.
	h.post(c, "/login", url.Values{"email": {"editor@example.org"}, "password": {testPassword}})
	second := c.Jar.Cookies(u)[0].Value
	if first == second {
		t.Fatal("the session token did not change on sign-in")
	}
	if _, err := h.store.SessionActor(context.Background(), first); err == nil {
		t.Error("the old session still works after signing in again")
	}
	resp := h.post(c, "/logout", nil)
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("logout status %d", resp.StatusCode)
	}
	if _, err := h.store.SessionActor(context.Background(), second); err == nil {
		t.Error("the session still works after signing out")
	}
	resp, _ = h.get(c, "/account")
	if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(resp.Header.Get("Location"), "/login") {
		t.Errorf("after sign-out GET /account = %d to %q, want a redirect to /login", resp.StatusCode, resp.Header.Get("Location"))
	}
}

func TestSignInRateLimited(t *testing.T) {
	h := newHarness(t)
	c := h.client("")
	var last int
	for range 12 {
		resp := h.post(c, "/login", url.Values{"email": {"owner@example.org"}, "password": {"wrong password!"}})
		last = resp.StatusCode
	}
	if last != http.StatusTooManyRequests {
		t.Errorf("12th quick attempt = %d, want 429", last)
	}
}

func TestSignInLink(t *testing.T) {
	h := newHarness(t)
	tok, err := h.store.CreateSignInLink(context.Background(), "viewer@example.org", time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	c := h.client("")
	resp, body := h.get(c, "/login/link/"+tok)
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "link-signin") {
		t.Fatalf("GET link = %d", resp.StatusCode)
	}
	// GET alone does not use the link up.
	h.get(c, "/login/link/"+tok)
	resp = h.post(c, "/login/link/"+tok, nil)
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("POST link = %d, want 303", resp.StatusCode)
	}
	resp, body = h.get(c, "/account")
	if resp.StatusCode != http.StatusOK || !strings.Contains(body, "Test viewer") {
		t.Errorf("after the link, GET /account = %d", resp.StatusCode)
	}
	resp = h.post(h.client(""), "/login/link/"+tok, nil)
	if resp.StatusCode != http.StatusForbidden {
		t.Errorf("second use of the link = %d, want 403", resp.StatusCode)
	}
}

func TestAccount(t *testing.T) {
	h := newHarness(t)
	c := h.client("editor")
	t.Run("ErrPasswordsDiffer", func(t *testing.T) {
		resp, body := h.postBody(c, "/account/password", url.Values{"current": {testPassword}, "new_password": {"a new password 1"}, "confirm": {"another one 2"}})
		if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-confirm") {
			t.Errorf("status %d, inline error %v", resp.StatusCode, hasTestID(body, "err-confirm"))
		}
	})
	t.Run("ErrPasswordTooShort", func(t *testing.T) {
		resp, body := h.postBody(c, "/account/password", url.Values{"current": {testPassword}, "new_password": {"short"}, "confirm": {"short"}})
		if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-new_password") {
			t.Errorf("status %d, inline error on the new password %v", resp.StatusCode, hasTestID(body, "err-new_password"))
		}
	})
	t.Run("ErrWrongCurrent", func(t *testing.T) {
		resp, body := h.postBody(c, "/account/password", url.Values{"current": {"not my password"}, "new_password": {"a new password 1"}, "confirm": {"a new password 1"}})
		if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-current") {
			t.Errorf("status %d, inline error %v", resp.StatusCode, hasTestID(body, "err-current"))
		}
	})
	t.Run("TokenCreateRevoke", func(t *testing.T) {
		resp, body := h.postBody(c, "/account/tokens", url.Values{"token_name": {"script"}, "ttl_days": {"30"}})
		if resp.StatusCode != http.StatusOK || !hasTestID(body, "new-token") {
			t.Fatalf("create token = %d", resp.StatusCode)
		}
		tok := regexp.MustCompile(`data-testid="new-token">([^<]+)<`).FindStringSubmatch(body)
		if len(tok) != 2 {
			t.Fatal("token not shown")
		}
		if _, err := h.store.APITokenActor(context.Background(), tok[1]); err != nil {
			t.Fatalf("the shown token does not authenticate: %v", err)
		}
		id := regexp.MustCompile(`/account/tokens/(\d+)/revoke`).FindStringSubmatch(body)
		resp = h.post(c, "/account/tokens/"+id[1]+"/revoke", nil)
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("revoke = %d", resp.StatusCode)
		}
		if _, err := h.store.APITokenActor(context.Background(), tok[1]); err == nil {
			t.Error("a revoked token still authenticates")
		}
	})
	t.Run("PasswordChanged", func(t *testing.T) {
		resp := h.post(c, "/account/password", url.Values{"current": {testPassword}, "new_password": {"a new password 1"}, "confirm": {"a new password 1"}})
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("change = %d", resp.StatusCode)
		}
		if _, _, err := h.store.SignIn(context.Background(), "editor@example.org", "a new password 1"); err != nil {
			t.Errorf("the new password does not work: %v", err)
		}
	})
}

func TestTeamPageByRole(t *testing.T) {
	h := newHarness(t)
	tests := []struct {
		user        string
		invitations bool
	}{
		{"owner", true}, {"editor", false}, {"viewer", false},
	}
	for _, tt := range tests {
		t.Run(tt.user, func(t *testing.T) {
			resp, body := h.get(h.client(tt.user), "/team")
			if resp.StatusCode != http.StatusOK || !hasTestID(body, "members") {
				t.Fatalf("GET /team = %d", resp.StatusCode)
			}
			if got := hasTestID(body, "invite-create-form"); got != tt.invitations {
				t.Errorf("invitation form shown = %v, want %v", got, tt.invitations)
			}
		})
	}
	t.Run("ErrEditorCannotInvite", func(t *testing.T) {
		resp := h.post(h.client("editor"), "/team/invitations", url.Values{"role": {"viewer"}, "ttl_days": {"7"}})
		if resp.StatusCode != http.StatusForbidden {
			t.Errorf("editor invites = %d, want 403", resp.StatusCode)
		}
	})
	t.Run("OutsiderSeesOwnTeamOnly", func(t *testing.T) {
		_, body := h.get(h.client("outsider"), "/team")
		if strings.Contains(body, "Test team") || !strings.Contains(body, "Other team") {
			t.Error("the outsider sees the wrong team")
		}
		resp := h.post(h.client("outsider"), "/team/select", url.Values{"team_id": {i64s(h.teamID)}})
		if resp.StatusCode != http.StatusNotFound {
			t.Errorf("outsider selects a foreign team = %d, want 404", resp.StatusCode)
		}
	})
}

func TestInvitationNewUser(t *testing.T) {
	h := newHarness(t)
	owner := h.client("owner")
	resp, body := h.postBody(owner, "/team/invitations", url.Values{"role": {"viewer"}, "ttl_days": {"7"}, "note": {"for a student"}})
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("create invitation = %d", resp.StatusCode)
	}
	m := regexp.MustCompile(`data-testid="new-invite">[^<]*(/invite/[^<]+)<`).FindStringSubmatch(body)
	if len(m) != 2 {
		t.Fatal("invitation link not shown")
	}
	c := h.client("")
	resp, body = h.get(c, m[1])
	if resp.StatusCode != http.StatusOK || !strings.Contains(body, "Test team") {
		t.Fatalf("GET invitation = %d", resp.StatusCode)
	}
	resp, body = h.postBody(c, m[1], url.Values{"name": {"New student"}, "email": {"not-an-email"}, "password": {"long enough pass"}})
	if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-email") {
		t.Fatalf("bad email = %d, inline error %v", resp.StatusCode, hasTestID(body, "err-email"))
	}
	resp = h.post(c, m[1], url.Values{"name": {"New student"}, "email": {"student@example.org"}, "password": {"long enough pass"}})
	if resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("accept = %d", resp.StatusCode)
	}
	_, body = h.get(c, "/team")
	if !strings.Contains(body, "New student") || !strings.Contains(body, `data-testid="my-role">viewer<`) {
		t.Error("the new member is not in the team as a viewer")
	}
}

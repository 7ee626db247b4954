package web

import (
	"context"
	"net/http"
	"net/url"
	"strings"
	"testing"
	"time"

	"phasecast/store"
)

// TestPagesByRole opens every page as each member role, as a member of
// another team and signed out: members see their team's pages (viewers
// without the editing controls), the other team's member gets 404 for this
// team's things, and a signed-out visitor is sent to sign in.
func TestPagesByRole(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 3)
	ctx := context.Background()
	owner := h.actor("owner")
	run, err := h.store.CreateRun(ctx, owner, h.teamID, store.RunInput{Name: "Test run", SiteID: f.siteID, ListID: f.listID,
		Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}, {Date: "2026-03-15", Part: store.NightFull}}})
	if err != nil {
		t.Fatal(err)
	}
	tg := i64s(f.targetIDs[0])
	night := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	pages := []struct {
		path, testid string
		team         bool   // belongs to the team (others get 404)
		editOnly     string // a testid only editors and owners see
	}{
		{"/tonight", "tonight-table", false, ""},
		{"/night" + night, "night-chart", false, ""},
		{"/night/sheet" + night, "blocks", false, ""},
		{"/targets?list=" + i64s(f.listID), "targets-table", true, "target-new"},
		{"/targets/" + tg, "upcoming", true, "target-edit"},
		{"/targets/" + tg + "/edit", "target-form", true, ""},
		{"/sites", "sites", false, "site-new"},
		{"/sites/" + i64s(f.siteID), "horizon-preview", true, "site-save"},
		{"/runs", "runs", false, "run-form"},
		{"/runs/" + i64s(run.ID), "run-name", true, "optimize-form"},
		{"/windows", "windows-form", false, ""},
		{"/team", "members", false, ""}, // invitations: owners only (TestTeamPageByRole)
		{"/account", "token-form", false, ""},
		{"/lists/" + i64s(f.listID) + "/import", "import-form", true, ""},
	}
	for _, role := range []string{"owner", "editor", "viewer", "outsider", ""} {
		c := h.client(role)
		for _, p := range pages {
			name := role
			if name == "" {
				name = "signed-out"
			}
			t.Run(name+p.path, func(t *testing.T) {
				resp, body := h.get(c, p.path)
				switch {
				case role == "":
					if resp.StatusCode != http.StatusSeeOther || !strings.HasPrefix(resp.Header.Get("Location"), "/login") {
						t.Errorf("status %d to %q, want a redirect to /login", resp.StatusCode, resp.Header.Get("Location"))
					}
				case role == "outsider" && p.team:
					if resp.StatusCode != http.StatusNotFound {
						t.Errorf("status %d, want 404 for another team's page", resp.StatusCode)
					}
				case role == "outsider" && strings.Contains(body, "Test list"):
					t.Error("another team's member sees this team's list")
				case role != "outsider":
					if resp.StatusCode != http.StatusOK || !hasTestID(body, p.testid) {
						t.Errorf("status %d, %s present %v", resp.StatusCode, p.testid, hasTestID(body, p.testid))
					}
					if p.editOnly != "" && hasTestID(body, p.editOnly) != (role != "viewer") {
						t.Errorf("%s shown = %v for a %s", p.editOnly, hasTestID(body, p.editOnly), role)
					}
				}
			})
		}
	}
}

// TestWritesByRole posts every kind of change as each role: owners and
// editors may change team data, viewers and other teams' members may not,
// and nothing reaches the store from a cross-site form.
func TestWritesByRole(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	tgt, err := h.store.GetTarget(context.Background(), h.actor("owner"), f.targetIDs[0])
	if err != nil {
		t.Fatal(err)
	}
	writes := []struct {
		name, path string
		form       url.Values
	}{
		{"NewList", "/lists", url.Values{"name": {"L2"}}},
		{"Share", "/lists/" + i64s(f.listID) + "/share", url.Values{"label": {"x"}, "ttl_days": {"7"}}},
		{"DeleteTarget", "/targets/" + i64s(tgt.ID) + "/delete", url.Values{"version": {i64s(tgt.Version)}}},
		{"DeleteSite", "/sites/" + i64s(f.siteID) + "/delete", url.Values{"version": {"1"}}},
	}
	for _, role := range []string{"viewer", "outsider"} {
		c := h.client(role)
		for _, w := range writes {
			if role == "outsider" && w.name == "NewList" {
				continue // a list in the outsider's own team
			}
			t.Run(role+"/"+w.name, func(t *testing.T) {
				resp := h.post(c, w.path, w.form)
				if resp.StatusCode != http.StatusForbidden && resp.StatusCode != http.StatusNotFound {
					t.Errorf("status %d, want 403 or 404", resp.StatusCode)
				}
			})
		}
	}
	t.Run("editor/NewList", func(t *testing.T) {
		if resp := h.post(h.client("editor"), "/lists", url.Values{"name": {"Editor list"}}); resp.StatusCode != http.StatusSeeOther {
			t.Errorf("status %d, want 303", resp.StatusCode)
		}
	})
	t.Run("CrossSite", func(t *testing.T) {
		c := h.client("owner")
		resp, _ := send(t, c, http.MethodPost, h.ts.URL+"/lists", strings.NewReader("name=Evil"),
			http.Header{"Content-Type": {"application/x-www-form-urlencoded"}, "Sec-Fetch-Site": {"cross-site"}})
		if resp.StatusCode != http.StatusForbidden {
			t.Errorf("cross-site POST = %d, want 403", resp.StatusCode)
		}
		lists, _ := h.store.ListLists(context.Background(), h.actor("owner"), h.teamID)
		for _, l := range lists {
			if l.Name == "Evil" {
				t.Error("a cross-site form created a list")
			}
		}
	})
}

// TestShareLink makes a share link as an editor and opens it signed out;
// after revocation it no longer works.
func TestShareLink(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	ctx := context.Background()
	_, tok, err := h.store.CreateShareLink(ctx, h.actor("editor"), store.ShareInput{ListID: f.listID, Label: "collaborator", TTL: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	anon := h.client("")
	resp, body := h.get(anon, "/share/"+tok)
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "share-targets") || hasTestID(body, "whoami") {
		t.Fatalf("share page = %d", resp.StatusCode)
	}
	if strings.Count(body, `data-testid="target-row"`) != 2 {
		t.Error("the share page does not list the list's two targets")
	}
	links, _ := h.store.ListShareLinks(ctx, h.actor("owner"), h.teamID)
	if err := h.store.RevokeShareLink(ctx, h.actor("owner"), links[0].ID); err != nil {
		t.Fatal(err)
	}
	if resp, _ := h.get(anon, "/share/"+tok); resp.StatusCode != http.StatusNotFound {
		t.Errorf("revoked share link = %d, want 404", resp.StatusCode)
	}
	if resp, _ := h.get(anon, "/share/not-a-token"); resp.StatusCode != http.StatusNotFound {
		t.Errorf("unknown share link = %d, want 404", resp.StatusCode)
	}
}

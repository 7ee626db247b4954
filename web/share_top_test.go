package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// TestNewShareAtTop: a share link just made is shown above the page's
// first section, with a copy button wired to it (static/app.js).
func TestNewShareAtTop(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("owner")
	run, err := h.store.CreateRun(context.Background(), h.actor("owner"), h.teamID, store.RunInput{Name: "Shared run", SiteID: f.siteID, ListID: f.listID,
		Constraints: planner.DefaultConstraints(), Nights: []store.RunNight{{Date: "2026-03-14", Part: store.NightFull}}})
	if err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/runs/" + i64s(run.ID) + "/share", "/lists/" + i64s(f.listID) + "/share"} {
		t.Run(path, func(t *testing.T) {
			resp, body := h.postBody(c, path, url.Values{"label": {"colleague"}, "ttl_days": {"7"}})
			if resp.StatusCode != http.StatusOK {
				t.Fatalf("status %d", resp.StatusCode)
			}
			at := strings.Index(body, `data-testid="new-share"`)
			h2 := strings.Index(body, "<h2")
			if at < 0 || h2 < 0 || at > h2 {
				t.Errorf("the new link (at %d) is not above the first section (at %d)", at, h2)
			}
			m := regexp.MustCompile(`<button[^>]*data-copy="([^"]+)"[^>]*data-testid="copy-share"`).FindStringSubmatch(body)
			if m == nil {
				t.Fatal("no copy button")
			}
			if !strings.Contains(body, `id="`+m[1]+`"`) || !strings.Contains(body[at-200:at+200], `id="`+m[1]+`"`) {
				t.Errorf("the copy button points at %q, which is not the link", m[1])
			}
			if strings.Count(body, `data-testid="new-share"`) != 1 {
				t.Error("the link is shown more than once")
			}
		})
	}
}

package web

import (
	"net/http"
	"net/http/httptest"
	"testing"
)

// BenchmarkNightPage30Targets renders the Night page for 30 targets on the
// server: planning (the plan cache is emptied each time), sampling the
// chart, drawing it and the template.
func BenchmarkNightPage30Targets(b *testing.B) { benchNightPage(b, 30) }

// BenchmarkNightPage100Targets is the same for 100 targets.
func BenchmarkNightPage100Targets(b *testing.B) { benchNightPage(b, 100) }

func benchNightPage(b *testing.B, n int) {
	b.Helper()
	h := newHarness(b)
	f := h.addFixtures(b, n)
	c := h.client("owner")
	query := "site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&date=2026-03-14"
	handler := h.srv.inTeam(h.srv.nightShow)
	for b.Loop() {
		h.srv.plans = planCache{} // plan every time: no cached night
		req := signedRequest(b, h, c)
		req.URL.Path, req.URL.RawQuery = "/night", query
		rec := httptest.NewRecorder()
		handler(rec, req)
		if rec.Code != http.StatusOK {
			b.Fatalf("status %d", rec.Code)
		}
	}
}

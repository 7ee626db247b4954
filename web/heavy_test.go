package web

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"runtime"
	"sync"
	"testing"
	"time"
)

// heavyGet requests path with an API token and returns the status, the
// Retry-After header and the body.
func heavyGet(tb testing.TB, url, token string) (int, string, []byte) {
	tb.Helper()
	req, err := http.NewRequest(http.MethodGet, url, nil)
	if err != nil {
		tb.Error(err)
		return 0, "", nil
	}
	req.Header.Set("Authorization", "Bearer "+token)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		tb.Error(err)
		return 0, "", nil
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		tb.Error(err)
	}
	return resp.StatusCode, resp.Header.Get("Retry-After"), b
}

// checkRefusal fails unless a refused heavy request is a JSON error with
// its code, a message and Retry-After.
func checkRefusal(tb testing.TB, status int, retry string, body []byte) {
	tb.Helper()
	var e apiErrorBody
	if err := json.Unmarshal(body, &e); err != nil {
		tb.Errorf("status %d: not a JSON error: %.200s", status, body)
		return
	}
	wantCode := map[int]string{http.StatusTooManyRequests: codeTooMany, http.StatusServiceUnavailable: codeBusy}[status]
	if e.Error.Code != wantCode || e.Error.Message == "" || retry == "" {
		tb.Errorf("status %d: code %q (want %q), message %q, Retry-After %q", status, e.Error.Code, wantCode, e.Error.Message, retry)
	}
}

// TestHeavyGateRefusesExcess fills every heavy slot of the server, then
// sends 50 concurrent year-long queue-window requests from one viewer's
// token: beyond the caller's perCaller, they are refused at once with 429,
// and those that queue are refused with 503 when their wait runs out;
// /healthz answers meanwhile. Once the slots are free, the same request
// is answered.
func TestHeavyGateRefusesExcess(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 4)
	token := h.token("viewer")
	url := fmt.Sprintf("%s/api/v1/windows?site=%d&list=%d&from=2026-03-14&to=2027-03-13", h.ts.URL, f.siteID, f.listID)
	g := h.srv.gate
	var held []func()
	for i := range cap(g.slots) {
		release, err := g.acquire(context.Background(), fmt.Sprint("test holder ", i))
		if err != nil {
			t.Fatal(err)
		}
		held = append(held, release)
	}
	const n = 50
	statuses := make([]int, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() {
			status, retry, body := heavyGet(t, url, token)
			statuses[i] = status
			checkRefusal(t, status, retry, body)
		})
	}
	health, _, body := heavyGet(t, h.ts.URL+"/healthz", "")
	if health != http.StatusOK {
		t.Errorf("/healthz with every heavy slot taken: %d %s", health, body)
	}
	wg.Wait()
	count := map[int]int{}
	for _, s := range statuses {
		count[s]++
	}
	if count[http.StatusTooManyRequests] != n-g.perCaller || count[http.StatusServiceUnavailable] != g.perCaller {
		t.Errorf("statuses %v, want %d × 429 and %d × 503", count, n-g.perCaller, g.perCaller)
	}
	for _, release := range held {
		release()
	}
	if status, _, body := heavyGet(t, url, token); status != http.StatusOK {
		t.Errorf("with the slots free: %d %.300s", status, body)
	}
}

// TestHeavyConcurrentWindows sends 50 concurrent year-long queue-window
// requests from three members' tokens while /healthz is asked again and
// again: every answer is 200, or a 429/503 refusal with Retry-After; at
// least one is answered, at least one refused; every /healthz is 200.
// The heap in use is sampled (runtime.MemStats.HeapInuse) and logged, with
// the slowest /healthz (a figure for docs/reliability.md, not asserted).
func TestHeavyConcurrentWindows(t *testing.T) {
	if testing.Short() {
		t.Skip("50 year-long window requests")
	}
	h := newHarness(t)
	f := h.addFixtures(t, 12)
	tokens := []string{h.token("owner"), h.token("editor"), h.token("viewer")}
	url := fmt.Sprintf("%s/api/v1/windows?site=%d&list=%d&from=2026-03-14&to=2027-03-13", h.ts.URL, f.siteID, f.listID)
	var before runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	done := make(chan struct{})
	var peak uint64
	var slowest time.Duration // logged only: a figure, not an assertion
	healthz := map[int]int{}
	var sampler sync.WaitGroup
	sampler.Go(func() {
		for {
			select {
			case <-done:
				return
			default:
			}
			var m runtime.MemStats
			runtime.ReadMemStats(&m)
			peak = max(peak, m.HeapInuse)
			start := time.Now() // elapsed
			status, _, _ := heavyGet(t, h.ts.URL+"/healthz", "")
			slowest = max(slowest, time.Since(start))
			healthz[status]++
		}
	})
	const n = 50
	statuses := make([]int, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() {
			status, retry, body := heavyGet(t, url, tokens[i%len(tokens)])
			statuses[i] = status
			if status != http.StatusOK {
				checkRefusal(t, status, retry, body)
			}
		})
	}
	wg.Wait()
	close(done)
	sampler.Wait()
	count := map[int]int{}
	for _, s := range statuses {
		count[s]++
	}
	t.Logf("statuses %v; /healthz %v, the slowest in %v; heap in use %.0f MB before, %.0f MB at most during", count, healthz,
		slowest.Round(time.Millisecond), float64(before.HeapInuse)/1e6, float64(peak)/1e6)
	if count[http.StatusOK] == 0 || count[http.StatusOK] == n {
		t.Errorf("statuses %v: want some answered and the excess refused", count)
	}
	if len(healthz) != 1 || healthz[http.StatusOK] == 0 {
		t.Errorf("/healthz answers %v, want only 200", healthz)
	}
}

package web

import (
	"net"
	"net/http"
	"sync"
	"time"
)

// limiter is a token bucket per key (client address): each key may spend
// burst attempts at once and regains one every interval. It guards the
// sign-in forms against password guessing.
type limiter struct {
	mu       sync.Mutex
	burst    float64
	interval time.Duration
	buckets  map[string]*bucket
	lastGC   time.Time
}

type bucket struct {
	tokens float64
	last   time.Time
}

func newLimiter(burst int, interval time.Duration) *limiter {
	return &limiter{burst: float64(burst), interval: interval, buckets: map[string]*bucket{}}
}

// allow spends one token of key at now and reports whether one was left.
func (l *limiter) allow(key string, now time.Time) bool {
	l.mu.Lock()
	defer l.mu.Unlock()
	l.gc(now)
	b, ok := l.buckets[key]
	if !ok {
		b = &bucket{tokens: l.burst, last: now}
		l.buckets[key] = b
	}
	b.tokens += float64(now.Sub(b.last)) / float64(l.interval)
	if b.tokens > l.burst {
		b.tokens = l.burst
	}
	b.last = now
	if b.tokens < 1 {
		return false
	}
	b.tokens--
	return true
}

// gc drops full buckets once a minute so the map does not grow without end.
func (l *limiter) gc(now time.Time) {
	if now.Sub(l.lastGC) < time.Minute {
		return
	}
	l.lastGC = now
	for k, b := range l.buckets {
		if b.tokens+float64(now.Sub(b.last))/float64(l.interval) >= l.burst {
			delete(l.buckets, k)
		}
	}
}

// clientKey is the client's address without the port. Forwarded headers
// are not trusted: behind a proxy, the proxy should limit.
func clientKey(r *http.Request) string {
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		return r.RemoteAddr
	}
	return host
}

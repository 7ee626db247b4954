package web

import (
	"context"
	"net/http"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"
)

// Error codes of a refused heavy request (statusFor: 429 and 503).
const (
	// codeTooMany: the caller already has heavyPerCaller heavy requests
	// running or waiting.
	codeTooMany = "ETOOMANY"
	// codeBusy: every heavy slot of the server is taken and the queue is
	// full, or the wait ran out.
	codeBusy = "EBUSY"
)

// heavyRetryAfterS is the Retry-After, seconds, of a refused heavy request.
const heavyRetryAfterS = 10

// heavyGate bounds the heavy computations a server runs at once (planning
// nights and runs, queue windows, imports): at most cap(slots) run at
// once server-wide; a request finding them taken waits up to wait in a
// queue of at most maxQueue; one caller (a user, or the address of a
// share-link visitor) holds at most perCaller running or waiting. The rest
// are refused at once, so that heavy work cannot pile up, and /healthz and
// the light pages keep answering. A refusal is logged at warning level: it
// is the server protecting itself, not a failure.
type heavyGate struct {
	slots     chan struct{}
	wait      time.Duration
	maxQueue  int
	perCaller int

	mu      sync.Mutex
	queued  int
	holders map[string]int // running or waiting, by caller
	active  int            // running or waiting, in all
	freeing atomic.Bool    // a FreeOSMemory is under way
	freed   time.Time      // when memory was last handed back (g.mu)
}

// freeEvery is the least time between two hand-backs of memory to the
// system: each is a full garbage collection.
const freeEvery = 10 * time.Second

// newHeavyGate returns a gate of n slots (at least 1), a queue of 16 per
// slot, a 2-second wait and 4 requests per caller (a browser's page and its
// downloads). A waiting request holds no memory of its work yet; most
// heavy requests (a night from the plan cache, a night plan) take tens of
// milliseconds and pass through the queue, a year of queue windows takes
// seconds and is refused when the slots stay taken.
func newHeavyGate(n int) *heavyGate {
	n = max(n, 1)
	return &heavyGate{slots: make(chan struct{}, n), wait: 2 * time.Second, maxQueue: 16 * n, perCaller: 4, holders: map[string]int{}}
}

// defaultHeavySlots is the server's number of heavy slots: the processors
// Go may use, at least 2.
func defaultHeavySlots() int { return max(2, runtime.GOMAXPROCS(0)) }

// acquire takes a slot for caller, waiting at most g.wait; release gives
// it back. The error is ETOOMANY, EBUSY or the context's.
func (g *heavyGate) acquire(ctx context.Context, caller string) (release func(), err error) {
	g.mu.Lock()
	if g.holders[caller] >= g.perCaller {
		g.mu.Unlock()
		return nil, &codedError{code: codeTooMany, msg: "You already have " + strconv.Itoa(g.perCaller) +
			" long computations (plans, queue windows, imports) running; wait for them to finish, then try again."}
	}
	g.holders[caller]++
	g.active++
	select {
	case g.slots <- struct{}{}:
		g.mu.Unlock()
		return g.releaser(caller), nil
	default:
	}
	if g.queued >= g.maxQueue {
		g.leave(caller)
		g.mu.Unlock()
		return nil, errBusy()
	}
	g.queued++
	g.mu.Unlock()
	t := time.NewTimer(g.wait)
	defer t.Stop()
	var got bool
	select {
	case g.slots <- struct{}{}:
		got = true
	case <-t.C:
		err = errBusy()
	case <-ctx.Done():
		err = ctx.Err()
	}
	g.mu.Lock()
	defer g.mu.Unlock()
	g.queued--
	if !got {
		g.leave(caller)
		return nil, err
	}
	return g.releaser(caller), nil
}

func errBusy() error {
	return &codedError{code: codeBusy, msg: "The server is busy with other long computations (plans, queue windows, imports); try again in " +
		strconv.Itoa(heavyRetryAfterS) + " seconds."}
}

// leave forgets one request of caller; g.mu is held. When the last heavy
// request has gone, the memory it used is handed back to the system (at
// most once every freeEvery).
func (g *heavyGate) leave(caller string) {
	if g.holders[caller]--; g.holders[caller] <= 0 {
		delete(g.holders, caller)
	}
	if g.active--; g.active == 0 && time.Since(g.freed) >= freeEvery && g.freeing.CompareAndSwap(false, true) { // elapsed
		g.freed = time.Now() // elapsed
		go func() {
			defer g.freeing.Store(false)
			debug.FreeOSMemory()
		}()
	}
}

func (g *heavyGate) releaser(caller string) func() {
	var once sync.Once
	return func() {
		once.Do(func() {
			<-g.slots
			g.mu.Lock()
			g.leave(caller)
			g.mu.Unlock()
		})
	}
}

// heavy wraps the handler of a heavy page, export or API call: it runs
// under a slot of the server's heavyGate, or is refused with 429 (this
// user has enough running) or 503 (the server has), with Retry-After.
func (s *Server) heavy(h userHandler) userHandler {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		s.underGate(w, r, "user "+strconv.FormatInt(u.actor.UserID, 10), func() { h(w, r, u) })
	}
}

// heavyPublic is heavy for a route without sign-in (a share link's
// night): the caller is the client's address.
func (s *Server) heavyPublic(h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		s.underGate(w, r, "client "+clientKey(r), func() { h(w, r) })
	}
}

func (s *Server) underGate(w http.ResponseWriter, r *http.Request, caller string, run func()) {
	release, err := s.gate.acquire(r.Context(), caller)
	if err != nil {
		w.Header().Set("Retry-After", strconv.Itoa(heavyRetryAfterS))
		if strings.HasPrefix(r.URL.Path, "/api/") {
			s.apiError(w, r, err)
		} else {
			s.renderError(w, r, err)
		}
		return
	}
	defer release()
	run()
}

package web

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"sync"
	"time"
)

// job is a long computation (planning a run) running in the background,
// with its progress, so that a page can show a progress bar and cancel it.
type job struct {
	id     string
	userID int64
	back   string // page to return to
	title  string
	cancel context.CancelFunc

	mu       sync.Mutex
	done     int
	total    int
	finished bool
	err      error
	next     string // where to go when finished
	started  time.Time
}

// progress records (done, total); safe from any goroutine.
func (j *job) progress(done, total int) {
	j.mu.Lock()
	j.done, j.total = done, total
	j.mu.Unlock()
}

// state returns the fraction done (0..1), a message, and whether the job
// has finished and where to go then.
func (j *job) state() (fraction float64, msg string, finished bool, next string) {
	j.mu.Lock()
	defer j.mu.Unlock()
	if j.total > 0 {
		fraction = float64(j.done) / float64(j.total)
	}
	switch {
	case j.finished && j.err != nil:
		msg = "Stopped: " + j.err.Error()
	case j.finished:
		msg, fraction = "Finished.", 1
	default:
		msg = fmt.Sprintf("Working: %d of %d steps, %s elapsed.", j.done, j.total, time.Since(j.started).Round(time.Second)) // elapsed
	}
	return fraction, msg, j.finished, j.next
}

// jobs is the server's registry of background computations. At most
// maxJobs run at once (the machine has few cores); finished jobs are kept
// for an hour so their pages can still answer.
type jobs struct {
	mu sync.Mutex
	m  map[string]*job
}

const maxJobs = 2

// maxJobsPerUser is how many background computations one user may run at
// once, so that one user cannot take every slot of maxJobs.
const maxJobsPerUser = 1

// start runs work in the background under a context that the job's cancel
// button (or a 10-minute limit) ends.
func (js *jobs) start(userID int64, title, back string, work func(ctx context.Context, j *job) (next string, err error)) (*job, error) {
	js.mu.Lock()
	defer js.mu.Unlock()
	if js.m == nil {
		js.m = map[string]*job{}
	}
	running, mine := 0, 0
	for id, j := range js.m {
		_, _, finished, _ := j.state()
		if finished && time.Since(j.started) > time.Hour { // elapsed
			delete(js.m, id)
		} else if !finished {
			running++
			if j.userID == userID && j.back == back {
				return j, nil // the same computation is already running
			}
			if j.userID == userID {
				mine++
			}
		}
	}
	if mine >= maxJobsPerUser {
		return nil, &codedError{code: codeTooMany, msg: "You already have a run being planned; wait for it to finish (or stop it), then try again."}
	}
	if running >= maxJobs {
		return nil, errBusy()
	}
	b := make([]byte, 12)
	if _, err := rand.Read(b); err != nil {
		return nil, err
	}
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	j := &job{id: hex.EncodeToString(b), userID: userID, back: back, title: title, cancel: cancel, started: time.Now()} // elapsed
	js.m[j.id] = j
	go func() {
		defer cancel()
		next, err := func() (next string, err error) {
			defer func() {
				if v := recover(); v != nil { // a bug must not take the server down
					err = fmt.Errorf("internal error: %v", v)
				}
			}()
			return work(ctx, j)
		}()
		j.mu.Lock()
		j.finished, j.err, j.next = true, err, next
		if j.next == "" {
			j.next = back
		}
		j.mu.Unlock()
	}()
	return j, nil
}

// get returns the user's job id.
func (js *jobs) get(id string, userID int64) (*job, bool) {
	js.mu.Lock()
	defer js.mu.Unlock()
	j, ok := js.m[id]
	if !ok || j.userID != userID {
		return nil, false
	}
	return j, true
}

// running returns the user's unfinished job for back, if any.
func (js *jobs) running(userID int64, back string) (*job, bool) {
	js.mu.Lock()
	defer js.mu.Unlock()
	for _, j := range js.m {
		if _, _, finished, _ := j.state(); !finished && j.userID == userID && j.back == back {
			return j, true
		}
	}
	return nil, false
}

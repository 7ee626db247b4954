package web

import (
	"context"
	"errors"
	"testing"
	"time"
)

// TestJobs runs background jobs: progress, a panic turned into an error,
// cancellation, and the limit on jobs running at once.
func TestJobs(t *testing.T) {
	var js jobs
	wait := func(j *job) {
		t.Helper()
		deadline := time.Now().Add(10 * time.Second)
		for {
			if _, _, done, _ := j.state(); done {
				return
			}
			if time.Now().After(deadline) {
				t.Fatal("job did not finish")
			}
			time.Sleep(time.Millisecond)
		}
	}
	t.Run("Progress", func(t *testing.T) {
		j, err := js.start(1, "t", "/back", func(ctx context.Context, j *job) (string, error) {
			j.progress(3, 4)
			return "/next", nil
		})
		if err != nil {
			t.Fatal(err)
		}
		wait(j)
		f, _, _, next := j.state()
		if f != 1 || next != "/next" {
			t.Errorf("finished job: fraction %g, next %q", f, next)
		}
	})
	t.Run("Panic", func(t *testing.T) {
		j, _ := js.start(1, "t", "/p", func(ctx context.Context, j *job) (string, error) { panic("boom") })
		wait(j)
		if j.err == nil {
			t.Error("a panicking job reports no error")
		}
	})
	t.Run("Cancel", func(t *testing.T) {
		j, _ := js.start(1, "t", "/c", func(ctx context.Context, j *job) (string, error) {
			<-ctx.Done()
			return "", ctx.Err()
		})
		j.cancel()
		wait(j)
		if !errors.Is(j.err, context.Canceled) {
			t.Errorf("err = %v, want context.Canceled", j.err)
		}
	})
	t.Run("ErrBusy", func(t *testing.T) {
		block := make(chan struct{})
		defer close(block)
		for i := range maxJobs {
			// One job per user (maxJobsPerUser), users 10, 11, …
			if _, err := js.start(10+int64(i), "t", "/busy"+i64s(int64(i)), func(ctx context.Context, j *job) (string, error) {
				<-block
				return "", nil
			}); err != nil {
				t.Fatal(err)
			}
		}
		_, err := js.start(10, "t", "/another", func(ctx context.Context, j *job) (string, error) { return "", nil })
		if code, _ := errorCode(err); code != codeTooMany {
			t.Errorf("a second job of one user: %v, want %s", err, codeTooMany)
		}
		_, err = js.start(3, "t", "/more", func(ctx context.Context, j *job) (string, error) { return "", nil })
		if code, _ := errorCode(err); code != codeBusy {
			t.Errorf("a job beyond the server's limit: %v, want %s", err, codeBusy)
		}
	})
}

package main

import (
	"bufio"
	"context"
	"io"
	"net/http"
	"net/http/cookiejar"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"
)

// lockedBuffer collects output written by the server goroutine.
type lockedBuffer struct {
	mu sync.Mutex
	b  strings.Builder
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// servedApp is a serve command running in-process.
type servedApp struct {
	base   string // http://127.0.0.1:PORT
	link   string // the printed one-time sign-in link ("" on later starts)
	stdout *lockedBuffer
	stop   func() error
}

var (
	servingRE = regexp.MustCompile(`serving (http://\S+)`)
	linkRE    = regexp.MustCompile(`(http://\S+/login/link/\S+)`)
)

// startServe runs `phasecast serve --addr 127.0.0.1:0 --db DB` in-process
// and waits until it has printed the address it serves (printed last, after
// any one-time sign-in link). stop cancels the context, as SIGINT does, and returns the
// command's error.
func startServe(tb testing.TB, db string, extra ...string) *servedApp {
	tb.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	pr, pw := io.Pipe()
	app := &servedApp{stdout: &lockedBuffer{}}
	done := make(chan error, 1)
	go func() {
		err := run(ctx, testClock(tb), append([]string{"serve", "--addr", "127.0.0.1:0", "--db", db}, extra...), io.MultiWriter(pw, app.stdout), io.Discard)
		pw.Close()
		done <- err
	}()
	lines := make(chan string)
	go func() {
		sc := bufio.NewScanner(pr)
		for sc.Scan() {
			lines <- sc.Text()
		}
		close(lines)
	}()
	deadline := time.After(60 * time.Second)
	for app.base == "" {
		select {
		case l, ok := <-lines:
			if !ok {
				cancel()
				tb.Fatalf("serve ended early: %v\n%s", <-done, app.stdout.String())
			}
			if m := servingRE.FindStringSubmatch(l); m != nil {
				app.base = m[1]
			}
			if m := linkRE.FindStringSubmatch(l); m != nil {
				app.link = m[1]
			}
		case <-deadline:
			cancel()
			tb.Fatalf("serve did not start within 60 s:\n%s", app.stdout.String())
		}
	}
	go func() {
		for range lines {
		}
	}()
	app.stop = func() error {
		cancel()
		select {
		case err := <-done:
			return err
		case <-time.After(20 * time.Second):
			return context.DeadlineExceeded
		}
	}
	return app
}

func TestServeFirstStart(t *testing.T) {
	db := filepath.Join(t.TempDir(), "phasecast.db")
	app := startServe(t, db)
	if app.link == "" {
		t.Fatalf("no sign-in link printed:\n%s", app.stdout.String())
	}
	if strings.Contains(strings.ToLower(app.stdout.String()), "password:") {
		t.Error("the first start prints a password")
	}
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, Timeout: 30 * time.Second}
	resp, err := c.Get(app.base + "/healthz")
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		t.Errorf("GET /healthz = %d, want 200", resp.StatusCode)
	}
	req, _ := http.NewRequest(http.MethodPost, app.link, nil)
	req.Header.Set("Sec-Fetch-Site", "same-origin")
	resp, err = c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK || !strings.Contains(string(body), `data-testid="whoami"`) {
		t.Errorf("signing in with the printed link: status %d, signed in %v", resp.StatusCode, strings.Contains(string(body), `data-testid="whoami"`))
	}
	if err := app.stop(); err != nil {
		t.Errorf("graceful shutdown: %v", err)
	}

	// A second start on the same database seeds nothing and prints no link.
	app = startServe(t, db)
	if strings.Contains(app.stdout.String(), "first start") {
		t.Errorf("second start seeded again:\n%s", app.stdout.String())
	}
	if err := app.stop(); err != nil {
		t.Errorf("graceful shutdown: %v", err)
	}
}

func TestServeNoArgumentsIsServe(t *testing.T) {
	called := false
	cmds := []command{{"serve", "", func(_ context.Context, _ func() time.Time, args []string, _, _ io.Writer) error {
		called = len(args) == 0
		return nil
	}}}
	if err := runWith(context.Background(), testClock(t), cmds, nil, io.Discard, io.Discard); err != nil || !called {
		t.Errorf("phasecast without arguments: serve called %v, err %v", called, err)
	}
}

func TestServeBadFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"ErrAddr", []string{"--addr", "nonsense"}, "--addr nonsense: not an address"},
		{"ErrBaseURL", []string{"--base-url", "ftp://x"}, "--base-url ftp://x: not an absolute http(s) URL"},
		{"ErrDemo", []string{"--demo", "maybe"}, "--demo maybe: not accepted; accepted: yes or no"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, append([]string{"serve"}, tt.args...)...)
			if code != exitUsage || !strings.Contains(stderr, tt.want) {
				t.Errorf("exit %d, stderr %q; want exit %d mentioning %q", code, stderr, exitUsage, tt.want)
			}
		})
	}
}

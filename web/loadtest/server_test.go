package loadtest

import (
	"bufio"
	"bytes"
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"phasecast/store"

	_ "github.com/jackc/pgx/v5/stdlib" // driver "pgx", for the checks on PostgreSQL
	_ "modernc.org/sqlite"             // driver "sqlite", for PRAGMA checks on the file
)

// binDir holds the phasecast binary built once for all tests of a run.
var (
	binDir  string
	binPath string
	binErr  error
	binOnce sync.Once
)

func TestMain(m *testing.M) {
	code := m.Run()
	if binDir != "" {
		os.RemoveAll(binDir)
	}
	os.Exit(code)
}

// buildServer builds cmd/phasecast once per test run, with the same
// environment (GOFLAGS, CGO_ENABLED) as the rest of the build, so that a
// warm cache makes it a link step only. PHASECAST_BIN names a binary to
// test instead (a release build, or a snapshot while the tree is being
// edited).
func buildServer(tb testing.TB) string {
	tb.Helper()
	if p := os.Getenv("PHASECAST_BIN"); p != "" {
		if _, err := os.Stat(p); err != nil {
			tb.Fatalf("PHASECAST_BIN=%q: %v", p, err)
		}
		return p
	}
	binOnce.Do(func() {
		binDir, binErr = os.MkdirTemp("", "phasecast-loadtest-")
		if binErr != nil {
			return
		}
		binPath = filepath.Join(binDir, "phasecast")
		start := time.Now()
		out, err := exec.Command("go", "build", "-o", binPath, "phasecast/cmd/phasecast").CombinedOutput()
		if err != nil {
			binErr = fmt.Errorf("go build phasecast/cmd/phasecast: %v\n%s", err, out)
			return
		}
		tb.Logf("built %s in %v", binPath, time.Since(start).Round(10*time.Millisecond))
	})
	if binErr != nil {
		tb.Fatal(binErr)
	}
	return binPath
}

// server is a running `phasecast serve` child process.
type server struct {
	cmd     *exec.Cmd
	base    string // http://127.0.0.1:PORT
	link    string // the one-time sign-in link printed at first start, if any
	done    chan struct{}
	waitErr error
}

var (
	servingRE = regexp.MustCompile(`^phasecast: serving (http://\S+) `)
	linkRE    = regexp.MustCompile(`(http://\S+/login/link/\S+)`)
)

// startServer starts `phasecast serve` on a free loopback port with the
// database db, appends its log (stderr) to logPath, and waits until it
// says it is serving and /healthz answers 200.
func startServer(tb testing.TB, bin, db, logPath string) *server {
	tb.Helper()
	logf, err := os.OpenFile(logPath, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o644)
	if err != nil {
		tb.Fatal(err)
	}
	defer logf.Close() // the child keeps its own descriptor
	cmd := exec.Command(bin, "serve", "--addr", "127.0.0.1:0", "--db", db)
	cmd.Stderr = logf
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		tb.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		tb.Fatalf("start %s: %v", bin, err)
	}
	s := &server{cmd: cmd, done: make(chan struct{})}
	tb.Cleanup(func() { s.kill() })
	ready := make(chan error, 1)
	go func() {
		sc := bufio.NewScanner(stdout)
		for sc.Scan() {
			line := sc.Text()
			if m := linkRE.FindStringSubmatch(line); m != nil {
				s.link = m[1]
			}
			if m := servingRE.FindStringSubmatch(line); m != nil {
				s.base = m[1]
				ready <- nil
				break
			}
		}
		if s.base == "" {
			ready <- fmt.Errorf("server stdout ended before it said it was serving (%v)", sc.Err())
		}
		io.Copy(io.Discard, stdout)
		s.waitErr = cmd.Wait()
		close(s.done)
	}()
	select {
	case err = <-ready:
	case <-time.After(60 * time.Second):
		err = errors.New("server did not say it was serving within 60 s")
	}
	if err != nil {
		s.kill()
		tb.Fatalf("%v; log %s:\n%s", err, logPath, tail(logPath, 20))
	}
	u, err := url.Parse(s.base)
	if err != nil || u.Hostname() != "127.0.0.1" {
		s.kill()
		tb.Fatalf("server address %q is not on 127.0.0.1: the tests run on loopback only", s.base)
	}
	if err := waitHealthy(s.base, 10*time.Second); err != nil {
		s.kill()
		tb.Fatal(err)
	}
	return s
}

// waitHealthy polls /healthz until it answers 200.
func waitHealthy(base string, within time.Duration) error {
	deadline := time.Now().Add(within)
	for {
		resp, err := http.Get(base + "/healthz")
		if err == nil {
			resp.Body.Close()
			if resp.StatusCode == http.StatusOK {
				return nil
			}
			err = fmt.Errorf("status %d", resp.StatusCode)
		}
		if time.Now().After(deadline) {
			return fmt.Errorf("GET %s/healthz: %v after %v", base, err, within)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// pid returns the child's process id.
func (s *server) pid() int { return s.cmd.Process.Pid }

// exited reports whether the process has ended.
func (s *server) exited() bool {
	select {
	case <-s.done:
		return true
	default:
		return false
	}
}

// kill sends SIGKILL (if the process still runs) and waits for it to end.
func (s *server) kill() {
	if !s.exited() {
		s.cmd.Process.Signal(syscall.SIGKILL)
	}
	<-s.done
}

// stop asks the server to shut down gracefully (SIGTERM) and returns the
// error of its exit (nil for status 0), or an error if it took longer
// than within (it is then killed).
func (s *server) stop(within time.Duration) error {
	if s.exited() {
		return fmt.Errorf("server had already exited: %v", s.waitErr)
	}
	if err := s.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		return err
	}
	select {
	case <-s.done:
		return s.waitErr
	case <-time.After(within):
		s.kill()
		return fmt.Errorf("server did not stop within %v of SIGTERM", within)
	}
}

// memory reads the resident set size and its peak (VmRSS, VmHWM) of the
// process from /proc, in KiB.
func memory(pid int) (rssKiB, peakKiB int64, err error) {
	b, err := os.ReadFile(fmt.Sprintf("/proc/%d/status", pid))
	if err != nil {
		return 0, 0, err
	}
	for _, line := range strings.Split(string(b), "\n") {
		f := strings.Fields(line)
		if len(f) < 2 {
			continue
		}
		switch f[0] {
		case "VmRSS:":
			rssKiB, _ = strconv.ParseInt(f[1], 10, 64)
		case "VmHWM:":
			peakKiB, _ = strconv.ParseInt(f[1], 10, 64)
		}
	}
	if rssKiB == 0 {
		return 0, 0, fmt.Errorf("no VmRSS in /proc/%d/status", pid)
	}
	return rssKiB, peakKiB, nil
}

// cpuTime reads the user and system CPU time the process has used from
// /proc/PID/stat (fields 14 and 15, in clock ticks of USER_HZ = 100, the
// value Linux exposes to user space on every common architecture).
func cpuTime(pid int) (time.Duration, error) {
	b, err := os.ReadFile(fmt.Sprintf("/proc/%d/stat", pid))
	if err != nil {
		return 0, err
	}
	s := string(b)
	i := strings.LastIndexByte(s, ')') // the command name may hold spaces
	if i < 0 {
		return 0, fmt.Errorf("/proc/%d/stat: no command name", pid)
	}
	f := strings.Fields(s[i+1:]) // f[0] is field 3 (state)
	if len(f) < 13 {
		return 0, fmt.Errorf("/proc/%d/stat: %d fields", pid, len(f)+2)
	}
	utime, err1 := strconv.ParseInt(f[11], 10, 64)
	stime, err2 := strconv.ParseInt(f[12], 10, 64)
	if err1 != nil || err2 != nil {
		return 0, fmt.Errorf("/proc/%d/stat: utime %q stime %q", pid, f[11], f[12])
	}
	return time.Duration(utime+stime) * 10 * time.Millisecond, nil
}

// loadAverage returns the first three fields of /proc/loadavg.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "unknown"
	}
	f := strings.Fields(string(b))
	if len(f) < 3 {
		return strings.TrimSpace(string(b))
	}
	return strings.Join(f[:3], " ")
}

// tail returns the last n lines of a file, for failure messages.
func tail(path string, n int) string {
	b, err := os.ReadFile(path)
	if err != nil {
		return err.Error()
	}
	lines := strings.Split(strings.TrimRight(string(b), "\n"), "\n")
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	return strings.Join(lines, "\n")
}

// newTransport is a keep-alive transport for many concurrent clients of
// one server.
func newTransport(conns int) *http.Transport {
	return &http.Transport{
		DialContext:         (&net.Dialer{Timeout: 5 * time.Second}).DialContext,
		MaxIdleConns:        conns,
		MaxIdleConnsPerHost: conns,
		IdleConnTimeout:     30 * time.Second,
	}
}

// client is one browser (a session cookie) or API script (a token) and
// the server's address.
type client struct {
	hc      *http.Client
	base    string
	session string
	token   string // API token, for api
}

// newClient returns a client that does not follow redirects (a 303 after a
// POST is the acknowledgement, and its Location names what was made).
func newClient(tr http.RoundTripper, base, session string) *client {
	return &client{base: base, session: session, hc: &http.Client{
		Transport:     tr,
		Timeout:       60 * time.Second,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse },
	}}
}

// newAPIClient is newClient with an API token as well.
func newAPIClient(tr http.RoundTripper, base, session, token string) *client {
	c := newClient(tr, base, session)
	c.token = token
	return c
}

// response is what a request returned.
type response struct {
	status     int
	body       []byte
	location   string
	retryAfter string // set on a refusal of the heavy-work gate (429, 503)
	elapsed    time.Duration
}

// get requests path (with its query).
func (c *client) get(ctx context.Context, path string) (response, error) {
	return c.do(ctx, http.MethodGet, path, nil)
}

// post sends a form to path as a same-origin browser form would.
func (c *client) post(ctx context.Context, path string, form url.Values) (response, error) {
	return c.do(ctx, http.MethodPost, path, form)
}

// api sends a JSON API request with the API token c.token (body nil for
// none), as a script would: no cookie, no browser headers.
func (c *client) api(ctx context.Context, method, path string, body []byte) (response, error) {
	var rd io.Reader
	if body != nil {
		rd = bytes.NewReader(body)
	}
	req, err := http.NewRequestWithContext(ctx, method, c.base+path, rd)
	if err != nil {
		return response{}, err
	}
	req.Header.Set("Authorization", "Bearer "+c.token)
	req.Header.Set("Accept", "application/json")
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	return c.send(req)
}

func (c *client) do(ctx context.Context, method, path string, form url.Values) (response, error) {
	var body io.Reader
	if form != nil {
		body = strings.NewReader(form.Encode())
	}
	req, err := http.NewRequestWithContext(ctx, method, c.base+path, body)
	if err != nil {
		return response{}, err
	}
	if c.session != "" {
		req.AddCookie(&http.Cookie{Name: "phasecast_session", Value: c.session})
	}
	if form != nil {
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", c.base)
		req.Header.Set("Sec-Fetch-Site", "same-origin")
	}
	return c.send(req)
}

// send makes the request and reads the whole answer, timing both.
func (c *client) send(req *http.Request) (response, error) {
	start := time.Now()
	resp, err := c.hc.Do(req)
	if err != nil {
		return response{elapsed: time.Since(start)}, err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	r := response{status: resp.StatusCode, body: b, location: resp.Header.Get("Location"), retryAfter: resp.Header.Get("Retry-After"),
		elapsed: time.Since(start)}
	if err != nil {
		return r, fmt.Errorf("read body of %s %s: %w", req.Method, req.URL.Path, err)
	}
	return r, nil
}

// redeem posts a one-time sign-in link and returns the session cookie.
func redeem(ctx context.Context, link string) (string, error) {
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, link, strings.NewReader(""))
	if err != nil {
		return "", err
	}
	u, _ := url.Parse(link)
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", u.Scheme+"://"+u.Host)
	req.Header.Set("Sec-Fetch-Site", "same-origin")
	hc := &http.Client{Timeout: 30 * time.Second, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := hc.Do(req)
	if err != nil {
		return "", err
	}
	defer resp.Body.Close()
	io.Copy(io.Discard, resp.Body)
	if resp.StatusCode != http.StatusSeeOther {
		return "", fmt.Errorf("POST sign-in link: status %d, want 303", resp.StatusCode)
	}
	for _, c := range resp.Cookies() {
		if c.Name == "phasecast_session" && c.Value != "" {
			return c.Value, nil
		}
	}
	return "", errors.New("POST sign-in link: no phasecast_session cookie in the answer")
}

// locationID returns the number after prefix in a redirect Location
// (/targets/12?m=... or /targets?list=3&m=...).
func locationID(loc, prefix string) (int64, error) {
	i := strings.Index(loc, prefix)
	if i < 0 {
		return 0, fmt.Errorf("location %q has no %q", loc, prefix)
	}
	rest := loc[i+len(prefix):]
	j := 0
	for j < len(rest) && rest[j] >= '0' && rest[j] <= '9' {
		j++
	}
	id, err := strconv.ParseInt(rest[:j], 10, 64)
	if err != nil || id <= 0 {
		return 0, fmt.Errorf("location %q: no id after %q", loc, prefix)
	}
	return id, nil
}

// fileChecks runs SQLite's own checks on the database file through a
// separate read-only connection: PRAGMA integrity_check must say "ok"
// and PRAGMA foreign_key_check must list nothing.
//
// On PostgreSQL (path is a URL) the server enforces every foreign key
// itself, and there is no file to check: every table is read through
// (count(*) scans each heap page, so a damaged one fails) and integrity
// is "ok" when all of them read.
func fileChecks(ctx context.Context, path string) (integrity string, fkProblems int, err error) {
	if store.IsPostgresURL(path) {
		return pgChecks(ctx, path)
	}
	db, err := sql.Open("sqlite", "file:"+path+"?_pragma=busy_timeout(5000)&_pragma=query_only(1)")
	if err != nil {
		return "", 0, err
	}
	defer db.Close()
	rows, err := db.QueryContext(ctx, "PRAGMA integrity_check")
	if err != nil {
		return "", 0, fmt.Errorf("integrity_check: %w", err)
	}
	var lines []string
	for rows.Next() {
		var s string
		if err := rows.Scan(&s); err != nil {
			rows.Close()
			return "", 0, err
		}
		lines = append(lines, s)
	}
	if err := rows.Err(); err != nil {
		return "", 0, err
	}
	rows.Close()
	fk, err := db.QueryContext(ctx, "PRAGMA foreign_key_check")
	if err != nil {
		return "", 0, fmt.Errorf("foreign_key_check: %w", err)
	}
	defer fk.Close()
	for fk.Next() {
		fkProblems++
	}
	if err := fk.Err(); err != nil {
		return "", 0, err
	}
	return strings.Join(lines, "; "), fkProblems, nil
}

// scanLog counts the lines of the server log that show trouble: "database
// is locked" (SQLITE_BUSY), level=ERROR, and panics; it returns up to five
// examples.
func scanLog(path string) (locked, errorsN, panics int, examples []string, err error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, 0, nil, err
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 16<<20)
	for sc.Scan() {
		line := sc.Text()
		bad := false
		if strings.Contains(line, "database is locked") || strings.Contains(line, "SQLITE_BUSY") {
			locked++
			bad = true
		}
		if strings.Contains(line, "level=ERROR") || strings.Contains(line, `"level":"ERROR"`) {
			errorsN++
			bad = true
		}
		if strings.Contains(line, "panic") {
			panics++
			bad = true
		}
		if bad && len(examples) < 5 {
			if len(line) > 400 {
				line = line[:400] + "…"
			}
			examples = append(examples, line)
		}
	}
	return locked, errorsN, panics, examples, sc.Err()
}

func pgChecks(ctx context.Context, dsn string) (string, int, error) {
	db, err := sql.Open("pgx", dsn)
	if err != nil {
		return "", 0, err
	}
	defer db.Close()
	rows, err := db.QueryContext(ctx, "SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'")
	if err != nil {
		return "", 0, err
	}
	var tables []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			rows.Close()
			return "", 0, err
		}
		tables = append(tables, n)
	}
	rows.Close()
	if len(tables) == 0 {
		return "no tables", 0, nil
	}
	for _, tbl := range tables {
		var n int64
		if err := db.QueryRowContext(ctx, "SELECT count(*) FROM "+tbl).Scan(&n); err != nil {
			return fmt.Sprintf("table %s unreadable: %v", tbl, err), 0, nil
		}
	}
	return "ok", 0, nil
}

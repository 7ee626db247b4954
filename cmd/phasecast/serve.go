package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"net/url"
	"strings"
	"time"

	"phasecast/store"
	"phasecast/web"
)

// DefaultDBPath is where serve keeps its data when --db is not given: a
// file in the working directory.
const DefaultDBPath = "phasecast.db"

// DefaultAddr is the address serve listens on when --addr is not given:
// this machine only.
const DefaultAddr = "127.0.0.1:8080"

const serveSynopsis = `Run the web interface (the default when phasecast is started without a command).

On first start with an empty database it seeds an invented demo scenario
(a team, a site, a list of binaries, a run) and prints a ONE-TIME sign-in
link for the demo owner: there is no default password. Open the link,
then set a password on the account page. The server stops cleanly on
Ctrl-C (SIGINT) or SIGTERM.`

// serveConfig is the parsed command line of serve.
type serveConfig struct {
	addr, db, baseURL, linkFor string
	demo, jsonLogs             bool
}

// runServe is the serve command.
func runServe(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	cfg, help, err := parseServe(args, stdout)
	if help || err != nil {
		return err
	}
	logger := newLogger(stderr, cfg.jsonLogs)
	st, err := store.Open(ctx, cfg.db, now)
	if err != nil {
		return fmt.Errorf("open database %s: %w", store.RedactURL(cfg.db), err)
	}
	defer st.Close()
	ln, err := net.Listen("tcp", cfg.addr)
	if err != nil {
		return fmt.Errorf("listen on %s: %w", cfg.addr, err)
	}
	defer ln.Close()
	base := cfg.baseURL
	if base == "" {
		base = "http://" + displayAddr(ln.Addr())
	}
	if err := firstStart(ctx, st, cfg, base, now, stdout); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "phasecast: serving %s (database %s, %s)\n", base, store.RedactURL(st.Path()), st.Engine())
	srv, err := web.New(web.Config{Store: st, Logger: logger, BaseURL: cfg.baseURL, Now: now})
	if err != nil {
		return err
	}
	return serveUntilDone(ctx, ln, srv.Handler(), logger)
}

// parseServe reads serve's flags.
func parseServe(args []string, stdout io.Writer) (serveConfig, bool, error) {
	fl := newFlags("serve", serveSynopsis)
	addr := fl.text("addr", "HOST:PORT", DefaultAddr, "address to listen on; 0.0.0.0:8080 for every interface")
	db := fl.text("db", dbMeta, DefaultDBPath, dbUsage+"; a file is made on first start, a PostgreSQL database must exist")
	base := fl.text("base-url", "URL", "http://ADDR", "the address users reach the server at (behind a proxy), used in printed links")
	linkFor := fl.text("signin-link", "EMAIL", "", "print a one-time sign-in link for this existing account and start (for a locked-out member)")
	demo := fl.text("demo", "yes|no", "yes", "seed the demo scenario into an empty database")
	jsonLogs := fl.boolean("json", "write the request log as JSON lines (default: text)")
	if help, err := fl.parse(args, stdout); help || err != nil {
		return serveConfig{}, help, err
	}
	cfg := serveConfig{addr: DefaultAddr, db: DefaultDBPath, baseURL: strings.TrimSuffix(base.value, "/"), linkFor: linkFor.value,
		demo: true, jsonLogs: *jsonLogs}
	if addr.set {
		if _, _, err := net.SplitHostPort(addr.value); err != nil {
			return cfg, false, fieldError(addr, "not an address", "HOST:PORT, e.g. 127.0.0.1:8080 or :8080")
		}
		cfg.addr = addr.value
	}
	dbName, err := dbFlag(db)
	if err != nil {
		return cfg, false, err
	}
	cfg.db = dbName
	if base.set {
		if u, err := url.Parse(base.value); err != nil || (u.Scheme != "http" && u.Scheme != "https") || u.Host == "" {
			return cfg, false, fieldError(base, "not an absolute http(s) URL", "e.g. https://plans.example.org")
		}
	}
	switch demo.value {
	case "yes", "":
	case "no":
		cfg.demo = false
	default:
		return cfg, false, fieldError(demo, "not accepted", "yes or no")
	}
	return cfg, false, nil
}

// firstStart seeds the demo scenario into an empty database and prints
// the owner's one-time sign-in link; on later starts it prints a link only
// when --signin-link asks for one.
func firstStart(ctx context.Context, st *store.Store, cfg serveConfig, base string, now func() time.Time, stdout io.Writer) error {
	if cfg.linkFor != "" {
		tok, err := st.CreateSignInLink(ctx, cfg.linkFor, time.Hour)
		if err != nil {
			return fmt.Errorf("sign-in link for %s: %w", cfg.linkFor, err)
		}
		fmt.Fprintf(stdout, "phasecast: one-time sign-in link for %s (valid 1 hour):\n  %s/login/link/%s\n", cfg.linkFor, base, tok)
		return nil
	}
	empty, err := st.IsEmpty(ctx)
	if err != nil || !empty {
		return err
	}
	if !cfg.demo {
		fmt.Fprintln(stdout, "phasecast: the database is empty and --demo no was given; run with --demo yes to seed the demo scenario.")
		return nil
	}
	info, err := st.SeedDemo(ctx, now().UTC())
	if err != nil {
		return fmt.Errorf("seed the demo scenario: %w", err)
	}
	fmt.Fprintf(stdout, "phasecast: first start: seeded the invented demo scenario (team %q, %d targets, site %q).\n",
		info.Team.Name, len(info.Targets), info.Site.Name)
	fmt.Fprintf(stdout, "phasecast: sign in as %s with this ONE-TIME link (valid until %s), then set a password on the account page:\n  %s/login/link/%s\n",
		info.Owner.Email, info.SignInExpires.UTC().Format("2006-01-02 15:04 UTC"), base, info.SignInToken)
	return nil
}

// serveUntilDone serves on ln until ctx is cancelled (SIGINT, SIGTERM),
// then shuts down gracefully, letting requests in flight finish for up to
// 10 seconds.
func serveUntilDone(ctx context.Context, ln net.Listener, h http.Handler, logger *slog.Logger) error {
	hs := newHTTPServer(h, logger, defaultTimeouts)
	errc := make(chan error, 1)
	go func() { errc <- hs.Serve(ln) }()
	select {
	case err := <-errc:
		return fmt.Errorf("serve: %w", err)
	case <-ctx.Done():
	}
	logger.Info("shutting down")
	sctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	if err := hs.Shutdown(sctx); err != nil {
		return fmt.Errorf("shutdown: %w", err)
	}
	if err := <-errc; err != nil && !errors.Is(err, http.ErrServerClosed) {
		return fmt.Errorf("serve: %w", err)
	}
	return nil
}

// serveTimeouts are the limits of one connection of the server: a client
// that sends its headers, its body or reads its answer slower than this,
// or keeps an idle connection longer, is cut off, so that slow clients
// cannot hold the server's connections.
type serveTimeouts struct {
	readHeader, read, write, idle time.Duration
}

// defaultTimeouts are serve's: 10 s for the request headers, 60 s for the
// whole request (a 16 MiB import on a slow line), 5 minutes to write the
// answer (long plans and exports; heavy work is also bounded by the web
// server's gate), 2 minutes idle between requests.
var defaultTimeouts = serveTimeouts{readHeader: 10 * time.Second, read: 60 * time.Second, write: 5 * time.Minute, idle: 2 * time.Minute}

// newHTTPServer returns the http.Server of serve for handler h.
func newHTTPServer(h http.Handler, logger *slog.Logger, t serveTimeouts) *http.Server {
	return &http.Server{
		Handler:           h,
		ReadHeaderTimeout: t.readHeader,
		ReadTimeout:       t.read,
		WriteTimeout:      t.write,
		IdleTimeout:       t.idle,
		MaxHeaderBytes:    64 << 10,
		ErrorLog:          slog.NewLogLogger(logger.Handler(), slog.LevelWarn),
	}
}

// newLogger returns the server's structured logger on w.
func newLogger(w io.Writer, asJSON bool) *slog.Logger {
	if asJSON {
		return slog.New(slog.NewJSONHandler(w, nil))
	}
	return slog.New(slog.NewTextHandler(w, nil))
}

// displayAddr is the listener's address as a browser should use it: an
// unspecified host (0.0.0.0, ::) is shown as 127.0.0.1.
func displayAddr(a net.Addr) string {
	host, port, err := net.SplitHostPort(a.String())
	if err != nil {
		return a.String()
	}
	if ip := net.ParseIP(host); ip == nil || ip.IsUnspecified() {
		host = "127.0.0.1"
	}
	return net.JoinHostPort(host, port)
}

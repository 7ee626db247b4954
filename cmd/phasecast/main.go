// Command phasecast plans observations of short-period binaries: where a
// target, the Sun and the Moon stand, the night's twilights, barycentric time
// and orbital phase, the next orbital events, and ephemeris refinement from
// timings, and serves the web interface. Without arguments it runs `serve`
// (the web interface on 127.0.0.1:8080); `phasecast help` lists the commands.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
	"time"

	_ "time/tzdata" // time zones load on machines without zoneinfo
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	// The wall clock is read here and nowhere else: every command, the store
	// and the web server take "now" from this one clock.
	code := exitCode(run(ctx, time.Now, os.Args[1:], os.Stdout, os.Stderr))
	stop()
	os.Exit(code)
}

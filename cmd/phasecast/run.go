package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
	"time"
)

// commandFunc runs one command with its own arguments (the command name
// removed). It writes results to stdout; stderr is for logs of long-running
// commands. It returns an error rather than printing one.
//
// now is the program's one clock, handed down from main: commands read "now"
// from it (default dates, --at), never from time.Now.
type commandFunc func(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error

// command is one entry of the dispatch table.
type command struct {
	name    string
	summary string
	run     commandFunc
}

// commands is the dispatch table, in the order the overview lists them.
// A new command is one line here plus its own file.
func commands() []command {
	return []command{
		{"serve", "the web interface (the default without a command): " + DefaultAddr + ", database ./" + DefaultDBPath, runServe},
		{"sky", "where a target, the Sun and the Moon stand at an instant", runSky},
		{"night", "sunset, twilights, sunrise, moonrise and moonset for one night", runNight},
		{"bjd", "an instant in JD_UTC, JD_TT, JD_TDB, HJD_UTC and BJD_TDB for a target", runBJD},
		{"phase", "orbital cycle and phase (with its uncertainty) at an instant", runPhase},
		{"events", "next orbital events or phase windows of a target in a time range", runEvents},
		{"fit", "refine an ephemeris from measured event times (CSV)", runFit},
		{"plan", "plan one night: exposure blocks on the wanted orbital phases of a target list", runPlan},
		{"run", "plan a run of nights: goals spread over nights, coverage, best nights, observed log", runRun},
		{"propose", "size a proposal: fewest nights and best dates for N exposures per goal, weather margin, year of hours", runPropose},
		{"exposure", "the exposure for a wanted S/N (or the S/N of an exposure) under the moonlit sky of an instant", runExposure},
		{"windows", "queue phase windows of targets over a date range (text, JSON, CSV, iCalendar)", runWindows},
		{"backup", "take a consistent copy of the database while the server runs", runBackup},
		{"restore", "put a backup in place of the database (server stopped)", runRestore},
		{"export-team", "write one whole team as JSON, to move it to another database (SQLite or PostgreSQL)", runExportTeam},
		{"import-team", "make a team anew from an export-team document, all or nothing", runImportTeam},
	}
}

// run is the whole program: it dispatches args to a command and reports any
// error on stderr as one line starting "phasecast: ". now is the program's
// clock (time.Now in main, a pinned instant in tests).
func run(ctx context.Context, now func() time.Time, args []string, stdout, stderr io.Writer) error {
	return runWith(ctx, now, commands(), args, stdout, stderr)
}

// runWith is run with a given dispatch table. A panic anywhere below is
// turned into an error as a last resort, never shown as a stack trace.
func runWith(ctx context.Context, now func() time.Time, cmds []command, args []string, stdout, stderr io.Writer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = &internalError{fmt.Sprintf("internal error: %v; please report this with the command line", r)}
		}
		if err != nil {
			fmt.Fprintln(stderr, "phasecast: "+oneLine(err.Error()))
		}
	}()
	switch {
	case len(args) == 0:
		args = []string{"serve"} // no command: the web interface with its defaults
	case args[0] == "help" || args[0] == "-h" || args[0] == "-help" || args[0] == "--help":
		return overview(stdout, cmds)
	case strings.HasPrefix(args[0], "-"):
		// Flags without a command are serve's: phasecast --db FILE --addr :8080.
		args = append([]string{"serve"}, args...)
	}
	name := args[0]
	for _, c := range cmds {
		if c.name == name {
			return c.run(ctx, now, args[1:], stdout, stderr)
		}
	}
	return usageErrorf("unknown command %q; accepted: %s (run phasecast without arguments for the overview)", name, commandNames(cmds))
}

// overview prints the list of commands.
func overview(w io.Writer, cmds []command) error {
	var b strings.Builder
	b.WriteString("phasecast: plan observations of short-period binaries by orbital phase\n\n")
	b.WriteString("Usage: phasecast COMMAND [flags]    (phasecast COMMAND -h lists a command's flags)\n")
	b.WriteString("Without a command (or with only serve's flags, e.g. --db FILE), phasecast runs serve: the web interface on " + DefaultAddr + ".\n\nCommands:\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 3, ' ', 0)
	for _, c := range cmds {
		fmt.Fprintf(tw, "  %s\t%s\n", c.name, c.summary)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	b.WriteString("\nSites: --lat DEG (north +), --lon DEG (EAST +), --elev M. Times: RFC 3339, UTC unless an offset is given.\n")
	b.WriteString("--json prints one JSON object. Computed times: verify them against your observatory's own tools\n")
	b.WriteString("and rules before observing, and never point a telescope near the Sun.\n")
	_, err := io.WriteString(w, b.String())
	return err
}

func commandNames(cmds []command) string {
	var names []string
	for _, c := range cmds {
		names = append(names, c.name)
	}
	return strings.Join(names, ", ")
}

// usageError is a bad command line: an unknown command or flag, a missing or
// malformed value. Exit status 2.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usageErrorf(format string, a ...any) error {
	return &usageError{fmt.Sprintf(format, a...)}
}

// internalError is a recovered panic. Exit status 3.
type internalError struct{ msg string }

func (e *internalError) Error() string { return e.msg }

// Exit statuses.
const (
	exitOK       = 0
	exitFailure  = 1 // the command could not do its job (for example an unreadable file)
	exitUsage    = 2 // bad command line or input value
	exitInternal = 3 // a bug: a recovered panic
)

// exitCode maps the error run returned to the process exit status.
func exitCode(err error) int {
	var ue *usageError
	var ie *internalError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &ue):
		return exitUsage
	case errors.As(err, &ie):
		return exitInternal
	}
	return exitFailure
}

// oneLine folds a message onto one line.
func oneLine(s string) string {
	s = strings.TrimSpace(s)
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\n", " ")), " ")
}

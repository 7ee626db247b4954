package main

import (
	"bytes"
	"context"
	"io"
	"strings"
	"testing"
)

// fakeTerminal makes isTerminal answer yes for the duration of a test.
func fakeTerminal(t *testing.T, yes bool) {
	t.Helper()
	old := isTerminal
	isTerminal = func(io.Writer) bool { return yes }
	t.Cleanup(func() { isTerminal = old })
}

// longArgs are a run and a windows command line over the test target list.
func longArgs(t *testing.T) map[string][]string {
	t.Helper()
	csvPath := writeFile(t, "targets.csv", runCSV)
	return map[string][]string{
		"run":     args([]string{"run"}, siteArgs, runArgs, []string{"--targets", csvPath}),
		"windows": args([]string{"windows"}, siteArgs, windowsArgs, []string{"--targets", csvPath}),
	}
}

// TestLongCommandsProgress checks that run and windows print a progress
// line on stderr when it is a terminal (a stand-in here), ending at 100 %,
// and none when it is not; stdout is the same either way.
func TestLongCommandsProgress(t *testing.T) {
	for name, argv := range longArgs(t) {
		t.Run(name, func(t *testing.T) {
			var plain, plainErr bytes.Buffer
			fakeTerminal(t, false)
			if err := run(context.Background(), testClock(t), argv, &plain, &plainErr); err != nil {
				t.Fatalf("not a terminal: %v", err)
			}
			if plainErr.Len() != 0 {
				t.Errorf("not a terminal: stderr %q, want nothing", plainErr.String())
			}
			fakeTerminal(t, true)
			var out, errOut bytes.Buffer
			if err := run(context.Background(), testClock(t), argv, &out, &errOut); err != nil {
				t.Fatalf("terminal: %v", err)
			}
			line := errOut.String()
			if !strings.HasPrefix(line, "\r"+name+": ") || !strings.Contains(line, "100 %") || !strings.HasSuffix(line, "Ctrl-C stops\n") {
				t.Errorf("terminal: stderr %q, want a progress line of %s ending at 100 %%", line, name)
			}
			if out.String() != plain.String() {
				t.Error("stdout differs with a progress line")
			}
		})
	}
}

// TestLongCommandsCancelled checks that a cancelled context (what Ctrl-C
// does through main's signal.NotifyContext) stops run and windows with a
// clear error, exit status 1 and nothing on stdout.
func TestLongCommandsCancelled(t *testing.T) {
	for name, argv := range longArgs(t) {
		t.Run(name, func(t *testing.T) {
			fakeTerminal(t, true)
			ctx, cancel := context.WithCancel(context.Background())
			cancel()
			var out, errOut bytes.Buffer
			err := run(ctx, testClock(t), argv, &out, &errOut)
			if err == nil || exitCode(err) != exitFailure {
				t.Fatalf("err %v (exit %d), want an interruption, exit %d", err, exitCode(err), exitFailure)
			}
			if want := name + " interrupted"; !strings.Contains(err.Error(), want) || !strings.Contains(errOut.String(), "phasecast: "+want) {
				t.Errorf("err %q, stderr %q: want %q", err, errOut.String(), want)
			}
			if out.Len() != 0 {
				t.Errorf("stdout %q, want nothing", out.String())
			}
		})
	}
}

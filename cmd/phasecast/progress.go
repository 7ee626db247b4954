package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
)

// isTerminal reports whether w is a terminal (a character device): the
// progress line is for someone watching, not for a log file or a pipe. A
// variable so that tests can stand in for a terminal without one.
var isTerminal = func(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// progressLine keeps one line of stderr up to date with the progress of a
// long command ("run: 37 % (120/322 steps), Ctrl-C stops"), rewritten in
// place with a carriage return at each whole percent, and ended by finish.
type progressLine struct {
	w     io.Writer
	label string
	pct   int
	shown bool
}

// newProgress returns the progress line of command label on w, or nil when
// w is not a terminal (then nothing is printed).
func newProgress(w io.Writer, label string) *progressLine {
	if !isTerminal(w) {
		return nil
	}
	return &progressLine{w: w, label: label, pct: -1}
}

// callback returns the function the planner calls with (done, total); nil
// for a nil line (the planner then reports nothing).
func (p *progressLine) callback() func(done, total int) {
	if p == nil {
		return nil
	}
	return p.update
}

func (p *progressLine) update(done, total int) {
	if total <= 0 {
		return
	}
	pct := 100 * done / total
	if pct == p.pct {
		return
	}
	p.pct, p.shown = pct, true
	fmt.Fprintf(p.w, "\r%s: %3d %% (%d/%d steps), Ctrl-C stops", p.label, pct, done, total)
}

// finish ends the line (when one was shown).
func (p *progressLine) finish() {
	if p != nil && p.shown {
		fmt.Fprintln(p.w)
	}
}

// interrupted turns the planner's context error into the command's error:
// the work was stopped (Ctrl-C, or the context's deadline) before anything
// was written. Other errors are returned as they are.
func interrupted(err error, what string) error {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return fmt.Errorf("%s interrupted (%v): stopped before finishing, nothing written", what, err)
	}
	return err
}

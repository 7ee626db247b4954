package main

// The manual's transcripts, replayed: every `$ phasecast …` line of a
// ```text block in README.md and docs/*.md is run through run() and its
// output compared with the lines under it, so that the manual cannot drift
// from the program. The rules, also stated in docs/cli.md ("How the
// examples are checked"):
//
//   - A command runs from the repository's root, so paths such as
//     planner/testdata/night_targets.csv work as printed. A line ending in
//     a backslash continues on the next one.
//   - The output is stdout followed by stderr (an error example shows the
//     "phasecast: …" line), compared line by line with trailing blanks and
//     carriage returns dropped.
//   - An output line whose text starts with "…" stands for any number of
//     lines left out (an excerpt); "…" among the arguments stands for the
//     arguments of the block's previous command.
//   - Pipes: `| head -N`, `| tail -N` and `| grep -E REGEXP` (Go's RE2
//     syntax, which covers the extended expressions used) are done by the
//     test; any other program after a pipe fails the test.
//   - The commands in skipTranscript are not run, each for the reason
//     given there; every other command is.

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// skipTranscript lists the commands whose transcripts are not replayed,
// with the reason.
var skipTranscript = map[string]string{
	"serve":   "runs until it is stopped; its start-up lines are checked by TestServe* in serve_test.go",
	"backup":  "needs the database file the transcript names in the working directory; backup_test.go runs backup and restore",
	"restore": "needs the backup file the transcript names in the working directory; backup_test.go runs backup and restore",
}

// transcript is one `$ phasecast …` example: where it is, its command
// line (after "$ ") and the output printed under it.
type transcript struct {
	file string
	line int
	cmd  string
	want []string
}

// readTranscripts returns the transcripts of the ```text blocks of the
// Markdown file at path.
func readTranscripts(path string) ([]transcript, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var out []transcript
	lines := strings.Split(string(b), "\n")
	inText := false
	var cur *transcript
	prev := "" // the previous command's arguments in the block, for "…"
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		switch {
		case !inText && strings.TrimSpace(l) == "```text":
			inText, cur, prev = true, nil, ""
			continue
		case !inText:
			continue
		case strings.TrimSpace(l) == "```":
			inText, cur = false, nil
			continue
		}
		if strings.HasPrefix(l, "$ ") {
			cur = nil
			cmd, at := strings.TrimPrefix(l, "$ "), i+1
			for strings.HasSuffix(cmd, `\`) && i+1 < len(lines) {
				i++
				cmd = strings.TrimSuffix(cmd, `\`) + " " + strings.TrimSpace(lines[i])
			}
			rest, ok := strings.CutPrefix(cmd, "phasecast ")
			if !ok {
				continue // another program's example (go run, curl)
			}
			if fields := strings.Fields(rest); len(fields) > 0 {
				rest = strings.Join(fields[1:], " ")
				if i := strings.Index(rest, "|"); i >= 0 {
					rest = rest[:i]
				}
				if strings.Contains(rest, "…") {
					cmd = strings.Replace(cmd, "…", prev, 1)
				} else {
					prev = strings.TrimSpace(rest)
				}
			}
			out = append(out, transcript{file: path, line: at, cmd: cmd})
			cur = &out[len(out)-1]
			continue
		}
		if cur != nil {
			cur.want = append(cur.want, l)
		}
	}
	return out, nil
}

// shellWords splits a command line as a POSIX shell would for the simple
// lines of the manual: blanks separate words, single and double quotes
// group, a backslash escapes the next character outside single quotes.
// A bare | separates the stages of a pipe.
func shellWords(s string) ([][]string, error) {
	var stages [][]string
	var words []string
	var w strings.Builder
	inWord := false
	var quote rune
	flush := func() {
		if inWord {
			words = append(words, w.String())
			w.Reset()
			inWord = false
		}
	}
	rs := []rune(s)
	for i := 0; i < len(rs); i++ {
		r := rs[i]
		switch {
		case quote == '\'':
			if r == '\'' {
				quote = 0
			} else {
				w.WriteRune(r)
			}
		case quote == '"':
			switch {
			case r == '"':
				quote = 0
			case r == '\\' && i+1 < len(rs) && strings.ContainsRune(`"\$`, rs[i+1]):
				i++
				w.WriteRune(rs[i])
			default:
				w.WriteRune(r)
			}
		case r == '\'' || r == '"':
			quote, inWord = r, true
		case r == '\\' && i+1 < len(rs):
			i++
			w.WriteRune(rs[i])
			inWord = true
		case r == ' ' || r == '\t':
			flush()
		case r == '|':
			flush()
			stages = append(stages, words)
			words = nil
		default:
			w.WriteRune(r)
			inWord = true
		}
	}
	if quote != 0 {
		return nil, fmt.Errorf("unclosed %c quote", quote)
	}
	flush()
	return append(stages, words), nil
}

// pipeStage applies one stage after a pipe (head -N, tail -N, grep -E RE)
// to lines.
func pipeStage(words []string, lines []string) ([]string, error) {
	count := func(flag string) (int, error) {
		if len(words) != 2 || !strings.HasPrefix(words[1], "-") {
			return 0, fmt.Errorf("%s: want %s -N", strings.Join(words, " "), words[0])
		}
		return strconv.Atoi(strings.TrimPrefix(words[1], flag))
	}
	switch {
	case len(words) > 0 && words[0] == "head":
		n, err := count("-")
		if err != nil {
			return nil, err
		}
		return lines[:min(n, len(lines))], nil
	case len(words) > 0 && words[0] == "tail":
		n, err := count("-")
		if err != nil {
			return nil, err
		}
		return lines[max(0, len(lines)-n):], nil
	case len(words) == 3 && words[0] == "grep" && words[1] == "-E":
		re, err := regexp.Compile(words[2])
		if err != nil {
			return nil, fmt.Errorf("grep -E %q: %v", words[2], err)
		}
		var out []string
		for _, l := range lines {
			if re.MatchString(l) {
				out = append(out, l)
			}
		}
		return out, nil
	}
	return nil, fmt.Errorf("%q after a pipe: the transcript test does head -N, tail -N and grep -E only", strings.Join(words, " "))
}

// outputLines splits output into lines with trailing blanks (and the CR of
// iCalendar's CRLF line ends) dropped and without the empty lines at the
// end.
func outputLines(s string) []string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " \t\r")
	}
	for len(lines) > 0 && lines[len(lines)-1] == "" {
		lines = lines[:len(lines)-1]
	}
	return lines
}

// isElision reports whether an expected line stands for lines left out.
func isElision(l string) bool { return strings.HasPrefix(strings.TrimSpace(l), "…") }

// matchLines reports whether got matches want, where an elision line of
// want matches any run of lines of got (including none).
func matchLines(want, got []string) bool {
	// ok[i][j]: want[i:] matches got[j:].
	ok := make([][]bool, len(want)+1)
	for i := range ok {
		ok[i] = make([]bool, len(got)+1)
	}
	ok[len(want)][len(got)] = true
	for i := len(want) - 1; i >= 0; i-- {
		for j := len(got); j >= 0; j-- {
			if isElision(want[i]) {
				ok[i][j] = ok[i+1][j] || (j < len(got) && ok[i][j+1])
			} else {
				ok[i][j] = j < len(got) && want[i] == got[j] && ok[i+1][j+1]
			}
		}
	}
	return ok[0][0]
}

// TestManualTranscripts replays every transcript of README.md and
// docs/*.md (see the rules at the top of this file).
func TestManualTranscripts(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	files, err := filepath.Glob(filepath.Join(root, "docs", "*.md"))
	if err != nil {
		t.Fatal(err)
	}
	files = append([]string{filepath.Join(root, "README.md")}, files...)
	var all []transcript
	for _, f := range files {
		ts, err := readTranscripts(f)
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, ts...)
	}
	if len(all) < 10 {
		t.Fatalf("found %d transcripts in %d files: the reader is broken", len(all), len(files))
	}
	t.Chdir(root)
	ran := 0
	for _, tr := range all {
		rel, _ := filepath.Rel(root, tr.file)
		name := fmt.Sprintf("%s:%d", rel, tr.line)
		t.Run(name, func(t *testing.T) {
			stages, err := shellWords(tr.cmd)
			if err != nil {
				t.Fatalf("%s: %v", tr.cmd, err)
			}
			argv := stages[0][1:] // without "phasecast"
			if len(argv) > 0 {
				if why, ok := skipTranscript[argv[0]]; ok {
					t.Logf("not replayed: %s (%s)", tr.cmd, why)
					return
				}
			}
			ran++
			var stdout, stderr bytes.Buffer
			_ = run(context.Background(), testClock(t), argv, &stdout, &stderr)
			got := outputLines(stdout.String() + stderr.String())
			for _, st := range stages[1:] {
				if got, err = pipeStage(st, got); err != nil {
					t.Fatal(err)
				}
			}
			want := outputLines(strings.Join(tr.want, "\n"))
			if !matchLines(want, got) {
				t.Errorf("$ %s\nthe manual shows:\n%s\nphasecast prints:\n%s", tr.cmd, strings.Join(want, "\n"), strings.Join(got, "\n"))
			}
		})
	}
	if ran == 0 {
		t.Error("no transcript was replayed")
	}
}

// TestTranscriptRules checks the reader's helpers on made-up input, so
// that a mistake in them cannot pass a wrong manual.
func TestTranscriptRules(t *testing.T) {
	t.Run("Elision", func(t *testing.T) {
		for _, tc := range []struct {
			want, got string
			ok        bool
		}{
			{"a\nb", "a\nb", true},
			{"a\n…\nd", "a\nb\nc\nd", true},
			{"a\n  … (left out)\nd", "a\nd", true},
			{"a\n…\nd", "a\nb\nc", false},
			{"a\nb", "a\nc", false},
			{"a", "a\nb", false},
		} {
			if got := matchLines(strings.Split(tc.want, "\n"), strings.Split(tc.got, "\n")); got != tc.ok {
				t.Errorf("matchLines(%q, %q) = %v, want %v", tc.want, tc.got, got, tc.ok)
			}
		}
	})
	t.Run("Words", func(t *testing.T) {
		got, err := shellWords(`phasecast run --x 'a b' "c\"d" | grep -E "^[0-9].*(A|B)" | head -3`)
		if err != nil {
			t.Fatal(err)
		}
		want := `[[phasecast run --x a b c"d] [grep -E ^[0-9].*(A|B)] [head -3]]`
		if fmt.Sprint(got) != want {
			t.Errorf("shellWords = %v, want %s", got, want)
		}
	})
	t.Run("Pipes", func(t *testing.T) {
		lines := []string{"x1", "y2", "x3"}
		for _, tc := range []struct {
			stage []string
			want  string
		}{
			{[]string{"head", "-2"}, "[x1 y2]"},
			{[]string{"tail", "-1"}, "[x3]"},
			{[]string{"grep", "-E", "^x"}, "[x1 x3]"},
		} {
			got, err := pipeStage(tc.stage, lines)
			if err != nil || fmt.Sprint(got) != tc.want {
				t.Errorf("%v: %v, %v; want %s", tc.stage, got, err, tc.want)
			}
		}
		if _, err := pipeStage([]string{"jq", "."}, lines); err == nil {
			t.Error("jq after a pipe was accepted")
		}
	})
}

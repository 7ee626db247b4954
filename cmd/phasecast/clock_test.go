package main

import (
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// The program has one clock: main hands time.Now to run(), and everything
// below reads "now" from the clock it was given (the store's, the web
// server's, a command's). A non-test file that reads the wall clock itself
// brings back the date bombs the suite once had (a test pinned to a date,
// a store on the wall clock, a sign-in link expired two days later).
//
// TestOneClock fails on any use of time.Now, time.Since or time.Until in a
// non-test file, except in cmd/phasecast/main.go (the wiring) and in the
// benchmark comparison program under testdata/compare. Measuring elapsed
// time is not reading the date: a line that does only that carries the
// comment "// elapsed" and is let through.
func TestOneClock(t *testing.T) {
	root := filepath.Join("..", "..")
	allowed := []string{"cmd/phasecast/main.go"}
	var bad []string
	files := 0
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, path) // path is under root: Rel cannot fail
		rel = filepath.ToSlash(rel)
		if d.IsDir() {
			if rel == "testdata/compare" || strings.HasPrefix(d.Name(), ".") && rel != "." || d.Name() == "node_modules" {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(rel, ".go") || strings.HasSuffix(rel, "_test.go") || slices.Contains(allowed, rel) {
			return nil
		}
		files++
		if rel != "store/testclock/testclock.go" {
			if src, err := os.ReadFile(path); err != nil {
				return err
			} else if strings.Contains(string(src), "PHASECAST_"+"TEST_NOW") {
				bad = append(bad, rel+": reads PHASECAST_"+"TEST_NOW, which only the test clock may")
			}
		}
		found, err := wallClockUses(path)
		if err != nil {
			return err
		}
		for _, f := range found {
			bad = append(bad, rel+":"+f)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if files < 100 {
		t.Fatalf("read only %d non-test Go files under %s; the walk is broken", files, root)
	}
	for _, b := range bad {
		t.Errorf("%s reads the wall clock; take \"now\" from the clock handed down (or mark a pure elapsed-time measurement // elapsed)", b)
	}
}

// wallClockUses returns "line: time.X" for every time.Now, time.Since and
// time.Until in the file at path whose line has no "// elapsed" comment.
func wallClockUses(path string) ([]string, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	fset := token.NewFileSet()
	f, err := parser.ParseFile(fset, path, src, parser.ParseComments)
	if err != nil {
		return nil, err
	}
	timeName := ""
	for _, im := range f.Imports {
		if im.Path.Value == `"time"` {
			timeName = "time"
			if im.Name != nil {
				timeName = im.Name.Name
			}
		}
	}
	if timeName == "" {
		return nil, nil
	}
	elapsed := map[int]bool{}
	for _, cg := range f.Comments {
		for _, c := range cg.List {
			if strings.TrimSpace(strings.TrimPrefix(c.Text, "//")) == "elapsed" {
				elapsed[fset.Position(c.Pos()).Line] = true
			}
		}
	}
	var out []string
	ast.Inspect(f, func(n ast.Node) bool {
		sel, ok := n.(*ast.SelectorExpr)
		if !ok {
			return true
		}
		id, ok := sel.X.(*ast.Ident)
		if !ok || id.Name != timeName || id.Obj != nil {
			return true
		}
		switch sel.Sel.Name {
		case "Now", "Since", "Until":
			line := fset.Position(sel.Pos()).Line
			if !elapsed[line] {
				out = append(out, strconv.Itoa(line)+": time."+sel.Sel.Name)
			}
		}
		return true
	})
	return out, nil
}

// TestClockSelfCheck makes sure TestOneClock can fail: a file that calls
// time.Now without the comment is reported, the same call marked elapsed is
// not, and a method named Now on another value is not.
func TestClockSelfCheck(t *testing.T) {
	dir := t.TempDir()
	write := func(name, src string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(src), 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct {
		name, src string
		want      int
	}{
		{"Call", "package x\nimport \"time\"\nvar _ = time.Now()\n", 1},
		{"FuncValue", "package x\nimport \"time\"\nvar f = time.Now\n", 1},
		{"Since", "package x\nimport \"time\"\nvar t0 time.Time\nvar _ = time.Since(t0)\n", 1},
		{"Renamed", "package x\nimport tm \"time\"\nvar _ = tm.Now()\n", 1},
		{"Elapsed", "package x\nimport \"time\"\nvar _ = time.Now() // elapsed\n", 0},
		{"OtherNow", "package x\nimport \"time\"\ntype c struct{}\nfunc (c) Now() time.Time { return time.Time{} }\nvar _ = c{}.Now()\n", 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := wallClockUses(write(tc.name+".go", tc.src))
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != tc.want {
				t.Errorf("found %v, want %d use(s)", got, tc.want)
			}
		})
	}
}

// TestTestClockOnlyInTests: the packages that read PHASECAST_TEST_NOW and
// PHASECAST_TEST_PG are for tests; no package of the program imports them.
func TestTestClockOnlyInTests(t *testing.T) {
	for _, p := range listPackages(t) {
		for _, only := range []string{"/store/testclock", "/store/testdb"} {
			if slices.Contains(p.Imports, module+only) {
				t.Errorf("%s imports %s%s, which only tests may use", p.ImportPath, module, only)
			}
		}
	}
}

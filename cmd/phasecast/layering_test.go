package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"os/exec"
	"strings"
	"testing"
)

// The import direction is ephem ← planner ← store ← web ← cmd: a package may
// import phasecast packages of its own layer or a lower one only. ephem
// imports only the standard library, meeus and soniakeys/unit (and, through
// meeus, soniakeys/sexagesimal). Nothing outside web and cmd imports web.

const module = "phasecast"

// layers ranks the top-level packages (and everything under them).
var layers = map[string]int{"ephem": 0, "planner": 1, "store": 2, "web": 3, "cmd": 4}

// listedPackage is the part of `go list -json` output the test reads.
type listedPackage struct {
	ImportPath string
	Imports    []string
	Deps       []string
}

func listPackages(t *testing.T) []listedPackage {
	t.Helper()
	pkgs := goList[listedPackage](t, "-e", "-json=ImportPath,Imports,Deps", module+"/...")
	if len(pkgs) == 0 {
		t.Fatal("go list found no packages")
	}
	return pkgs
}

// goList runs `go list` with args (which ask for JSON) and decodes every
// package it prints into a T.
func goList[T any](t *testing.T, args ...string) []T {
	t.Helper()
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Fatalf("the go command is needed to list the module's packages: %v", err)
	}
	cmd := exec.Command(goTool, append([]string{"list"}, args...)...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list: %v: %s", err, stderr.String())
	}
	var pkgs []T
	dec := json.NewDecoder(bytes.NewReader(out))
	for {
		var p T
		if err := dec.Decode(&p); errors.Is(err, io.EOF) {
			break
		} else if err != nil {
			t.Fatalf("decoding go list output: %v", err)
		}
		pkgs = append(pkgs, p)
	}
	return pkgs
}

// topLevel returns the first path element under the module ("ephem" for
// phasecast/ephem/x) and whether path is in the module at all.
func topLevel(path string) (string, bool) {
	rest, ok := strings.CutPrefix(path, module+"/")
	if !ok {
		return "", false
	}
	top, _, _ := strings.Cut(rest, "/")
	return top, true
}

// isStandard reports whether path is a standard-library package: its first
// element has no dot (and it is not this module, whose name has none either).
func isStandard(path string) bool {
	first, _, _ := strings.Cut(path, "/")
	return !strings.Contains(first, ".") && first != module
}

func TestImportDirection(t *testing.T) {
	pkgs := listPackages(t)
	for _, p := range pkgs {
		top, _ := topLevel(p.ImportPath)
		rank, ranked := layers[top]
		if !ranked {
			t.Logf("%s is outside the layers ephem, planner, store, web, cmd", p.ImportPath)
		}
		for _, imp := range p.Imports {
			itop, inModule := topLevel(imp)
			if !inModule {
				continue
			}
			if itop == "web" && top != "web" && top != "cmd" {
				t.Errorf("%s imports %s: nothing outside web and cmd may import web", p.ImportPath, imp)
			}
			irank, ok := layers[itop]
			if ranked && ok && irank > rank {
				t.Errorf("%s imports %s: imports go ephem ← planner ← store ← web ← cmd only", p.ImportPath, imp)
			}
		}
	}
}

func TestEphemDependencies(t *testing.T) {
	allowedDirect := func(path string) bool {
		return isStandard(path) ||
			strings.HasPrefix(path, "github.com/soniakeys/meeus/v3/") ||
			path == "github.com/soniakeys/unit"
	}
	allowedAny := func(path string) bool {
		return allowedDirect(path) || path == "github.com/soniakeys/sexagesimal"
	}
	found := false
	for _, p := range listPackages(t) {
		if top, _ := topLevel(p.ImportPath); top != "ephem" {
			continue
		}
		found = true
		for _, imp := range p.Imports {
			if !allowedDirect(imp) {
				t.Errorf("%s imports %s: ephem may import only the standard library, github.com/soniakeys/meeus/v3 and github.com/soniakeys/unit", p.ImportPath, imp)
			}
		}
		for _, dep := range p.Deps {
			if !allowedAny(dep) {
				t.Errorf("%s depends on %s (through its imports): ephem's dependencies are the standard library and meeus", p.ImportPath, dep)
			}
		}
	}
	if !found {
		t.Fatal("go list found no ephem package")
	}
}

func TestLayeringRules(t *testing.T) {
	// The rules above, applied to made-up import paths, so that a mistake in
	// the checker itself shows.
	tests := []struct {
		name, path string
		top        string
		inModule   bool
		standard   bool
	}{
		{"Ephem", "phasecast/ephem", "ephem", true, false},
		{"WebSub", "phasecast/web/chart", "web", true, false},
		{"Std", "encoding/json", "", false, true},
		{"Meeus", "github.com/soniakeys/meeus/v3/coord", "", false, false},
		{"ModuleRoot", "phasecast", "", false, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			top, in := topLevel(tc.path)
			if top != tc.top || in != tc.inModule {
				t.Errorf("topLevel(%q) = %q, %v; want %q, %v", tc.path, top, in, tc.top, tc.inModule)
			}
			if got := isStandard(tc.path); got != tc.standard {
				t.Errorf("isStandard(%q) = %v, want %v", tc.path, got, tc.standard)
			}
		})
	}
}

// TestWebNoAstronomy: web and the packages under it do no astronomy of their
// own: their non-test files do not import ephem, and reach it only through
// planner (planner/targetinfo.go). Tests may still import ephem.
func TestWebNoAstronomy(t *testing.T) {
	found := false
	for _, p := range listPackages(t) {
		if top, _ := topLevel(p.ImportPath); top != "web" {
			continue
		}
		found = true
		for _, imp := range p.Imports {
			if itop, _ := topLevel(imp); itop == "ephem" {
				t.Errorf("%s imports %s: web calls planner for astronomy (see planner/targetinfo.go), never ephem", p.ImportPath, imp)
			}
		}
	}
	if !found {
		t.Fatal("no web package listed")
	}
}

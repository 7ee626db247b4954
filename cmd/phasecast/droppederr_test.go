package main

import (
	"fmt"
	"go/ast"
	"go/importer"
	"go/parser"
	"go/token"
	"go/types"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// droppedMark is the comment that lets a line give an error to _ on
// purpose; the text after it says why.
const droppedMark = "// dropped:"

// TestNoDroppedErrors type-checks every non-test file of the module and
// fails where an error result is assigned to _ (`_ = f()`, `x, _ := g()`)
// on a line without a droppedMark comment giving the reason. Errors are
// handled, returned or logged (CONVENTIONS.md: "never drop an error with
// _"). Type information comes from the compiler's export data, as go vet
// reads it (`go list -export`).
func TestNoDroppedErrors(t *testing.T) {
	if testing.Short() {
		t.Skip("type-checks the module")
	}
	pkgs := listExported(t)
	exports := map[string]string{}
	for _, p := range pkgs {
		exports[p.ImportPath] = p.Export
	}
	fset := token.NewFileSet()
	imp := importer.ForCompiler(fset, "gc", func(path string) (io.ReadCloser, error) {
		f, ok := exports[path]
		if !ok || f == "" {
			return nil, fmt.Errorf("no export data for %s", path)
		}
		return os.Open(f)
	})
	errType := types.Universe.Lookup("error").Type()
	var found []string
	for _, p := range pkgs {
		if p.Standard || !strings.HasPrefix(p.ImportPath, module) {
			continue
		}
		var files []*ast.File
		for _, name := range p.GoFiles {
			f, err := parser.ParseFile(fset, filepath.Join(p.Dir, name), nil, parser.ParseComments)
			if err != nil {
				t.Fatal(err)
			}
			files = append(files, f)
		}
		info := &types.Info{Types: map[ast.Expr]types.TypeAndValue{}}
		if _, err := (&types.Config{Importer: imp}).Check(p.ImportPath, fset, files, info); err != nil {
			t.Fatalf("type-check %s: %v", p.ImportPath, err)
		}
		for _, f := range files {
			marked := map[int]bool{}
			for _, cg := range f.Comments {
				for _, c := range cg.List {
					if strings.HasPrefix(c.Text, droppedMark) && len(strings.TrimSpace(c.Text[len(droppedMark):])) > 0 {
						marked[fset.Position(c.Pos()).Line] = true
					}
				}
			}
			ast.Inspect(f, func(n ast.Node) bool {
				as, ok := n.(*ast.AssignStmt)
				if !ok {
					return true
				}
				for i, lhs := range as.Lhs {
					if id, ok := lhs.(*ast.Ident); !ok || id.Name != "_" {
						continue
					}
					var typ types.Type
					if len(as.Rhs) == len(as.Lhs) {
						typ = info.Types[as.Rhs[i]].Type
					} else if tuple, ok := info.Types[as.Rhs[0]].Type.(*types.Tuple); ok && i < tuple.Len() {
						typ = tuple.At(i).Type()
					}
					pos := fset.Position(lhs.Pos())
					if typ != nil && types.Identical(typ, errType) && !marked[pos.Line] {
						found = append(found, fmt.Sprintf("%s:%d", pos.Filename, pos.Line))
					}
				}
				return true
			})
		}
	}
	sort.Strings(found)
	for _, f := range found {
		t.Errorf("%s: an error is assigned to _; handle it, or say why on the line with %q", f, droppedMark+" REASON")
	}
}

// exportedPackage is the part of `go list -export -json` the test reads.
type exportedPackage struct {
	ImportPath, Dir, Export string
	GoFiles                 []string
	Standard                bool
}

// listExported lists the module's packages and their dependencies with
// the compiler's export data (building them if needed).
func listExported(t *testing.T) []exportedPackage {
	t.Helper()
	return goList[exportedPackage](t, "-export", "-deps", "-json=ImportPath,Dir,Export,GoFiles,Standard", module+"/...")
}

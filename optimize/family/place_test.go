package family

import (
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// allowed lists the few places outside this package where a family's name
// may appear as a string, each for a reason that is not the family: the
// catalog's amplifier type "matched" (a kind of part, which the matched
// family happens to be named after) and the importer's reading of a
// distributor's type column ("difference amplifier").
var allowed = map[string]string{
	"catalog/part.go":   "matched",
	"importers/rows.go": "difference",
}

// TestFamiliesStayInTheirPlace fails when code outside this package names a
// specific family: a registry entry (family.Difference), an identifier
// declared with a registry entry's name, or a string that is a family's
// name or a build of it ("difference", "difference-discrete"). The search,
// the budget, the spec reader and the commands must work through the
// Family fields and the registry. Test files are not checked: tests name
// families to check them.
func TestFamiliesStayInTheirPlace(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	vars := registryVars(t)
	names := Names()
	checked := 0
	err = filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, path)
		rel = filepath.ToSlash(rel)
		if d.IsDir() {
			if rel == "optimize/family" || strings.HasPrefix(d.Name(), ".") || d.Name() == "testdata" {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return nil
		}
		checked++
		fset := token.NewFileSet()
		f, err := parser.ParseFile(fset, path, nil, parser.SkipObjectResolution)
		if err != nil {
			return err
		}
		pkgName := ""
		for _, im := range f.Imports {
			if p, _ := strconv.Unquote(im.Path.Value); p == "plumb/optimize/family" {
				pkgName = "family"
				if im.Name != nil {
					pkgName = im.Name.Name
				}
			}
		}
		ast.Inspect(f, func(n ast.Node) bool {
			switch n := n.(type) {
			case *ast.SelectorExpr:
				if x, ok := n.X.(*ast.Ident); ok && pkgName != "" && x.Name == pkgName && vars[n.Sel.Name] {
					t.Errorf("%s: names family.%s; use the family's fields or the registry", fset.Position(n.Pos()), n.Sel.Name)
				}
			case *ast.ValueSpec:
				for _, id := range n.Names {
					if vars[id.Name] {
						t.Errorf("%s: declares %s, the name of a family; families live in optimize/family", fset.Position(id.Pos()), id.Name)
					}
				}
			case *ast.TypeSpec:
				if vars[n.Name.Name] {
					t.Errorf("%s: declares %s, the name of a family", fset.Position(n.Name.Pos()), n.Name.Name)
				}
			case *ast.BasicLit:
				if n.Kind != token.STRING {
					return true
				}
				s, err := strconv.Unquote(n.Value)
				if err != nil {
					return true
				}
				for _, name := range names {
					if (s == name || strings.HasPrefix(s, name+"-") || strings.HasSuffix(s, "-"+name)) && allowed[rel] != name {
						t.Errorf("%s: string %q names family %s; take it from the registry", fset.Position(n.Pos()), s, name)
					}
				}
			}
			return true
		})
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if checked < 50 {
		t.Fatalf("only %d files checked under %s", checked, root)
	}
}

// registryVars returns the identifiers the registry lists (registry.go).
func registryVars(t *testing.T) map[string]bool {
	t.Helper()
	b, err := os.ReadFile("registry.go")
	if err != nil {
		t.Fatal(err)
	}
	f, err := parser.ParseFile(token.NewFileSet(), "registry.go", b, 0)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]bool{}
	ast.Inspect(f, func(n ast.Node) bool {
		if vs, ok := n.(*ast.ValueSpec); ok && len(vs.Names) == 1 && vs.Names[0].Name == "registry" {
			for _, e := range vs.Values[0].(*ast.CompositeLit).Elts {
				out[e.(*ast.Ident).Name] = true
			}
		}
		return true
	})
	if len(out) != len(All()) {
		t.Fatalf("registry.go lists %d identifiers, the registry %d families", len(out), len(All()))
	}
	return out
}

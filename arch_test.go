package main

import (
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDependencyDirection enforces the layering of ../shared/STYLE.md: physics
// imports only the standard library and gonum (its sub-packages may import physics
// packages); display knows nothing of the language or the protocol; the kernel knows
// nothing of the language; install stands alone. main wires them.
func TestDependencyDirection(t *testing.T) {
	allowed := map[string][]string{
		"physics": {"Nutate/physics", "gonum.org/v1/gonum"},
		// fpdf is the library under gonum/plot's PDF back end; display sets its
		// document defaults (fixed dates, sorted catalogs) for reproducible PDFs.
		"display": {"gonum.org/v1/plot", "gonum.org/v1/gonum", "golang.org/x/image", "codeberg.org/go-pdf/fpdf"},
		"dsl":     {"Nutate/physics", "Nutate/display", "Nutate/dsl", "gonum.org/v1/gonum"},
		"kernel":  {"Nutate/kernel", "github.com/go-zeromq/zmq4", "github.com/google/uuid"},
		"install": {"Nutate/install"},
	}
	checked := 0
	for top, ok := range allowed {
		err := filepath.WalkDir(top, func(path string, d os.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if d.IsDir() && d.Name() == "testdata" {
				return filepath.SkipDir
			}
			if d.IsDir() || !strings.HasSuffix(path, ".go") {
				return nil
			}
			f, err := parser.ParseFile(token.NewFileSet(), path, nil, parser.ImportsOnly)
			if err != nil {
				return err
			}
			checked++
			for _, imp := range f.Imports {
				p := strings.Trim(imp.Path.Value, `"`)
				if !strings.Contains(strings.SplitN(p, "/", 2)[0], ".") && !strings.HasPrefix(p, "nutate") {
					continue // standard library
				}
				if !hasAnyPrefix(p, ok) {
					t.Errorf("%s imports %s: %s/ may import only the standard library and %v", path, p, top, ok)
				}
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	if checked == 0 {
		t.Fatal("no Go files checked")
	}
}

func hasAnyPrefix(p string, prefixes []string) bool {
	for _, pre := range prefixes {
		if p == pre || strings.HasPrefix(p, pre+"/") {
			return true
		}
	}
	return false
}

package main

import (
	"go/ast"
	"go/parser"
	"go/token"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestDependencyDirection enforces the layering of ../shared/STYLE.md: physics
// imports only the standard library, gonum and golang.org/x/sys/cpu (its sub-packages may import physics
// packages); display knows nothing of the language or the protocol; the kernel knows
// nothing of the language; install stands alone; the notebook format
// (kernel/nbformat) needs only the standard library; presentation (dsl/present)
// needs only display. main wires them.
func TestDependencyDirection(t *testing.T) {
	allowed := map[string][]string{
		// x/sys/cpu tells physics which vector kernel the CPU runs.
		"physics": {"Nutate/physics", "gonum.org/v1/gonum", "golang.org/x/sys/cpu"},
		// fpdf is the library under gonum/plot's PDF back end; display sets its
		// document defaults (fixed dates, sorted catalogs) for reproducible PDFs.
		"display": {"gonum.org/v1/plot", "gonum.org/v1/gonum", "golang.org/x/image", "codeberg.org/go-pdf/fpdf"},
		"dsl":     {"Nutate/physics", "Nutate/display", "Nutate/dsl", "gonum.org/v1/gonum"},
		// Presentation: results → tables and figure bundles, from plain values;
		// the language (dsl) imports it, never the other way, and it knows no
		// physics.
		"dsl/present": {"Nutate/display"},
		"kernel":      {"Nutate/kernel", "github.com/go-zeromq/zmq4", "github.com/google/uuid"},
		"install":     {"Nutate/install"},
		// The notebook format: read, check, write and compare nbformat 4, for
		// `nutate run` in main; it knows no language, kernel or display.
		"kernel/nbformat": nil,
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
				if !strings.Contains(strings.SplitN(p, "/", 2)[0], ".") && !hasAnyPrefix(p, []string{"Nutate"}) {
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

// TestPresentTakesPlainValues holds the presentation package (dsl/present) to
// the direction results → tables and figures: it takes plain result values and
// imports only the standard library and display (TestDependencyDirection); no
// file of it names the study layer's types (the evaluator, the session state,
// pulses, axes, runs, settings), nor physics.
func TestPresentTakesPlainValues(t *testing.T) {
	files, err := filepath.Glob("dsl/present/*.go")
	if err != nil || len(files) == 0 {
		t.Fatalf("no files in dsl/present (%v)", err)
	}
	study := map[string]bool{"evaluator": true, "state": true, "Session": true, "pulseDef": true, "sweepAxis": true,
		"curveData": true, "sweepRun": true, "settings": true, "physics": true, "shape": true, "dsl": true}
	for _, file := range files {
		f, err := parser.ParseFile(token.NewFileSet(), file, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, imp := range f.Imports {
			p := strings.Trim(imp.Path.Value, `"`)
			if hasAnyPrefix(p, []string{"Nutate"}) && p != "Nutate/display" {
				t.Errorf("%s imports %s: presentation may import only the standard library and Nutate/display", file, p)
			}
		}
		ast.Inspect(f, func(n ast.Node) bool {
			if id, ok := n.(*ast.Ident); ok && study[id.Name] {
				t.Errorf("%s names %s: presentation takes plain result values, not the study layer's", file, id.Name)
			}
			return true
		})
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

// TestNoTrackedBuildArtefacts fails when git tracks an executable over 1 MB (a built
// binary committed by mistake; the .gitignore names /nutate and /Nutate). Skipped
// outside a git checkout.
func TestNoTrackedBuildArtefacts(t *testing.T) {
	out, err := exec.Command("git", "ls-files", "-z").Output()
	if err != nil {
		t.Skipf("not a git checkout: %v", err)
	}
	for _, name := range strings.Split(string(out), "\x00") {
		if name == "" {
			continue
		}
		fi, err := os.Stat(name)
		if err != nil || !fi.Mode().IsRegular() || fi.Size() <= 1<<20 {
			continue
		}
		if isExecutable(name, fi) {
			t.Errorf("%s is tracked and is an executable of %d bytes: remove it (git rm --cached) and ignore it", name, fi.Size())
		}
	}
}

// isExecutable reports a file with an exec bit or an ELF, Mach-O or PE header.
func isExecutable(name string, fi os.FileInfo) bool {
	if fi.Mode().Perm()&0o111 != 0 {
		return true
	}
	f, err := os.Open(name)
	if err != nil {
		return false
	}
	defer f.Close()
	head := make([]byte, 4)
	if _, err := io.ReadFull(f, head); err != nil {
		return false
	}
	switch {
	case string(head) == "\x7fELF", string(head[:2]) == "MZ":
		return true
	case head[0] == 0xcf && head[1] == 0xfa && head[2] == 0xed && head[3] == 0xfe, // Mach-O 64, little-endian
		head[0] == 0xce && head[1] == 0xfa && head[2] == 0xed && head[3] == 0xfe:
		return true
	}
	return false
}

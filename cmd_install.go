package main

import (
	"debug/elf"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"

	"Nutate/install"
)

// cmdInstall writes (or with --uninstall removes) the kernelspec "nutate".
//
//	--user        per-user kernels directory (the default): $JUPYTER_DATA_DIR,
//	              else ~/.local/share/jupyter (Linux), ~/Library/Jupyter (macOS),
//	              %APPDATA%\jupyter (Windows)
//	--prefix DIR  DIR/share/jupyter/kernels
//	--sys-prefix  the active Python environment without running Python:
//	              $VIRTUAL_ENV, else $CONDA_PREFIX, else the system-wide
//	              /usr/local/share/jupyter (Unix), %PROGRAMDATA%\jupyter (Windows)
func cmdInstall(args []string) int {
	fs := flag.NewFlagSet("install", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	user := fs.Bool("user", false, "")
	prefix := fs.String("prefix", "", "")
	sysPrefix := fs.Bool("sys-prefix", false, "")
	uninstall := fs.Bool("uninstall", false, "")
	var allow allowFlags
	fs.Var(&allow, "allow-files", "")
	const use = "usage: nutate install [--user | --prefix DIR | --sys-prefix] [--allow-files DIR]... [--uninstall]"
	if err := fs.Parse(args); err != nil {
		fmt.Fprintf(os.Stderr, "nutate install: %v\n%s\n", err, use)
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(os.Stderr, "nutate install: unexpected argument %q\n%s\n", fs.Arg(0), use)
		return 2
	}
	n := 0
	for _, set := range []bool{*user, *prefix != "", *sysPrefix} {
		if set {
			n++
		}
	}
	if n > 1 {
		fmt.Fprintf(os.Stderr, "nutate install: got %d of --user, --prefix, --sys-prefix, want at most one\n%s\n", n, use)
		return 2
	}
	var kernels string
	switch {
	case *prefix != "":
		abs, err := filepath.Abs(*prefix)
		if err != nil {
			fmt.Fprintf(os.Stderr, "nutate install: --prefix: %v\n", err)
			return 1
		}
		kernels = install.PrefixKernelsDir(abs)
	case *sysPrefix:
		d, err := install.SysPrefixKernelsDir()
		if err != nil {
			fmt.Fprintf(os.Stderr, "nutate install: %v\n", err)
			return 1
		}
		kernels = d
	default:
		d, err := install.UserKernelsDir()
		if err != nil {
			fmt.Fprintf(os.Stderr, "nutate install: %v\n", err)
			return 1
		}
		kernels = d
	}
	if *uninstall {
		dir, existed, err := install.Uninstall(kernels)
		switch {
		case err != nil:
			fmt.Fprintf(os.Stderr, "nutate install: %v\n", err)
			return 1
		case existed:
			fmt.Printf("removed kernelspec %s\n", dir)
		default:
			fmt.Printf("no kernelspec at %s; nothing to remove\n", dir)
		}
		return 0
	}
	bin, err := os.Executable()
	if err == nil {
		bin, err = filepath.EvalSymlinks(bin)
	}
	if err == nil {
		bin, err = filepath.Abs(bin)
	}
	if err != nil {
		fmt.Fprintf(os.Stderr, "nutate install: cannot locate this binary: %v\n", err)
		return 1
	}
	if goRunBinary(bin) {
		fmt.Fprintf(os.Stderr, "nutate install: %s is a temporary binary of `go run`, gone when it exits; build one to keep and install from it:\n  %s\n", bin, buildHint(runtime.GOOS))
		return 1
	}
	spec := install.NewSpec(bin, version)
	spec.Resources = map[string][]byte{"kernel.js": kernelJS()}
	// Folders the kernel may read and write files in beside the notebook's.
	for _, d := range allow {
		abs, err := filepath.Abs(d)
		if err == nil {
			_, err = os.Stat(abs)
		}
		if err != nil {
			fmt.Fprintf(os.Stderr, "nutate install: --allow-files %s: %v\n", d, err)
			return 2
		}
		spec.Argv = append(spec.Argv, "--allow-files", abs)
	}
	dir, err := install.Install(kernels, spec)
	if err != nil {
		fmt.Fprintf(os.Stderr, "nutate install: %v\n", err)
		return 1
	}
	fmt.Printf("installed kernelspec %q in %s (kernel: %s)\n", install.Name, dir, bin)
	if dynamicallyLinked(bin) {
		fmt.Fprintln(os.Stderr, "note: this binary is dynamically linked (built with cgo); `CGO_ENABLED=0 go build -o nutate .` gives the single static binary, which also starts faster")
	}
	return 0
}

// buildHint is the command that builds a binary to keep and installs it, in
// the shell of the system goos.
func buildHint(goos string) string {
	name := install.BinaryName(goos)
	if goos == "windows" {
		return "$env:CGO_ENABLED=0; go build -o " + name + " .; .\\" + name + " install"
	}
	return "CGO_ENABLED=0 go build -o " + name + " . && ./" + name + " install"
}

// goRunBinary tells whether bin is the temporary executable `go run` builds
// (under a directory go-build<digits> in the temporary directory), which is deleted
// when it exits.
func goRunBinary(bin string) bool {
	for d := filepath.Dir(bin); d != filepath.Dir(d); d = filepath.Dir(d) {
		if n, ok := strings.CutPrefix(filepath.Base(d), "go-build"); ok && n != "" && strings.Trim(n, "0123456789") == "" {
			return true
		}
	}
	return false
}

// dynamicallyLinked tells whether the ELF executable at path asks for a
// program interpreter (false for other formats or when it cannot be read).
func dynamicallyLinked(path string) bool {
	f, err := elf.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	for _, p := range f.Progs {
		if p.Type == elf.PT_INTERP {
			return true
		}
	}
	return false
}

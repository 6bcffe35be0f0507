package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"Nutate/install"
)

// cmdInstall writes (or with --uninstall removes) the kernelspec "nutate".
//
//	--user        per-user kernels directory (the default): $JUPYTER_DATA_DIR,
//	              else ~/.local/share/jupyter (Linux), ~/Library/Jupyter (macOS)
//	--prefix DIR  DIR/share/jupyter/kernels
//	--sys-prefix  the active Python environment without running Python:
//	              $VIRTUAL_ENV, else $CONDA_PREFIX, else /usr/local
func cmdInstall(args []string) int {
	fs := flag.NewFlagSet("install", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	user := fs.Bool("user", false, "")
	prefix := fs.String("prefix", "", "")
	sysPrefix := fs.Bool("sys-prefix", false, "")
	uninstall := fs.Bool("uninstall", false, "")
	const use = "usage: nutate install [--user | --prefix DIR | --sys-prefix] [--uninstall]"
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
		kernels = install.PrefixKernelsDir(install.SysPrefix())
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
	dir, err := install.Install(kernels, install.NewSpec(bin, version))
	if err != nil {
		fmt.Fprintf(os.Stderr, "nutate install: %v\n", err)
		return 1
	}
	fmt.Printf("installed kernelspec %q in %s (kernel: %s)\n", install.Name, dir, bin)
	return 0
}

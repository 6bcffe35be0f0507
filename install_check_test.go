package main

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

func TestGoRunBinary(t *testing.T) {
	for path, want := range map[string]bool{
		"/tmp/go-build3141592/b001/exe/nutate":        true,
		"/var/folders/x/T/go-build12/b001/exe/nutate": true,
		"/usr/local/bin/nutate":                       false,
		"/home/me/go-builds/nutate":                   false, // a folder the user named, not go's
		"/home/me/src/nutate/nutate":                  false,
	} {
		if got := goRunBinary(filepath.FromSlash(path)); got != want {
			t.Errorf("goRunBinary(%q) = %v, want %v", path, got, want)
		}
	}
}

// dynamicallyLinked reads ELF program headers: the system shell (a C program)
// has an interpreter; a file that is not ELF is reported as not dynamic.
func TestDynamicallyLinked(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("ELF executables: Linux")
	}
	if _, err := os.Stat("/bin/sh"); err != nil {
		t.Skip("no /bin/sh")
	}
	if !dynamicallyLinked("/bin/sh") {
		t.Error("/bin/sh was reported as static")
	}
	notELF := filepath.Join(t.TempDir(), "script")
	if err := os.WriteFile(notELF, []byte("#!/bin/sh\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	if dynamicallyLinked(notELF) {
		t.Error("a shell script was reported as a dynamically linked ELF")
	}
}

// The hint after an install from `go run` names the binary and the shell of
// each system.
func TestBuildHint(t *testing.T) {
	for goos, want := range map[string]string{
		"linux":   "CGO_ENABLED=0 go build -o nutate . && ./nutate install",
		"darwin":  "CGO_ENABLED=0 go build -o nutate . && ./nutate install",
		"windows": `$env:CGO_ENABLED=0; go build -o nutate.exe .; .\nutate.exe install`,
	} {
		if got := buildHint(goos); got != want {
			t.Errorf("buildHint(%q) = %q, want %q", goos, got, want)
		}
	}
}

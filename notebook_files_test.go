package main

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// An edit saved while an in-place run works (a notebook server's autosave) is
// not overwritten: the run goes beside the notebook, the error says where.
func TestInPlaceRunKeepsEditSavedMeanwhile(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "print 1 kHz in uT")
	edited := []byte(`{"cells": [], "metadata": {}, "nbformat": 4, "nbformat_minor": 5, "note": "saved during the run"}` + "\n")
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out, beforeWrite: func() {
		if err := os.WriteFile(f, edited, 0o644); err != nil {
			t.Fatal(err)
		}
	}}
	err := r.notebook(context.Background(), f, "")
	beside := filepath.Join(dir, "nb.nutate-run.ipynb")
	if err == nil || !strings.Contains(err.Error(), "changed on disk") || !strings.Contains(err.Error(), beside) {
		t.Fatalf("got %v, want an error saying the notebook changed and naming %s", err, beside)
	}
	if got, _ := os.ReadFile(f); !bytes.Equal(got, edited) {
		t.Errorf("the edit saved meanwhile was overwritten:\n%s", got)
	}
	run, err := os.ReadFile(beside)
	if err != nil || !bytes.Contains(run, []byte("23.48")) {
		t.Errorf("the run beside the notebook: %v\n%s", err, run)
	}
	// Unchanged, the same run writes in place.
	r.beforeWrite = nil
	f = writeNotebook(t, dir, "print 1 kHz in uT")
	if err := r.notebook(context.Background(), f, ""); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(f); !bytes.Contains(got, []byte("23.48")) {
		t.Errorf("in place: outputs missing:\n%s", got)
	}
}

// A full disk (a 64 KiB tmpfs, where the test may mount one as root) fails
// the write of an in-place run or --output and leaves the files as they were.
func TestRunDiskFull(t *testing.T) {
	if runtime.GOOS != "linux" || os.Geteuid() != 0 {
		t.Skip("needs root on Linux to mount a small tmpfs")
	}
	dir := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", dir).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs: %v %s", err, out)
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
	// Outputs of about 200 KiB: a profile figure and its data.
	f := writeNotebook(t, dir, "pulse p = sinc(duration = 2 ms, tbw = 4, flip = 90 deg)\nsweep p over offset -5 kHz to 5 kHz points 4001")
	orig, _ := os.ReadFile(f)
	prev := filepath.Join(dir, "prev.ipynb")
	os.WriteFile(prev, []byte("an earlier output\n"), 0o644)
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	for _, output := range []string{"", prev} {
		err := r.notebook(context.Background(), f, output)
		if err == nil || !strings.Contains(err.Error(), "no space left") {
			t.Fatalf("output %q: got %v, want a full-disk error", output, err)
		}
	}
	if got, _ := os.ReadFile(f); !bytes.Equal(got, orig) {
		t.Errorf("the notebook changed: got %d bytes, want its %d", len(got), len(orig))
	}
	if got, _ := os.ReadFile(prev); string(got) != "an earlier output\n" {
		t.Errorf("--output's earlier file changed: %q", got)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		var names []string
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Errorf("files left: %v, want nb.ipynb and prev.ipynb", names)
	}
}

// --allow-files and NUTATE_ALLOW_FILES (the person running Nutate) open a
// folder beside the notebook's; without them the notebook's own folder only.
func TestRunAllowFiles(t *testing.T) {
	base := t.TempDir()
	nbDir, shared := filepath.Join(base, "nb"), filepath.Join(base, "shared")
	os.MkdirAll(nbDir, 0o755)
	os.MkdirAll(shared, 0o755)
	os.WriteFile(filepath.Join(shared, "w.csv"), []byte("0,1e-6\n1e-5,1e-6\n"), 0o644)
	var out bytes.Buffer
	run := func(allow []string) error {
		writeNotebook(t, nbDir, `import w from "../shared/w.csv"`)
		r := runner{stdout: &out, stderr: &out, allow: allow}
		return r.notebook(context.Background(), filepath.Join(nbDir, "nb.ipynb"), "")
	}
	if err := run(nil); err == nil || !strings.Contains(err.Error(), "outside the notebook's folder") {
		t.Errorf("without --allow-files: got %v, want a refusal", err)
	}
	t.Setenv(allowEnv, shared+string(os.PathListSeparator)+nbDir)
	dirs, err := allowedFolders(allowFlags{filepath.Join(base, "nb", "..", "shared")})
	if err != nil || len(dirs) != 3 {
		t.Fatalf("allowedFolders: got %v, %v; want 3 folders", dirs, err)
	}
	if err := run(dirs); err != nil {
		t.Errorf("with the folder allowed: %v", err)
	}
	t.Setenv(allowEnv, filepath.Join(base, "missing"))
	if _, err := allowedFolders(nil); err == nil {
		t.Error("a missing folder in NUTATE_ALLOW_FILES: got nil error, want one")
	}
}

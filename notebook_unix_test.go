//go:build unix

package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// A notebook or script that is a named pipe is refused at once, not waited on.
func TestRunRefusesNamedPipe(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	for _, name := range []string{"nb.ipynb", "s.nut"} {
		p := filepath.Join(dir, name)
		if err := syscall.Mkfifo(p, 0o644); err != nil {
			t.Skip(err)
		}
		var err error
		if name == "nb.ipynb" {
			err = r.notebook(context.Background(), p, "")
		} else {
			err = r.script(context.Background(), p)
		}
		if err == nil || !strings.Contains(err.Error(), "named pipe") {
			t.Errorf("%s: got %v, want a refusal naming a named pipe", name, err)
		}
	}
}

// --output may name a device the person chose, such as /dev/null (a run for
// its errors alone); the notebook itself is left as it was.
func TestRunOutputDevNull(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "print 1 kHz in uT")
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	if err := r.notebook(context.Background(), f, "/dev/null"); err != nil {
		t.Fatalf("--output /dev/null: %v", err)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("files in the folder: %v, want the notebook alone", ents)
	}
}

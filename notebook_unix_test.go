//go:build unix

package main

import (
	"bytes"
	"context"
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

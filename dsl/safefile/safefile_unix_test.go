//go:build unix

package safefile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"
)

func TestWriteFileRefusesNonRegular(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no named pipes in the file system")
	}
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip(err)
	}
	err := WriteFile(fifo, func(w io.Writer) error { return nil })
	if err == nil || !strings.Contains(err.Error(), "named pipe") {
		t.Errorf("got %v, want a refusal naming a named pipe", err)
	}
	leftovers(t, dir, "fifo")
}

// Opening a named pipe neither hangs nor reads it; devices and /proc files are
// refused; a regular file opens.
func TestOpenRegularOnly(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("Unix special files")
	}
	dir := t.TempDir()
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { _, err := Open(fifo); done <- err }()
	select {
	case err := <-done:
		if !errors.Is(err, ErrNotRegular) {
			t.Errorf("fifo: got %v, want ErrNotRegular", err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("opening a named pipe hung")
	}
	for _, p := range []string{"/dev/zero", "/dev/null", "/proc/self/environ", "/sys/kernel/mm", dir} {
		if _, err := os.Stat(p); err != nil {
			continue
		}
		if _, err := Open(p); !errors.Is(err, ErrNotRegular) && !(p == "/proc/self/environ" && runtime.GOOS != "linux") {
			t.Errorf("%s: got %v, want ErrNotRegular", p, err)
		}
	}
	reg := filepath.Join(dir, "ok.csv")
	os.WriteFile(reg, []byte("0,1\n"), 0o644)
	f, err := Open(reg)
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
}

package safefile

import (
	"bytes"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
)

// fullDisk is a temporary file that accepts room bytes, then fails as a full
// disk does.
type fullDisk struct {
	*os.File
	room int
}

func (f *fullDisk) Write(p []byte) (int, error) {
	if len(p) > f.room {
		n, _ := f.File.Write(p[:f.room])
		f.room = 0
		return n, syscall.ENOSPC
	}
	f.room -= len(p)
	return f.File.Write(p)
}

func leftovers(t *testing.T, dir string, keep ...string) {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		found := false
		for _, k := range keep {
			found = found || e.Name() == k
		}
		if !found {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}

func TestWriteFileReplaces(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "nb.ipynb")
	if err := os.WriteFile(path, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(path, func(w io.Writer) error { _, err := io.WriteString(w, "new bytes"); return err }); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(path)
	if string(got) != "new bytes" {
		t.Errorf("got %q, want %q", got, "new bytes")
	}
	if info, _ := os.Stat(path); runtime.GOOS != "windows" && info.Mode().Perm() != 0o600 {
		t.Errorf("permissions: got %v, want the original -rw-------", info.Mode().Perm())
	}
	leftovers(t, dir, "nb.ipynb")
}

// A write error (the disk full after 100 bytes, injected through the temporary
// file's interface) leaves the original bytes and no temporary file.
func TestWriteFileDiskFullInjected(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "nb.ipynb")
	orig := []byte(`{"cells": [], "nbformat": 4}`)
	if err := os.WriteFile(path, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	fsys := osFS
	fsys.createTemp = func(dir, pattern string) (tempFile, error) {
		f, err := os.CreateTemp(dir, pattern)
		if err != nil {
			return nil, err
		}
		return &fullDisk{File: f, room: 100}, nil
	}
	big := bytes.Repeat([]byte("x"), 1<<20)
	err := writeFile(fsys, path, func(w io.Writer) error { _, err := w.Write(big); return err })
	if !errors.Is(err, syscall.ENOSPC) {
		t.Fatalf("got error %v, want one wrapping ENOSPC", err)
	}
	if !strings.Contains(err.Error(), "unchanged") {
		t.Errorf("error %q does not say the file is unchanged", err)
	}
	got, _ := os.ReadFile(path)
	if !bytes.Equal(got, orig) {
		t.Errorf("original changed: got %d bytes, want the %d original ones", len(got), len(orig))
	}
	leftovers(t, dir, "nb.ipynb")
}

// A failing rename (or a failing producer) also keeps the original.
func TestWriteFileFailingRenameAndProducer(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "p.csv")
	os.WriteFile(path, []byte("original"), 0o644)
	fsys := osFS
	fsys.rename = func(string, string) error { return syscall.EIO }
	if err := writeFile(fsys, path, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); !errors.Is(err, syscall.EIO) {
		t.Fatalf("rename failure: got %v, want EIO", err)
	}
	boom := errors.New("producer failed")
	if err := WriteFile(path, func(w io.Writer) error { io.WriteString(w, "half"); return boom }); !errors.Is(err, boom) {
		t.Fatalf("producer failure: got %v, want it passed on", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "original" {
		t.Errorf("got %q, want the original bytes", got)
	}
	leftovers(t, dir, "p.csv")
}

// A real full disk: a 64 KiB tmpfs, where the test runs as root and may mount
// one.
func TestWriteFileDiskFullTmpfs(t *testing.T) {
	if runtime.GOOS != "linux" || os.Geteuid() != 0 {
		t.Skip("needs root on Linux to mount a small tmpfs")
	}
	dir := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", dir).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs: %v %s", err, out)
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
	path := filepath.Join(dir, "nb.ipynb")
	orig := []byte(`{"cells": [], "nbformat": 4, "nbformat_minor": 5}` + "\n")
	if err := os.WriteFile(path, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	big := bytes.Repeat([]byte("y"), 256<<10)
	err := WriteFile(path, func(w io.Writer) error { _, err := w.Write(big); return err })
	if !errors.Is(err, syscall.ENOSPC) {
		t.Fatalf("got error %v, want one wrapping ENOSPC", err)
	}
	got, _ := os.ReadFile(path)
	if !bytes.Equal(got, orig) {
		t.Errorf("original changed: got %d bytes, want the %d original ones", len(got), len(orig))
	}
	leftovers(t, dir, "nb.ipynb")
}

// The limit is counted while reading: a file of limit bytes reads, one more
// fails.
func TestReadFileLimit(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "f")
	os.WriteFile(p, bytes.Repeat([]byte("a"), 100), 0o644)
	if b, err := ReadFile(p, 100); err != nil || len(b) != 100 {
		t.Errorf("limit 100: got %d bytes, %v; want 100, nil", len(b), err)
	}
	if _, err := ReadFile(p, 99); !errors.Is(err, ErrTooLarge) {
		t.Errorf("limit 99: got %v, want ErrTooLarge", err)
	}
	r := LimitReader(strings.NewReader(strings.Repeat("b", 50)), 10)
	b, err := io.ReadAll(r)
	if len(b) != 10 || !errors.Is(err, ErrTooLarge) {
		t.Errorf("LimitReader: got %d bytes, %v; want 10 and ErrTooLarge", len(b), err)
	}
	if n, err := r.Read(make([]byte, 8)); n != 0 || err == nil {
		t.Errorf("read after the limit: got %d, %v; want 0 and an error", n, err)
	}
}

func TestPolicy(t *testing.T) {
	base := t.TempDir()
	nb := filepath.Join(base, "proj", "nb")
	other := filepath.Join(base, "proj", "secrets")
	shared := filepath.Join(base, "shared")
	for _, d := range []string{filepath.Join(nb, "data"), other, shared} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	os.WriteFile(filepath.Join(other, ".env"), []byte("KEY=secret"), 0o600)
	os.WriteFile(filepath.Join(shared, "p.csv"), []byte("0,1"), 0o644)
	links := runtime.GOOS != "windows"
	if links {
		os.Symlink(filepath.Join(other, ".env"), filepath.Join(nb, "env.csv"))
		os.Symlink(other, filepath.Join(nb, "out"))
		os.Symlink(filepath.Join(nb, "data"), filepath.Join(nb, "inlink"))
	}
	p, err := NewPolicy(nb, nil)
	if err != nil {
		t.Fatal(err)
	}
	abs := func(parts ...string) string { return filepath.Join(append([]string{p.Root()}, parts...)...) }
	inside := []struct{ name, want string }{
		{"p.csv", abs("p.csv")},
		{"data/p.csv", abs("data", "p.csv")},
		{"./data/../p.csv", abs("p.csv")},
		{abs("data", "q.csv"), abs("data", "q.csv")},
		{"new/deeper/x.csv", abs("new", "deeper", "x.csv")},
	}
	if links {
		inside = append(inside, struct{ name, want string }{"inlink/p.csv", abs("data", "p.csv")})
	}
	if runtime.GOOS == "windows" {
		inside = append(inside, struct{ name, want string }{`data\p.csv`, abs("data", "p.csv")})
	}
	for _, c := range inside {
		got, err := p.Resolve(c.name)
		if err != nil || got != c.want {
			t.Errorf("Resolve(%q): got %q, %v; want %q", c.name, got, err, c.want)
		}
	}
	if got := p.Show(abs("data", "p.csv")); got != "data/p.csv" {
		t.Errorf("Show: got %q, want data/p.csv", got)
	}
	outside := []string{"../secrets/.env", "../../shared/p.csv", filepath.Join(other, ".env"), "..", "data/../../x.csv"}
	if links {
		outside = append(outside, "env.csv", "out/.env", "out/new.csv")
	}
	if runtime.GOOS != "windows" {
		outside = append(outside, "/etc/passwd", "/proc/self/environ", "/dev/zero")
	}
	for _, name := range outside {
		if got, err := p.Resolve(name); !errors.Is(err, ErrOutside) {
			t.Errorf("Resolve(%q): got %q, %v; want ErrOutside", name, got, err)
		}
	}
	// A folder allowed when starting Nutate.
	pa, err := NewPolicy(nb, []string{shared})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := pa.Resolve("../../shared/p.csv"); err != nil {
		t.Errorf("allowed folder: got %v, want nil", err)
	}
	if _, err := pa.Resolve("../secrets/.env"); !errors.Is(err, ErrOutside) {
		t.Errorf("allowed folder does not open its siblings: got %v, want ErrOutside", err)
	}
	if _, err := NewPolicy(nb, []string{filepath.Join(base, "missing")}); err == nil {
		t.Error("a missing allowed folder: got nil error, want one")
	}
}

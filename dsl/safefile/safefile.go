// Package safefile holds Nutate's file policy: atomic writes (a temporary file in
// the same folder, synced, then renamed over the target), reads of regular files
// only and bounded by a limited reader, and paths kept inside a root folder (the
// notebook's) or folders the person starting Nutate allowed. It imports only the
// standard library.
package safefile

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
)

// tempFile is what WriteFile needs of the temporary file; tests inject a
// failing one (a full disk) through it.
type tempFile interface {
	io.Writer
	Name() string
	Chmod(os.FileMode) error
	Sync() error
	Close() error
}

// fileSystem holds the operations WriteFile performs.
type fileSystem struct {
	createTemp func(dir, pattern string) (tempFile, error)
	rename     func(from, to string) error
	remove     func(name string) error
}

var osFS = fileSystem{
	createTemp: func(dir, pattern string) (tempFile, error) { return os.CreateTemp(dir, pattern) },
	rename:     os.Rename,
	remove:     os.Remove,
}

// WriteFile replaces path atomically with what write produces: the bytes go to a
// temporary file in the same folder, which is synced to disk and then renamed
// over path (and the folder synced). On any failure the original file keeps its
// bytes and the temporary file is removed. A symbolic link is followed (its
// target is replaced); an existing target must be a regular file, and keeps its
// permissions (a new file gets 0644).
func WriteFile(path string, write func(w io.Writer) error) error {
	return writeFile(osFS, path, write)
}

func writeFile(fsys fileSystem, path string, write func(w io.Writer) error) (err error) {
	if real, err := filepath.EvalSymlinks(path); err == nil {
		path = real
	}
	perm := os.FileMode(0o644)
	existed := false
	if info, err := os.Lstat(path); err == nil {
		existed = true
		if !info.Mode().IsRegular() {
			return fmt.Errorf("%s is %s, not a regular file; refusing to replace it", path, kind(info.Mode()))
		}
		perm = info.Mode().Perm()
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := fsys.createTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, bare(err))
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			fsys.remove(tmp)
			kept := ""
			if existed {
				kept = " (it is unchanged)"
			}
			err = fmt.Errorf("cannot write %s%s: %w", path, kept, bare(err))
		}
	}()
	bw := bufio.NewWriterSize(f, 64<<10)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = f.Chmod(perm); err != nil && runtime.GOOS != "windows" {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = fsys.rename(tmp, path); err != nil {
		return err
	}
	syncDir(dir)
	return nil
}

// bare drops the temporary file's name from an error: messages name the
// target alone.
func bare(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) && strings.Contains(filepath.Base(pe.Path), ".tmp-") {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}

// syncDir makes a rename in dir durable; best effort (Windows cannot open a
// folder for syncing).
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// kind names a file mode for messages.
func kind(m os.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&os.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case m&os.ModeSocket != 0:
		return "a socket"
	case m&os.ModeDevice != 0:
		return "a device"
	case m&os.ModeSymlink != 0:
		return "a symbolic link"
	case m&os.ModeIrregular != 0:
		return "an irregular file"
	}
	return "not a regular file"
}

// ErrNotRegular is wrapped by the error of Open for anything but a regular file.
var ErrNotRegular = errors.New("not a regular file")

// Open opens a regular file for reading. It opens without blocking (so a named
// pipe never hangs) and refuses, after checking the open file itself, folders,
// devices, pipes and sockets, and the kernel's interface files under /proc and
// /sys.
func Open(path string) (*os.File, error) {
	if kernelFile(path) {
		return nil, fmt.Errorf("%s is a kernel interface file, not a regular file: %w", path, ErrNotRegular)
	}
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, err
	}
	info, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, err
	}
	if !info.Mode().IsRegular() {
		f.Close()
		return nil, fmt.Errorf("%s is %s: %w", path, kind(info.Mode()), ErrNotRegular)
	}
	return f, nil
}

// kernelFile tells whether path lies under Linux's /proc or /sys, whose files
// call themselves regular and report a size of 0.
func kernelFile(path string) bool {
	if runtime.GOOS != "linux" && runtime.GOOS != "android" {
		return false
	}
	p := filepath.Clean(path)
	for _, root := range []string{"/proc", "/sys"} {
		if p == root || strings.HasPrefix(p, root+"/") {
			return true
		}
	}
	return false
}

// ErrTooLarge is wrapped by the error of ReadFile and LimitedReader for a file
// over its limit.
var ErrTooLarge = errors.New("file too large")

// ReadFile reads a regular file (see Open) of at most limit bytes; the limit is
// counted while reading, never taken from the size the file reports.
func ReadFile(path string, limit int64) ([]byte, error) {
	f, err := Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(LimitReader(f, limit))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return data, nil
}

// LimitReader reads from r until limit bytes, then fails with ErrTooLarge if r
// has more.
func LimitReader(r io.Reader, limit int64) io.Reader {
	return &limited{r: io.LimitedReader{R: r, N: limit + 1}, limit: limit}
}

type limited struct {
	r     io.LimitedReader
	limit int64
	read  int64
}

func (l *limited) Read(p []byte) (int, error) {
	if l.read > l.limit {
		return 0, fmt.Errorf("over the limit of %d bytes: %w", l.limit, ErrTooLarge)
	}
	n, err := l.r.Read(p)
	l.read += int64(n)
	if l.read > l.limit {
		n -= int(l.read - l.limit)
		return n, fmt.Errorf("over the limit of %d bytes: %w", l.limit, ErrTooLarge)
	}
	return n, err
}

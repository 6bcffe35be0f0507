package safefile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Policy keeps file paths inside a root folder (the notebook's, which is the
// kernel's working directory) and the folders the person starting Nutate
// allowed. Paths are resolved with their symbolic links, so a link leaving the
// folders is refused like a path that does.
type Policy struct {
	root    string   // resolved
	allowed []string // resolved
}

// NewPolicy returns the policy for root and the allowed folders (each must
// exist).
func NewPolicy(root string, allowed []string) (*Policy, error) {
	if root == "" {
		root = "."
	}
	r, err := resolveDir(root)
	if err != nil {
		return nil, err
	}
	p := &Policy{root: r}
	for _, a := range allowed {
		d, err := resolveDir(a)
		if err != nil {
			return nil, fmt.Errorf("allowed folder %s: %w", a, err)
		}
		p.allowed = append(p.allowed, d)
	}
	return p, nil
}

func resolveDir(dir string) (string, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return "", err
	}
	real, err := filepath.EvalSymlinks(abs)
	if err != nil {
		return "", err
	}
	info, err := os.Stat(real)
	if err != nil {
		return "", err
	}
	if !info.IsDir() {
		return "", fmt.Errorf("%s is not a folder", dir)
	}
	return real, nil
}

// Root is the resolved root folder.
func (p *Policy) Root() string { return p.root }

// ErrOutside is wrapped by Resolve's error for a path that leaves the folders.
var ErrOutside = errors.New("outside the allowed folders")

// Resolve turns a path written in a notebook (with / or the system's
// separator) into the absolute path of the file it names, its symbolic links
// resolved, and checks that it lies inside the root or an allowed folder. The
// file itself need not exist (an export creates it); its folder must.
func (p *Policy) Resolve(name string) (string, error) {
	if name == "" {
		return "", errors.New("empty file name")
	}
	n := filepath.FromSlash(name)
	var abs string
	switch {
	case filepath.IsAbs(n):
		abs = filepath.Clean(n)
	case filepath.VolumeName(n) != "":
		// "C:x" on Windows: relative to a drive's own working directory.
		return "", fmt.Errorf("%s names a drive without a folder: %w", name, ErrOutside)
	case os.PathSeparator == '\\' && (n[0] == '\\' || n[0] == '/'):
		// "\x.csv" on Windows: the current drive's root, not the notebook's folder.
		return "", fmt.Errorf("%s starts at a drive's root: %w", name, ErrOutside)
	default:
		if c := filepath.Clean(n); os.PathSeparator == '\\' && c != ".." && !strings.HasPrefix(c, `..\`) && !filepath.IsLocal(c) {
			// NUL, CON, COM1 ...: a device, not a file in the folder.
			return "", fmt.Errorf("%s names a Windows device, not a file", name)
		}
		abs = filepath.Join(p.root, n)
	}
	real, err := resolveExisting(abs)
	if err != nil {
		return "", err
	}
	if !p.inside(real) {
		return "", fmt.Errorf("%s resolves to %s: %w", name, real, ErrOutside)
	}
	return real, nil
}

// resolveExisting resolves the symbolic links of the longest existing prefix
// of an absolute, clean path and appends the rest.
func resolveExisting(abs string) (string, error) {
	real, err := filepath.EvalSymlinks(abs)
	if err == nil {
		return real, nil
	}
	if !errors.Is(err, os.ErrNotExist) {
		return "", err
	}
	if info, lerr := os.Lstat(abs); lerr == nil && info.Mode()&os.ModeSymlink != 0 {
		return "", fmt.Errorf("%s is a symbolic link to a missing file", abs)
	}
	dir, base := filepath.Split(abs)
	dir = filepath.Clean(dir)
	if dir == abs {
		return abs, nil
	}
	d, err := resolveExisting(dir)
	if err != nil {
		return "", err
	}
	return filepath.Join(d, base), nil
}

func (p *Policy) inside(path string) bool {
	if within(p.root, path) {
		return true
	}
	for _, a := range p.allowed {
		if within(a, path) {
			return true
		}
	}
	return false
}

// within tells whether path is dir or lies beneath it (both absolute, clean).
func within(dir, path string) bool {
	rel, err := filepath.Rel(dir, path)
	if err != nil || filepath.IsAbs(rel) {
		return false
	}
	return rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

// Show is how messages name a resolved path: relative to the root (with /)
// when inside it, else in full.
func (p *Policy) Show(path string) string {
	if within(p.root, path) {
		if rel, err := filepath.Rel(p.root, path); err == nil {
			return filepath.ToSlash(rel)
		}
	}
	return path
}

// Outside explains a refusal to the person reading the notebook.
func (p *Policy) Outside(name string) string {
	return fmt.Sprintf("%s is outside the notebook's folder: files are read and written only inside it, unless Nutate was started with --allow-files DIR (or NUTATE_ALLOW_FILES) naming a folder that holds it; a notebook cannot allow more itself", strconv.Quote(name))
}

//go:build windows

package safefile

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// Windows path forms in a notebook's file names: `\` and `/` both separate,
// case does not matter on NTFS, and the forms that leave the notebook's
// folder (another drive, a drive-relative path, `..\`) are refused.
func TestPolicyWindowsPaths(t *testing.T) {
	nb := filepath.Join(t.TempDir(), "proj", "nb")
	if err := os.MkdirAll(filepath.Join(nb, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(nb, "data", "p.csv"), []byte("0,1\r\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	p, err := NewPolicy(nb, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := filepath.Join(p.Root(), "data", "p.csv")
	for _, name := range []string{`data\p.csv`, `data/p.csv`, `.\data\p.csv`, `data\..\data\p.csv`, `DATA\P.CSV`} {
		if got, err := p.Resolve(name); err != nil || !sameFile(t, got, want) {
			t.Errorf("Resolve(%q): got %q, %v; want %q", name, got, err, want)
		}
	}
	vol := filepath.VolumeName(p.Root()) // e.g. C:
	other := "Q:"
	if vol == "Q:" {
		other = "R:"
	}
	for _, name := range []string{
		`..\secrets\.env`,
		`data\..\..\x.csv`,
		vol + `x.csv`,              // drive-relative: the drive's own working folder
		vol + `\Windows\win.ini`,   // absolute, outside
		other + `\elsewhere\x.csv`, // another drive
		`\x.csv`,                   // the current drive's root
		`/x.csv`,
	} {
		if got, err := p.Resolve(name); err == nil {
			t.Errorf("Resolve(%q): got %q, want an error", name, got)
		} else if name != other+`\elsewhere\x.csv` && !errors.Is(err, ErrOutside) {
			t.Errorf("Resolve(%q): got %v, want ErrOutside", name, err)
		}
	}
}

func sameFile(t *testing.T, a, b string) bool {
	t.Helper()
	fa, err1 := os.Stat(a)
	fb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(fa, fb)
}

// Device names are refused, not opened (NUL would read nothing, CON would
// wait for the console).
func TestPolicyWindowsDevices(t *testing.T) {
	p, err := NewPolicy(t.TempDir(), nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"NUL", "con", `data\COM1`} {
		if got, err := p.Resolve(name); err == nil {
			t.Errorf("Resolve(%q): got %q, want an error", name, got)
		}
	}
}

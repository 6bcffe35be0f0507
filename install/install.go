// Package install writes and removes the Jupyter kernelspec of the nutate
// kernel: a directory named "nutate" holding kernel.json, two logos
// (logo-32x32.png, logo-64x64.png) and the resources the caller gives (the
// front end's kernel.js) inside a Jupyter "kernels" directory.
//
// Entry points: UserKernelsDir, PrefixKernelsDir and SysPrefixKernelsDir find
// where to install; Install writes the spec (idempotently: running it again
// rewrites the same files); Uninstall removes it.
package install

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"slices"
)

// Name is the kernelspec's directory name, the kernel name clients select.
const Name = "nutate"

// Spec is the content of kernel.json.
type Spec struct {
	Argv          []string          `json:"argv"`
	DisplayName   string            `json:"display_name"`
	Language      string            `json:"language"`
	InterruptMode string            `json:"interrupt_mode,omitempty"`
	Env           map[string]string `json:"env,omitempty"`
	Metadata      map[string]any    `json:"metadata,omitempty"`
	// Resources are further files of the kernelspec directory, by name (the
	// front end's kernel.js); not part of kernel.json.
	Resources map[string][]byte `json:"-"`
}

// resourceNames are the Resources Install may write, which Uninstall removes.
var resourceNames = []string{"kernel.js"}

// NewSpec returns the kernelspec that launches binary (an absolute path) as
// `binary kernel --connection-file {connection_file}`. Interrupts travel as
// messages on the control channel.
func NewSpec(binary, version string) Spec {
	return Spec{
		Argv:          []string{binary, "kernel", "--connection-file", "{connection_file}"},
		DisplayName:   "Nutate (RF pulses)",
		Language:      "nutate",
		InterruptMode: "message",
		Metadata: map[string]any{
			"nutate_version": version,
			"debugger":       false,
		},
	}
}

// UserKernelsDir returns the per-user Jupyter kernels directory, as Jupyter
// (jupyter_core's jupyter_data_dir) finds it: $JUPYTER_DATA_DIR/kernels if
// set; otherwise on macOS ~/Library/Jupyter/kernels; on Windows
// %APPDATA%\jupyter\kernels (without APPDATA, the data folder of the config
// directory: %JUPYTER_CONFIG_DIR%\data\kernels, else ~\.jupyter\data\kernels);
// on Linux and other Unix $XDG_DATA_HOME/jupyter/kernels, by default
// ~/.local/share/jupyter/kernels.
func UserKernelsDir() (string, error) {
	home, err := os.UserHomeDir()
	return userKernelsDir(runtime.GOOS, os.Getenv, home, err)
}

// userKernelsDir is UserKernelsDir for the system goos (a GOOS value), with
// the environment read through getenv and the home directory given (homeErr
// when it is unknown), so that tests cover every system on any host.
func userKernelsDir(goos string, getenv func(string) string, home string, homeErr error) (string, error) {
	if d := getenv("JUPYTER_DATA_DIR"); d != "" {
		return filepath.Join(d, "kernels"), nil
	}
	needHome := func() error {
		if homeErr != nil {
			return fmt.Errorf("user kernels directory: %w", homeErr)
		}
		if home == "" {
			return fmt.Errorf("user kernels directory: got no home directory, want one (or set JUPYTER_DATA_DIR)")
		}
		return nil
	}
	switch goos {
	case "darwin", "ios":
		if err := needHome(); err != nil {
			return "", err
		}
		return filepath.Join(home, "Library", "Jupyter", "kernels"), nil
	case "windows":
		if a := getenv("APPDATA"); a != "" {
			return filepath.Join(a, "jupyter", "kernels"), nil
		}
		if c := getenv("JUPYTER_CONFIG_DIR"); c != "" {
			return filepath.Join(c, "data", "kernels"), nil
		}
		if err := needHome(); err != nil {
			return "", err
		}
		return filepath.Join(home, ".jupyter", "data", "kernels"), nil
	}
	if x := getenv("XDG_DATA_HOME"); x != "" {
		return filepath.Join(x, "jupyter", "kernels"), nil
	}
	if err := needHome(); err != nil {
		return "", err
	}
	return filepath.Join(home, ".local", "share", "jupyter", "kernels"), nil
}

// PrefixKernelsDir returns prefix/share/jupyter/kernels, where Jupyter looks
// for the kernels of an installation prefix.
func PrefixKernelsDir(prefix string) string {
	return filepath.Join(prefix, "share", "jupyter", "kernels")
}

// SysPrefixKernelsDir returns the kernels directory of --sys-prefix: that of
// the active Python environment ($VIRTUAL_ENV, else $CONDA_PREFIX; Jupyter
// reads sys.prefix/share/jupyter/kernels), else the system-wide one Jupyter
// searches: /usr/local/share/jupyter/kernels on Unix and macOS,
// %PROGRAMDATA%\jupyter\kernels on Windows.
func SysPrefixKernelsDir() (string, error) {
	return sysPrefixKernelsDir(runtime.GOOS, os.Getenv)
}

// sysPrefixKernelsDir is SysPrefixKernelsDir for the system goos.
func sysPrefixKernelsDir(goos string, getenv func(string) string) (string, error) {
	for _, v := range []string{"VIRTUAL_ENV", "CONDA_PREFIX"} {
		if p := getenv(v); p != "" {
			return PrefixKernelsDir(p), nil
		}
	}
	if goos != "windows" {
		return PrefixKernelsDir("/usr/local"), nil
	}
	if p := getenv("PROGRAMDATA"); p != "" {
		return filepath.Join(p, "jupyter", "kernels"), nil
	}
	return "", fmt.Errorf("--sys-prefix: got no VIRTUAL_ENV, CONDA_PREFIX or PROGRAMDATA, want one of them (or use --prefix DIR)")
}

// BinaryName is the file name the README's build gives the binary on the
// system goos: nutate.exe on Windows (which runs only files so named), else
// nutate. The kernelspec is the same on every system: its interrupt_mode
// "message" (interrupt_request on the control channel) is what Windows needs,
// having no SIGINT for Jupyter to send, and works on Unix as well.
func BinaryName(goos string) string {
	if goos == "windows" {
		return "nutate.exe"
	}
	return "nutate"
}

// Install writes the kernelspec into kernelsDir/nutate, creating directories
// as needed and replacing any earlier files, and returns the spec directory.
// Each file is written to a temporary name and renamed, so a reader never sees
// half a file.
func Install(kernelsDir string, spec Spec) (string, error) {
	if len(spec.Argv) == 0 || !filepath.IsAbs(spec.Argv[0]) {
		return "", fmt.Errorf("install: argv[0]: got %q, want an absolute path to the binary", first(spec.Argv))
	}
	for name := range spec.Resources {
		if !slices.Contains(resourceNames, name) {
			return "", fmt.Errorf("install: resource %q: got an unknown name, want one of %v", name, resourceNames)
		}
	}
	dir := filepath.Join(kernelsDir, Name)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", fmt.Errorf("install: %w", err)
	}
	js, err := json.MarshalIndent(spec, "", "  ")
	if err != nil {
		return "", fmt.Errorf("install: kernel.json: %w", err)
	}
	files := []struct {
		name string
		data []byte
	}{
		{"kernel.json", append(js, '\n')},
		{"logo-32x32.png", LogoPNG(32)},
		{"logo-64x64.png", LogoPNG(64)},
	}
	for _, name := range resourceNames {
		if data, ok := spec.Resources[name]; ok {
			files = append(files, struct {
				name string
				data []byte
			}{name, data})
		}
	}
	for _, f := range files {
		if err := writeAtomic(filepath.Join(dir, f.name), f.data); err != nil {
			return "", fmt.Errorf("install: %w", err)
		}
	}
	return dir, nil
}

// Uninstall removes kernelsDir/nutate and reports the directory and whether
// it existed. Only the files Install writes are removed, then the directory if
// it is empty, so nothing a user put there is lost.
func Uninstall(kernelsDir string) (string, bool, error) {
	dir := filepath.Join(kernelsDir, Name)
	if _, err := os.Stat(dir); errors.Is(err, os.ErrNotExist) {
		return dir, false, nil
	}
	for _, name := range append([]string{"kernel.json", "logo-32x32.png", "logo-64x64.png"}, resourceNames...) {
		if err := os.Remove(filepath.Join(dir, name)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return dir, true, fmt.Errorf("uninstall: %w", err)
		}
	}
	if err := os.Remove(dir); err != nil {
		return dir, true, fmt.Errorf("uninstall: %s still holds other files: %w", dir, err)
	}
	return dir, true, nil
}

func writeAtomic(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return os.Rename(tmp.Name(), path)
}

func first(s []string) string {
	if len(s) == 0 {
		return ""
	}
	return s[0]
}

package install

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// Where Jupyter looks for kernelspecs on each system (jupyter_core's
// jupyter_data_dir and SYSTEM_JUPYTER_PATH), checked for every system on any
// host: the table is fed the GOOS value. Paths are built with filepath.Join,
// so on the system itself they carry its separator.
func TestKernelsDirsPerOS(t *testing.T) {
	env := func(kv ...string) func(string) string {
		return func(k string) string {
			for i := 0; i+1 < len(kv); i += 2 {
				if kv[i] == k {
					return kv[i+1]
				}
			}
			return ""
		}
	}
	const (
		unixHome = "/home/ann"
		macHome  = "/Users/ann"
		winHome  = `C:\Users\ann`
		appData  = `C:\Users\ann\AppData\Roaming`
	)
	noHome := errors.New("$HOME is not defined")
	for _, c := range []struct {
		name, goos string
		getenv     func(string) string
		home       string
		homeErr    error
		want       string // "" with wantErr
		wantErr    string
	}{
		{"linux default", "linux", env(), unixHome, nil, filepath.Join(unixHome, ".local", "share", "jupyter", "kernels"), ""},
		{"linux XDG", "linux", env("XDG_DATA_HOME", "/xdg"), unixHome, nil, filepath.Join("/xdg", "jupyter", "kernels"), ""},
		{"linux JUPYTER_DATA_DIR first", "linux", env("JUPYTER_DATA_DIR", "/jd", "XDG_DATA_HOME", "/xdg"), unixHome, nil, filepath.Join("/jd", "kernels"), ""},
		{"linux no home", "linux", env(), "", noHome, "", "user kernels directory: $HOME is not defined"},
		{"linux no home, XDG", "linux", env("XDG_DATA_HOME", "/xdg"), "", noHome, filepath.Join("/xdg", "jupyter", "kernels"), ""},
		{"freebsd as linux", "freebsd", env(), unixHome, nil, filepath.Join(unixHome, ".local", "share", "jupyter", "kernels"), ""},
		{"macOS", "darwin", env(), macHome, nil, filepath.Join(macHome, "Library", "Jupyter", "kernels"), ""},
		{"macOS ignores XDG", "darwin", env("XDG_DATA_HOME", "/xdg"), macHome, nil, filepath.Join(macHome, "Library", "Jupyter", "kernels"), ""},
		{"macOS JUPYTER_DATA_DIR", "darwin", env("JUPYTER_DATA_DIR", "/jd"), macHome, nil, filepath.Join("/jd", "kernels"), ""},
		{"macOS no home", "darwin", env(), "", noHome, "", "user kernels directory: $HOME is not defined"},
		{"windows APPDATA", "windows", env("APPDATA", appData), winHome, nil, filepath.Join(appData, "jupyter", "kernels"), ""},
		{"windows ignores XDG", "windows", env("APPDATA", appData, "XDG_DATA_HOME", "/xdg"), winHome, nil, filepath.Join(appData, "jupyter", "kernels"), ""},
		{"windows JUPYTER_DATA_DIR", "windows", env("JUPYTER_DATA_DIR", `D:\jd`, "APPDATA", appData), winHome, nil, filepath.Join(`D:\jd`, "kernels"), ""},
		{"windows no APPDATA", "windows", env("JUPYTER_CONFIG_DIR", `D:\cfg`), winHome, nil, filepath.Join(`D:\cfg`, "data", "kernels"), ""},
		{"windows no APPDATA, no config dir", "windows", env(), winHome, nil, filepath.Join(winHome, ".jupyter", "data", "kernels"), ""},
		{"windows nothing", "windows", env(), "", noHome, "", "user kernels directory: $HOME is not defined"},
	} {
		got, err := userKernelsDir(c.goos, c.getenv, c.home, c.homeErr)
		switch {
		case c.wantErr != "":
			if err == nil || !strings.Contains(err.Error(), c.wantErr) {
				t.Errorf("%s: got %q, %v, want error %q", c.name, got, err, c.wantErr)
			}
		case err != nil || got != c.want:
			t.Errorf("%s: got %q, %v, want %q", c.name, got, err, c.want)
		}
	}
}

func TestSysPrefixKernelsDirPerOS(t *testing.T) {
	env := func(m map[string]string) func(string) string { return func(k string) string { return m[k] } }
	for _, c := range []struct {
		goos    string
		env     map[string]string
		want    string
		wantErr bool
	}{
		{"linux", map[string]string{"VIRTUAL_ENV": "/venv", "CONDA_PREFIX": "/conda"}, filepath.Join("/venv", "share", "jupyter", "kernels"), false},
		{"linux", map[string]string{"CONDA_PREFIX": "/conda"}, filepath.Join("/conda", "share", "jupyter", "kernels"), false},
		{"linux", nil, filepath.Join("/usr/local", "share", "jupyter", "kernels"), false},
		{"darwin", nil, filepath.Join("/usr/local", "share", "jupyter", "kernels"), false},
		{"darwin", map[string]string{"CONDA_PREFIX": "/opt/miniconda3"}, filepath.Join("/opt/miniconda3", "share", "jupyter", "kernels"), false},
		{"windows", map[string]string{"VIRTUAL_ENV": `C:\venv`, "PROGRAMDATA": `C:\ProgramData`}, filepath.Join(`C:\venv`, "share", "jupyter", "kernels"), false},
		{"windows", map[string]string{"PROGRAMDATA": `C:\ProgramData`}, filepath.Join(`C:\ProgramData`, "jupyter", "kernels"), false},
		{"windows", nil, "", true},
	} {
		got, err := sysPrefixKernelsDir(c.goos, env(c.env))
		if (err != nil) != c.wantErr || got != c.want {
			t.Errorf("%s %v: got %q, %v, want %q (error: %v)", c.goos, c.env, got, err, c.want, c.wantErr)
		}
	}
}

// The binary's name on each system. The kernelspec is the same on every
// system: interrupts as messages, which Windows needs (Jupyter has no SIGINT
// to send there) and Unix accepts.
func TestBinaryNamePerOS(t *testing.T) {
	for goos, want := range map[string]string{
		"linux": "nutate", "darwin": "nutate", "freebsd": "nutate", "windows": "nutate.exe",
	} {
		if got := BinaryName(goos); got != want {
			t.Errorf("BinaryName(%q) = %q, want %q", goos, got, want)
		}
	}
	if m := NewSpec(filepath.Join(string(filepath.Separator)+"opt", "nutate"), "1").InterruptMode; m != "message" {
		t.Errorf("interrupt_mode %q, want message", m)
	}
}

package install

import (
	"bytes"
	"encoding/json"
	"image/png"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

func TestInstallUninstall(t *testing.T) {
	kernels := PrefixKernelsDir(t.TempDir())
	spec := NewSpec("/opt/nutate/bin/nutate", "9.9")
	dir, err := Install(kernels, spec)
	if err != nil {
		t.Fatal(err)
	}
	if want := filepath.Join(kernels, "nutate"); dir != want {
		t.Fatalf("dir: got %s, want %s", dir, want)
	}
	first := readAll(t, dir)
	// kernel.json as Jupyter reads it (jupyter-client documentation, "Kernel specs").
	var got map[string]any
	if err := json.Unmarshal(first["kernel.json"], &got); err != nil {
		t.Fatal(err)
	}
	wantArgv := []any{"/opt/nutate/bin/nutate", "kernel", "--connection-file", "{connection_file}"}
	if !reflect.DeepEqual(got["argv"], wantArgv) || got["display_name"] != "Nutate (RF pulses)" ||
		got["language"] != "nutate" || got["interrupt_mode"] != "message" {
		t.Fatalf("kernel.json: got %v", got)
	}
	for name, size := range map[string]int{"logo-32x32.png": 32, "logo-64x64.png": 64} {
		img, err := png.Decode(bytes.NewReader(first[name]))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if b := img.Bounds(); b.Dx() != size || b.Dy() != size {
			t.Fatalf("%s: got %v, want %dx%d", name, b, size, size)
		}
	}
	// Idempotent: a second install leaves the same files and nothing else.
	if _, err := Install(kernels, spec); err != nil {
		t.Fatal(err)
	}
	if second := readAll(t, dir); !reflect.DeepEqual(first, second) {
		t.Fatalf("second install changed the files: %v", keys(second))
	}
	if _, existed, err := Uninstall(kernels); err != nil || !existed {
		t.Fatalf("Uninstall: existed=%v err=%v", existed, err)
	}
	if _, err := os.Stat(dir); !os.IsNotExist(err) {
		t.Fatalf("spec directory still there: %v", err)
	}
	if _, existed, err := Uninstall(kernels); err != nil || existed {
		t.Fatalf("second Uninstall: existed=%v err=%v, want false, nil", existed, err)
	}
}

func TestUninstallKeepsForeignFiles(t *testing.T) {
	kernels := t.TempDir()
	dir, err := Install(kernels, NewSpec("/x/nutate", "1"))
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("mine"), 0o644)
	if _, _, err := Uninstall(kernels); err == nil {
		t.Fatalf("Uninstall with a foreign file: got nil error, want one")
	}
	if _, err := os.Stat(filepath.Join(dir, "notes.txt")); err != nil {
		t.Fatalf("foreign file removed: %v", err)
	}
}

func TestInstallNeedsAbsoluteBinary(t *testing.T) {
	if _, err := Install(t.TempDir(), NewSpec("nutate", "1")); err == nil {
		t.Fatal("relative argv[0]: got nil error, want one")
	}
}

func TestKernelsDirs(t *testing.T) {
	t.Setenv("JUPYTER_DATA_DIR", "/data/jup")
	if d, _ := UserKernelsDir(); d != filepath.Join("/data/jup", "kernels") {
		t.Fatalf("UserKernelsDir with JUPYTER_DATA_DIR: got %s", d)
	}
	if d := PrefixKernelsDir("/p"); d != filepath.Join("/p", "share", "jupyter", "kernels") {
		t.Fatalf("PrefixKernelsDir: got %s", d)
	}
}

func TestLogoDeterministicAndDrawn(t *testing.T) {
	if !bytes.Equal(LogoPNG(32), LogoPNG(32)) {
		t.Fatal("logo bytes differ between runs")
	}
	img := Logo(64)
	// Corners are transparent (round badge), the centre is painted.
	if img.NRGBAAt(0, 0).A != 0 || img.NRGBAAt(32, 32).A != 255 {
		t.Fatalf("logo alpha: corner %d, centre %d", img.NRGBAAt(0, 0).A, img.NRGBAAt(32, 32).A)
	}
}

func readAll(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, e := range es {
		b, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		out[e.Name()] = b
	}
	return out
}

func keys(m map[string][]byte) []string {
	var k []string
	for n := range m {
		k = append(k, n)
	}
	return k
}

// TestInstallResources: a spec's resources (kernel.js) are written beside
// kernel.json, not into it, and removed by Uninstall; an unknown name is refused.
func TestInstallResources(t *testing.T) {
	kernels := PrefixKernelsDir(t.TempDir())
	spec := NewSpec("/opt/nutate/bin/nutate", "9.9")
	js := []byte("define([], function () { return {onload: function () {}}; });\n")
	spec.Resources = map[string][]byte{"kernel.js": js}
	dir, err := Install(kernels, spec)
	if err != nil {
		t.Fatal(err)
	}
	if got, err := os.ReadFile(filepath.Join(dir, "kernel.js")); err != nil || !bytes.Equal(got, js) {
		t.Fatalf("kernel.js: got %q, %v; want the resource", got, err)
	}
	raw, err := os.ReadFile(filepath.Join(dir, "kernel.json"))
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(raw, []byte("define(")) || bytes.Contains(raw, []byte("Resources")) {
		t.Errorf("kernel.json carries the resources: %s", raw)
	}
	if _, existed, err := Uninstall(kernels); err != nil || !existed {
		t.Fatalf("Uninstall: existed %v, %v", existed, err)
	}
	if _, err := os.Stat(dir); !os.IsNotExist(err) {
		t.Errorf("after Uninstall: %s still there (%v)", dir, err)
	}
	spec.Resources = map[string][]byte{"kernel.css": nil}
	if _, err := Install(kernels, spec); err == nil {
		t.Error("an unknown resource name was accepted")
	}
}

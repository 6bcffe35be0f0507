package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// testInstallAllowFiles: `nutate install --allow-files DIR` puts the folder,
// made absolute, in the kernelspec's argv, which the kernel reads; a folder
// that does not exist is refused by both.
func testInstallAllowFiles(t *testing.T, bin string) {
	dir := t.TempDir()
	shared := filepath.Join(dir, "shared")
	os.MkdirAll(shared, 0o755)
	prefix := filepath.Join(dir, "prefix")
	cmd := exec.Command(bin, "install", "--prefix", prefix, "--allow-files", shared)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("install --allow-files: %v\n%s", err, out)
	}
	kj, err := os.ReadFile(filepath.Join(prefix, "share", "jupyter", "kernels", "nutate", "kernel.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ks struct {
		Argv []string `json:"argv"`
	}
	if err := json.Unmarshal(kj, &ks); err != nil {
		t.Fatal(err)
	}
	if n := len(ks.Argv); n != 6 || ks.Argv[n-2] != "--allow-files" || ks.Argv[n-1] != shared {
		t.Errorf("argv: got %q, want it to end with --allow-files %s", ks.Argv, shared)
	}
	missing := filepath.Join(dir, "missing")
	for _, args := range [][]string{
		{"install", "--prefix", prefix, "--allow-files", missing},
		{"kernel", "--connection-file", filepath.Join(dir, "conn.json"), "--allow-files", missing},
		{"run", "--allow-files", missing, filepath.Join(dir, "x.nut")},
	} {
		out, err := exec.Command(bin, args...).CombinedOutput()
		if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 2 || !strings.Contains(string(out), missing) {
			t.Errorf("nutate %s with a missing folder: got %v\n%s\nwant exit status 2 naming %s", args[0], err, out, missing)
		}
	}
}

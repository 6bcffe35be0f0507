package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The budgets are set by whoever starts Nutate: flags of run and kernel, or
// the environment; a bad value is a usage error.
func TestRunBudgetFlags(t *testing.T) {
	dir := t.TempDir()
	src := "pulse p = rect(duration = 10 ms, flip = 90 deg, samples = 1000000)\n"
	for i := 1; i <= 4; i++ {
		src += "pulse p" + string(rune('0'+i)) + " = p(phase = " + string(rune('0'+i)) + "0 deg)\n"
	}
	nb := writeNotebook(t, dir, src)
	out := filepath.Join(dir, "out.ipynb")
	if code := cmdRun([]string{"--memory", "64MiB", "--output", out, nb}); code != 1 {
		t.Fatalf("--memory 64MiB: exit %d, want 1", code)
	}
	raw, err := os.ReadFile(out)
	if err != nil || !strings.Contains(string(raw), "session memory budget of 64 MiB reached: pulse p3 needs") {
		t.Fatalf("--memory 64MiB: the output notebook does not show the budget error (%v)", err)
	}
	if code := cmdRun([]string{"--output", out, nb}); code != 0 {
		t.Fatalf("default budget: exit %d, want 0", code)
	}
	t.Setenv("NUTATE_MEMORY", "64MiB")
	if code := cmdRun([]string{"--output", out, nb}); code != 1 {
		t.Fatalf("NUTATE_MEMORY=64MiB: exit %d, want 1", code)
	}
	if code := cmdRun([]string{"--memory", "1GiB", "--output", out, nb}); code != 0 {
		t.Fatalf("--memory over NUTATE_MEMORY: exit %d, want 0", code)
	}
	t.Setenv("NUTATE_MEMORY", "plenty")
	if code := cmdRun([]string{"--output", out, nb}); code != 2 {
		t.Fatalf("NUTATE_MEMORY=plenty: exit %d, want 2", code)
	}
	t.Setenv("NUTATE_MEMORY", "")

	d := writeNotebook(t, dir, "pulse h = hsec(duration = 10 ms, peak = 20 uT, bandwidth = 4 kHz, samples = 10000, role = invert)\ndescribe h")
	if code := cmdRun([]string{"--work", "1e6", "--output", out, d}); code != 1 {
		t.Fatalf("--work 1e6: exit %d, want 1", code)
	}
	if raw, _ := os.ReadFile(out); !strings.Contains(string(raw), "over the session's work budget of 1e+06") {
		t.Fatal("--work 1e6: the output notebook does not show the work budget error")
	}
	for _, args := range [][]string{{"--memory", "2 parsecs", nb}, {"--work", "lots", nb}} {
		if code := cmdRun(args); code != 2 {
			t.Errorf("run %v: exit %d, want 2", args, code)
		}
	}
	for _, args := range [][]string{{"--connection-file", "x.json", "--memory", "1MiB"}, {"--connection-file", "x.json", "--work", "0"}} {
		if code := cmdKernel(args); code != 2 {
			t.Errorf("kernel %v: exit %d, want 2", args, code)
		}
	}
}

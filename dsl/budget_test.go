package dsl

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"Nutate/display"
)

func TestParseMemory(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
	}{
		{"2GiB", 2 << 30}, {"2G", 2 << 30}, {"512MiB", 512 << 20}, {"512 MB", 512 << 20},
		{"1.5GiB", 3 << 29}, {"67108864", 64 << 20}, {"1TiB", 1 << 40},
	} {
		got, err := ParseMemory(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseMemory(%q) = %d, %v; want %d", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "2", "1MiB", "2 parsecs", "-1GiB", "GiB", "1e400GiB"} {
		if n, err := ParseMemory(bad); err == nil {
			t.Errorf("ParseMemory(%q) = %d, want an error", bad, n)
		}
	}
	env := func(v string) func(string) string { return func(string) string { return v } }
	if n, err := MemoryBudgetFromEnv(env("")); err != nil || n != DefaultMemoryBudget {
		t.Errorf("unset: got %d, %v; want the default", n, err)
	}
	if n, err := MemoryBudgetFromEnv(env("3GiB")); err != nil || n != 3<<30 {
		t.Errorf("3GiB: got %d, %v", n, err)
	}
	if _, err := MemoryBudgetFromEnv(env("lots")); err == nil || !strings.Contains(err.Error(), MemoryBudgetEnv) {
		t.Errorf("lots: got %v, want an error naming %s", err, MemoryBudgetEnv)
	}
}

// TestMemoryCountsSharedSamplesOnce: a copy that changes nothing shares every
// array of its original; a copy with another phase shares the dwell times and
// holds its own amplitudes (16 bytes a sample).
func TestMemoryCountsSharedSamplesOnce(t *testing.T) {
	s := NewSession(t.TempDir())
	held := func() int64 { return stateMemory(s.state()).bytes }
	run := func(src string) {
		t.Helper()
		if err := s.Exec(context.Background(), src, Sink{}); err != nil {
			t.Fatal(err)
		}
	}
	const n = 100_000
	run(fmt.Sprintf("pulse p = rect(duration = 10 ms, flip = 90 deg, samples = %d)", n))
	if got, want := held(), int64(24*n); got != want {
		t.Fatalf("one pulse: %d bytes, want %d (16 a sample for B1, 8 for the dwell)", got, want)
	}
	run("pulse q = p()\npulse r = q()")
	if got, want := held(), int64(24*n); got != want {
		t.Fatalf("two unchanged copies: %d bytes, want %d (all shared)", got, want)
	}
	run("pulse u = p(phase = 90 deg)")
	if got, want := held(), int64(40*n); got != want {
		t.Fatalf("a copy with another phase: %d bytes, want %d (its own B1)", got, want)
	}
}

func TestMemoryBudgetRefuses(t *testing.T) {
	s := NewSession(t.TempDir())
	s.SetMemoryBudget(64 << 20)
	ctx := context.Background()
	if err := s.Exec(ctx, "pulse p = rect(duration = 10 ms, flip = 90 deg, samples = 1000000)", Sink{}); err != nil {
		t.Fatal(err)
	}
	var err error
	i := 1
	for ; i <= 10 && err == nil; i++ {
		err = s.Exec(ctx, fmt.Sprintf("pulse p%d = p(phase = %d deg)", i, i), Sink{})
	}
	// 24 MB for p, 16 MB for each copy: p1, p2 fit in 64 MiB, p3 does not.
	want := "session memory budget of 64 MiB reached: pulse p3 needs 15.3 MiB and the session holds 53.4 MiB (3 pulses)"
	if err == nil || i-1 != 3 || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "--memory") {
		t.Fatalf("copy %d: got %v, want %q naming how to raise it", i-1, err, want)
	}
	if _, ok := s.state().names["p3"]; ok {
		t.Fatal("the refused pulse was kept")
	}
	// A sweep's arrays count too: a 1000 × 1000 map needs more than is left.
	err = s.Exec(ctx, "pulse h = rect(duration = 1 ms, flip = 90 deg)\nsweep h over offset -1 kHz to 1 kHz points 1000, b1 0.5 to 1.5 points 1000", Sink{})
	if err == nil || !strings.Contains(err.Error(), "session memory budget of 64 MiB reached: the sweep needs") {
		t.Fatalf("map: got %v, want the budget error", err)
	}
	// Freed by redefining: p1 again with its own phase fits.
	if err := s.Exec(ctx, "reset\npulse p = rect(duration = 10 ms, flip = 90 deg, samples = 1000000)\npulse p1 = p(phase = 1 deg)", Sink{}); err != nil {
		t.Fatalf("after reset: %v", err)
	}
}

func lastLines(s string, n int) string {
	lines := strings.Split(strings.TrimSpace(s), "\n")
	return strings.Join(lines[max(0, len(lines)-n):], "\n")
}

// TestWorkBudgetCoversMeasurements: describe and report are refused before
// they start when their measurements pass the work budget, with the steps, a
// time estimate and how to raise the budget.
func TestWorkBudgetCoversMeasurements(t *testing.T) {
	s := NewSession(t.TempDir())
	ctx := context.Background()
	if err := s.Exec(ctx, "pulse h = hsec(duration = 10 ms, peak = 20 uT, bandwidth = 4 kHz, samples = 100000, role = invert)", Sink{}); err != nil {
		t.Fatal(err)
	}
	s.SetWorkBudget(1e7)
	for _, stmt := range []string{"describe h", "report h"} {
		progress := 0
		err := s.Exec(ctx, stmt, Sink{Progress: func(string, int, int) { progress++ }})
		want := stmt + " needs 2.81e+08 isochromat-steps (about "
		if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "over the session's work budget of 1e+07") || !strings.Contains(err.Error(), "--work 1e11") {
			t.Errorf("%s: got %v, want %q with the budget and how to raise it", stmt, err, want)
		}
		if progress != 0 {
			t.Errorf("%s: %d progress reports, want the refusal before any work", stmt, progress)
		}
	}
	if err := s.Exec(ctx, "sweep h over offset -1 kHz to 1 kHz points 200", Sink{}); err == nil || !strings.Contains(err.Error(), "sweep needs more than 2e+07 isochromat-steps") {
		t.Errorf("sweep: got %v, want it under the same budget", err)
	}
	s.SetWorkBudget(3e8)
	if err := s.Exec(ctx, "sweep h over offset -1 kHz to 1 kHz points 200", Sink{}); err != nil {
		t.Errorf("sweep within a raised budget: %v", err)
	}
}

func TestWorkBudgetText(t *testing.T) {
	for _, c := range []struct {
		t    float64
		want string
	}{{0.2, "about 1 s"}, {30, "about 30 s"}, {600, "about 10 min"}, {7200, "about 2.0 h"}} {
		if got := durationText(c.t); got != c.want {
			t.Errorf("durationText(%g) = %q, want %q", c.t, got, c.want)
		}
	}
	if got := workLabel("sweep p", 1e6); got != "sweep p" {
		t.Errorf("short work: label %q, want no estimate", got)
	}
	for _, bad := range []string{"", "lots", "1e3", "1e20", "NaN"} {
		if x, err := ParseWork(bad); err == nil {
			t.Errorf("ParseWork(%q) = %g, want an error", bad, x)
		}
	}
	if x, err := ParseWork("1e11"); err != nil || x != 1e11 {
		t.Errorf("ParseWork(1e11) = %g, %v", x, err)
	}
}

// TestMemoryBudgetCountsKeptOutputs: a host that keeps every output (a
// notebook run headless) has their bytes counted; one that passes them on
// (the kernel) does not.
func TestMemoryBudgetCountsKeptOutputs(t *testing.T) {
	ctx := context.Background()
	sweep := "sweep h over offset -10 kHz to 10 kHz points 100000"
	for _, keep := range []bool{true, false} {
		s := NewSession(t.TempDir())
		s.SetMemoryBudget(64 << 20)
		if keep {
			s.KeepOutputs()
		}
		if err := s.Exec(ctx, "pulse h = rect(duration = 1 ms, flip = 90 deg)", Sink{}); err != nil {
			t.Fatal(err)
		}
		before := s.outputs
		var kept int64
		if err := s.Exec(ctx, sweep, Sink{Display: func(b display.Bundle) { kept += outputBytes([]display.Bundle{b}) }}); err != nil {
			t.Fatal(err)
		}
		if keep != (s.outputs-before == kept && kept > 0) || !keep && s.outputs != 0 {
			t.Fatalf("keep %v: counted %d bytes of outputs, the sweep's were %d", keep, s.outputs, kept)
		}
		if !keep {
			continue
		}
		limit := int(64<<20/kept) + 2
		var err error
		for i := 0; i < limit && err == nil; i++ {
			err = s.Exec(ctx, sweep, Sink{})
		}
		// Refused before running (the sweep's arrays do not fit beside the
		// outputs kept) or after (its outputs do not).
		if err == nil || !strings.Contains(err.Error(), "the sweep") || !strings.Contains(err.Error(), "(1 pulse, ") || !strings.Contains(err.Error(), "of outputs kept") {
			t.Fatalf("after %d sweeps of %d bytes of outputs: got %v, want the budget error", limit, kept, err)
		}
	}
}

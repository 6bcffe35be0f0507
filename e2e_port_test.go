package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"testing"
)

// BenchmarkE2EKernelNoPrebind is BenchmarkE2EKernel for a binary built with
// the tag noprebind: the ports are not bound while the program starts but by
// the kernel once main runs, as on systems other than Linux and macOS (package
// kernel/prebind). The difference between the two is what that portable path
// costs at start-up. Run with
// `go test -run '^$' -bench 'E2EKernel' -benchtime 1x .`
func BenchmarkE2EKernelNoPrebind(b *testing.B) {
	if testing.Short() {
		b.Skip("tests of the built binary skipped in -short mode")
	}
	bin := filepath.Join(b.TempDir(), "nutate")
	cmd := exec.Command("go", "build", "-tags", "noprebind", "-o", bin, ".")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	if out, err := cmd.CombinedOutput(); err != nil {
		b.Fatalf("go build -tags noprebind: %v\n%s", err, out)
	}
	benchE2E(b, bin)
}

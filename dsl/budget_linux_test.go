//go:build linux

package dsl

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"syscall"
	"testing"
)

// memoryChildEnv makes the test binary run TestMemoryBudgetCappedChild's
// child: the script of the report (a 10⁶-sample pulse, then 200 short
// lines each copying it with another phase, 16 MB each, 3.2 GB in all).
const memoryChildEnv = "NUTATE_DSL_MEMORY_CHILD"

// childHeadroom caps the child's address space at what it has mapped when it
// starts plus this much: far below the 3.2 GB the 200 copies would take, well
// above a 256 MiB budget plus the garbage of the builds.
const childHeadroom = 1 << 30

func TestMemoryBudgetCappedChild(t *testing.T) {
	if os.Getenv(memoryChildEnv) == "1" {
		memoryChild()
		return
	}
	if testing.Short() {
		t.Skip("runs a child process")
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestMemoryBudgetCappedChild$")
	cmd.Env = append(os.Environ(), memoryChildEnv+"=1")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("child killed or failed (%v): %s", err, lastLines(string(out), 5))
	}
	if !strings.Contains(string(out), "session memory budget of 256 MiB reached: pulse p") {
		t.Fatalf("child output: %s", lastLines(string(out), 5))
	}
	t.Log(lastLines(string(out), 2))
}

func memoryChild() {
	size := vmSize()
	lim := syscall.Rlimit{Cur: uint64(size + childHeadroom), Max: uint64(size + childHeadroom)}
	if err := syscall.Setrlimit(syscall.RLIMIT_AS, &lim); size == 0 || err != nil {
		fmt.Println("cannot cap the address space")
		os.Exit(2)
	}
	s := NewSession(os.TempDir())
	s.SetMemoryBudget(256 << 20)
	var src strings.Builder
	src.WriteString("pulse p = rect(duration = 10 ms, flip = 90 deg, samples = 1000000)\n")
	for i := 1; i <= 200; i++ {
		fmt.Fprintf(&src, "pulse p%d = p(phase = %d deg)\n", i, i)
	}
	err := s.Exec(context.Background(), src.String(), Sink{})
	fmt.Printf("peak RSS %d MiB\n%v\n", vmField("VmHWM:")>>20, err)
	os.Exit(0)
}

func vmSize() int { return vmField("VmSize:") }

// vmField reads a size field of /proc/self/status in bytes, 0 if absent.
func vmField(name string) int {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		if f := strings.Fields(l); len(f) == 3 && f[0] == name {
			kb, _ := strconv.Atoi(f[1])
			return kb << 10
		}
	}
	return 0
}

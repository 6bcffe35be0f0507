package kernel

import (
	"context"
	"runtime"
	"testing"
)

// bigExec holds mb MiB of touched memory while its cell runs, as a large map
// does at its peak, then drops it.
type bigExec struct {
	fakeExec
	mb int
}

func (e *bigExec) Execute(ctx context.Context, code string, emit func(Output)) error {
	held := make([][]byte, e.mb)
	for i := range held {
		held[i] = make([]byte, 1<<20)
		for k := 0; k < len(held[i]); k += 4096 {
			held[i][k] = 1
		}
	}
	emit(Output{Data: map[string]any{"text/plain": code}})
	runtime.KeepAlive(held)
	return nil
}

// TestMemoryReturnedAfterBigCell: once a cell that held 192 MiB has ended (its
// idle status published), the heap keeps from the operating system no more
// than a fraction of that, without waiting for the runtime's scavenger.
func TestMemoryReturnedAfterBigCell(t *testing.T) {
	h := newHarness()
	const mb = 192
	h.d.exec = &bigExec{mb: mb}
	r := h.req("execute_request", map[string]any{"code": "sweep"})
	h.d.handle(r, false)
	h.collect(t, r)
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	if kept := (ms.HeapSys - ms.HeapReleased) >> 20; kept > mb/4 {
		t.Fatalf("the heap keeps %d MiB from the system after a cell that held %d MiB, want at most %d", kept, mb, mb/4)
	}
}

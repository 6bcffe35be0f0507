package kernel

import (
	"runtime/debug"
	"runtime/metrics"
)

// bigCell is how many bytes a cell must allocate for the kernel to hand the
// memory back to the operating system as soon as the cell ends.
//
// A kernel sits idle between cells for minutes, and a notebook user may keep
// several open. After a large map (a 1000 × 1000 sweep allocates about 70 MB
// and its heap peaks far above what the session keeps), the runtime's
// background scavenger returns the free pages only gradually. A forced
// collection and release (debug.FreeOSMemory) costs one garbage collection of
// the live heap, a few milliseconds for what a session keeps, little beside a
// cell that allocated this much; small cells never pay it.
const bigCell = 64 << 20

// allocatedBytes is the heap bytes allocated so far by the process.
func allocatedBytes() uint64 {
	s := []metrics.Sample{{Name: "/gc/heap/allocs:bytes"}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 {
		return 0
	}
	return s[0].Value.Uint64()
}

// releaseAfter returns the free heap to the operating system when the
// process has allocated at least bigCell bytes since before (allocatedBytes).
func releaseAfter(before uint64) {
	if allocatedBytes()-before >= bigCell {
		debug.FreeOSMemory()
	}
}

//go:build unix

package slr

import (
	"syscall"
	"time"
)

// processCPU is the user+system CPU time of the process, so benchmark figures
// can be read on a machine shared with other work.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

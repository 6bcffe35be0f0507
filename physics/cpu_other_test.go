//go:build !linux

package physics

// threadCPU and processCPU read CPU time on Linux only (getrusage with
// RUSAGE_THREAD); elsewhere they report 0 and the benchmarks' cpu-s figures
// are meaningless.
func threadCPU() float64  { return 0 }
func processCPU() float64 { return 0 }

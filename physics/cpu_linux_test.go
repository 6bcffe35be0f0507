package physics

import "syscall"

// threadCPU is the CPU time of the calling OS thread, so that the kernel
// benchmarks can report a rate that other processes on the machine do not skew.
func threadCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(1, &ru); err != nil { // RUSAGE_THREAD
		return 0
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) * 1e-9
}

// processCPU is the CPU time of the whole process, all threads.
func processCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) * 1e-9
}

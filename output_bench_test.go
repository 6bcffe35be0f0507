//go:build unix

package main

import (
	"context"
	"os"
	"path/filepath"
	"runtime"
	"syscall"
	"testing"
	"time"

	"Nutate/display"
	"Nutate/dsl"
	"Nutate/kernel"
)

// BenchmarkMapOutput measures the output path of a 1000 × 1000 map sweep end to
// end: from the simulated values (the sweep's progress reaching 100 %) to its
// bundles (text, SVG, PNG and decimated data) and each one's display_data
// message as the kernel signs it for the wire ("shown"), then `export sweep`
// of the same map to a CSV file of 1e6 rows, 57 MB ("export"). The simulation
// itself (a hard pulse of 16 samples, enough for progress to be reported) is
// left out: -ms is wall time, -cpu-ms the process's CPU time (the garbage
// collector's included), -MB the bytes allocated; held-MB is the heap the
// session keeps afterwards (the sweep's table and the figure, for export).
//
// Measured on the 2-core development machine shared with other builds (load
// 4 to 8), 3 iterations per run:
//
//	            shown ms  shown MB  export ms  export MB  output cpu-ms  held MB  allocs/op
//	before      540-1065       230    295-617       0.08       800-880       68    3.0 M
//	after        107-230        17    191-300        3.2       237-360       18    22 k
//
// (allocs/op counts the simulation too.) Of the export, formatting the numbers
// takes 70-85 ms (BenchmarkSweepCSV in package dsl), the rest is writing and
// syncing the file.
func BenchmarkMapOutput(b *testing.B) {
	dir := b.TempDir()
	s := dsl.NewSession(dir)
	ctx := context.Background()
	if err := s.Exec(ctx, "pulse p = rect(duration = 1 ms, flip = 90 deg, samples = 16)", dsl.Sink{}); err != nil {
		b.Fatal(err)
	}
	signer, err := kernel.NewSigner("bench-key", "hmac-sha256")
	if err != nil {
		b.Fatal(err)
	}
	const sweep = "sweep p over offset -2 kHz to 2 kHz points 1000, b1 0.5 to 1.5 points 1000"
	var shown, exported, cpu, shownCPU, wireTime time.Duration
	var shownBytes, exportBytes, wire uint64
	for b.Loop() {
		var start time.Time
		var before, mid, after runtime.MemStats
		sink := dsl.Sink{
			Progress: func(_ string, done, total int) {
				if done >= total {
					runtime.ReadMemStats(&before)
					cpu -= cpuTime()
					shownCPU -= cpuTime()
					start = time.Now()
				}
			},
			Display: func(bd display.Bundle) {
				t0 := time.Now()
				defer func() { wireTime += time.Since(t0) }()
				typ, content, err := kernel.Output{Data: bd}.Encode()
				if err != nil {
					b.Fatal(err)
				}
				frames, err := signer.Encode(kernel.Message{Content: content, Header: kernel.Header{MsgType: typ}})
				if err != nil {
					b.Fatal(err)
				}
				for _, f := range frames {
					wire += uint64(len(f))
				}
			},
		}
		if err := s.Exec(ctx, sweep, sink); err != nil {
			b.Fatal(err)
		}
		if start.IsZero() {
			b.Fatal("the sweep reported no progress")
		}
		shown += time.Since(start)
		shownCPU += cpuTime()
		runtime.ReadMemStats(&mid)
		start = time.Now()
		if err := s.Exec(ctx, `export sweep to "map.csv"`, dsl.Sink{}); err != nil {
			b.Fatal(err)
		}
		exported += time.Since(start)
		cpu += cpuTime()
		runtime.ReadMemStats(&after)
		shownBytes += mid.TotalAlloc - before.TotalAlloc
		exportBytes += after.TotalAlloc - mid.TotalAlloc
	}
	// What the session keeps of the map (the sweep's table for export sweep,
	// the figure for export figure) once the garbage is collected.
	var held runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&held)
	runtime.KeepAlive(s)
	b.ReportMetric(float64(held.HeapInuse)/1e6, "held-MB")
	if fi, err := os.Stat(filepath.Join(dir, "map.csv")); err == nil {
		b.ReportMetric(float64(fi.Size())/1e6, "csv-MB")
	}
	n := float64(b.N)
	b.ReportMetric(float64((shown+exported).Milliseconds())/n, "output-ms")
	b.ReportMetric(float64(shownBytes+exportBytes)/1e6/n, "output-MB")
	b.ReportMetric(float64(cpu.Milliseconds())/n, "output-cpu-ms")
	b.ReportMetric(float64(shown.Milliseconds())/n, "shown-ms")
	b.ReportMetric(float64(shownCPU.Milliseconds())/n, "shown-cpu-ms")
	b.ReportMetric(float64(shownBytes)/1e6/n, "shown-MB")
	b.ReportMetric(float64(exported.Milliseconds())/n, "export-ms")
	b.ReportMetric(float64(exportBytes)/1e6/n, "export-MB")
	b.ReportMetric(float64(wire)/1e6/n, "wire-MB")
	b.ReportMetric(float64(wireTime.Microseconds())/1e3/n, "wire-ms")
}

// cpuTime is the process's user and system CPU time so far (every thread, the
// garbage collector's included).
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

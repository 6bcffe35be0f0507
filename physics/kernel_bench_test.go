package physics

import (
	"fmt"
	"runtime"
	"testing"
)

// BenchmarkKernelRotate is the rotation kernel alone on one block of 64 spins
// (offsets over ±6 kHz, B1 scale 1) through the hyperbolic secant pulse of
// BenchmarkSimulateHS, 10 ms, at 2048 samples and at 256 (each step's angle up to
// 1.5 rad), with each vector kernel this CPU runs and the scalar one.
// isochromat-steps/cpu-s is per busy core (CPU time of the benchmark's thread).
//
// Figures on the 2-core AMD EPYC (Turin) build machine, go1.26, GOAMD64=v1, load
// average about 6 on 2 cores from other builds, median of 5, isochromat-steps per
// CPU-second of one core:
//
//	                   2048 samples   256 samples
//	vector (AVX-512)   1.17e9         7.9e8
//	vector (AVX2+FMA)  5.4e8          3.7e8
//	scalar             1.2e8          5.1e7–8.1e7
//	scalar, before the long series and angle halving (math.Sincos, sqrt and a
//	division above |φ| = 1/8 rad)
//	                   1.27e8         5.0e7
//
// The 256-sample steps take the longer series (terms to x⁹ instead of x⁵) for
// most spins, hence their lower rate; neither reaches math.Sincos.
//
// C baselines for the same workload, measured on this machine by the issue's
// author: scalar C with libm 5.5e7, a division-free scalar C series 1.1e8, the
// same C series auto-vectorised for AVX-512 8.6e8 isochromat-steps/s.
func BenchmarkKernelRotate(b *testing.B) {
	for _, kernel := range []string{"avx512", "avx2", "scalar"} {
		for _, samples := range []int{2048, 256} {
			b.Run(fmt.Sprintf("kernel=%s/samples=%d", kernel, samples), func(b *testing.B) {
				if kernel == "avx512" && !haveAVX512 || kernel == "avx2" && !haveVector {
					b.Skip("no such kernel on this CPU")
				}
				saved, saved512 := useVector, use512
				useVector, use512 = kernel != "scalar", kernel == "avx512"
				defer func() { useVector, use512 = saved, saved512 }()
				w := hsWaveform(10e-3, samples, 4000, 5.3, 800)
				st, _ := newSteps(w, 1, 2*3.14159*6000, 0, 1.5)
				var blk block
				for i := range blockSpins {
					blk.off[i] = 2 * 3.14159 * (-6000 + 12000*float64(i)/blockSpins)
					blk.scale[i] = 1
					blk.scale2[i] = 1
					blk.ar[i] = 1
				}
				runtime.LockOSThread()
				defer runtime.UnlockOSThread()
				c0 := threadCPU()
				for b.Loop() {
					rotateBlock(st, 0, st.n, blk.off[:], blk.pos[:], blk.scale[:], blk.scale2[:], blk.ar[:], blk.ai[:], blk.br[:], blk.bi[:])
				}
				b.ReportMetric(float64(blockSpins*st.n)*float64(b.N)/b.Elapsed().Seconds(), "isochromat-steps/s")
				b.ReportMetric(float64(blockSpins*st.n)*float64(b.N)/(threadCPU()-c0), "isochromat-steps/cpu-s")
			})
		}
	}
}

// BenchmarkKernelRelax is the relaxation kernel alone on one block of 64 spins
// (T1 = 1 s, T2 = 100 ms) through the 2048-sample pulse of BenchmarkKernelRotate.
// On the same machine, median of 5, isochromat-steps per CPU-second of one core:
// vector (AVX2) 1.58e8, scalar 3.6e7 (NUTATE_SCALAR=1).
func BenchmarkKernelRelax(b *testing.B) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
	st, _ := newSteps(w, 1, 2*3.14159*6000, 0, 1.5)
	_ = st.planRelax(w, 1, 2*3.14159*6000, 0, 1.5, 10)
	var blk block
	for i := range blockSpins {
		blk.off[i] = 2 * 3.14159 * (-6000 + 12000*float64(i)/blockSpins)
		blk.scale[i] = 1
		blk.r1[i] = 1
		blk.r2[i] = 10
		blk.mz[i] = 1
	}
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	c0 := threadCPU()
	for b.Loop() {
		relaxBlock(st, 0, st.n, blk.off[:], blk.pos[:], blk.scale[:], blk.r1[:], blk.r2[:], blk.mx[:], blk.my[:], blk.mz[:], &blk.relax)
	}
	b.ReportMetric(float64(blockSpins*st.n)*float64(b.N)/b.Elapsed().Seconds(), "isochromat-steps/s")
	b.ReportMetric(float64(blockSpins*st.n)*float64(b.N)/(threadCPU()-c0), "isochromat-steps/cpu-s")
}

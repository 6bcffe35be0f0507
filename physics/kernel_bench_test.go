package physics

import (
	"runtime"
	"testing"
)

func BenchmarkKernelRotate(b *testing.B) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
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
}

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

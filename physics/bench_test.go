package physics

import (
	"context"
	"fmt"
	"math"
	"sync"
	"testing"
	"time"
)

// hsWaveform is the hyperbolic secant pulse of Silver, Joseph & Hoult (Phys. Rev. A
// 31:2753, 1985): ω1 = ω1max·sech(βt), frequency −μβ·tanh(βt), whose integral gives
// the phase −μ·ln cosh(βt). duration T, n samples, bandwidth μβ/π (Hz), truncation
// βT/2, peak ω1max/2π (Hz); gamma = 1 so B1 is in rad/s.
func hsWaveform(duration float64, n int, bandwidth, trunc, peak float64) *Waveform {
	beta := 2 * trunc / duration
	mu := math.Pi * bandwidth / beta
	w1 := 2 * math.Pi * peak
	dt := duration / float64(n)
	w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
	for j := range n {
		t := (float64(j)+0.5)*dt - duration/2
		bt := beta * t
		phase := -mu * math.Log(math.Cosh(bt))
		a := w1 / math.Cosh(bt)
		w.Dwell[j] = dt
		w.B1[j] = complex(a*math.Cos(phase), a*math.Sin(phase))
	}
	return w
}

func linspace(a, b float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		if n == 1 {
			v[i] = a
			continue
		}
		v[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return v
}

// BenchmarkSimulateHS is the reference workload: hyperbolic secant, 10 ms, 2048
// samples, bandwidth 4 kHz, truncation 5.3, peak 800 Hz, offsets over ±6 kHz × B1
// scales 0.5–1.5, from +z; without relaxation and with T1 = 1 s, T2 = 100 ms. The
// metric isochromat-steps/s is spins × samples per second of wall time;
// isochromat-steps/cpu-s divides by the CPU time of the process instead, so it is
// the rate per busy core whatever else the machine runs.
//
// Figures on the 2-core AMD EPYC (Turin) build machine, go1.26, GOAMD64=v1, with
// other builds running (load average 6–10 on 2 cores, so wall-time figures are a
// fraction of a free machine's), 256 × 256 spins, best of 3:
//
//	                       ns/op    steps/cpu-s  steps/s (wall)
//	rotation, 1 worker     1.26e8   1.11e9       1.07e9  (vector kernel, AVX-512)
//	rotation, 2 workers    9.53e7   1.03e9       1.41e9  (vector kernel, AVX-512)
//	rotation, 1 worker     3.35e8   5.2e8        4.0e8   (vector kernel, AVX2+FMA)
//	rotation, 2 workers    5.63e8   5.5e8        2.4e8   (vector kernel, AVX2+FMA)
//	rotation, 1 worker     2.07e9   1.30e8       6.5e7   (scalar kernel, earlier run)
//	rotation, 2 workers    2.32e9   1.28e8       5.8e7   (scalar kernel, earlier run)
//	relaxation, 1 worker   1.02e9   1.87e8       1.31e8  (vector kernel, AVX2+FMA)
//	relaxation, 2 workers  8.78e8   1.82e8       1.53e8  (vector kernel, AVX2+FMA)
//	relaxation, 1 worker   5.04e9   5.03e7       2.7e7   (scalar kernel, earlier run)
//	relaxation, 2 workers  4.04e9   5.21e7       3.3e7   (scalar kernel, earlier run)
//
// Two workers keep the per-core rate (no sharing between workers), so on two free
// cores the wall rate doubles. C baselines
// measured on this machine (same workload, per core): a plain scalar C loop with
// libm 5.5e7–5.7e7 isochromat-steps/s, a division-free scalar C series 1.1e8, the
// C series auto-vectorised for AVX-512 8.6e8.
func BenchmarkSimulateHS(b *testing.B) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
	for _, relax := range []bool{false, true} {
		for _, size := range []int{16, 64, 256} {
			for _, workers := range []int{1, 2} {
				name := fmt.Sprintf("relax=%v/spins=%dx%d/workers=%d", relax, size, size, workers)
				b.Run(name, func(b *testing.B) {
					iso := Grid(linspace(-6000, 6000, size), linspace(0.5, 1.5, size), nil, nil, nil)
					if relax {
						iso.T1 = fill(iso.Len(), 1)
						iso.T2 = fill(iso.Len(), 0.1)
					}
					opt := Options{Workers: workers}
					b.ReportAllocs()
					c0 := processCPU()
					for b.Loop() {
						if _, err := Simulate(context.Background(), w, 1, &iso, opt); err != nil {
							b.Fatal(err)
						}
					}
					steps := float64(iso.Len()) * float64(w.Len())
					b.ReportMetric(steps*float64(b.N)/b.Elapsed().Seconds(), "isochromat-steps/s")
					b.ReportMetric(steps*float64(b.N)/(processCPU()-c0), "isochromat-steps/cpu-s")
				})
			}
		}
	}
}

func fill(n int, v float64) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = v
	}
	return s
}

// BenchmarkCancelLatency measures the time from cancel() to Simulate's return on
// the reference workload, with and without relaxation, cancelling from the first
// progress report; the contract is 50 ms. Reported as the worst seen.
func BenchmarkCancelLatency(b *testing.B) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
	for _, relax := range []bool{false, true} {
		b.Run(fmt.Sprintf("relax=%v", relax), func(b *testing.B) {
			iso := Grid(linspace(-6000, 6000, 256), linspace(0.5, 1.5, 256), nil, nil, nil)
			if relax {
				iso.T1 = fill(iso.Len(), 1)
				iso.T2 = fill(iso.Len(), 0.1)
			}
			worst := time.Duration(0)
			for b.Loop() {
				ctx, cancel := context.WithCancel(context.Background())
				var once sync.Once
				var at time.Time
				opt := Options{Progress: func(done, total int) {
					once.Do(func() { at = time.Now(); cancel() })
				}}
				if _, err := Simulate(ctx, w, 1, &iso, opt); err == nil {
					b.Fatal("not cancelled")
				}
				worst = max(worst, time.Since(at))
			}
			b.ReportMetric(float64(worst.Microseconds())/1000, "ms-worst-latency")
		})
	}
}

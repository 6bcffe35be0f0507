package physics

import (
	"context"
	"math"
	"testing"
)

// FuzzSimulate feeds arbitrary numbers to Simulate: it must return an error or a
// result, never panic or hang, and without relaxation |M| must stay |M(0)| whenever
// the inputs are finite (Bloch 1946: rotations conserve length).
func FuzzSimulate(f *testing.F) {
	f.Add(1e-4, 1e-5, -2e-5, 0.0, 1.0, 100.0, 1.0, 0.0, 0.0, 0.0, 0.0)
	f.Add(1e-3, 0.5, 0.0, 1e-3, 42.58e6, 0.0, 0.5, 1e-3, 0.1, 0.01, 1.0)
	f.Add(0.0, 1.0, 1.0, 1.0, -1.0, 1e300, -2.0, 1e9, -1.0, math.Inf(1), 0.3)
	f.Fuzz(func(t *testing.T, dwell, b1x, b1y, grad, gamma, offset, scale, pos, t1, t2, mx0 float64) {
		w := &Waveform{
			Dwell:    []float64{dwell, dwell / 3, dwell},
			B1:       []complex128{complex(b1x, b1y), complex(b1y, -b1x), complex(b1x, 0)},
			Gradient: []float64{grad, 0, -grad},
		}
		iso := Isochromats{
			Offset: []float64{offset, -offset}, B1Scale: []float64{scale, 1},
			Position: []float64{pos, 0}, T1: []float64{t1, 0}, T2: []float64{t2, 0},
		}
		start := [3]float64{mx0, 0.5, 0.25}
		r, err := Simulate(context.Background(), w, gamma, &iso, Options{Start: start, MaxSteps: 1e3})
		if err != nil {
			return
		}
		if r.Alpha == nil {
			return
		}
		n0 := math.Sqrt(mx0*mx0 + 0.25 + 0.0625)
		for i := range 2 {
			n := math.Sqrt(r.Mx[i]*r.Mx[i] + r.My[i]*r.My[i] + r.Mz[i]*r.Mz[i])
			if !math.IsNaN(n) && math.Abs(n-n0) > 1e-9*max(1, n0) {
				t.Errorf("spin %d: |M| = %g, want %g", i, n, n0)
			}
		}
	})
}

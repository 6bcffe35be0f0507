package physics

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// cosSinc agrees with the library's sine and cosine beyond the series range too,
// through the angle halving and the double-angle identities, for angles from 1e-9
// to 1e3 rad (common practice: the double-angle identities of trigonometry).
func TestCosSincAnyAngle(t *testing.T) {
	for k := 0; k <= 12000; k++ {
		phi := math.Pow(10, -9+12*float64(k)/12000)
		c, s := cosSinc(phi * phi)
		phi = math.Sqrt(phi * phi) // the angle cosSinc sees
		sw, cw := math.Sincos(phi)
		if math.Abs(c-cw) > 1e-14 || math.Abs(s*phi-sw) > 1e-14 {
			t.Fatalf("φ = %.17g: cos %.17g, sin %.17g; want %.17g, %.17g", phi, c, s*phi, cw, sw)
		}
	}
}

// One step of the engine is the rotation of Rodrigues' formula about γB_eff by
// −|γB_eff|·dt (dM/dt = M × γB_eff, the convention in CHECKS.md), for step angles
// from 1e-9 to 1e3 rad, and it conserves |M|. The step is run through Simulate, so
// the vector kernel is tested where the machine has one, and the scalar kernel too
// (see forceScalar).
func TestStepIsRodriguesRotation(t *testing.T) {
	forBothKernels(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(17, 1))
		const dt = 1e-3
		for k := 0; k <= 600; k++ {
			angle := math.Pow(10, -9+12*float64(k)/600)
			// A random direction of γB_eff with |γB_eff|·dt = angle.
			var n [3]float64
			for {
				n = [3]float64{r.NormFloat64(), r.NormFloat64(), r.NormFloat64()}
				if l := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2]); l > 1e-3 {
					n = [3]float64{n[0] / l, n[1] / l, n[2] / l}
					break
				}
			}
			w := angle / dt
			wf := &Waveform{Dwell: []float64{dt}, B1: []complex128{complex(w*n[0], w*n[1])}}
			start := [3]float64{r.NormFloat64(), r.NormFloat64(), r.NormFloat64()}
			l := math.Sqrt(start[0]*start[0] + start[1]*start[1] + start[2]*start[2])
			start = [3]float64{start[0] / l, start[1] / l, start[2] / l}
			// 13 spins share the step, so the vector kernels process groups of 8
			// and 4 and the scalar one the last.
			iso := Isochromats{Offset: make([]float64, 13)}
			for i := range iso.Offset {
				iso.Offset[i] = w * n[2] / (2 * math.Pi)
			}
			res, err := Simulate(context.Background(), wf, 1, &iso, Options{Start: start, Workers: 1})
			if err != nil {
				t.Fatal(err)
			}
			// γB_eff as the engine sees it: its z component passes through Hz.
			want := rodrigues(start, w*n[0], w*n[1], 2*math.Pi*iso.Offset[0], dt)
			// Beyond 16 rad (8 rad for cosSinc) the angle itself carries a rounding of about
			// angle × 1.1e-16 (its square root is taken from a sum of squares),
			// on either side.
			tol := 1e-14 * max(1, angle/16)
			for i := range iso.Offset {
				got := [3]float64{res.Mx[i], res.My[i], res.Mz[i]}
				for c := range got {
					if math.Abs(got[c]-want[c]) > tol {
						t.Fatalf("angle %g rad, spin %d: M = %v, want %v (Rodrigues), |error| > %g", angle, i, got, want, tol)
					}
				}
				if d := math.Abs(got[0]*got[0] + got[1]*got[1] + got[2]*got[2] - 1); d > 1e-14 {
					t.Fatalf("angle %g rad: | |M|² − 1 | = %g, want ≤ 1e-14", angle, d)
				}
			}
		}
	})
}

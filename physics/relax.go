package physics

import "gonum.org/v1/gonum/mat"

// relaxStep advances m over dt under the Bloch equations with relaxation toward
// M0 = ẑ, exactly: the 4×4 augmented generator [[A, b], [0, 0]] is exponentiated,
// with A from dMx/dt = Δω·My − ω1y·Mz − R2·Mx, dMy/dt = ω1x·Mz − Δω·Mx − R2·My,
// dMz/dt = ω1y·Mx − ω1x·My − R1·(Mz − 1).
func relaxStep(m [3]float64, wx, wy, wz, r1, r2, dt float64) [3]float64 {
	g := mat.NewDense(4, 4, []float64{
		-r2 * dt, wz * dt, -wy * dt, 0,
		-wz * dt, -r2 * dt, wx * dt, 0,
		wy * dt, -wx * dt, -r1 * dt, r1 * dt,
		0, 0, 0, 0,
	})
	var e mat.Dense
	e.Exp(g)
	var out [3]float64
	for r := 0; r < 3; r++ {
		out[r] = e.At(r, 0)*m[0] + e.At(r, 1)*m[1] + e.At(r, 2)*m[2] + e.At(r, 3)
	}
	return out
}

package physics

import (
	"fmt"
	"math"
)

// Relaxation during a step. With R1 = 1/T1, R2 = 1/T2 and M0 = ẑ the Bloch
// equations (Bloch, Phys. Rev. 70:460, 1946) are linear with constant coefficients
// over a piecewise-constant step:
//
//	dM/dt = A·M + b,  A = [[−R2, ωz, −ωy], [−ωz, −R2, ωx], [ωy, −ωx, −R1]],  b = (0, 0, R1),
//
// whose exact solution over dt is M(dt) = M + φ1(dt·A)·(dt·A·M + dt·b) with
// φ1(z) = (eᶻ − 1)/z = Σ zᵏ/(k+1)! (the exponential-integrator identity; Hochbruck
// & Ostermann, Acta Numerica 19:209, 2010). No operator splitting is involved and
// A need not be invertible.
//
// φ1(X) of the 3×3 matrix X = dt·A is evaluated exactly through the Cayley–Hamilton
// theorem: with the characteristic polynomial λ³ + q1λ² + q2λ + q3 of X,
// X³ = −q1X² − q2X − q3I, so every power is Xᵏ = e0·I + e1·X + e2·X² with the scalar
// recurrence (e0, e1, e2) ← (−q3·e2, e0 − q2·e2, e1 − q1·e2), and
// φ1(X) = d0·I + d1·X + d2·X² with d = Σ eₖ/(k+1)!. The scalar series of the
// entire function is summed until the first omitted term is below 1e-17 for
// ‖X‖₂ ≤ ρ; steps whose bound exceeds relaxRho are cut into n = 2ˢ equal substeps,
// which is exact because the generator is constant: e^{dt·A} = (e^{dt·A/n})ⁿ. The
// coefficients are shared by the substeps; up to maxRepeat substeps are applied one
// after the other, more are combined by squaring the affine map of one substep s
// times, so that a step costs O(log ρ) however long it is.

// relaxRho is the largest ‖dt·A‖₂ bound summed in one piece.
const relaxRho = 0.5

// maxRepeat is the largest number of substeps applied one after the other.
const maxRepeat = 4

// maxTerms caps the series length; relaxRho needs far fewer terms.
const maxTerms = 31 // 2ⁿ − 1, so that k&maxTerms needs no bounds check

// seriesTol bounds the first omitted term of the φ1 series relative to its leading
// term 1 (a tenth of the double-precision unit roundoff 1.1e-16).
const seriesTol = 1e-17

// rhoLimit[K] is the largest ρ for which K terms suffice: ρ^(K+1)/(K+2)! = seriesTol.
var rhoLimit = func() (v [maxTerms + 1]float64) {
	f := 1.0 // (K+2)!
	for k := range v {
		f *= float64(k + 2)
		v[k] = math.Pow(seriesTol*f, 1/float64(k+1))
	}
	return v
}()

// relaxTerms is the number of φ1 series terms for a step with ‖dt·A‖₂ ≤ rho.
func relaxTerms(rho float64) int {
	k := 0
	for k < maxTerms && rho > rhoLimit[k] {
		k++
	}
	return k
}

// planRelax sets, for every step, the substeps from a bound on
// ‖dt·A‖₂ ≤ dt·(|ω|max + max(R1, R2)) over all spins: ‖Ω‖₂ = |ω| for the rotation
// part and ‖diag(R2, R2, R1)‖₂ = max(R1, R2). The series length is chosen per block
// of spins and step from the same bound over the block (relaxBlock).
func (st *steps) planRelax(w *Waveform, gamma, maxOff, maxPos, maxScale, maxR float64) error {
	n := st.n
	st.dt, st.wx, st.wy, st.g = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	st.w1, st.sub = make([]float64, n), make([]int, n)
	for j, b1 := range w.B1 {
		dt := w.Dwell[j]
		st.wx[j] = gamma * real(b1)
		st.wy[j] = gamma * imag(b1)
		if w.Gradient != nil {
			st.g[j] = gamma * w.Gradient[j]
		}
		wz := maxOff + maxPos*math.Abs(st.g[j])
		st.w1[j] = math.Hypot(st.wx[j], st.wy[j])
		rho := dt * (math.Hypot(maxScale*st.w1[j], wz) + maxR)
		if !(rho <= maxRho) {
			return fmt.Errorf("sample %d: ‖γB_eff‖·dt + dt/T = %.3g rad is too large to simulate with relaxation, want ≤ %.3g", j, rho, maxRho)
		}
		sq := 0
		for math.Ldexp(relaxRho, sq) < rho {
			sq++
		}
		st.dt[j] = math.Ldexp(dt, -sq)
		st.sub[j] = 1 << sq
	}
	return nil
}

// maxRho bounds ‖dt·A‖₂ of one sample: 2⁴⁰ substeps, far beyond any pulse.
var maxRho = math.Ldexp(relaxRho, 40)

// invFact1[k] = 1/(k+1)!.
var invFact1 = func() (v [maxTerms + 1]float64) {
	f := 1.0
	for k := range v {
		f *= float64(k + 1)
		v[k] = 1 / f
	}
	return v
}()

// seriesHorner sets v = Σₖ cₖ·Cᵏ·(1, 0, 0) for k = 0…terms, cₖ = 1/(k+1)!, by
// Horner's rule v ← C·v + cₖ·(1, 0, 0) with C·(e0, e1, e2) = (−q3·e2, e0 − q2·e2,
// e1 − q1·e2). It takes the negated coefficients nqᵢ = −qᵢ. Three spins are
// summed together so that their dependency chains overlap; plain multiply and add
// (no fused multiply-add, whose fallback call would force spills) keep the nine
// running values in registers.
func seriesHorner(terms int, nq1, nq2, nq3, v0, v1, v2 []float64) {
	n := len(nq1)
	q1, q2, q3 := nq1, nq2[:n], nq3[:n]
	v0, v1, v2 = v0[:n], v1[:n], v2[:n]
	cK := invFact1[terms&maxTerms]
	i := 0
	for ; i+3 <= n; i += 3 {
		qa, qb, qc := q1[i:i+3:i+3], q2[i:i+3:i+3], q3[i:i+3:i+3]
		a0, a1, a2 := cK, 0.0, 0.0
		b0, b1, b2 := cK, 0.0, 0.0
		c0, c1, c2 := cK, 0.0, 0.0
		for k := terms - 1; k >= 0; k-- {
			ck := invFact1[k&maxTerms]
			a0, a1, a2 = ck+qc[0]*a2, a0+qb[0]*a2, a1+qa[0]*a2
			b0, b1, b2 = ck+qc[1]*b2, b0+qb[1]*b2, b1+qa[1]*b2
			c0, c1, c2 = ck+qc[2]*c2, c0+qb[2]*c2, c1+qa[2]*c2
		}
		v0[i], v1[i], v2[i] = a0, a1, a2
		v0[i+1], v1[i+1], v2[i+1] = b0, b1, b2
		v0[i+2], v1[i+2], v2[i+2] = c0, c1, c2
	}
	for ; i < n; i++ {
		e0, e1, e2 := cK, 0.0, 0.0
		for k := terms - 1; k >= 0; k-- {
			ck := invFact1[k&maxTerms]
			e0, e1, e2 = ck+q3[i]*e2, e0+q2[i]*e2, e1+q1[i]*e2
		}
		v0[i], v1[i], v2[i] = e0, e1, e2
	}
}

// xMul returns X·(ux, uy, uz) for X = [[a, z, −y], [−z, a, x], [y, −x, c]].
func xMul(a, c, x, y, z, ux, uy, uz float64) (float64, float64, float64) {
	return a*ux + z*uy - y*uz, -z*ux + a*uy + x*uz, y*ux - x*uy + c*uz
}

// relaxSquare applies sub = 2ˢ substeps of the affine map M ← E·M + f with
// E = e^X = I + X·φ1(X) and f = φ1(X)·t·b, t·b = (0, 0, −c), by squaring:
// (E, f)∘(E, f) = (E², E·f + f). With φ1(X) = d0·I + d1·X + d2·X²,
// E = I + d0·X + d1·X² + d2·X³.
func relaxSquare(sub int, x, y, z, a, c, d0, d1, d2, mx, my, mz float64) (float64, float64, float64) {
	var xm, x2, e [3][3]float64
	xm = [3][3]float64{{a, z, -y}, {-z, a, x}, {y, -x, c}}
	x2 = mat3Mul(&xm, &xm)
	x3 := mat3Mul(&x2, &xm)
	for r := range 3 {
		for k := range 3 {
			e[r][k] = d0*xm[r][k] + d1*x2[r][k] + d2*x3[r][k]
		}
		e[r][r]++
	}
	// f = (d0·I + d1·X + d2·X²)·(0, 0, −c): the third columns.
	f := [3]float64{
		-c * (d1*xm[0][2] + d2*x2[0][2]),
		-c * (d1*xm[1][2] + d2*x2[1][2]),
		-c * (d0 + d1*xm[2][2] + d2*x2[2][2]),
	}
	for n := sub; n > 1; n >>= 1 {
		var g [3]float64
		for r := range 3 {
			g[r] = e[r][0]*f[0] + e[r][1]*f[1] + e[r][2]*f[2] + f[r]
		}
		f = g
		e = mat3Mul(&e, &e)
	}
	return e[0][0]*mx + e[0][1]*my + e[0][2]*mz + f[0],
		e[1][0]*mx + e[1][1]*my + e[1][2]*mz + f[1],
		e[2][0]*mx + e[2][1]*my + e[2][2]*mz + f[2]
}

func mat3Mul(p, q *[3][3]float64) (out [3][3]float64) {
	for r := range 3 {
		for k := range 3 {
			out[r][k] = p[r][0]*q[0][k] + p[r][1]*q[1][k] + p[r][2]*q[2][k]
		}
	}
	return out
}

// relaxScratch holds per-spin series state for relaxBlock, the series length of
// each step and the vector kernel's per-step terms.
type relaxScratch struct {
	q1, q2, q3, v0, v1, v2 [blockSpins]float64
	terms                  []int
	rec                    []relaxStep
}

// relaxBlock advances the magnetization of a block of spins through steps
// [j0, j1) with relaxation, exactly as described at the top of this file. Per
// step: the characteristic coefficients of every spin's X, the series for d
// (seriesHorner, its length from a bound on ‖X‖₂ over the block), then the update
// of M (relaxSquare for long steps).
func relaxBlock(st *steps, j0, j1 int, off, pos, scale, r1, r2, mx, my, mz []float64, sc *relaxScratch) {
	n := len(off)
	pos, scale, r1, r2 = pos[:n], scale[:n], r1[:n], r2[:n]
	mx, my, mz = mx[:n], my[:n], mz[:n]
	q1, q2, q3 := sc.q1[:n], sc.q2[:n], sc.q3[:n]
	v0, v1, v2 := sc.v0[:n], sc.v1[:n], sc.v2[:n]
	maxOff, maxPos, maxScale, maxR := 0.0, 0.0, 0.0, 0.0
	for i := range n {
		maxOff = max(maxOff, math.Abs(off[i]))
		maxPos = max(maxPos, math.Abs(pos[i]))
		maxScale = max(maxScale, math.Abs(scale[i]))
		maxR = max(maxR, r1[i], r2[i])
	}
	// The series length of each step, from the bound over the whole block, so
	// that the vector kernel (on the leading spins) and the scalar loop below
	// (on the rest) sum the same series.
	sc.terms = sc.terms[:0]
	for j := j0; j < j1; j++ {
		t := st.dt[j]
		// ‖X‖₂ ≤ t·(|ω| + max(R1, R2)) over the block, as in planRelax.
		w1, wz := maxScale*st.w1[j], maxOff+maxPos*math.Abs(st.g[j])
		sc.terms = append(sc.terms, relaxTerms(t*(math.Sqrt(w1*w1+wz*wz)+maxR)))
	}
	k := 0
	if useVector {
		k = relaxVector(st, j0, j1, off, pos, scale, r1, r2, mx, my, mz, sc)
	}
	if k == n {
		return
	}
	off, pos, scale, r1, r2 = off[k:], pos[k:], scale[k:], r1[k:], r2[k:]
	mx, my, mz = mx[k:], my[k:], mz[k:]
	n -= k
	q1, q2, q3 = q1[:n], q2[:n], q3[:n]
	v0, v1, v2 = v0[:n], v1[:n], v2[:n]
	for j := j0; j < j1; j++ {
		t := st.dt[j]
		wxt, wyt, gt := st.wx[j]*t, st.wy[j]*t, st.g[j]*t
		sub := st.sub[j]
		terms := sc.terms[j-j0]
		for i := range n {
			// X = t·A = [[a, z, −y], [−z, a, x], [y, −x, c]]; its characteristic
			// polynomial has q1 = −tr X, q2 = the sum of the principal 2×2 minors,
			// q3 = −det X.
			x, y := scale[i]*wxt, scale[i]*wyt
			z := off[i]*t + pos[i]*gt
			a, c := -r2[i]*t, -r1[i]*t
			xy2, z2 := x*x+y*y, z*z
			q1[i] = a + a + c                 // −q1
			q2[i] = -(a*a + z2 + 2*a*c + xy2) // −q2
			q3[i] = a*a*c + a*xy2 + c*z2      // −q3
		}
		seriesHorner(terms, q1, q2, q3, v0, v1, v2)
		for i := range n {
			x, y := scale[i]*wxt, scale[i]*wyt
			z := off[i]*t + pos[i]*gt
			a, c := -r2[i]*t, -r1[i]*t
			d0, d1, d2 := v0[i], v1[i], v2[i]
			mxi, myi, mzi := mx[i], my[i], mz[i]
			if sub > maxRepeat {
				mxi, myi, mzi = relaxSquare(sub, x, y, z, a, c, d0, d1, d2, mxi, myi, mzi)
				mx[i], my[i], mz[i] = mxi, myi, mzi
				continue
			}
			for range sub {
				// w = X·M + t·b; M ← M + d0·w + d1·X·w + d2·X²·w.
				wx, wy, wz := xMul(a, c, x, y, z, mxi, myi, mzi)
				wz -= c
				vx, vy, vz := xMul(a, c, x, y, z, wx, wy, wz)
				ux, uy, uz := xMul(a, c, x, y, z, vx, vy, vz)
				mxi += d0*wx + d1*vx + d2*ux
				myi += d0*wy + d1*vy + d2*uy
				mzi += d0*wz + d1*vz + d2*uz
			}
			mx[i], my[i], mz[i] = mxi, myi, mzi
		}
	}
}

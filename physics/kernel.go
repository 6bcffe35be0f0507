package physics

import (
	"fmt"
	"math"
	"slices"
)

// steps holds the per-sample terms that every isochromat shares, computed once per
// simulation so that the inner loops only combine them with per-spin values.
type steps struct {
	n int
	// Rotation: h = dt/2; wxh, wyh = γB1x·h, γB1y·h; p = wxh² + wyh²; gh = γG·h.
	h, wxh, wyh, p, gh []float64
	// Relaxation: dt (per substep), γB1x, γB1y, γ|B1|, γG, and the substeps.
	dt, wx, wy, w1, g []float64
	sub               []int
	// wide[j]: some spin's rotation at step j may exceed the range of the angle
	// halving (it then takes math.Sincos, which only the scalar kernel does).
	wide []bool
}

// newSteps tabulates the shared terms; it refuses a sample whose rotation angle
// over the spins (bounded with the largest offset, position and B1 scale) is not
// a finite number, which only absurd inputs reach.
func newSteps(w *Waveform, gamma, maxOff, maxPos, maxScale float64) (*steps, error) {
	n := w.Len()
	st := &steps{n: n}
	buf := make([]float64, 5*n)
	st.h, st.wxh, st.wyh, st.p, st.gh = buf[:n], buf[n:2*n], buf[2*n:3*n], buf[3*n:4*n], buf[4*n:]
	st.wide = make([]bool, n)
	for j, b1 := range w.B1 {
		h := w.Dwell[j] / 2
		st.h[j] = h
		st.wxh[j] = gamma * real(b1) * h
		st.wyh[j] = gamma * imag(b1) * h
		st.p[j] = st.wxh[j]*st.wxh[j] + st.wyh[j]*st.wyh[j]
		if w.Gradient != nil {
			st.gh[j] = gamma * w.Gradient[j] * h
		}
		zh := maxOff*h + maxPos*math.Abs(st.gh[j])
		if x := maxScale*maxScale*st.p[j] + zh*zh; math.IsInf(x, 0) || math.IsNaN(x) {
			return nil, fmt.Errorf("sample %d: the rotation angle overflows (B1 %g T, dwell %g s), want finite", j, b1, w.Dwell[j])
		} else if x > 0.99*seriesMax*math.Ldexp(1, 2*halvingMax) {
			// 0.99: a margin over the roundings of this bound.
			st.wide[j] = true
		}
	}
	return st, nil
}

// Power series in x = φ² of cos φ and of sin φ / φ (Abramowitz & Stegun 4.3.65,
// 4.3.66). Fine samples take them truncated after x⁵: for x ≤ shortMax = 1/64
// (|φ| ≤ 1/8 rad) the first omitted terms are below x⁶/12! ≈ 3e-20 and
// x⁶/13! ≈ 2e-21. Coarser samples take them truncated after x⁹: for
// x ≤ seriesMax = 1 (|φ| ≤ 1 rad) the first omitted terms are below
// x¹⁰/20! ≈ 4.1e-19 and x¹⁰/21! ≈ 2.0e-20. Both are far under the double
// precision unit roundoff 1.1e-16, so the series are as exact as math.Sincos
// (within 2.3e-16, TestCosSinc). The longer one covers the steps of coarse
// waveforms (256 samples of a 10 ms pulse at ±6 kHz: |φ| ≤ 0.8 rad) without
// Sincos, sqrt or a division; larger angles take the angle halving below.
const (
	shortMax  = 1.0 / 64
	seriesMax = 1
	cos1      = -1.0 / 2
	cos2      = 1.0 / 24
	cos3      = -1.0 / 720
	cos4      = 1.0 / 40320
	cos5      = -1.0 / 3628800
	cos6      = 1.0 / 479001600
	cos7      = -1.0 / 87178291200
	cos8      = 1.0 / 20922789888000
	cos9      = -1.0 / 6402373705728000
	sinc1     = -1.0 / 6
	sinc2     = 1.0 / 120
	sinc3     = -1.0 / 5040
	sinc4     = 1.0 / 362880
	sinc5     = -1.0 / 39916800
	sinc6     = 1.0 / 6227020800
	sinc7     = -1.0 / 1307674368000
	sinc8     = 1.0 / 355687428096000
	sinc9     = -1.0 / 121645100408832000
)

// Angle halving extends the series to any angle: while x > seriesMax, x is divided
// by 4 (the angle halved, exactly: a power of two), the series is summed at the
// small angle, and the double-angle identities
//
//	cos 2θ = 1 − 2θ²·(sin θ/θ)²,   sin 2θ / 2θ = (sin θ/θ)·cos θ
//
// are applied once per halving (two multiplications and an FMA each). The first form
// keeps cos 2θ accurate near 1 (no cancellation of 2cos²θ − 1). Each doubling adds
// about one rounding to the angle's relative error, so the rotation stays within
// 1e-14 of math.Sincos for |φ| ≤ 2^halvingMax = 8 rad (TestCosSincAnyAngle);
// larger angles, which need very long samples or absurd fields, take math.Sincos.
const halvingMax = 3

// cosSinc returns cos φ and sin φ / φ for x = φ² ≥ 0.
func cosSinc(x float64) (c, s float64) {
	if x <= shortMax {
		return cosSincShort(x)
	}
	if x <= seriesMax {
		return cosSincSeries(x)
	}
	x0, k := x, 0
	for x > seriesMax && k <= halvingMax {
		x *= 0.25
		k++
	}
	if k > halvingMax {
		phi := math.Sqrt(x0)
		sn, cs := math.Sincos(phi)
		return cs, sn / phi
	}
	c, s = cosSincSeries(x)
	for ; k > 0; k-- {
		c, s = math.FMA(-2*x*s, s, 1), s*c
		x *= 4
	}
	return c, s
}

// cosSincShort is cosSinc for x ≤ shortMax, by Horner's rule with fused
// multiply-adds.
func cosSincShort(x float64) (c, s float64) {
	c = math.FMA(x, math.FMA(x, math.FMA(x, math.FMA(x, math.FMA(x, cos5, cos4), cos3), cos2), cos1), 1)
	s = math.FMA(x, math.FMA(x, math.FMA(x, math.FMA(x, math.FMA(x, sinc5, sinc4), sinc3), sinc2), sinc1), 1)
	return c, s
}

// cosSincSeries is cosSinc for x ≤ seriesMax, by Horner's rule with fused
// multiply-adds.
func cosSincSeries(x float64) (c, s float64) {
	c = math.FMA(x, cos9, cos8)
	s = math.FMA(x, sinc9, sinc8)
	c = math.FMA(x, c, cos7)
	s = math.FMA(x, s, sinc7)
	c = math.FMA(x, c, cos6)
	s = math.FMA(x, s, sinc6)
	c = math.FMA(x, c, cos5)
	s = math.FMA(x, s, sinc5)
	c = math.FMA(x, c, cos4)
	s = math.FMA(x, s, sinc4)
	c = math.FMA(x, c, cos3)
	s = math.FMA(x, s, sinc3)
	c = math.FMA(x, c, cos2)
	s = math.FMA(x, s, sinc2)
	c = math.FMA(x, c, cos1)
	s = math.FMA(x, s, sinc1)
	c = math.FMA(x, c, 1)
	s = math.FMA(x, s, 1)
	return c, s
}

// rotateBlock runs steps [j0, j1) for a block of spins: with the vector kernel
// where the CPU has one (see vector_amd64.go) and no step needs math.Sincos,
// and with the scalar kernel rotateScalar for the rest of the spins (fewer
// than 4) or everywhere else. Both give the same results bit for bit (tested in
// vector_test.go).
func rotateBlock(st *steps, j0, j1 int, off, pos, scale, scale2, ar, ai, br, bi []float64) {
	k := 0
	if useVector && !slices.Contains(st.wide[j0:j1], true) {
		k = rotateVector(st, j0, j1, off, pos, scale, scale2, ar, ai, br, bi)
	}
	if k < len(off) {
		rotateScalar(st, j0, j1, off[k:], pos[k:], scale[k:], scale2[k:], ar[k:], ai[k:], br[k:], bi[k:])
	}
}

// rotateScalar composes the Cayley–Klein parameters of steps [j0, j1) into the
// state (ar + i·ai, br + i·bi) of a block of spins, spin-minor so that the loop
// body is one independent chain per spin.
//
// A step of duration dt about γB_eff = ω = (ωx, ωy, ωz) turns M by φ = |ω|·dt
// clockwise about ω (dM/dt = M × ω). Its Cayley–Klein parameters (Pauly et al.,
// IEEE TMI 10:53, 1991, with their rotation angle −|ω|dt) are, with h = dt/2,
// ψ = |ω|h and S = sin ψ / ψ:
//
//	αj = cos ψ + i·ωz·h·S,   βj = −ωy·h·S + i·ωx·h·S,
//
// and they compose as α ← αj·α − βj*·β, β ← βj·α + αj*·β.
func rotateScalar(st *steps, j0, j1 int, off, pos, scale, scale2, ar, ai, br, bi []float64) {
	n := len(off)
	pos, scale, scale2 = pos[:n], scale[:n], scale2[:n]
	ar, ai, br, bi = ar[:n], ai[:n], br[:n], bi[:n]
	for j := j0; j < j1; j++ {
		h, gh, wxh, wyh, p := st.h[j], st.gh[j], st.wxh[j], st.wyh[j], st.p[j]
		// The two loops differ only in ωz: the gradient term is left out of the
		// first, the common case. αj = c + i·qi, βj = qr + i·qx.
		if gh == 0 {
			for i := range n {
				zh := off[i] * h
				x := math.FMA(scale2[i], p, zh*zh)
				var c, s float64
				if x <= shortMax {
					c, s = cosSincShort(x)
				} else {
					c, s = cosSinc(x)
				}
				qi := zh * s
				ks := scale[i] * s
				qr := -wyh * ks
				qx := wxh * ks
				a0, a1, b0, b1 := ar[i], ai[i], br[i], bi[i]
				ar[i] = math.FMA(c, a0, -math.FMA(qi, a1, math.FMA(qr, b0, qx*b1)))
				ai[i] = math.FMA(c, a1, math.FMA(qi, a0, math.FMA(qx, b0, -qr*b1)))
				br[i] = math.FMA(qr, a0, math.FMA(-qx, a1, math.FMA(c, b0, qi*b1)))
				bi[i] = math.FMA(qr, a1, math.FMA(qx, a0, math.FMA(c, b1, -qi*b0)))
			}
			continue
		}
		for i := range n {
			zh := math.FMA(off[i], h, pos[i]*gh)
			x := math.FMA(scale2[i], p, zh*zh)
			var c, s float64
			if x <= shortMax {
				c, s = cosSincShort(x)
			} else {
				c, s = cosSinc(x)
			}
			qi := zh * s
			ks := scale[i] * s
			qr := -wyh * ks
			qx := wxh * ks
			a0, a1, b0, b1 := ar[i], ai[i], br[i], bi[i]
			ar[i] = math.FMA(c, a0, -math.FMA(qi, a1, math.FMA(qr, b0, qx*b1)))
			ai[i] = math.FMA(c, a1, math.FMA(qi, a0, math.FMA(qx, b0, -qr*b1)))
			br[i] = math.FMA(qr, a0, math.FMA(-qx, a1, math.FMA(c, b0, qi*b1)))
			bi[i] = math.FMA(qr, a1, math.FMA(qx, a0, math.FMA(c, b1, -qi*b0)))
		}
	}
}

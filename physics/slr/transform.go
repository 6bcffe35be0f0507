package slr

import (
	"math"
	"math/cmplx"
)

// The hard-pulse rotation of sample j by angle φ about the transverse axis of phase
// ψ (rf = φ·e^{iψ}) has, in the sign convention of physics.Simulate,
//
//	C = cos(φ/2),  S = i·e^{iψ}·sin(φ/2),
//
// and the recursion (Pauly et al. 1991, with precession diag(1, z⁻¹) between
// samples)
//
//	A_j = C·A_{j−1} − S*·z⁻¹·B_{j−1},  B_j = S·A_{j−1} + C·z⁻¹·B_{j−1},
//
// starting from A_0 = 1, B_0 = 0.
func rotation(rf complex128) (c float64, s complex128) {
	phi := cmplx.Abs(rf)
	if phi == 0 {
		return 1, 0
	}
	sn, cs := math.Sincos(phi / 2)
	u := rf / complex(phi, 0)
	return cs, complex(0, sn) * u
}

// Forward is the forward SLR transform: from the rotation angle of each sample
// (rad; the complex value angle·e^{i·phase}, i.e. γ·B1·Δt) to the coefficients of
// A(z) and B(z) in powers of z⁻¹, each of length len(rf).
func Forward(rf []complex128) (a, b []complex128) {
	n := len(rf)
	a = make([]complex128, n)
	b = make([]complex128, n)
	if n == 0 {
		return a, b
	}
	a[0] = 1
	for j, r := range rf {
		c, s := rotation(r)
		sc := cmplx.Conj(s)
		cc := complex(c, 0)
		// Degree j polynomials: new coefficient k uses old k (A) and old k−1 (z⁻¹B).
		for k := j; k >= 0; k-- {
			ak := a[k]
			var bk1 complex128
			if k > 0 {
				bk1 = b[k-1]
			}
			a[k] = cc*ak - sc*bk1
			b[k] = s*ak + cc*bk1
		}
	}
	return a, b
}

// Inverse is the inverse SLR transform: from A(z) and B(z) (coefficients of powers
// of z⁻¹, equal lengths) to the rotation angle of each sample in rad, as for
// Forward. Peeling sample j off (A_j, B_j) uses
//
//	S/C = b₀/a₀,  A_{j−1} = C·A_j + S*·B_j,  z⁻¹·B_{j−1} = −S·A_j + C·B_j
//
// (Pauly et al. 1991). It panics if the lengths differ.
func Inverse(a, b []complex128) []complex128 {
	if len(a) != len(b) {
		panic("slr: Inverse of polynomials of different lengths")
	}
	n := len(a)
	aa := append([]complex128(nil), a...)
	bb := append([]complex128(nil), b...)
	rf := make([]complex128, n)
	for j := n - 1; j >= 0; j-- {
		a0, b0 := aa[0], bb[0]
		phi := 2 * math.Atan2(cmplx.Abs(b0), cmplx.Abs(a0))
		var s complex128
		c := 1.0
		if phi != 0 {
			// S = i·e^{iψ}·sin(φ/2) and S/C = b₀/a₀ give e^{iψ} = −i·(b₀/a₀)/|b₀/a₀|.
			r := b0 / a0
			u := complex(0, -1) * r / complex(cmplx.Abs(r), 0)
			rf[j] = complex(phi, 0) * u
			sn, cs := math.Sincos(phi / 2)
			c, s = cs, complex(0, sn)*u
		}
		sc := cmplx.Conj(s)
		cc := complex(c, 0)
		for k := 0; k <= j; k++ {
			ak, bk := aa[k], bb[k]
			aa[k] = cc*ak + sc*bk
			bb[k] = -s*ak + cc*bk // coefficient k of z⁻¹·B_{j−1}
		}
		// Shift z⁻¹·B_{j−1} down to B_{j−1}.
		copy(bb, bb[1:j+1])
		bb[j] = 0
		aa[j] = 0
	}
	return rf
}

// Profile evaluates the Cayley–Klein parameters of the hard-pulse model with
// polynomials a, b and sample dwell (s) at each offset (Hz):
// α = z^{N/2}·A(z), β = z^{(N−1)/2}·B(z), z = exp(i·2π·f·dwell).
func Profile(a, b []complex128, dwell float64, offsets []float64) (alpha, beta []complex128) {
	n := len(a)
	alpha = make([]complex128, len(offsets))
	beta = make([]complex128, len(offsets))
	for i, f := range offsets {
		w := 2 * math.Pi * f * dwell
		zi := cmplx.Exp(complex(0, -w)) // z⁻¹
		var pa, pb complex128
		for k := n - 1; k >= 0; k-- {
			pa = pa*zi + a[k]
			pb = pb*zi + b[k]
		}
		alpha[i] = pa * cmplx.Exp(complex(0, w*float64(n)/2))
		beta[i] = pb * cmplx.Exp(complex(0, w*float64(n-1)/2))
	}
	return alpha, beta
}

package physics

import "golang.org/x/sys/cpu"

// haveVector reports whether the CPU runs the AVX2 and FMA rotation kernel of
// vector_amd64.s (the operating system saving the YMM registers is part of
// cpu.X86.HasAVX).
var haveVector = cpu.X86.HasAVX && cpu.X86.HasAVX2 && cpu.X86.HasFMA

// haveAVX512 reports whether the CPU also runs the 8-spin kernel (AVX-512
// foundation, and DQ for the mask tests and the sign flip); use512 selects it,
// and tests clear it to test the 4-spin kernel.
var haveAVX512 = haveVector && cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ

var use512 = haveAVX512

// vecArgs is the argument block of rotateAVX2; the offsets are spelled out in
// vector_amd64.s. The step pointers point at the first step, the spin pointers
// at the first of 4 spins.
type vecArgs struct {
	h, gh, wxh, wyh, p      *float64
	steps                   int
	off, pos, scale, scale2 *float64
	ar, ai, br, bi          *float64
}

// rotateAVX2 runs steps a.steps from the given ones for 4 spins, the same
// operations as rotateBlock's scalar loop in the same order, so that every lane
// rounds as the scalar kernel does.
//
//go:noescape
func rotateAVX2(a *vecArgs)

// rotateAVX512 is rotateAVX2 for 8 spins.
//
//go:noescape
func rotateAVX512(a *vecArgs)

// rotateVector runs steps [j0, j1) for the leading spins in groups of 8 (with
// AVX-512) and 4 and returns how many spins it ran; the caller runs the rest
// with the scalar kernel.
func rotateVector(st *steps, j0, j1 int, off, pos, scale, scale2, ar, ai, br, bi []float64) int {
	n := len(off) &^ 3
	if n == 0 || j1 <= j0 {
		return n
	}
	a := vecArgs{h: &st.h[j0], gh: &st.gh[j0], wxh: &st.wxh[j0], wyh: &st.wyh[j0], p: &st.p[j0], steps: j1 - j0}
	pos, scale, scale2 = pos[:n], scale[:n], scale2[:n]
	ar, ai, br, bi = ar[:n], ai[:n], br[:n], bi[:n]
	for i := 0; i < n; {
		a.off, a.pos, a.scale, a.scale2 = &off[i], &pos[i], &scale[i], &scale2[i]
		a.ar, a.ai, a.br, a.bi = &ar[i], &ai[i], &br[i], &bi[i]
		if use512 && i+8 <= n {
			rotateAVX512(&a)
			i += 8
		} else {
			rotateAVX2(&a)
			i += 4
		}
	}
	return n
}

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

// relaxStep holds the terms of one step that every spin shares, for relaxAVX2;
// the offsets are spelled out in vector_amd64.s.
type relaxStep struct {
	t, wxt, wyt, gt float64
	sub, terms      int
}

// relaxArgs is the argument block of relaxAVX2: spin holds off, pos, scale, r1,
// r2 of 4 spins, m their magnetization (in and out), x the per-step X entries
// x, y, z, a, c (the kernel's scratch).
type relaxArgs struct {
	rec   *relaxStep
	steps int
	fact  *float64
	spin  [5][4]float64
	m     [3][4]float64
	x     [5][4]float64
}

// relaxAVX2 runs the steps of a.rec for 4 spins: the same operations as
// relaxBlock's scalar loops (seriesHorner and the repeated substeps) in the same
// order, so that every lane rounds as the scalar kernel does.
//
//go:noescape
func relaxAVX2(a *relaxArgs)

// relaxVector runs steps [j0, j1) with relaxation for the leading spins in
// groups of 4 and returns how many spins it ran; it runs none when a step needs
// the squaring of relaxSquare, which only the scalar kernel does.
func relaxVector(st *steps, j0, j1 int, off, pos, scale, r1, r2, mx, my, mz []float64, sc *relaxScratch) int {
	n := len(off) &^ 3
	if n == 0 || j1 <= j0 {
		return 0
	}
	sc.rec = sc.rec[:0]
	for j := j0; j < j1; j++ {
		if st.sub[j] > maxRepeat {
			return 0
		}
		t := st.dt[j]
		sc.rec = append(sc.rec, relaxStep{t: t, wxt: st.wx[j] * t, wyt: st.wy[j] * t, gt: st.g[j] * t, sub: st.sub[j], terms: sc.terms[j-j0]})
	}
	a := relaxArgs{rec: &sc.rec[0], steps: j1 - j0, fact: &invFact1[0]}
	for i := 0; i < n; i += 4 {
		for l := range 4 {
			a.spin[0][l], a.spin[1][l], a.spin[2][l], a.spin[3][l], a.spin[4][l] = off[i+l], pos[i+l], scale[i+l], r1[i+l], r2[i+l]
			a.m[0][l], a.m[1][l], a.m[2][l] = mx[i+l], my[i+l], mz[i+l]
		}
		relaxAVX2(&a)
		for l := range 4 {
			mx[i+l], my[i+l], mz[i+l] = a.m[0][l], a.m[1][l], a.m[2][l]
		}
	}
	return n
}

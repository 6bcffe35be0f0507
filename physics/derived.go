package physics

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Rotate applies the rotation with Cayley–Klein parameters α, β to the
// magnetization m (Pauly et al., IEEE TMI 10:53, 1991, eq. 8):
//
//	Mxy⁺ = (α*)²·Mxy − β²·Mxy* + 2α*β·Mz
//	Mz⁺  = −α*β*·Mxy − αβ·Mxy* + (|α|² − |β|²)·Mz
//
// with Mxy = Mx + i·My.
func Rotate(alpha, beta complex128, m [3]float64) (mx, my, mz float64) {
	mxy := complex(m[0], m[1])
	ac := cmplx.Conj(alpha)
	t := ac*ac*mxy - beta*beta*cmplx.Conj(mxy) + 2*ac*beta*complex(m[2], 0)
	aa := real(alpha)*real(alpha) + imag(alpha)*imag(alpha)
	bb := real(beta)*real(beta) + imag(beta)*imag(beta)
	z := -2*real(alpha*beta*cmplx.Conj(mxy)) + (aa-bb)*m[2]
	return real(t), imag(t), z
}

// Echo is the transverse magnetization Mxy = Mx + i·My refocused by a pulse with
// Cayley–Klein β between ideal crusher gradients, for Mxy = 1 (along +x) before the
// pulse: −β². Its magnitude is |β|² (Pauly et al., IEEE TMI 10:53, 1991).
func Echo(beta complex128) complex128 { return -beta * beta }

// EchoPhase is the phase of the crushed spin echo, arg(−β²) in radians in
// (−π, π]: the phase the refocused Mxy takes for Mxy = 1 (along +x) before the
// pulse. A hard pulse of phase φ gives 2φ at every offset (the Rabi closed form in
// Cayley–Klein terms); a phase that runs linearly across offset shifts the echo in
// time, curvature dephases it. It is meaningless where |β|² is at rounding level.
func EchoPhase(beta complex128) float64 { return cmplx.Phase(Echo(beta)) }

// EchoOf is the crushed spin echo for a given transverse magnetization before the
// pulse: Mxy⁺ = −β²·Mxy* (Pauly et al. 1991).
func EchoOf(beta, mxy complex128) complex128 { return -beta * beta * cmplx.Conj(mxy) }

// Mxy returns the transverse magnetization Mx + i·My of isochromat i.
func (r *Result) Mxy(i int) complex128 { return complex(r.Mx[i], r.My[i]) }

// Phase returns the phase of the transverse magnetization of isochromat i in
// radians, atan2(My, Mx), in (−π, π].
func (r *Result) Phase(i int) float64 { return math.Atan2(r.My[i], r.Mx[i]) }

// Transverse returns |Mxy| of isochromat i.
func (r *Result) Transverse(i int) float64 { return math.Hypot(r.Mx[i], r.My[i]) }

// Echo returns the crushed spin echo of isochromat i (see Echo); ok is false when
// the result has no Cayley–Klein parameters because spins relaxed.
func (r *Result) Echo(i int) (e complex128, ok bool) {
	if r.Beta == nil {
		return 0, false
	}
	return Echo(r.Beta[i]), true
}

// Start states for Options.Start.
var (
	StartPlusZ  = [3]float64{0, 0, 1}
	StartMinusZ = [3]float64{0, 0, -1}
	StartPlusX  = [3]float64{1, 0, 0}
	StartPlusY  = [3]float64{0, 1, 0}
)

// StartState returns the start magnetization named "z", "-z", "x", "y" (also
// "+z", "+x", "+y", "-x", "-y").
func StartState(name string) ([3]float64, error) {
	switch name {
	case "z", "+z":
		return StartPlusZ, nil
	case "-z":
		return StartMinusZ, nil
	case "x", "+x":
		return StartPlusX, nil
	case "-x":
		return [3]float64{-1, 0, 0}, nil
	case "y", "+y":
		return StartPlusY, nil
	case "-y":
		return [3]float64{0, -1, 0}, nil
	}
	return [3]float64{}, fmt.Errorf("start state %q is unknown, want one of z -z x y", name)
}

package physics

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// hardCK is the rotation of a constant B1 = ω1·e^{iφ} (rad/s, gamma 1) for a time
// T at offset Δω in Cayley–Klein form: the Rabi closed form (Rabi, Phys. Rev.
// 51:652, 1937) written as in Pauly et al., IEEE TMI 10:53 (1991), with the sign
// of the project's convention (B1 along +x tips +z toward +y, CHECKS.md):
// Ω = √(ω1² + Δω²), α = cos(ΩT/2) + i(Δω/Ω)·sin(ΩT/2),
// β = i·e^{iφ}(ω1/Ω)·sin(ΩT/2).
func hardCK(w1, phi, dw, T float64) (alpha, beta complex128) {
	om := math.Hypot(w1, dw)
	s, c := math.Sincos(om * T / 2)
	return complex(c, dw/om*s), complex(0, 1) * cmplx.Rect(w1/om*s, phi)
}

func wrapPi(v float64) float64 { return v - 2*math.Pi*math.Round(v/(2*math.Pi)) }

// A hard pulse of phase φ: −β² = (ω1/Ω)²·sin²(ΩT/2)·e^{2iφ} (hardCK), so the echo
// phase is 2φ at every offset where the echo is not zero, and |echo| matches the
// closed form.
func TestEchoPhaseHardPulse(t *testing.T) {
	const T = 500e-6
	w1 := math.Pi / T // 180° (ν1 = 1 kHz)
	offs := []float64{-3000, -1000, -250, 0, 250, 1000, 2500}
	for _, phiDeg := range []float64{0, 30, 90, -135} {
		phi := phiDeg * math.Pi / 180
		t.Run(fmt.Sprintf("phase %g deg", phiDeg), func(t *testing.T) {
			w := rect(w1, T, 5)
			for j := range w.B1 {
				w.B1[j] = cmplx.Rect(w1, phi)
			}
			iso := Isochromats{Offset: offs}
			r := sim(t, w, 1, &iso, Options{})
			for i, f := range offs {
				_, beta := hardCK(w1, phi, 2*math.Pi*f, T)
				want := Echo(beta)
				if got := Echo(r.Beta[i]); cmplx.Abs(got-want) > 1e-9 {
					t.Errorf("offset %g Hz: echo %v, want %v", f, got, want)
				}
				if got := EchoPhase(r.Beta[i]); math.Abs(wrapPi(got-2*phi)) > 1e-9 {
					t.Errorf("offset %g Hz: echo phase %g rad, want 2φ = %g", f, got, 2*phi)
				}
			}
		})
	}
}

// Two hard pulses back to back (90° of phase 0, then 180° of phase 90° at the same
// amplitude): the echo is
// −β² of the product of the two closed-form rotations, β = β2·α1 + α2*·β1 (Pauly
// et al. 1991, composition of Cayley–Klein parameters). Its phase varies with
// offset (the pulse is not time-symmetric), unlike a single hard pulse.
func TestEchoPhaseComposite(t *testing.T) {
	const tau = 250e-6
	w1 := math.Pi / 2 / tau
	w := rect(w1, 2*tau, 2)
	w.Dwell[0], w.Dwell[1] = tau, 2*tau
	w.B1[1] = complex(0, w1)
	offs := []float64{-1500, -400, 0, 300, 1200}
	r := sim(t, w, 1, &Isochromats{Offset: offs}, Options{})
	var phases []float64
	for i, f := range offs {
		dw := 2 * math.Pi * f
		a1, b1 := hardCK(w1, 0, dw, tau)
		a2, b2 := hardCK(w1, math.Pi/2, dw, 2*tau)
		beta := b2*a1 + cmplx.Conj(a2)*b1
		if got, want := EchoPhase(r.Beta[i]), EchoPhase(beta); math.Abs(wrapPi(got-want)) > 1e-9 {
			t.Errorf("offset %g Hz: echo phase %g rad, want %g", f, got, want)
		}
		phases = append(phases, EchoPhase(beta))
	}
	if math.Abs(wrapPi(phases[0]-phases[2])) < 1e-3 {
		t.Errorf("echo phase of the composite is the same at %g and %g Hz; want it to vary", offs[0], offs[2])
	}
}

// A time-symmetric pulse with a constant phase φ: each sample's SU(2) matrix
// e^{iφσz/2}·S·e^{−iφσz/2} has S symmetric (σx and σz are symmetric), so the
// palindromic product is symmetric up to the same frame rotation, β·e^{−iφ} is
// purely imaginary, and the echo phase is 2φ at every offset (a consequence of
// the Cayley–Klein composition of Pauly et al. 1991; derivation in this comment).
func TestEchoPhaseSymmetricPulse(t *testing.T) {
	const n = 64
	const dur = 3e-3
	phi := 40 * math.Pi / 180
	w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
	area := 0.0
	for j := range n {
		x := (float64(j)+0.5)/n*2 - 1 // −1…1, symmetric about the centre
		v := math.Exp(-8 * x * x)
		w.Dwell[j] = dur / n
		w.B1[j] = complex(v, 0)
		area += v * dur / n
	}
	for j := range w.B1 {
		w.B1[j] = cmplx.Rect(real(w.B1[j])*math.Pi/area, phi) // 180°
	}
	var offs []float64
	for f := -1500.0; f <= 1500; f += 125 {
		offs = append(offs, f)
	}
	r := sim(t, w, 1, &Isochromats{Offset: offs}, Options{})
	checked := 0
	for i, f := range offs {
		e := Echo(r.Beta[i])
		if cmplx.Abs(e) < 1e-6 {
			continue
		}
		checked++
		if got := EchoPhase(r.Beta[i]); math.Abs(wrapPi(got-2*phi)) > 1e-9 {
			t.Errorf("offset %g Hz: echo phase %g rad, want 2φ = %g", f, got, 2*phi)
		}
	}
	if checked < len(offs)/2 {
		t.Errorf("only %d of %d offsets have an echo above 1e-6", checked, len(offs))
	}
}

package shape

import (
	"fmt"
	"math"
)

// Defaults of the hyperbolic secant.
const (
	// DefaultHsecBeta truncates the amplitude at sech(5.3) ≈ 1 % of its peak
	// (common practice).
	DefaultHsecBeta = 5.3
	// DefaultHsecOrder is the plain hyperbolic secant, HS1.
	DefaultHsecOrder = 1
)

// Hsec is the adiabatic hyperbolic secant HSn of the given order n (0: 1),
// sweep bandwidth (Hz) and dimensionless truncation beta (0: DefaultHsecBeta).
// Amplitude is set by c.Peak only; giving c.Flip is an error.
//
// With τ = 2t/T ∈ [−1, 1] (t from the middle of the pulse):
//
//	B1(τ) = peak·sech(β·|τ|ⁿ)
//	f(τ)  = −(bandwidth/2)·G(τ)/G(∞),  G(τ) = ∫₀^τ sech²(β·|s|ⁿ) ds
//
// so that the frequency sweep follows the square of the amplitude (Tannús &
// Garwood, J. Magn. Reson. A 120:133, 1996; from memory). For n = 1,
// G(τ)/G(∞) = tanh(βτ): in time, ω1 = ω1max·sech(βs·t) with βs = 2β/T s⁻¹ and
// sweep −μβs·tanh(βs·t), the form of Silver, Joseph & Hoult (Phys. Rev. A
// 31:2753, 1985), whose bandwidth is μβs/π. The bandwidth is thus the sweep range of the untruncated pulse. The
// frequency is integrated into the phase of B1 and recorded in Pulse.Freq.
func Hsec(c Common, gamma float64, order int, bandwidth, beta float64) (*Pulse, error) {
	const name = "hsec"
	if order == 0 {
		order = DefaultHsecOrder
	}
	if order < 1 || order > 64 {
		return nil, fmt.Errorf("%s: order must be 1 to 64, got %d", name, order)
	}
	if beta == 0 {
		beta = DefaultHsecBeta
	}
	if !(beta > 0) || beta > 700 {
		return nil, fmt.Errorf("%s: beta must be positive and at most 700, got %g", name, beta)
	}
	if err := checkBandwidth(name, bandwidth); err != nil {
		return nil, err
	}
	T := c.Duration
	sweep := hsecSweep(order, beta)
	amp := func(t float64) float64 { return sech(beta * math.Pow(math.Abs(2*t/T), float64(order))) }
	f := func(t float64) float64 { return -bandwidth / 2 * sweep(2*t/T) }
	return sweptPulse(name, c, gamma, bandwidth, amp, f)
}

func sech(x float64) float64 {
	if math.Abs(x) > 700 {
		return 0
	}
	return 1 / math.Cosh(x)
}

// hsecSweep returns G(τ)/G(∞) for HSn (odd in τ, 0 at 0, → ±1 at ±∞).
func hsecSweep(order int, beta float64) func(tau float64) float64 {
	if order == 1 {
		return func(tau float64) float64 { return math.Tanh(beta * tau) }
	}
	// Tabulate G on [0, τmax] where sech² has fallen below 1e-17, by the
	// trapezoidal rule on a fine grid; linear interpolation between nodes.
	n := float64(order)
	tmax := math.Max(1, math.Pow(20/beta, 1/n))
	const m = 1 << 14
	h := tmax / m
	g := make([]float64, m+1)
	prev := 1.0
	for i := 1; i <= m; i++ {
		s := sech(beta * math.Pow(float64(i)*h, n))
		v := s * s
		g[i] = g[i-1] + (prev+v)*h/2
		prev = v
	}
	ginf := g[m]
	return func(tau float64) float64 {
		a := math.Abs(tau)
		var v float64
		if a >= tmax {
			v = 1
		} else {
			x := a / h
			i := int(x)
			fr := x - float64(i)
			v = (g[i]*(1-fr) + g[i+1]*fr) / ginf
		}
		if tau < 0 {
			return -v
		}
		return v
	}
}

package shape

import (
	"fmt"
	"math"
)

// Default BIR-4 modulation constants (Garwood & Ke, J. Magn. Reson. 94:511, 1991;
// from memory): λ = 10 for the tanh amplitude, tan κ = 20 for the tan sweep.
const (
	DefaultBir4Lambda = 10
)

// DefaultBir4Kappa is κ = arctan 20 (rad), the default of the tan sweep.
var DefaultBir4Kappa = math.Atan(20)

// Bir4 is the B1-insensitive rotation BIR-4 (Garwood & Ke, J. Magn. Reson. 94:511,
// 1991; from memory): four segments of T/4 with tanh amplitude and tan frequency
// modulation, and phase jumps of +(π + θ/2) at T/4 and −(π + θ/2) at 3T/4 that set
// the rotation angle θ = c.Flip. Amplitude is set by c.Peak, which must also be
// given. With u the local time of a segment,
//
//	B1 = peak·tanh(λ(1 − |u|)),  f = F·tan(κu)/tan κ
//
// with local time u = 4t/T ∈ [0, 1] in segment 1, u = 4t/T − 2 ∈ [−1, 1] in
// segments 2 and 3, u = 4t/T − 4 ∈ [−1, 0] in segment 4, t from the start and F = bandwidth/2, so the sweep spans the bandwidth
// (Hz). lambda (0: DefaultBir4Lambda) and kappa in rad (0: DefaultBir4Kappa) are
// the modulation constants. The frequency is integrated into the phase of B1
// (∫tan = −ln cos / κ, in closed form) and recorded in Pulse.Freq. On resonance
// and well above its threshold, the pulse turns +z to Mz = cos θ for any B1 scale;
// its tolerance of offsets grows with B1, so it has no design band: Bandwidth is
// 0 (thickness cannot be derived) and the sweep is recorded in Pulse.Sweep.
func Bir4(c Common, gamma float64, bandwidth, lambda, kappa float64) (*Pulse, error) {
	const name = "bir4"
	if lambda == 0 {
		lambda = DefaultBir4Lambda
	}
	if kappa == 0 {
		kappa = DefaultBir4Kappa
	}
	if !(lambda > 0) || lambda > 700 {
		return nil, fmt.Errorf("%s: lambda must be positive and at most 700, got %g", name, lambda)
	}
	if !(kappa > 0 && kappa < math.Pi/2) {
		return nil, fmt.Errorf("%s: kappa must be between 0 and π/2 rad (0 and 90 deg), got %g rad", name, kappa)
	}
	if err := checkBandwidth(name, bandwidth); err != nil {
		return nil, err
	}
	if math.IsNaN(c.Flip) {
		return nil, fmt.Errorf("%s: give flip, the rotation angle", name)
	}
	if math.IsInf(c.Flip, 0) {
		return nil, fmt.Errorf("%s: flip must be finite, got %g rad", name, c.Flip)
	}
	// Four equal segments need a sample count divisible by 4 so that the phase
	// jumps fall on sample boundaries.
	def, err := c.sweepSamples(bandwidth)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	def += (4 - def%4) % 4
	n, dt, err := c.adiabaticTimes(def, true)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if n%4 != 0 {
		return nil, fmt.Errorf("%s: samples must be a multiple of 4 (four segments), got %d", name, n)
	}
	T := c.Duration
	theta := c.Flip
	F := bandwidth / 2
	tk := math.Tan(kappa)
	// P(u) = −2π∫F·tan(κu)/tan κ dt over local time, dt = T/4·du (sign as in
	// applyPhase).
	P := func(u float64) float64 {
		return 2 * math.Pi * F / tk * (T / 4) * math.Log(math.Cos(kappa*u)) / kappa
	}
	jump := -(math.Pi + theta/2)
	u := make([]float64, n)
	phase := make([]float64, n)
	freq := make([]float64, n)
	for j := range u {
		t := (float64(j) + 0.5) * dt
		x := 4 * t / T
		var loc, ph float64
		switch {
		case x < 1:
			loc = x
			ph = P(loc)
		case x < 3:
			loc = x - 2
			ph = jump + P(loc)
		default:
			loc = x - 4
			ph = P(loc)
		}
		u[j] = math.Tanh(lambda * (1 - math.Abs(loc)))
		phase[j] = ph
		freq[j] = F * math.Tan(kappa*loc) / tk
	}
	p, err := polar(name, c, gamma, u, phase, freq, dt)
	if err != nil {
		return nil, err
	}
	p.Flip = math.Abs(theta)
	p.Sweep = bandwidth
	p.Plane, p.Axis = true, c.Phase
	return p, p.setSlice(c)
}

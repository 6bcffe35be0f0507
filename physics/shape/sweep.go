package shape

import (
	"fmt"
	"math"
)

// sweepSamples is the default sample count of a frequency-swept pulse: at least
// 1000, and enough that the carrier-frame phase advances by at most 1/20 cycle
// per sample at the edge of a sweep of the given bandwidth (Hz) over c.Duration,
// centre offset included.
// It is an error when that needs more than the sample limit and neither samples
// nor dwell is given.
func (c *Common) sweepSamples(bandwidth float64) (int, error) {
	if c.Samples != 0 || !math.IsNaN(c.Dwell) || !(c.Duration > 0) || math.IsInf(c.Duration, 0) {
		return 1000, nil // grid checks and uses these
	}
	n := math.Ceil(20 * (math.Abs(c.Center) + math.Abs(bandwidth)/2) * c.Duration)
	if n > maxSamples {
		return 0, fmt.Errorf("a sweep of %g Hz over %g s needs %.3g samples, want at most %d: give a shorter duration or a narrower bandwidth", bandwidth, c.Duration, n, maxSamples)
	}
	return max(1000, int(n)), nil
}

// sampleTimes returns the sample midpoints of n samples of dt, measured from the
// middle of the pulse.
func sampleTimes(n int, dt float64) []float64 {
	T := float64(n) * dt
	ts := make([]float64, n)
	for j := range ts {
		ts[j] = (float64(j)+0.5)*dt - T/2
	}
	return ts
}

// integratePhase returns the phase φ(t_j) = −2π ∫₀^{t_j} f(t) dt of an RF field of
// instantaneous frequency f (Hz, relative to the carrier; see applyPhase for the
// sign) at the sample midpoints t_j (times from the middle of the pulse), by
// composite Simpson's rule on four sub-intervals between neighbouring midpoints.
// The phase is zero at the middle of the pulse.
func integratePhase(f func(t float64) float64, ts []float64) []float64 {
	simpson := func(a, b float64) float64 {
		const k = 4
		h := (b - a) / k
		s := f(a) + f(b)
		for i := 1; i < k; i++ {
			w := 2.0
			if i%2 == 1 {
				w = 4
			}
			s += w * f(a+float64(i)*h)
		}
		return s * h / 3
	}
	ph := make([]float64, len(ts))
	if len(ts) == 0 {
		return ph
	}
	// Start from the midpoint nearest the middle, integrating from t = 0.
	m := len(ts) / 2
	ph[m] = -2 * math.Pi * simpson(0, ts[m])
	for j := m + 1; j < len(ts); j++ {
		ph[j] = ph[j-1] - 2*math.Pi*simpson(ts[j-1], ts[j])
	}
	for j := m - 1; j >= 0; j-- {
		ph[j] = ph[j+1] + 2*math.Pi*simpson(ts[j], ts[j+1])
	}
	return ph
}

// sweptPulse samples a frequency-swept inversion of the given bandwidth (Hz)
// over c.Duration: unit-peak amplitude amp(t) and instantaneous frequency f(t)
// (Hz), t from the middle of the pulse, on the sweepSamples default grid. The
// frequency is integrated into the phase of B1 (integratePhase) and recorded in
// Pulse.Freq; the role is RoleInvert unless c.Role is set, and Bandwidth and
// Sweep are the bandwidth, TBW the bandwidth times c.Duration.
func sweptPulse(name string, c Common, gamma, bandwidth float64, amp, f func(t float64) float64) (*Pulse, error) {
	def, err := c.sweepSamples(bandwidth)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	n, dt, err := c.adiabaticTimes(def, false)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	ts := sampleTimes(n, dt)
	u := make([]float64, n)
	freq := make([]float64, n)
	for j, t := range ts {
		u[j] = amp(t)
		freq[j] = f(t)
	}
	p, err := polar(name, c, gamma, u, integratePhase(f, ts), freq, dt)
	if err != nil {
		return nil, err
	}
	if p.Role == RoleNone {
		p.Role = RoleInvert
	}
	p.Bandwidth = bandwidth
	p.Sweep = bandwidth
	p.TBW = bandwidth * c.Duration
	return p, p.setSlice(c)
}

// polar builds a pulse from a unit-peak amplitude u, a phase (rad) and an
// instantaneous frequency (Hz) per sample, scaled to c.Peak; then applies Phase,
// Center and the slice gradient. The pulse is marked adiabatic with an undefined
// nominal flip; the caller may set Flip.
func polar(name string, c Common, gamma float64, u, phase, freq []float64, dt float64) (*Pulse, error) {
	peak := 0.0
	for _, v := range u {
		peak = math.Max(peak, math.Abs(v))
	}
	if peak == 0 {
		return nil, fmt.Errorf("%s: the shape is zero everywhere", name)
	}
	scale := c.Peak / peak
	p := &Pulse{Shape: name, Gamma: gamma, Role: c.Role, Center: c.Center, Flip: math.NaN(), Adiabatic: true}
	p.Wave.Dwell = make([]float64, len(u))
	p.Wave.B1 = make([]complex128, len(u))
	for j, v := range u {
		p.Wave.Dwell[j] = dt
		s, co := math.Sincos(phase[j])
		p.Wave.B1[j] = complex(scale*v*co, scale*v*s)
	}
	p.Freq = append([]float64(nil), freq...)
	p.applyPhase(c.Phase, c.Center)
	return p, nil
}

// checkBandwidth checks a sweep bandwidth argument.
func checkBandwidth(name string, bw float64) error {
	if !(bw > 0) || math.IsInf(bw, 0) {
		return fmt.Errorf("%s: bandwidth must be positive, got %g Hz", name, bw)
	}
	return nil
}

package shape

import (
	"fmt"
	"math"
)

// Chirp is a linear frequency sweep of the given bandwidth (Hz), from
// −bandwidth/2 to +bandwidth/2 over the duration, with constant amplitude c.Peak
// except for edge smoothing: over the fraction ramp (0 to 0.5) of the duration at
// each end the amplitude rises as a quarter sine, sin(π/2·s/(ramp·T)) with s the
// time from the nearer end. Amplitude is set by peak only. The frequency is
// integrated into the phase of B1 and recorded in Pulse.Freq.
func Chirp(c Common, gamma float64, bandwidth, ramp float64) (*Pulse, error) {
	const name = "chirp"
	if err := checkBandwidth(name, bandwidth); err != nil {
		return nil, err
	}
	if !(ramp >= 0 && ramp <= 0.5) {
		return nil, fmt.Errorf("%s: ramp must be a fraction from 0 to 0.5, got %g", name, ramp)
	}
	T := c.Duration
	amp := func(t float64) float64 {
		if s := T/2 - math.Abs(t); ramp > 0 && s < ramp*T {
			return math.Sin(math.Pi / 2 * s / (ramp * T))
		}
		return 1
	}
	f := func(t float64) float64 { return bandwidth * t / T }
	return sweptPulse(name, c, gamma, bandwidth, amp, f)
}

package shape

import (
	"fmt"
	"math"
)

// DefaultWurstOrder is the order of the amplitude's smoothing, WURST-20 (Kupce &
// Freeman, J. Magn. Reson. A 115:273, 1995; from memory).
const DefaultWurstOrder = 20

// Wurst is a wideband, uniform-rate, smooth-truncation sweep (Kupce & Freeman,
// J. Magn. Reson. A 115:273, 1995; from memory): a linear sweep of the given
// bandwidth (Hz) from −bandwidth/2 to +bandwidth/2, with amplitude
//
//	B1(t) = peak·(1 − |sin(πt/T)|ⁿ), t ∈ [−T/2, T/2] from the middle,
//
// of order n (0: DefaultWurstOrder). Amplitude is set by peak only. The
// frequency is integrated into the phase of B1 and recorded in Pulse.Freq.
func Wurst(c Common, gamma float64, bandwidth float64, order float64) (*Pulse, error) {
	const name = "wurst"
	if order == 0 {
		order = DefaultWurstOrder
	}
	if !(order > 0) || order > 1000 {
		return nil, fmt.Errorf("%s: order must be positive and at most 1000, got %g", name, order)
	}
	if err := checkBandwidth(name, bandwidth); err != nil {
		return nil, err
	}
	T := c.Duration
	amp := func(t float64) float64 { return 1 - math.Pow(math.Abs(math.Sin(math.Pi*t/T)), order) }
	f := func(t float64) float64 { return bandwidth * t / T }
	return sweptPulse(name, c, gamma, bandwidth, amp, f)
}

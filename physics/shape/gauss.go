package shape

import (
	"fmt"
	"math"
)

// Gauss is a Gaussian envelope exp(−t²/(2σ²)), t ∈ [−T/2, T/2] from the middle,
// with σ set by exactly one of tbw or cutoff (0 means not given):
//
//   - tbw is the time-bandwidth product, the small-tip full width at half maximum
//     of the spectrum times the duration. The spectrum of the untruncated
//     Gaussian is exp(−2π²σ²f²), whose FWHM is √(2 ln 2)/(πσ), so
//     σ = √(2 ln 2)·T/(π·tbw).
//   - cutoff (0 < cutoff < 1) is the relative amplitude at the ends:
//     exp(−T²/(8σ²)) = cutoff, so σ = T/(2√(−2 ln cutoff)); T = 6σ is a cutoff
//     of exp(−4.5) ≈ 0.0111.
//
// Pulse.TBW and Pulse.Bandwidth report the tbw and its bandwidth either way.
// Sample times are sample midpoints; the default of 257 samples is odd so
// that the peak at the middle is a sample.
func Gauss(c Common, gamma float64, tbw, cutoff float64) (*Pulse, error) {
	const name = "gauss"
	T := c.Duration
	switch {
	case tbw != 0 && cutoff != 0:
		return nil, fmt.Errorf("%s: give tbw or cutoff, not both", name)
	case tbw == 0 && cutoff == 0:
		return nil, fmt.Errorf("%s: give tbw or cutoff for the width", name)
	case tbw != 0 && (!(tbw > 0) || math.IsInf(tbw, 0)):
		return nil, fmt.Errorf("%s: tbw must be positive, got %g", name, tbw)
	case cutoff != 0 && !(cutoff > 0 && cutoff < 1):
		return nil, fmt.Errorf("%s: cutoff must be between 0 and 1 (relative amplitude at the ends), got %g", name, cutoff)
	}
	var sigma float64
	if tbw != 0 {
		sigma = math.Sqrt(2*math.Ln2) * T / (math.Pi * tbw)
	} else {
		sigma = T / (2 * math.Sqrt(-2*math.Log(cutoff)))
		tbw = math.Sqrt(2*math.Ln2) * T / (math.Pi * sigma)
	}
	n, dt, err := c.times(bandSamples(tbw))
	if err == nil {
		err = checkBandSamples(n, tbw)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	u := make([]float64, n)
	for j, t := range sampleTimes(n, dt) {
		u[j] = math.Exp(-t * t / (2 * sigma * sigma))
	}
	return amplitudeModulated(name, c, gamma, u, dt, tbw)
}

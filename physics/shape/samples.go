package shape

import (
	"fmt"
	"math"
	"sort"
)

// Samples is a waveform given sample by sample, as read from a file. Exactly one
// of Dwell (uniform) or Times is given.
type Samples struct {
	// Dwell is the uniform sample length (s); 0 when Times is given.
	Dwell float64
	// Times are the strictly increasing start times of the samples (s); sample j
	// lasts Times[j+1] − Times[j], and the last sample lasts as long as the one
	// before it (or Common.Duration minus its start, when the duration is given).
	Times []float64
	// Amplitude is B1 (T), signed: a negative value is a phase of π.
	Amplitude []float64
	// Phase (rad) per sample, optional.
	Phase []float64
	// Freq is the instantaneous RF frequency (Hz) per sample, relative to the
	// carrier, optional. With Phase it is only recorded (the phase already
	// carries it); without Phase it is integrated into the phase, referenced to
	// zero at the middle of the pulse. The same value at every sample is the
	// carrier offset of a fixed-frequency pulse: it becomes Pulse.Center and
	// Pulse.Freq stays nil. A Freq that varies is a frequency modulation:
	// Pulse.Freq records it, Pulse.Sweep is its range (widened by half a sample
	// at each end, as the values are at sample midpoints) and Pulse.Center the
	// middle of that range.
	Freq []float64
	// Gradient (T/m) per sample, optional; Common.Gradient and Thickness then
	// must not be given. The same value at every sample is also Pulse.Gradient.
	Gradient []float64
}

// FromSamples builds a pulse from samples. Common.Duration, when given (> 0),
// must match the samples; Samples and Dwell of Common must not be given. The
// amplitude is used as given unless Common.Flip (scale so that γ|∫B1 dt| equals
// the flip, B1 taken in the frame that follows Freq when it is given) or
// Common.Peak (scale to that peak) is given, not both; Pulse.Flip is that
// nominal flip after scaling. Phase,
// Center, Gradient or Thickness and Role apply as for any shape.
func FromSamples(s Samples, c Common, gamma float64) (*Pulse, error) {
	const name = "import"
	n := len(s.Amplitude)
	if n == 0 {
		return nil, fmt.Errorf("%s: no samples", name)
	}
	if n > maxSamples {
		return nil, fmt.Errorf("%s: %d samples, want at most %d", name, n, maxSamples)
	}
	for _, col := range []struct {
		what string
		v    []float64
	}{{"times", s.Times}, {"phase", s.Phase}, {"frequency", s.Freq}, {"gradient", s.Gradient}} {
		if col.v != nil && len(col.v) != n {
			return nil, fmt.Errorf("%s: %s has %d values, want %d (one per amplitude)", name, col.what, len(col.v), n)
		}
		for j, v := range col.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("%s: %s of sample %d is %g, want a finite number", name, col.what, j+1, v)
			}
		}
	}
	for j, v := range s.Amplitude {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%s: amplitude of sample %d is %g, want a finite number", name, j+1, v)
		}
	}
	if c.Samples != 0 || (!math.IsNaN(c.Dwell) && c.Dwell != 0) {
		return nil, fmt.Errorf("%s: samples and dwell come from the data; do not give them", name)
	}
	hasDur := c.Duration != 0 && !math.IsNaN(c.Duration)
	if hasDur && (!(c.Duration > 0) || math.IsInf(c.Duration, 0)) {
		return nil, fmt.Errorf("%s: duration must be positive, got %g s", name, c.Duration)
	}
	dwell := make([]float64, n)
	switch {
	case s.Dwell != 0 && s.Times != nil:
		return nil, fmt.Errorf("%s: give dwell or times, not both", name)
	case s.Times != nil:
		if !sort.Float64sAreSorted(s.Times) {
			return nil, fmt.Errorf("%s: times must increase", name)
		}
		for j := 0; j+1 < n; j++ {
			dwell[j] = s.Times[j+1] - s.Times[j]
			if !(dwell[j] > 0) {
				return nil, fmt.Errorf("%s: times must increase strictly, got %g s twice (samples %d and %d)", name, s.Times[j], j+1, j+2)
			}
		}
		switch {
		case hasDur:
			dwell[n-1] = c.Duration - (s.Times[n-1] - s.Times[0])
			if !(dwell[n-1] > 0) {
				return nil, fmt.Errorf("%s: duration %g s ends before the last sample starts at %g s", name, c.Duration, s.Times[n-1]-s.Times[0])
			}
		case n > 1:
			dwell[n-1] = dwell[n-2]
		default:
			return nil, fmt.Errorf("%s: one sample with a time needs duration or dwell", name)
		}
	case s.Dwell != 0:
		if !(s.Dwell > 0) || math.IsInf(s.Dwell, 0) {
			return nil, fmt.Errorf("%s: dwell must be positive, got %g s", name, s.Dwell)
		}
		for j := range dwell {
			dwell[j] = s.Dwell
		}
		if hasDur && math.Abs(float64(n)*s.Dwell-c.Duration) > 1e-9*c.Duration {
			return nil, fmt.Errorf("%s: duration %g s does not match %d samples of %g s", name, c.Duration, n, s.Dwell)
		}
	case hasDur:
		for j := range dwell {
			dwell[j] = c.Duration / float64(n)
		}
	default:
		return nil, fmt.Errorf("%s: give dwell, times or duration", name)
	}
	if math.IsNaN(c.Phase) || math.IsInf(c.Phase, 0) {
		return nil, fmt.Errorf("%s: phase must be finite, got %g rad", name, c.Phase)
	}
	if math.IsNaN(c.Center) || math.IsInf(c.Center, 0) {
		return nil, fmt.Errorf("%s: center must be finite, got %g Hz", name, c.Center)
	}
	phase := s.Phase
	if phase == nil && s.Freq != nil {
		phase = integrateSampledPhase(s.Freq, dwell)
	}
	b1 := make([]complex128, n)
	for j, a := range s.Amplitude {
		b1[j] = complex(a, 0)
		if phase != nil {
			sn, co := math.Sincos(phase[j])
			b1[j] = complex(a*co, a*sn)
		}
	}
	// The nominal flip is γ|∫B1 dt| in the frame that follows the data's own
	// frequency, if any: the frequency's phase is taken out of the area.
	var follow []float64
	if s.Freq != nil {
		follow = integrateSampledPhase(s.Freq, dwell)
	}
	var area complex128
	peak := 0.0
	for j, b := range b1 {
		if follow != nil {
			sn, co := math.Sincos(-follow[j])
			b *= complex(co, sn)
		}
		area += b * complex(dwell[j], 0)
		peak = math.Max(peak, cabs(b))
	}
	hasFlip, hasPeak := !math.IsNaN(c.Flip), !math.IsNaN(c.Peak)
	scale := 1.0
	switch {
	case hasFlip && hasPeak:
		return nil, fmt.Errorf("%s: give flip or peak, not both", name)
	case hasFlip:
		if math.IsInf(c.Flip, 0) {
			return nil, fmt.Errorf("%s: flip must be finite, got %g rad", name, c.Flip)
		}
		if cabs(area) == 0 {
			return nil, fmt.Errorf("%s: the waveform has zero area, so no amplitude gives a flip", name)
		}
		scale = c.Flip / (math.Abs(gamma) * cabs(area))
	case hasPeak:
		if !(c.Peak >= 0) || math.IsInf(c.Peak, 0) {
			return nil, fmt.Errorf("%s: peak must be finite and not negative, got %g T", name, c.Peak)
		}
		if peak == 0 {
			return nil, fmt.Errorf("%s: the waveform is zero everywhere, so no scale gives a peak", name)
		}
		scale = c.Peak / peak
	}
	for j := range b1 {
		b1[j] *= complex(scale, 0)
	}
	p := &Pulse{Shape: name, Gamma: gamma, Role: c.Role, Center: c.Center,
		Flip: math.Abs(gamma) * scale * cabs(area)}
	p.Wave.Dwell = dwell
	p.Wave.B1 = b1
	lo, hi := span(s.Freq)
	if s.Freq != nil && lo != hi {
		p.Freq = append([]float64(nil), s.Freq...)
		// The values are at sample midpoints: a sweep over the whole pulse
		// reaches half a sample further at each end (exact for a linear one).
		p.Sweep = (hi - lo) * float64(n) / float64(n-1)
		// A frequency-swept waveform is taken as the designed swept shapes are
		// (hsec, chirp, wurst): its effect comes by passage, so Measure searches
		// its adiabatic threshold when it has a role.
		p.Adiabatic = true
	}
	p.applyPhase(c.Phase, c.Center)
	// The data's own frequency (constant, or the middle of its sweep) moves the
	// centre on top of Common.Center (applyPhase has already moved Freq).
	p.Center = c.Center + (lo+hi)/2
	if s.Gradient != nil {
		if c.Gradient != 0 || c.Thickness != 0 {
			return nil, fmt.Errorf("%s: the data carry a gradient; do not give gradient or thickness", name)
		}
		p.Wave.Gradient = append([]float64(nil), s.Gradient...)
		if glo, ghi := span(s.Gradient); glo == ghi {
			p.Gradient = glo
		}
		return p, nil
	}
	return p, p.setSlice(c)
}

// integrateSampledPhase integrates a per-sample frequency (Hz) into a phase
// −2π∫f dt (sign as in applyPhase) at the sample midpoints by the trapezoidal
// rule between midpoints, zero at the middle sample.
func integrateSampledPhase(f, dwell []float64) []float64 {
	n := len(f)
	ph := make([]float64, n)
	for j := 1; j < n; j++ {
		dt := (dwell[j-1] + dwell[j]) / 2
		ph[j] = ph[j-1] - 2*math.Pi*(f[j-1]+f[j])/2*dt
	}
	ref := ph[n/2]
	for j := range ph {
		ph[j] -= ref
	}
	return ph
}

// span gives the smallest and largest of v; 0, 0 for none.
func span(v []float64) (lo, hi float64) {
	for j, x := range v {
		if j == 0 || x < lo {
			lo = x
		}
		if j == 0 || x > hi {
			hi = x
		}
	}
	return lo, hi
}

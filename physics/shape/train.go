package shape

import (
	"fmt"
	"math"
)

// Element is one pulse of a Train with the extra phase (rad) it is played at.
type Element struct {
	Pulse *Pulse
	Phase float64
}

// Train plays its elements back to back, each rotated by its own phase
// (B1 → B1·e^{iφ}), with gap seconds of zero field between neighbours. Of the
// common arguments it takes Phase, Center and Role; duration, samples, dwell,
// flip, peak, gradient and thickness belong to the elements and are errors here.
// Every element must share one gyromagnetic ratio. The train's nominal flip is
// undefined (NaN): measure it. Gradients and frequencies are kept per sample
// (zero in the gaps and in elements without them).
//
// Elements that share one centre offset (an off-centre composite) are joined
// phase-coherently at that frequency, as a synthesizer set to it plays them:
// each element's own ramp (referenced to its own midpoint) is taken off and one
// ramp runs through the whole train, so that in the frame of the band's centre
// the elements keep the phases given. The train's centre is then that offset
// plus its own center. Elements with different centres keep their own ramps.
func Train(elements []Element, gap float64, c Common) (*Pulse, error) {
	const name = "train"
	if len(elements) == 0 {
		return nil, fmt.Errorf("%s: give at least one element, got none", name)
	}
	if !(gap >= 0) || math.IsInf(gap, 0) {
		return nil, fmt.Errorf("%s: gap must be zero or positive, got %g s", name, gap)
	}
	switch {
	case c.Duration != 0 && !math.IsNaN(c.Duration):
		return nil, fmt.Errorf("%s: duration is the sum of the elements and gaps; do not give it", name)
	case c.Samples != 0 || (!math.IsNaN(c.Dwell) && c.Dwell != 0):
		return nil, fmt.Errorf("%s: samples and dwell belong to the elements; do not give them", name)
	case !math.IsNaN(c.Flip) || !math.IsNaN(c.Peak):
		return nil, fmt.Errorf("%s: flip and peak belong to the elements; do not give them", name)
	case c.Gradient != 0 || c.Thickness != 0:
		return nil, fmt.Errorf("%s: gradient and thickness belong to the elements; do not give them", name)
	case math.IsNaN(c.Phase) || math.IsInf(c.Phase, 0):
		return nil, fmt.Errorf("%s: phase must be finite, got %g rad", name, c.Phase)
	case math.IsNaN(c.Center) || math.IsInf(c.Center, 0):
		return nil, fmt.Errorf("%s: center must be finite, got %g Hz", name, c.Center)
	}
	var gamma float64
	hasGrad, hasFreq, adiabatic := false, false, true
	for i, e := range elements {
		if e.Pulse == nil || e.Pulse.Wave.Len() == 0 {
			return nil, fmt.Errorf("%s: element %d is empty", name, i+1)
		}
		if math.IsNaN(e.Phase) || math.IsInf(e.Phase, 0) {
			return nil, fmt.Errorf("%s: element %d: phase must be finite, got %g rad", name, i+1, e.Phase)
		}
		if i == 0 {
			gamma = e.Pulse.Gamma
		} else if e.Pulse.Gamma != gamma {
			return nil, fmt.Errorf("%s: element %d is for γ = %g rad/s/T, want %g as element 1", name, i+1, e.Pulse.Gamma, gamma)
		}
		hasGrad = hasGrad || e.Pulse.Wave.Gradient != nil
		hasFreq = hasFreq || e.Pulse.Freq != nil
		adiabatic = adiabatic && e.Pulse.Adiabatic
	}
	fc := elements[0].Pulse.Center
	for _, e := range elements[1:] {
		if e.Pulse.Center != fc {
			fc = 0 // different centres: each element keeps its own ramp
		}
	}
	// The train's ramp (its centre, fc + c.Center) is held over each sample:
	// elements whose samples are too long for it (a hard pulse is one sample)
	// are split into equal sub-samples of the same field, which is the same
	// waveform, so the ramp is held over at most 1/centerCyclesPerSample
	// cycle (see grid).
	split := make([]int, len(elements))
	total := 0
	for i, e := range elements {
		split[i] = 1
		if f := math.Abs(fc + c.Center); f != 0 {
			longest := 0.0
			for _, d := range e.Pulse.Wave.Dwell {
				longest = math.Max(longest, d)
			}
			split[i] = max(1, int(math.Ceil(centerCyclesPerSample*f*longest-1e-9)))
		}
		total += split[i] * e.Pulse.Wave.Len()
		if i > 0 && gap > 0 {
			total++
		}
	}
	if total > maxSamples {
		return nil, fmt.Errorf("%s: %d samples in all, want at most %d", name, total, maxSamples)
	}
	p := &Pulse{Shape: name, Gamma: gamma, Role: c.Role, Center: c.Center, Flip: math.NaN(), Adiabatic: adiabatic}
	w := &p.Wave
	w.Dwell = make([]float64, 0, total)
	w.B1 = make([]complex128, 0, total)
	if hasGrad {
		w.Gradient = make([]float64, 0, total)
	}
	if hasFreq {
		p.Freq = make([]float64, 0, total)
	}
	for i, e := range elements {
		if i > 0 && gap > 0 {
			w.Dwell = append(w.Dwell, gap)
			w.B1 = append(w.B1, 0)
			if hasGrad {
				w.Gradient = append(w.Gradient, 0)
			}
			if hasFreq {
				p.Freq = append(p.Freq, 0)
			}
		}
		s, co := math.Sincos(e.Phase)
		rot := complex(co, s)
		ew := &e.Pulse.Wave
		te, t := ew.Duration(), 0.0
		k := split[i]
		for j, b := range ew.B1 {
			if fc != 0 {
				// Undo applyPhase's ramp of the element (its phase stays).
				s, co := math.Sincos(2 * math.Pi * fc * (t + ew.Dwell[j]/2 - te/2))
				b *= complex(co, s)
				t += ew.Dwell[j]
			}
			for range k {
				w.Dwell = append(w.Dwell, ew.Dwell[j]/float64(k))
				w.B1 = append(w.B1, b*rot)
				if hasGrad {
					g := 0.0
					if ew.Gradient != nil {
						g = ew.Gradient[j]
					}
					w.Gradient = append(w.Gradient, g)
				}
				if hasFreq {
					f := 0.0
					if e.Pulse.Freq != nil {
						f = e.Pulse.Freq[j] - fc // applyPhase below adds it back
					}
					p.Freq = append(p.Freq, f)
				}
			}
		}
	}
	p.applyPhase(c.Phase, c.Center+fc)
	p.Center = c.Center + fc
	return p, nil
}

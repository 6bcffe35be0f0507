package physics

import (
	"fmt"
	"math"
)

// Waveform is a piecewise-constant RF pulse in the frame rotating at its carrier.
// Sample j lasts Dwell[j] seconds with complex field B1[j] = B1x + i·B1y (tesla).
// Frequency modulation is carried as phase in B1 (integrated), so the simulation
// frame stays at the carrier. Gradient, when non-nil, is the slice-select gradient
// per sample in T/m.
type Waveform struct {
	Dwell    []float64
	B1       []complex128
	Gradient []float64
}

// Len is the number of samples.
func (w *Waveform) Len() int { return len(w.B1) }

// Duration is the sum of the dwell times.
func (w *Waveform) Duration() float64 {
	t := 0.0
	for _, d := range w.Dwell {
		t += d
	}
	return t
}

// Validate reports an inconsistent waveform.
func (w *Waveform) Validate() error {
	if len(w.B1) == 0 {
		return fmt.Errorf("waveform has no samples")
	}
	if len(w.Dwell) != len(w.B1) {
		return fmt.Errorf("waveform has %d dwell times for %d samples", len(w.Dwell), len(w.B1))
	}
	if w.Gradient != nil && len(w.Gradient) != len(w.B1) {
		return fmt.Errorf("waveform has %d gradient samples for %d RF samples", len(w.Gradient), len(w.B1))
	}
	for j, d := range w.Dwell {
		if !(d > 0) || math.IsInf(d, 1) {
			return fmt.Errorf("sample %d has dwell %g s, want > 0", j, d)
		}
		if b := w.B1[j]; math.IsNaN(real(b)) || math.IsNaN(imag(b)) || math.IsInf(real(b), 0) || math.IsInf(imag(b), 0) {
			return fmt.Errorf("sample %d has B1 %g T, want a finite value", j, b)
		}
		if w.Gradient != nil && (math.IsNaN(w.Gradient[j]) || math.IsInf(w.Gradient[j], 0)) {
			return fmt.Errorf("sample %d has gradient %g T/m, want a finite value", j, w.Gradient[j])
		}
	}
	return nil
}

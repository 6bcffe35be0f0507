package dsl

import (
	"context"
	"math"
	"testing"
)

// An export read back by import keeps the pulse's meaning: the carrier offset
// travels in the frequency-offset column (constant: the centre; varying: the
// sweep) and the phase column is B1's own, so describe finds the same band, flip
// and ripples around the same centre. Tolerances: the samples round-trip exactly
// (shortest decimal of each float64), so the profile differs only by the span
// and grid the measurement derives (the design bandwidth of the original, the
// sweep read back for an import): 0.5 % on bandwidth and rotation, a tenth of a
// percentage point on ripples, 3 % on the transition. Closed form of the centre:
// Δf = γ̄·B0·δ (README conventions), 1H CODATA 2018 γ̄ = 42.577478518 MHz/T.
func TestExportImportRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name, pulse string
		center      float64 // Hz, expected centre of the imported pulse
	}{
		{"centred sinc", "sinc(duration = 2 ms, tbw = 4, flip = 90 deg)", 0},
		// Wider bands than 4/T: the import has no design bandwidth to size its
		// profile by, so the profile widens until the band's edges sit inside.
		{"sinc tbw 8", "sinc(duration = 2 ms, tbw = 8, flip = 90 deg)", 0},
		{"hamming sinc tbw 6", "sinc(duration = 2 ms, tbw = 6, window = hamming, flip = 90 deg)", 0},
		{"hann sinc tbw 12", "sinc(duration = 2 ms, tbw = 12, window = hann, flip = 90 deg)", 0},
		{"off-centre sinc", "sinc(duration = 2 ms, tbw = 4, flip = 90 deg, center = -3.5 ppm)", 42.577478518e6 * 3 * -3.5e-6},
		{"swept hsec", "hsec(duration = 8 ms, bandwidth = 4 kHz, peak = 30 uT, role = invert, center = 1 kHz)", 1000},
		{"chirp", "chirp(duration = 10 ms, bandwidth = 10 kHz, peak = 10 uT, role = invert)", 0},
		{"slice sinc", "sinc(duration = 2 ms, tbw = 4, flip = 90 deg, gradient = 10 mT/m, center = 500 Hz)", 500},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := NewSession(t.TempDir())
			execText(t, s, "field 3 T\npulse p = "+tc.pulse+"\nexport p to \"p.csv\"\nimport q from \"p.csv\"")
			pd, qd := s.state().names["p"].pulse, s.state().names["q"].pulse
			p, q := pd.Pulse, qd.Pulse
			if math.Abs(q.Center-tc.center) > 1e-9*math.Max(1, math.Abs(tc.center)) {
				t.Errorf("imported centre = %.9g Hz, want %.9g Hz", q.Center, tc.center)
			}
			if w := phaseFrequencyWarning(q); w != "" {
				t.Errorf("an export's phase and frequency columns disagree:%s", w)
			}
			if q.Role != p.Role || q.Gradient != p.Gradient {
				t.Errorf("imported role, gradient = %v, %g T/m, want %v, %g T/m", q.Role, q.Gradient, p.Role, p.Gradient)
			}
			// describe's own measurement (ev.measure), at the session's field.
			ev := &evaluator{ctx: context.Background(), sess: s, st: s.state()}
			a, err := ev.measure(pd, 0, nil)
			if err != nil {
				t.Fatal(err)
			}
			b, err := ev.measure(qd, 0, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !(a.Bandwidth > 0) {
				t.Fatalf("original has no bandwidth: %+v", a)
			}
			rel := func(what string, x, y, tol float64) {
				if !(math.Abs(x-y) <= tol*math.Abs(x)) {
					t.Errorf("%s: imported %g, original %g (want within %g relative)", what, y, x, tol)
				}
			}
			abs := func(what string, x, y, tol float64) {
				if math.IsNaN(x) != math.IsNaN(y) || math.Abs(x-y) > tol {
					t.Errorf("%s: imported %g, original %g (want within %g)", what, y, x, tol)
				}
			}
			rel("bandwidth", a.Bandwidth, b.Bandwidth, 0.005)
			rel("rotation at centre", a.Rotation, b.Rotation, 0.005)
			rel("transition", a.Transition, b.Transition, 0.03)
			abs("pass ripple", a.PassRipple, b.PassRipple, 1e-3)
			abs("stop ripple", a.StopRipple, b.StopRipple, 1e-3)
			abs("thickness (m)", a.Thickness, b.Thickness, 1e-3*math.Abs(a.Thickness))
			// A swept pulse read back is still swept, so its adiabatic threshold
			// is searched over the same offsets (the central half of its sweep).
			if p.Adiabatic != q.Adiabatic {
				t.Errorf("imported adiabatic = %v, original %v", q.Adiabatic, p.Adiabatic)
			}
			switch {
			case math.IsNaN(a.Threshold) != math.IsNaN(b.Threshold):
				t.Errorf("adiabatic threshold: imported %g, original %g", b.Threshold, a.Threshold)
			case p.Adiabatic && !math.IsNaN(a.Threshold):
				rel("adiabatic threshold", a.Threshold, b.Threshold, 0.002)
			}
			if !math.IsNaN(p.Flip) && !p.Adiabatic {
				rel("flip (area at the centre)", p.Flip, q.Flip, 1e-9)
			}
		})
	}
}

package dsl

import (
	"context"
	"math"
	"strings"
	"testing"
)

// A chemical shift meeting a frequency or a time becomes its offset
// Δf = γ̄·B0·δ, signed like γ (README conventions). Expected values are computed
// here by hand from the γ̄ the code cites: 1H CODATA 2018 42.577478518 MHz/T,
// 15N IUPAC 2001 (Harris et al., Pure Appl. Chem. 73:1795) −4.317266 MHz/T.
func TestShiftArithmetic(t *testing.T) {
	const b0 = 3.0 // T
	hz := func(gammaBar, ppm float64) float64 { return gammaBar * b0 * ppm * 1e-6 }
	for _, nuc := range []struct {
		name     string
		gammaBar float64 // Hz/T
	}{{"1H", 42.577478518e6}, {"15N", -4.317266e6}} {
		for _, tc := range []struct {
			expr string
			want float64
			dim  Dim
		}{
			{"3.5 ppm / bw", hz(nuc.gammaBar, 3.5) / 2000, dimNumber},
			{"bw / 3.5 ppm", 2000 / hz(nuc.gammaBar, 3.5), dimNumber},
			{"3.5 ppm + 100 Hz", hz(nuc.gammaBar, 3.5) + 100, dimFrequency},
			{"100 Hz - 3.5 ppm", 100 - hz(nuc.gammaBar, 3.5), dimFrequency},
			{"3.5 ppm * 2 ms", hz(nuc.gammaBar, 3.5) * 2e-3, dimNumber},
			{"-3.5 ppm", -3.5, dimPPM},
			{"3.5 ppm - 1 ppm", 2.5, dimPPM},
			{"3.5 ppm * 2", 7, dimPPM},
			{"3.5 ppm / (0.5 ppm)", 7, dimNumber},
		} {
			t.Run(nuc.name+"/"+tc.expr, func(t *testing.T) {
				s := NewSession(t.TempDir())
				execText(t, s, "nucleus "+nuc.name+"\nfield 3 T\nlet bw = 2 kHz\nlet r = "+tc.expr)
				got := s.state().names["r"].val.Q
				if got.D != tc.dim || math.Abs(got.V-tc.want) > 1e-12*math.Abs(tc.want) {
					t.Errorf("%s = %g %s, want %g %s", tc.expr, got.V, got.D.Name(), tc.want, tc.dim.Name())
				}
			})
		}
	}
	// A shift per length is a displacement rate, not an offset: it stays in ppm.
	s := NewSession(t.TempDir())
	execText(t, s, "field 3 T\nlet r = 0.3 mm / ppm")
	if got := s.state().names["r"].val.Q; got.D != dimLength.div(dimPPM) {
		t.Errorf("0.3 mm / ppm has dimension %s, want length per ppm", got.D.Name())
	}
}

// Without the main field a shift has no offset in Hz: combining it with a
// frequency or a time is an error that names the field, and the session goes on.
func TestShiftArithmeticNeedsField(t *testing.T) {
	for _, expr := range []string{"3.5 ppm / 2 kHz", "3.5 ppm + 100 Hz", "1 kHz - 3.5 ppm", "3.5 ppm * 2 ms"} {
		t.Run(expr, func(t *testing.T) {
			s := NewSession(t.TempDir())
			err := s.Exec(context.Background(), "print "+expr, Sink{})
			if err == nil || !strings.Contains(err.Error(), "without the main field") || !strings.Contains(err.Error(), "field 3 T") {
				t.Errorf("print %s without a field: got %v, want an error naming the field", expr, err)
			}
			if out := execText(t, s, "print 3.5 ppm * 2"); !strings.Contains(out, "7 ppm") {
				t.Errorf("after the error, print 3.5 ppm * 2 = %q, want 7 ppm", out)
			}
		})
	}
}

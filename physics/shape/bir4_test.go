package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// BIR-4 on resonance turns +z to Mz = cos θ for any B1 well above threshold
// (Garwood & Ke, J. Magn. Reson. 94:511, 1991; from memory; CHECKS.md). The sweep
// (±20 kHz) is kept well above the B1 (≤ 4.3 kHz), as the design needs; the
// tolerance 2e-3 is the residual non-adiabaticity, not an exact result.
func TestBir4FlipInsensitive(t *testing.T) {
	g := gammaH(t)
	scales := []float64{1, 1.5, 2.5, 3.5, 5}
	for _, theta := range []float64{45, 90, 135, 180} {
		t.Run(fmt.Sprint(theta), func(t *testing.T) {
			c := commonPeak(10e-3, 20e-6)
			c.Flip = theta * deg
			p, err := Bir4(c, g, 40e3, 0, 0)
			mustOK(t, err)
			near(t, "Pulse.Flip (deg)", p.Flip/deg, theta, 1e-12)
			r := simulate(t, p, []float64{0}, scales)
			for i, s := range scales {
				near(t, fmt.Sprintf("Mz at B1 × %g", s), r.Mz[i], math.Cos(theta*deg), 2e-3)
			}
		})
	}
}

// The phase jumps fall at T/4 and 3T/4 where the amplitude is zero, and the
// sweep runs 0 → +F, −F → +F, −F → 0 (Garwood & Ke 1991; from memory).
func TestBir4Segments(t *testing.T) {
	g := gammaH(t)
	c := commonPeak(8e-3, 10e-6)
	c.Flip = math.Pi / 2
	c.Samples = 800
	p, err := Bir4(c, g, 10e3, 0, 0)
	mustOK(t, err)
	q := p.Wave.Len() / 4
	for _, j := range []int{q - 1, q, 3*q - 1, 3 * q} {
		if a := cabs(p.Wave.B1[j]) / p.Peak(); a > 0.07 {
			t.Errorf("sample %d: relative amplitude %.3f by a phase jump, want near 0", j, a)
		}
	}
	for _, tc := range []struct {
		j    int
		want float64
	}{{0, 0}, {q - 1, 5e3}, {q, -5e3}, {2 * q, 0}, {3*q - 1, 5e3}, {3 * q, -5e3}, {4*q - 1, 0}} {
		near(t, fmt.Sprintf("Freq[%d] (Hz)", tc.j), p.Freq[tc.j], tc.want, 600)
	}
}

func ExampleBir4() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 10e-3
	c.Peak = 20e-6
	c.Flip = math.Pi / 2
	p, _ := Bir4(c, h, 40e3, 0, 0)
	pr, _ := Measure(context.Background(), p, MeasureOptions{})
	fmt.Printf("BIR-4 %.0f°: threshold %.1f µT\n", p.Flip*180/math.Pi, pr.Threshold*1e6)
	// Output: BIR-4 90°: threshold 8.4 µT
}

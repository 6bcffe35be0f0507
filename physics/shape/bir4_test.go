package shape

import (
	"context"
	"fmt"
	"math"
	"testing"

	"Nutate/physics"
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

// BIR-4 turns the way a hard pulse of the same phase does (README conventions:
// phase 0 puts B1 along +x, and a 90° pulse takes +z to +y for positive γ), so
// that one can replace the other without the signal changing sign: on
// resonance, +z goes to (−sin φ·sin θ, cos φ·sin θ, cos θ) for both (rotation
// about the axis at phase φ, Bloch equations), to 2e-2 for BIR-4 (residual
// non-adiabaticity: at 60 µT over 10 ms it tilts the axis by under 1°; at
// 20 µT by about 8°, so the check is made well above threshold).
func TestBir4TurnsLikeAHardPulse(t *testing.T) {
	g := gammaH(t)
	for _, tc := range []struct{ theta, phase float64 }{{90, 0}, {45, 90}, {135, 30}} {
		t.Run(fmt.Sprint(tc.theta, "_", tc.phase), func(t *testing.T) {
			c := commonPeak(10e-3, 60e-6)
			c.Flip, c.Phase = tc.theta*deg, tc.phase*deg
			b, err := Bir4(c, g, 40e3, 0, 0)
			mustOK(t, err)
			h, err := Rect(Common{Duration: 250e-6, Flip: tc.theta * deg, Phase: tc.phase * deg, Dwell: math.NaN(), Peak: math.NaN()}, g)
			mustOK(t, err)
			rb, rh := simulate(t, b, []float64{0}, nil), simulate(t, h, []float64{0}, nil)
			th, ph := tc.theta*deg, tc.phase*deg
			want := [3]float64{-math.Sin(ph) * math.Sin(th), math.Cos(ph) * math.Sin(th), math.Cos(th)}
			for k, name := range []string{"Mx", "My", "Mz"} {
				gotB := []float64{rb.Mx[0], rb.My[0], rb.Mz[0]}[k]
				gotH := []float64{rh.Mx[0], rh.My[0], rh.Mz[0]}[k]
				near(t, "hard pulse "+name, gotH, want[k], 1e-12)
				near(t, "BIR-4 "+name, gotB, want[k], 2e-2)
			}
		})
	}
}

// An excitation's target scales with its flip: |Mxy| ≥ 0.9·sin θ, so a 45°
// BIR-4 above threshold meets it (|Mxy| = sin 45° ≈ 0.707 ≥ 0.636) where the
// 90° target of 0.9 could never be met.
func TestTargetMetExciteFlip(t *testing.T) {
	if !TargetMet(RoleExcite, 45*deg, 0.70, 0, 0.71, 0) {
		t.Error("|Mxy| 0.70 after a 45° excitation: want the target met")
	}
	if TargetMet(RoleExcite, 45*deg, 0.60, 0, 0.8, 0) {
		t.Error("|Mxy| 0.60 after a 45° excitation: want the target missed (0.636)")
	}
	if !TargetMet(RoleExcite, math.NaN(), 0.95, 0, 0.3, 0) || TargetMet(RoleExcite, math.NaN(), 0.85, 0, 0.5, 0) {
		t.Error("no nominal flip: want the 90° target |Mxy| ≥ 0.9")
	}
}

// A plane rotation's target includes its phase: magnetization with the right
// flip but an axis tilted by 8° (0.14 from the promised vector) misses it,
// the promised vector meets it, for the excite role and for none.
func TestPlaneRotationTarget(t *testing.T) {
	p := &Pulse{Flip: 90 * deg, Plane: true, Axis: 0}
	tilt := 8 * deg
	if p.TargetMet(RoleExcite, -math.Sin(tilt), math.Cos(tilt), 0, 0) {
		t.Error("an axis tilted by 8° met a plane rotation's target")
	}
	for _, r := range []Role{RoleExcite, RoleNone} {
		if !p.TargetMet(r, 0, 1, 0, 0) {
			t.Errorf("role %v: the promised +y missed the target", r)
		}
	}
	// Without Plane only the role's own target applies: the tilt passes.
	q := &Pulse{Flip: 90 * deg}
	if !q.TargetMet(RoleExcite, -math.Sin(tilt), math.Cos(tilt), 0, 0) {
		t.Error("a pulse without a plane rotation was held to its phase")
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

// The threshold of a plane rotation asks for the rotation itself, phase
// included (Pulse.TargetMet): at 20 µT this pulse's axis is still tilted by
// about 8°, which leaves the magnetization 0.14 from +y; from about 23 µT on it
// stays within 0.1.
func ExampleBir4() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 10e-3
	c.Peak = 20e-6
	c.Flip = math.Pi / 2
	p, _ := Bir4(c, h, 40e3, 0, 0)
	pr, _ := Measure(context.Background(), p, MeasureOptions{})
	fmt.Printf("BIR-4 %.0f°: threshold %.1f µT\n", p.Flip*180/math.Pi, pr.Threshold*1e6)
	// Output: BIR-4 90°: threshold 23.0 µT
}

// A plane rotation's threshold does not depend on where its band sits or on
// the sign of γ: off centre the promised vector precesses with the centre
// (−π·center·T, the phase referenced at the midpoint), and a negative γ turns
// the other way, as a hard pulse does (Bloch equations). The threshold in Hz
// (γ̄·B1) is the same at centres 0, 650 and 700 Hz and for 1H and 15N.
func TestBir4ThresholdCentreAndGammaSign(t *testing.T) {
	n15, ok := physics.Lookup("15N")
	if !ok {
		t.Fatal("no 15N")
	}
	thresholdHz := func(gamma, center float64) float64 {
		gb := math.Abs(gamma) / (2 * math.Pi)
		c := commonPeak(10e-3, 3000/gb)
		c.Flip, c.Center, c.Role = 90*deg, center, RoleExcite
		p, err := Bir4(c, gamma, 40e3, 0, 0)
		mustOK(t, err)
		pr, err := Measure(context.Background(), p, MeasureOptions{})
		mustOK(t, err)
		if math.IsNaN(pr.Threshold) {
			t.Fatalf("γ %g, centre %g Hz: threshold not met", gamma, center)
		}
		return pr.Threshold * gb
	}
	ref := thresholdHz(gammaH(t), 0)
	for _, tc := range []struct {
		name          string
		gamma, center float64
	}{{"1H at 650 Hz", gammaH(t), 650}, {"1H at 700 Hz", gammaH(t), 700}, {"15N on resonance", n15.Gamma(), 0}, {"15N at 650 Hz", n15.Gamma(), 650}} {
		near(t, tc.name+": threshold (Hz)", thresholdHz(tc.gamma, tc.center), ref, 1e-3*ref)
	}
}

package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// silverMz is the infinite hyperbolic-secant inversion profile (Silver, Joseph &
// Hoult, Phys. Rev. A 31:2753, 1985; CHECKS.md, "Adiabatic pulses"): at offset
// Ω (rad/s), x = π(Ω/β + μ)/2, y = π(Ω/β − μ)/2,
// Mz = tanh x·tanh y + cos(π√(ω1²/β² − μ²))·sech x·sech y (cosh for a negative
// argument of the root).
func silverMz(w1, beta, mu, omega float64) float64 {
	x := math.Pi * (omega/beta + mu) / 2
	y := math.Pi * (omega/beta - mu) / 2
	a := w1*w1/(beta*beta) - mu*mu
	var c float64
	if a >= 0 {
		c = math.Cos(math.Pi * math.Sqrt(a))
	} else {
		c = math.Cosh(math.Pi * math.Sqrt(-a))
	}
	return math.Tanh(x)*math.Tanh(y) + c/(math.Cosh(x)*math.Cosh(y))
}

// HS1 against the closed form: β = 1000 s⁻¹, μ = 5, so bandwidth μβ/π; the
// check values Mz(0) = −0.372389 at 300 Hz and −0.938867 at 500 Hz are from
// CHECKS.md. The pulse is truncated at β·T/2 = 15 (sech 15 ≈ 6e-7), hence a
// tolerance of 5e-6 rather than the exact-Bloch 1e-6.
func TestHsecClosedForm(t *testing.T) {
	g := gammaH(t)
	const betaS, mu, T = 1000.0, 5.0, 30e-3
	bw := mu * betaS / math.Pi
	build := func(nu1 float64) *Pulse {
		c := commonPeak(T, 2*math.Pi*nu1/g)
		c.Samples = 30000
		p, err := Hsec(c, g, 1, bw, betaS*T/2)
		mustOK(t, err)
		return p
	}
	for _, tc := range []struct{ nu1, want float64 }{{300, -0.372389}, {500, -0.938867}} {
		r := simulate(t, build(tc.nu1), []float64{0}, nil)
		near(t, fmt.Sprintf("Mz(0) at %g Hz", tc.nu1), r.Mz[0], tc.want, 5e-6)
	}
	// The formula in general, off resonance and at other amplitudes.
	offs := []float64{-700, -250, 0, 150, 400, 900}
	for _, nu1 := range []float64{200, 450, 800} {
		p := build(nu1)
		r := simulate(t, p, offs, nil)
		for i, f := range offs {
			want := silverMz(2*math.Pi*nu1, betaS, mu, 2*math.Pi*f)
			near(t, fmt.Sprintf("Mz(%g Hz) at %g Hz", f, nu1), r.Mz[i], want, 1e-5)
		}
		// The recorded sweep is −μβ·tanh(βt)/2π Hz (Silver et al. 1985).
		for j, tj := range sampleTimes(p.Wave.Len(), T/float64(p.Wave.Len())) {
			if j%997 == 0 {
				near(t, "Freq (Hz)", p.Freq[j], -mu*betaS*math.Tanh(betaS*tj)/(2*math.Pi), 1e-9)
			}
		}
	}
}

// HSn inverts with a lower peak B1 than HS1 of the same bandwidth and duration,
// about half for HS8 (Tannús & Garwood, J. Magn. Reson. A 120:133, 1996; from
// memory). Thresholds as defined by Measure.
func TestHsecOrderThreshold(t *testing.T) {
	g := gammaH(t)
	var th []float64
	for _, n := range []int{1, 2, 4, 8} {
		p, err := Hsec(commonPeak(10e-3, 20e-6), g, n, 4000, 0)
		mustOK(t, err)
		pr, err := Measure(context.Background(), p, MeasureOptions{})
		mustOK(t, err)
		if math.IsNaN(pr.Threshold) {
			t.Fatalf("HS%d: no threshold", n)
		}
		th = append(th, pr.Threshold)
		// The inversion band of an adiabatic sweep is about its sweep range
		// (common practice).
		nearRel(t, fmt.Sprintf("HS%d inversion bandwidth", n), pr.Bandwidth, 4000, 0.03)
	}
	for i := 1; i < len(th); i++ {
		if !(th[i] < th[i-1]) {
			t.Errorf("thresholds %v µT: want them to fall with the order 1, 2, 4, 8", th)
		}
	}
	if r := th[3] / th[0]; !(r > 0.35 && r < 0.65) {
		t.Errorf("HS8/HS1 threshold ratio %.3f, want about 1/2", r)
	}
}

func ExampleHsec() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 8e-3
	c.Peak = 15e-6
	p, err := Hsec(c, h, 1, 5000, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	pr, err := Measure(context.Background(), p, MeasureOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s %s: inverts %.2f kHz, threshold %.1f µT\n", p.Shape, p.Role, pr.Bandwidth/1e3, pr.Threshold*1e6)
	// Output: hsec invert: inverts 4.87 kHz, threshold 23.2 µT
}

package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// Gaussian truncated at ±3σ (T = 6σ, cutoff e^−4.5): A = 0.416643, mean square
// 0.295402 (CHECKS.md, "Sinc and Gaussian").
func TestGaussFactors(t *testing.T) {
	g := gammaH(t)
	c := common(3e-3, 90*deg)
	c.Samples = 100001
	p, err := Gauss(c, g, 0, math.Exp(-4.5))
	mustOK(t, err)
	a, ms := shapeFactors(p)
	near(t, "A", a, 0.416643, 5e-7)
	near(t, "mean square", ms, 0.295402, 5e-7)
	// The same σ given by tbw gives the same waveform.
	q, err := Gauss(c, g, p.TBW, 0)
	mustOK(t, err)
	peak := p.Peak()
	for j := range p.Wave.B1 {
		if math.Abs(real(p.Wave.B1[j]-q.Wave.B1[j])) > 1e-12*peak {
			t.Fatalf("sample %d: cutoff %v, tbw %v", j, p.Wave.B1[j], q.Wave.B1[j])
		}
	}
}

// Small-tip profile of a Gaussian is its Fourier transform exp(−2π²σ²f²)
// (small-tip approximation, Pauly et al., J. Magn. Reson. 81:43, 1989; from
// memory): FWHM = tbw/T by the definition of tbw, and the 90 %–10 % distance
// (√ln 10 − √ln(1/0.9))/(√2·π·σ). Measured from the simulated profile; many
// samples, since each piecewise-constant sample weighs the spectrum by
// sinc(f·dt).
func TestGaussSmallTipProfile(t *testing.T) {
	g := gammaH(t)
	for _, tbw := range []float64{3, 4, 6} {
		t.Run(fmt.Sprint(tbw), func(t *testing.T) {
			T := 4e-3
			c := common(T, 0.5*deg)
			c.Samples = 2001
			p, err := Gauss(c, g, tbw, 0)
			mustOK(t, err)
			pr, err := Measure(context.Background(), p, MeasureOptions{})
			mustOK(t, err)
			nearRel(t, "bandwidth (Hz)", pr.Bandwidth, tbw/T, 1e-4)
			sigma := math.Sqrt(2*math.Ln2) * T / (math.Pi * tbw)
			want := (math.Sqrt(math.Log(10)) - math.Sqrt(-math.Log(0.9))) / (math.Sqrt2 * math.Pi * sigma)
			nearRel(t, "transition (Hz)", pr.Transition, want, 1e-4)
		})
	}
}

func ExampleGauss() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 3e-3
	c.Flip = math.Pi / 2
	p, _ := Gauss(c, h, 0, 0.01) // 1 % at the ends
	fmt.Printf("tbw %.3f, bandwidth %.0f Hz, peak %.2f µT\n", p.TBW, p.Bandwidth, p.Peak()*1e6)
	// Output: tbw 2.275, bandwidth 758 Hz, peak 4.75 µT
}

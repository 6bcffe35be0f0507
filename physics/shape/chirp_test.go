package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// Landau–Zener (1932; CHECKS.md, "Adiabatic pulses"): constant amplitude and an
// infinite linear sweep, Q = ω1²/|dΔω/dt|, give Mz = 2·exp(−πQ/2) − 1;
// Q = 1 → −0.584241. The chirp is finite: a ±100 kHz sweep with ω1/2π ≈ 1.8 kHz
// and quarter-sine edges over 10 % of the duration, hence a tolerance of 1e-4.
func TestChirpLandauZener(t *testing.T) {
	g := gammaH(t)
	const T, bw = 10e-3, 200e3
	rate := 2 * math.Pi * bw / T
	for _, tc := range []struct{ q, want float64 }{
		{1, -0.584241},
		{0.5, 2*math.Exp(-math.Pi/4) - 1},
		{2, 2*math.Exp(-math.Pi) - 1},
	} {
		t.Run(fmt.Sprint(tc.q), func(t *testing.T) {
			w1 := math.Sqrt(tc.q * rate)
			p, err := Chirp(commonPeak(T, w1/g), g, bw, 0.1)
			mustOK(t, err)
			r := simulate(t, p, []float64{0}, nil)
			near(t, "Mz", r.Mz[0], tc.want, 1e-4)
		})
	}
}

// The sweep is linear, −bandwidth/2 to +bandwidth/2, and the recorded
// frequency is where spins are on resonance: a spin at offset f passes
// resonance at t = f·T/bandwidth, so well above threshold a chirp cut short at
// its middle inverts spins below 0 Hz and leaves those above (Bloch equations in
// the frame of the carrier; checks the sign of the phase).
func TestChirpSweepSign(t *testing.T) {
	g := gammaH(t)
	const T, bw = 20e-3, 10e3
	p, err := Chirp(commonPeak(T, 20e-6), g, bw, 0.05)
	mustOK(t, err)
	n := p.Wave.Len()
	nearRel(t, "Freq first (Hz)", p.Freq[0], -bw/2*(1-1.0/float64(n)), 1e-9)
	half := *p
	half.Wave.Dwell = p.Wave.Dwell[:n/2]
	half.Wave.B1 = p.Wave.B1[:n/2]
	r := simulate(t, &half, []float64{-2500, 2500}, nil)
	if !(r.Mz[0] < -0.9 && r.Mz[1] > 0.9) {
		t.Errorf("first half of the sweep: Mz(−2.5 kHz) = %.3f, Mz(+2.5 kHz) = %.3f; want below −0.9 and above 0.9", r.Mz[0], r.Mz[1])
	}
}

func ExampleChirp() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 10e-3
	c.Peak = 10e-6
	p, err := Chirp(c, h, 20e3, 0.1)
	if err != nil {
		fmt.Println(err)
		return
	}
	pr, _ := Measure(context.Background(), p, MeasureOptions{})
	fmt.Printf("%d samples, sweep %.0f to %.0f Hz, inverts %.1f kHz\n", p.Wave.Len(), p.Freq[0], p.Freq[len(p.Freq)-1], pr.Bandwidth/1e3)
	// Output: 2000 samples, sweep -9995 to 9995 Hz, inverts 17.2 kHz
}

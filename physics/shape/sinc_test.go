package shape

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
)

// A = mean of the unit-peak sinc (CHECKS.md, "Sinc and Gaussian"): Hamming, TBW 4:
// 0.25097821; no window, TBW 4: 0.22570583. Many samples so the midpoint rule
// meets the continuous value.
func TestSincAreaFactor(t *testing.T) {
	g := gammaH(t)
	for _, tc := range []struct {
		win  Window
		want float64
	}{
		{WindowHamming, 0.25097821},
		{WindowNone, 0.22570583},
	} {
		t.Run(tc.win.String(), func(t *testing.T) {
			c := common(2e-3, 90*deg)
			c.Samples = 200001
			p, err := Sinc(c, g, 4, tc.win)
			mustOK(t, err)
			a, _ := shapeFactors(p)
			near(t, "A", a, tc.want, 5e-9)
		})
	}
}

// Peak B1 for flip θ is θ/(360°·γ̄·T·A): a 90° Hamming sinc, TBW 4, 2 ms, 1H:
// 11.6975 µT, 498.05 Hz (CHECKS.md, "Sinc and Gaussian").
func TestSincPeakForFlip(t *testing.T) {
	g := gammaH(t)
	for _, tc := range []struct {
		samples int
		tolUT   float64
	}{
		{20001, 5e-5}, // continuous limit, to the check's 6 figures
		{0, 2e-4},     // default sampling: midpoint-rule area error O(dt²)
	} {
		t.Run(fmt.Sprint(tc.samples), func(t *testing.T) {
			c := common(2e-3, 90*deg)
			c.Samples = tc.samples
			p, err := Sinc(c, g, 4, WindowHamming)
			mustOK(t, err)
			near(t, "peak (µT)", p.Peak()*1e6, 11.6975, tc.tolUT)
			near(t, "peak (Hz)", p.Peak()*g/(2*math.Pi), 498.05, tc.tolUT*42.6)
			near(t, "Pulse.Flip (deg)", p.Flip/deg, 90, 1e-9)
		})
	}
}

// TBW = number of zero crossings, ends included (Bernstein, King & Zhou 2004; from
// memory), so a sinc of an odd number L of lobes has L − 1 sign changes inside
// and tbw = L + 1; an even L has L sign changes (half lobes at the ends).
func TestSincLobes(t *testing.T) {
	g := gammaH(t)
	for _, lobes := range []int{1, 3, 5, 8} {
		t.Run(fmt.Sprint(lobes), func(t *testing.T) {
			c := common(4e-3, 30*deg)
			c.Samples = 1000
			p, err := SincLobes(c, g, lobes, WindowHann)
			mustOK(t, err)
			near(t, "tbw", p.TBW, float64(lobes+1), 0)
			changes := 0
			for j := 1; j < p.Wave.Len(); j++ {
				if (real(p.Wave.B1[j]) < 0) != (real(p.Wave.B1[j-1]) < 0) {
					changes++
				}
			}
			want := lobes - 1
			if lobes%2 == 0 {
				want = lobes
			}
			if changes != want {
				t.Errorf("%d sign changes, want %d", changes, want)
			}
			q, err := Sinc(c, g, TBWFromLobes(lobes), WindowHann)
			mustOK(t, err)
			for j := range q.Wave.B1 {
				if q.Wave.B1[j] != p.Wave.B1[j] {
					t.Fatalf("sample %d: lobes %v, tbw %v", j, p.Wave.B1[j], q.Wave.B1[j])
				}
			}
		})
	}
}

func ExampleSinc() {
	h := 2 * math.Pi * 42.577478518e6 // 1H, CODATA 2018
	c := NewCommon()
	c.Duration = 2e-3
	c.Flip = math.Pi / 2
	p, err := Sinc(c, h, 4, WindowHamming)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s tbw %g: peak %.2f µT (%.0f Hz), design bandwidth %.0f Hz\n",
		p.Shape, p.TBW, p.Peak()*1e6, p.Peak()*h/(2*math.Pi), p.Bandwidth)
	// Output: sinc tbw 4: peak 11.70 µT (498 Hz), design bandwidth 2000 Hz
}

func ExampleSincLobes() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 3e-3
	c.Flip = math.Pi / 6
	p, _ := SincLobes(c, h, 5, WindowHann)
	fmt.Printf("5 lobes: tbw %g, %.0f Hz\n", p.TBW, p.Bandwidth)
	// Output: 5 lobes: tbw 6, 2000 Hz
}

// A wide band gets samples enough for it: a sinc of TBW 300 over 10 ms (band
// 30 kHz) defaults to 8·300 + 1 samples and its measured FWHM is the design's
// (FWHM ≈ tbw/T for a sinc, Bernstein, King & Zhou 2004; 1 %), where 257
// samples (a sampling rate of 25.7 kHz) alias the band. Fewer samples than
// 2·tbw are refused, for sinc and gauss alike; the same Common with more
// samples is accepted.
func TestWideBandSamples(t *testing.T) {
	g := gammaH(t)
	p, err := Sinc(common(10e-3, 90*deg), g, 300, WindowNone)
	mustOK(t, err)
	if n := p.Wave.Len(); n != 2401 {
		t.Errorf("default samples for tbw 300: %d, want 2401", n)
	}
	pr, err := Measure(context.Background(), p, MeasureOptions{})
	mustOK(t, err)
	near(t, "FWHM (Hz)", pr.Bandwidth, 30e3, 300)
	c := common(10e-3, 90*deg)
	c.Samples = 599
	if _, err := Sinc(c, g, 300, WindowNone); err == nil || !strings.Contains(err.Error(), "want at least 2·tbw = 600") {
		t.Errorf("sinc with 599 samples for tbw 300: err %v, want a refusal naming 600", err)
	}
	if _, err := Gauss(c, g, 300, 0); err == nil || !strings.Contains(err.Error(), "want at least 2·tbw = 600") {
		t.Errorf("gauss with 599 samples for tbw 300: err %v, want a refusal naming 600", err)
	}
	c.Samples = 600
	_, err = Sinc(c, g, 300, WindowNone)
	mustOK(t, err)
	// Narrow bands keep the 257 default.
	p, err = Sinc(common(2e-3, 90*deg), g, 8, WindowNone)
	mustOK(t, err)
	if n := p.Wave.Len(); n != 257 {
		t.Errorf("default samples for tbw 8: %d, want 257", n)
	}
}

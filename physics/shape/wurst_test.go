package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// For a linear sweep the adiabaticity is set by Q = ω1²/|dΔω/dt| (Landau–Zener,
// 1932), so the threshold of a WURST at fixed duration grows as √bandwidth; and
// well above threshold it inverts the centre of its band (Kupce & Freeman,
// J. Magn. Reson. A 115:273, 1995; from memory).
func TestWurstThresholdScaling(t *testing.T) {
	g := gammaH(t)
	const T = 10e-3
	var th [2]float64
	for i, bw := range []float64{10e3, 40e3} {
		p, err := Wurst(commonPeak(T, 20e-6), g, bw, 0)
		mustOK(t, err)
		pr, err := Measure(context.Background(), p, MeasureOptions{})
		mustOK(t, err)
		th[i] = pr.Threshold
		// Amplitude (1 − |sin(πt/T)|ⁿ) vanishes at the ends and peaks mid-pulse.
		near(t, "first sample / peak", cabs(p.Wave.B1[0])/p.Peak(), 1-math.Pow(math.Cos(math.Pi/2/float64(p.Wave.Len())), 20), 1e-12)
		strong := *p
		strong.Wave.B1 = append([]complex128(nil), p.Wave.B1...)
		for j := range strong.Wave.B1 {
			strong.Wave.B1[j] *= complex(3*th[i]/p.Peak(), 0)
		}
		offs := []float64{-bw / 4, -bw / 8, 0, bw / 8, bw / 4}
		r := simulate(t, &strong, offs, nil)
		for k, f := range offs {
			if !(r.Mz[k] < -0.95) {
				t.Errorf("bandwidth %g: Mz(%g Hz) = %.4f at 3× threshold, want < −0.95", bw, f, r.Mz[k])
			}
		}
	}
	nearRel(t, "threshold ratio for 4× bandwidth", th[1]/th[0], 2, 0.05)
}

func ExampleWurst() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 10e-3
	c.Peak = 10e-6
	p, _ := Wurst(c, h, 20e3, 20)
	pr, _ := Measure(context.Background(), p, MeasureOptions{})
	fmt.Printf("WURST-20: threshold %.2f µT (%.0f Hz)\n", pr.Threshold*1e6, pr.ThresholdHz)
	// Output: WURST-20: threshold 18.31 µT (780 Hz)
}

package slr

import (
	"math"
	"math/rand/v2"
	"testing"

	"Nutate/physics/shape"
)

// User input never panics: awkward values give errors or pulses, never a panic
// or a non-finite waveform.
func TestAwkwardInputs(t *testing.T) {
	g := proton(t)
	vals := []float64{math.NaN(), math.Inf(1), math.Inf(-1), -1, 0, 1e-300, 0.5, 1, 2, 8, 1e6, 1e300}
	rng := rand.New(rand.NewPCG(5, 6))
	pick := func() float64 { return vals[rng.IntN(len(vals))] }
	for i := 0; i < 300; i++ {
		spec := Spec{Role: shape.Role(rng.IntN(6) - 1), TBW: pick(), PassRipple: pick() / 100, StopRipple: pick() / 100, Design: Design(rng.IntN(4))}
		c := shape.NewCommon()
		c.Duration = pick() * 1e-3
		c.Samples = []int{0, -3, 5, 64, 1 << 30}[rng.IntN(5)]
		c.Flip, c.Peak, c.Phase, c.Center = pick(), []float64{math.NaN(), 1e-5}[rng.IntN(2)], pick(), pick()
		c.Gradient, c.Thickness = []float64{0, pick()}[rng.IntN(2)], []float64{0, pick() * 1e-3}[rng.IntN(2)]
		c.Role = shape.Role(rng.IntN(5))
		func() {
			defer func() {
				if r := recover(); r != nil {
					t.Fatalf("panic for %+v %+v: %v", spec, c, r)
				}
			}()
			p, err := Pulse(spec, c, g)
			if err != nil {
				return
			}
			for j, b := range p.Wave.B1 {
				if math.IsNaN(real(b)) || math.IsNaN(imag(b)) || math.IsInf(real(b), 0) || math.IsInf(imag(b), 0) {
					t.Fatalf("B1[%d] = %v for %+v %+v", j, b, spec, c)
				}
			}
		}()
	}
}

package shape

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// User input never panics (project rule): every constructor, then Measure on
// whatever it accepts, with each argument in turn set to a hostile value.
func TestHostileArguments(t *testing.T) {
	g := gammaH(t)
	hostile := []float64{math.NaN(), math.Inf(1), math.Inf(-1), 0, -1, 1e-300, 1e300, 3.7}
	type build func(c Common, a, b, d float64) (*Pulse, error)
	hard, _ := Rect(common(1e-4, 1), g)
	shapes := []struct {
		name    string
		peakish bool // amplitude by peak
		a, b, d float64
		f       build
	}{
		{"rect", false, 0, 0, 0, func(c Common, _, _, _ float64) (*Pulse, error) { return Rect(c, g) }},
		{"sinc", false, 4, 0, 0, func(c Common, a, _, _ float64) (*Pulse, error) { return Sinc(c, g, a, WindowHann) }},
		{"gauss", false, 3, 0, 0, func(c Common, a, b, _ float64) (*Pulse, error) { return Gauss(c, g, a, b) }},
		{"hsec", true, 4000, 5, 0, func(c Common, a, b, _ float64) (*Pulse, error) { return Hsec(c, g, 2, a, b) }},
		{"chirp", true, 4000, 0.1, 0, func(c Common, a, b, _ float64) (*Pulse, error) { return Chirp(c, g, a, b) }},
		{"wurst", true, 4000, 20, 0, func(c Common, a, b, _ float64) (*Pulse, error) { return Wurst(c, g, a, b) }},
		{"bir4", true, 4000, 10, 1.5, func(c Common, a, b, d float64) (*Pulse, error) {
			c.Flip = 1
			return Bir4(c, g, a, b, d)
		}},
		{"train", false, 0, 0, 0, func(c Common, a, _, _ float64) (*Pulse, error) {
			c.Duration, c.Flip = math.NaN(), math.NaN()
			return Train([]Element{{hard, a}, {hard, 0}}, math.Abs(a), c)
		}},
		{"import", false, 1e-6, 1e-5, 0, func(c Common, a, b, _ float64) (*Pulse, error) {
			c.Duration = 0
			return FromSamples(Samples{Dwell: b, Amplitude: []float64{a, a / 2}, Freq: []float64{a, 0}}, c, g)
		}},
	}
	fields := []struct {
		name string
		set  func(c *Common, v float64)
	}{
		{"duration", func(c *Common, v float64) { c.Duration = v }},
		{"dwell", func(c *Common, v float64) { c.Dwell = v }},
		{"phase", func(c *Common, v float64) { c.Phase = v }},
		{"center", func(c *Common, v float64) { c.Center = v }},
		{"flip", func(c *Common, v float64) { c.Flip = v }},
		{"peak", func(c *Common, v float64) { c.Peak = v }},
		{"gradient", func(c *Common, v float64) { c.Gradient = v }},
		{"thickness", func(c *Common, v float64) { c.Thickness = v }},
		{"role", func(c *Common, v float64) { c.Role = Role(int(math.Mod(v, 100))) }},
	}
	for _, sh := range shapes {
		base := common(2e-3, 30*deg)
		if sh.peakish {
			base = commonPeak(2e-3, 10e-6)
		}
		// Measure runs on everything non-adiabatic, and on adiabatic pulses for
		// the ordinary value only (each threshold search costs ~10 ms).
		try := func(name string, v0 float64, c Common, a, b, d float64) {
			t.Run(sh.name+"/"+name, func(t *testing.T) {
				defer func() {
					if r := recover(); r != nil {
						t.Fatalf("panic: %v", r)
					}
				}()
				p, err := sh.f(c, a, b, d)
				if err != nil || p.Wave.Len() > 2000 || (p.Adiabatic && math.Abs(v0) != 3.7) {
					return
				}
				_, _ = Measure(context.Background(), p, MeasureOptions{Points: 41})
				_ = p.Role.String()
			})
		}
		for _, v := range hostile {
			for _, f := range fields {
				c := base
				f.set(&c, v)
				try(fmt.Sprintf("%s=%g", f.name, v), v, c, sh.a, sh.b, sh.d)
			}
			try(fmt.Sprintf("a=%g", v), v, base, v, sh.b, sh.d)
			try(fmt.Sprintf("b=%g", v), v, base, sh.a, v, sh.d)
			try(fmt.Sprintf("d=%g", v), v, base, sh.a, sh.b, v)
		}
	}
}

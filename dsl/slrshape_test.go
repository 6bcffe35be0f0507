package dsl

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"Nutate/physics"
)

// An SLR design of thousands of samples takes seconds: it stops when the cell
// is interrupted (the builder hands the session's context to the design). A
// context cancelled before the design starts makes it return at once with the
// cancellation; the same design with a live context succeeds.
func TestSLRDesignObeysInterrupt(t *testing.T) {
	b := &builder{vals: map[string]float64{"duration": 2e-3, "tbw": 8}, words: map[string]string{"role": "refocus"}, gamma: 2.6752218744e8}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	b.ctx = ctx
	if _, err := buildSLR(b); !errors.Is(err, context.Canceled) {
		t.Fatalf("design with a cancelled context: err %v, want context.Canceled", err)
	}
	b.ctx = context.Background()
	if _, err := buildSLR(b); err != nil {
		t.Fatalf("design with a live context: %v", err)
	}
}

// A sinc or gauss asked for a bandwidth gets that measured band: the role's own
// profile (|Mxy| for excite, Mz for invert and saturate, |β|² for refocus;
// Pauly et al., IEEE TMI 10:53, 1991) is half-way at ±bandwidth/2, simulated
// here at those two offsets, within 1 % of the half-way value's range.
func TestBandwidthIsMeasured(t *testing.T) {
	const gamma = 2.6752218744e8 // 1H, CODATA 2018
	cases := []struct {
		shape, window, role string
		flip                float64 // rad
	}{
		{"sinc", "hann", "excite", math.Pi / 2},
		{"sinc", "none", "invert", math.Pi},
		{"sinc", "hamming", "saturate", math.Pi / 2},
		{"gauss", "", "refocus", math.Pi},
		{"gauss", "", "excite", math.Pi / 6},
	}
	for _, c := range cases {
		t.Run(c.shape+"_"+c.window+"_"+c.role, func(t *testing.T) {
			spec, _ := lookupShape(c.shape)
			b := &builder{vals: map[string]float64{"duration": 2e-3, "bandwidth": 2000, "flip": c.flip}, words: map[string]string{"role": c.role}, gamma: gamma, ctx: context.Background()}
			if c.window != "" {
				b.words["window"] = c.window
			}
			p, err := spec.Build(b)
			if err != nil {
				t.Fatal(err)
			}
			r, err := physics.Simulate(context.Background(), &p.Wave, gamma, &physics.Isochromats{Offset: []float64{0, -1000, 1000, 50000}}, physics.Options{})
			if err != nil {
				t.Fatal(err)
			}
			v := func(i int) float64 {
				switch c.role {
				case "invert", "saturate":
					return r.Mz[i]
				case "refocus":
					return cmplx.Abs(r.Beta[i]) * cmplx.Abs(r.Beta[i])
				}
				return math.Hypot(r.Mx[i], r.My[i])
			}
			mid := (v(0) + v(3)) / 2
			for i := 1; i <= 2; i++ {
				if d := math.Abs(v(i)-mid) / math.Abs(v(0)-v(3)); d > 0.01 {
					t.Errorf("profile at %+g Hz is %.4f, want half-way %.4f (off by %.2g of the range)", []float64{0, -1000, 1000}[i], v(i), mid, d)
				}
			}
			t.Logf("design tbw %.4g (design bandwidth %.1f Hz), measured width %.1f Hz", p.TBW, p.Bandwidth, p.Width)
		})
	}
}

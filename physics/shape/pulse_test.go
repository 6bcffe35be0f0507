package shape

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Energy ∝ ∫B1² dt: hard 90° in 1 ms is 5.87165 µT and 34.4763 µT²·ms; the same
// flip in half the time doubles the energy; once per 10 ms its B1rms is
// 1.85678 µT (CHECKS.md, "Slices, chemical shift, energy").
func TestRectEnergy(t *testing.T) {
	g := gammaH(t)
	p, err := Rect(common(1e-3, 90*deg), g)
	mustOK(t, err)
	near(t, "peak (µT)", p.Peak()*1e6, 5.87165, 5e-6)
	near(t, "energy (µT²·ms)", p.Energy()*1e12*1e3, 34.4763, 5e-5)
	half, err := Rect(common(0.5e-3, 90*deg), g)
	mustOK(t, err)
	nearRel(t, "energy ratio, half duration", half.Energy()/p.Energy(), 2, 1e-12)
	pr, err := Measure(context.Background(), p, MeasureOptions{TR: 10e-3})
	mustOK(t, err)
	near(t, "B1rms (µT)", pr.B1rms*1e6, 1.85678, 5e-6)
	near(t, "energy via Measure (µT²·ms)", pr.Energy*1e15, 34.4763, 5e-5)
	// Flip = 360°·ν1·T (CHECKS.md, rectangular pulse): 90° at 1 kHz takes 250 µs.
	q, err := Rect(common(250e-6, 90*deg), g)
	mustOK(t, err)
	near(t, "ν1 (Hz)", q.Peak()*g/(2*math.Pi), 1000, 1e-9)
}

// The nominal flip solves the amplitude exactly whatever the sampling: the
// simulated on-resonance rotation equals it (Pauly et al. 1991: flip = 2·asin|β|).
func TestFlipSolvedExactly(t *testing.T) {
	g := gammaH(t)
	for _, flip := range []float64{10, 90, 150} {
		for _, n := range []int{1, 7, 64} {
			c := common(1e-3, flip*deg)
			c.Samples = n
			p, err := Rect(c, g)
			mustOK(t, err)
			r := simulate(t, p, []float64{0}, nil)
			got := 2 * math.Asin(math.Min(1, math.Hypot(real(r.Beta[0]), imag(r.Beta[0]))))
			near(t, fmt.Sprintf("rect %g° n=%d rotation (deg)", flip, n), got/deg, flip, 1e-6)
			near(t, "Pulse.Flip (deg)", p.Flip/deg, flip, 1e-9)
		}
	}
}

// Center moves the band by a phase ramp: the profile of a pulse centred at f0 is
// the profile of the uncentred pulse moved by f0 (shift theorem; Bloch
// equations in the frame of the carrier).
func TestCenterMovesBand(t *testing.T) {
	g := gammaH(t)
	// A phase ramp on piecewise-constant samples shifts the band exactly only
	// as the dwell → 0 (error ∝ (f0·dt)²), hence many samples.
	c := common(2e-3, 90*deg)
	c.Samples = 4001
	p0, err := Sinc(c, g, 4, WindowHamming)
	mustOK(t, err)
	c.Center = 1500
	c.Phase = 30 * deg
	p1, err := Sinc(c, g, 4, WindowHamming)
	mustOK(t, err)
	offs := []float64{-1000, -200, 0, 300, 900, 2500}
	shifted := make([]float64, len(offs))
	for i, f := range offs {
		shifted[i] = f + 1500
	}
	r0 := simulate(t, p0, offs, nil)
	r1 := simulate(t, p1, shifted, nil)
	for i := range offs {
		near(t, fmt.Sprintf("Mz at %g Hz", offs[i]), r1.Mz[i], r0.Mz[i], 1e-5)
		near(t, fmt.Sprintf("|Mxy| at %g Hz", offs[i]), math.Hypot(r1.Mx[i], r1.My[i]), math.Hypot(r0.Mx[i], r0.My[i]), 1e-5)
	}
	// At the band's centre the transverse phase turns by the pulse's phase, less
	// the carrier frame's lag over the second half of the pulse, 360°·f0·T/2
	// (rotating frame, Bloch equations).
	a0 := math.Atan2(r0.My[2], r0.Mx[2])
	a1 := math.Atan2(r1.My[2], r1.Mx[2])
	want := math.Remainder((30-360*1500*1e-3)*deg, 2*math.Pi)
	near(t, "phase turn at centre (deg)", math.Remainder(a1-a0-want, 2*math.Pi)/deg, 0, 1e-3)
	pr, err := Measure(context.Background(), p1, MeasureOptions{})
	mustOK(t, err)
	near(t, "band middle (Hz)", (pr.Edges[0]+pr.Edges[1])/2, 1500, 0.01)
}

// User input never panics and each error names the argument at fault
// (CONTRIBUTING rules: lowercase, naming the argument).
func TestCommonErrors(t *testing.T) {
	g := gammaH(t)
	nan := math.NaN()
	rect := func(mod func(*Common)) func() (*Pulse, error) {
		return func() (*Pulse, error) {
			c := common(1e-3, 90*deg)
			mod(&c)
			return Rect(c, g)
		}
	}
	hard, _ := Rect(common(1e-3, 90*deg), g)
	other, _ := Rect(common(1e-3, 90*deg), -g)
	cases := []struct {
		name, want string
		f          func() (*Pulse, error)
	}{
		{"flip and peak", "flip or peak, not both", rect(func(c *Common) { c.Peak = 1e-6 })},
		{"neither flip nor peak", "flip or peak", rect(func(c *Common) { c.Flip = nan })},
		{"negative duration", "duration must be positive, got -0.001", rect(func(c *Common) { c.Duration = -1e-3 })},
		{"zero duration", "duration", rect(func(c *Common) { c.Duration = 0 })},
		{"NaN duration", "duration", rect(func(c *Common) { c.Duration = nan })},
		{"samples and dwell", "samples or dwell, not both", rect(func(c *Common) { c.Samples = 4; c.Dwell = 1e-4 })},
		{"dwell not dividing", "dwell", rect(func(c *Common) { c.Dwell = 3e-4 })},
		{"negative dwell", "dwell", rect(func(c *Common) { c.Dwell = -1e-5 })},
		{"negative samples", "samples", rect(func(c *Common) { c.Samples = -3 })},
		{"too many samples", "samples", rect(func(c *Common) { c.Samples = 1 << 30 })},
		{"negative peak", "peak", rect(func(c *Common) { c.Flip = nan; c.Peak = -1e-6 })},
		{"infinite flip", "flip", rect(func(c *Common) { c.Flip = math.Inf(1) })},
		{"NaN phase", "phase", rect(func(c *Common) { c.Phase = nan })},
		{"NaN center", "center", rect(func(c *Common) { c.Center = nan })},
		{"gradient and thickness", "gradient or thickness, not both", rect(func(c *Common) { c.Gradient = 0.01; c.Thickness = 0.005 })},
		{"negative thickness", "thickness", rect(func(c *Common) { c.Thickness = -0.005 })},
		{"NaN gradient", "gradient", rect(func(c *Common) { c.Gradient = nan })},
		{"sinc tbw", "tbw", func() (*Pulse, error) { return Sinc(common(1e-3, 1), g, 0, WindowNone) }},
		{"sinc lobes", "lobes", func() (*Pulse, error) { return SincLobes(common(1e-3, 1), g, 0, WindowNone) }},
		{"gauss both", "tbw or cutoff, not both", func() (*Pulse, error) { return Gauss(common(1e-3, 1), g, 2, 0.1) }},
		{"gauss neither", "tbw or cutoff", func() (*Pulse, error) { return Gauss(common(1e-3, 1), g, 0, 0) }},
		{"gauss cutoff", "cutoff", func() (*Pulse, error) { return Gauss(common(1e-3, 1), g, 0, 1.5) }},
		{"gauss NaN tbw", "tbw", func() (*Pulse, error) { return Gauss(common(1e-3, 1), g, nan, 0) }},
		{"hsec flip", "flip", func() (*Pulse, error) {
			c := commonPeak(8e-3, 15e-6)
			c.Flip = math.Pi
			return Hsec(c, g, 1, 4000, 0)
		}},
		{"hsec without peak", "peak", func() (*Pulse, error) { return Hsec(commonPeak(8e-3, nan), g, 1, 4000, 0) }},
		{"hsec bandwidth", "bandwidth", func() (*Pulse, error) { return Hsec(commonPeak(8e-3, 15e-6), g, 1, -4000, 0) }},
		{"hsec order", "order", func() (*Pulse, error) { return Hsec(commonPeak(8e-3, 15e-6), g, -1, 4000, 0) }},
		{"hsec beta", "beta", func() (*Pulse, error) { return Hsec(commonPeak(8e-3, 15e-6), g, 1, 4000, -2) }},
		{"chirp ramp", "ramp", func() (*Pulse, error) { return Chirp(commonPeak(8e-3, 15e-6), g, 4000, 0.7) }},
		{"chirp flip", "flip", func() (*Pulse, error) { return Chirp(common(8e-3, 1), g, 4000, 0.1) }},
		{"wurst order", "order", func() (*Pulse, error) { return Wurst(commonPeak(8e-3, 15e-6), g, 4000, -2) }},
		{"wurst without peak", "peak", func() (*Pulse, error) { return Wurst(commonPeak(8e-3, nan), g, 4000, 0) }},
		{"bir4 without flip", "flip", func() (*Pulse, error) { return Bir4(commonPeak(8e-3, 15e-6), g, 4000, 0, 0) }},
		{"bir4 without peak", "peak", func() (*Pulse, error) { return Bir4(common(8e-3, 1), g, 4000, 0, 0) }},
		{"bir4 kappa", "kappa", func() (*Pulse, error) {
			c := commonPeak(8e-3, 15e-6)
			c.Flip = 1
			return Bir4(c, g, 4000, 0, 2)
		}},
		{"bir4 samples", "multiple of 4", func() (*Pulse, error) {
			c := commonPeak(8e-3, 15e-6)
			c.Flip = 1
			c.Samples = 1001
			return Bir4(c, g, 4000, 0, 0)
		}},
		{"train without elements", "at least one element", func() (*Pulse, error) { return Train(nil, 0, NewCommon()) }},
		{"train gap", "gap", func() (*Pulse, error) { return Train([]Element{{Pulse: hard}}, -1e-3, NewCommon()) }},
		{"train duration", "duration", func() (*Pulse, error) { return Train([]Element{{Pulse: hard}}, 0, common(1e-3, nan)) }},
		{"train flip", "flip", func() (*Pulse, error) { return Train([]Element{{Pulse: hard}}, 0, common(0, 1)) }},
		{"train nil element", "element 2", func() (*Pulse, error) { return Train([]Element{{Pulse: hard}, {}}, 0, NewCommon()) }},
		{"train nuclei", "element 2 is for γ", func() (*Pulse, error) {
			return Train([]Element{{Pulse: hard}, {Pulse: other}}, 0, NewCommon())
		}},
		{"import empty", "no samples", func() (*Pulse, error) { return FromSamples(Samples{Dwell: 1e-5}, NewCommon(), g) }},
		{"import dwell and times", "dwell or times", func() (*Pulse, error) {
			return FromSamples(Samples{Dwell: 1e-5, Times: []float64{0, 1e-5}, Amplitude: []float64{1e-6, 1e-6}}, NewCommon(), g)
		}},
		{"import times", "times must increase", func() (*Pulse, error) {
			return FromSamples(Samples{Times: []float64{0, 2e-5, 1e-5}, Amplitude: []float64{1e-6, 1e-6, 1e-6}}, NewCommon(), g)
		}},
		{"import phase length", "phase has 1 values, want 2", func() (*Pulse, error) {
			return FromSamples(Samples{Dwell: 1e-5, Amplitude: []float64{1e-6, 1e-6}, Phase: []float64{0}}, NewCommon(), g)
		}},
		{"import NaN amplitude", "amplitude of sample 2", func() (*Pulse, error) {
			return FromSamples(Samples{Dwell: 1e-5, Amplitude: []float64{1e-6, nan}}, NewCommon(), g)
		}},
		{"import flip and peak", "flip or peak, not both", func() (*Pulse, error) {
			c := common(0, 1)
			c.Peak = 1e-6
			return FromSamples(Samples{Dwell: 1e-5, Amplitude: []float64{1e-6, 1e-6}}, c, g)
		}},
		{"import no timing", "dwell, times or duration", func() (*Pulse, error) {
			return FromSamples(Samples{Amplitude: []float64{1e-6, 1e-6}}, NewCommon(), g)
		}},
		{"import duration mismatch", "does not match", func() (*Pulse, error) {
			return FromSamples(Samples{Dwell: 1e-5, Amplitude: []float64{1e-6, 1e-6}}, common(1e-3, nan), g)
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p, err := tc.f()
			if err == nil {
				t.Fatalf("got pulse %v, want an error containing %q", p.Shape, tc.want)
			}
			msg := err.Error()
			if !strings.Contains(msg, tc.want) {
				t.Errorf("error %q, want it to contain %q", msg, tc.want)
			}
			if msg != strings.ToLower(msg[:1])+msg[1:] {
				t.Errorf("error %q starts with a capital", msg)
			}
		})
	}
}

func ExampleRect() {
	h := 2 * math.Pi * 42.577478518e6 // 1H, CODATA 2018
	c := NewCommon()
	c.Duration = 250e-6
	c.Flip = math.Pi / 2
	p, err := Rect(c, h)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %.4f µT (%.1f Hz), %d sample\n", p.Shape, p.Peak()*1e6, p.Peak()*h/(2*math.Pi), p.Wave.Len())
	// Output: rect: 23.4866 µT (1000.0 Hz), 1 sample
}

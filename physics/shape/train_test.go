package shape

import (
	"fmt"
	"math"
	"testing"
)

// 90x-180y-90x (Levitt & Freeman, J. Magn. Reson. 33:473, 1979; from memory;
// CHECKS.md): on resonance with B1 scale s, Mz = −1 + 2·sin⁴(π(s − 1)/2);
// s = 0.9 → −0.998802, where a single 180° gives −0.951057. Exact Bloch: 1e-6.
func TestTrainComposite(t *testing.T) {
	g := gammaH(t)
	h90, err := Rect(common(250e-6, 90*deg), g)
	mustOK(t, err)
	h180, err := Rect(common(500e-6, 180*deg), g)
	mustOK(t, err)
	p, err := Train([]Element{{h90, 0}, {h180, 90 * deg}, {h90, 0}}, 0, NewCommon())
	mustOK(t, err)
	near(t, "duration (s)", p.Duration(), 1e-3, 1e-15)
	r := simulate(t, p, []float64{0}, []float64{0.9})
	near(t, "Mz at s = 0.9", r.Mz[0], -0.998802, 1e-6)
	single := simulate(t, h180, []float64{0}, []float64{0.9})
	near(t, "single 180°, Mz at s = 0.9", single.Mz[0], -0.951057, 1e-6)
	scales := []float64{0.7, 0.8, 0.95, 1, 1.1, 1.3}
	r = simulate(t, p, []float64{0}, scales)
	for i, s := range scales {
		want := -1 + 2*math.Pow(math.Sin(math.Pi*(s-1)/2), 4)
		near(t, fmt.Sprintf("Mz at s = %g", s), r.Mz[i], want, 1e-6)
	}
}

// The same composite with every element moved to a centre of 3 kHz (and a gap
// between elements) is the on-centre composite seen from the frame of that
// centre: Mz at 3 kHz + d equals Mz at d for the on-centre train (Bloch
// equations in a frame rotating at the centre; the elements are joined
// coherently at that frequency). Levitt–Freeman's Mz at s = 0.9 holds there
// (CHECKS.md value, tolerance of the held ramp's 0.1 % plus rounding). Joined
// element by element with their own ramps, the phases between elements would
// be off by 2π·3 kHz·(their spacing) and the composite would fail.
func TestTrainOffCentreCoherent(t *testing.T) {
	g := gammaH(t)
	build := func(center, gap float64) *Pulse {
		c90, c180 := common(250e-6, 90*deg), common(500e-6, 180*deg)
		c90.Center, c180.Center = center, center
		h90, err := Rect(c90, g)
		mustOK(t, err)
		h180, err := Rect(c180, g)
		mustOK(t, err)
		p, err := Train([]Element{{h90, 0}, {h180, 90 * deg}, {h90, 0}}, gap, NewCommon())
		mustOK(t, err)
		return p
	}
	const fc, gap = 3000.0, 37e-6
	off, on := build(fc, gap), build(0, gap)
	near(t, "train centre (Hz)", off.Center, fc, 0)
	ds := []float64{-400, -150, 0, 80, 300}
	offs := make([]float64, len(ds))
	for i, d := range ds {
		offs[i] = fc + d
	}
	a := simulate(t, off, offs, []float64{0.9})
	b := simulate(t, on, ds, []float64{0.9})
	for i, d := range ds {
		near(t, fmt.Sprintf("Mz at centre %+g Hz, s = 0.9", d), a.Mz[i], b.Mz[i], 3e-3)
	}
	near(t, "Mz at the centre, s = 0.9", a.Mz[2], -0.998802, 3e-3)

	// The train's own centre on on-carrier hard elements (one sample each):
	// the elements are split so the ramp is held over at most 1/40 cycle, and
	// the composite works at the centre as above. Held over whole elements,
	// the three phases would cancel and leave the band at the carrier.
	cc := NewCommon()
	cc.Center = fc
	h90, err := Rect(common(250e-6, 90*deg), g)
	mustOK(t, err)
	h180, err := Rect(common(500e-6, 180*deg), g)
	mustOK(t, err)
	own, err := Train([]Element{{h90, 0}, {h180, 90 * deg}, {h90, 0}}, gap, cc)
	mustOK(t, err)
	near(t, "own-centre train centre (Hz)", own.Center, fc, 0)
	if n := own.Wave.Len(); n < 3*30 {
		t.Errorf("own-centre train has %d samples, want the 1-sample elements split (≥ 30 each)", n)
	}
	o := simulate(t, own, offs, []float64{0.9})
	for i, d := range ds {
		near(t, fmt.Sprintf("own centre: Mz at centre %+g Hz, s = 0.9", d), o.Mz[i], b.Mz[i], 3e-3)
	}

	// One element: the train is that element, centre included.
	c := common(2e-3, 90*deg)
	c.Center = -2000
	s, err := Sinc(c, g, 4, WindowHann)
	mustOK(t, err)
	one, err := Train([]Element{{s, 0}}, 0, NewCommon())
	mustOK(t, err)
	near(t, "one-element train centre (Hz)", one.Center, s.Center, 0)
	for j := range s.Wave.B1 {
		if d := cabs(one.Wave.B1[j] - s.Wave.B1[j]); d > 1e-12*s.Peak() {
			t.Fatalf("sample %d differs by %g T", j, d)
		}
	}
}

// A gap is free precession: nothing on resonance, a turn of 2π·f·gap about z
// off resonance (Bloch equations).
func TestTrainGapAndPhase(t *testing.T) {
	g := gammaH(t)
	h90, err := Rect(common(250e-6, 90*deg), g)
	mustOK(t, err)
	const gap, f = 1e-3, 125.0
	p, err := Train([]Element{{h90, 0}, {h90, 0}}, gap, NewCommon())
	mustOK(t, err)
	if p.Wave.Len() != 3 || p.Wave.B1[1] != 0 || p.Wave.Dwell[1] != gap {
		t.Fatalf("train has %d samples, middle %v for %g s; want 3 with a zero gap of %g s", p.Wave.Len(), p.Wave.B1[1], p.Wave.Dwell[1], gap)
	}
	r := simulate(t, p, []float64{0}, nil)
	near(t, "Mz on resonance", r.Mz[0], -1, 1e-12)
	// With f·gap = 1/8 the gap turns the off-resonance magnetization by 45°.
	// Compare with the train built by hand: 90, free precession, 90.
	free, err := FromSamples(Samples{Dwell: gap, Amplitude: []float64{0}}, NewCommon(), g)
	mustOK(t, err)
	q, err := Train([]Element{{h90, 0}, {free, 0}, {h90, 0}}, 0, NewCommon())
	mustOK(t, err)
	a := simulate(t, p, []float64{f}, nil)
	b := simulate(t, q, []float64{f}, nil)
	near(t, "Mz off resonance, gap vs free sample", a.Mz[0], b.Mz[0], 1e-12)
	// An element's phase acts as the phase of the pulse itself.
	c := common(250e-6, 90*deg)
	c.Phase = 60 * deg
	h60, err := Rect(c, g)
	mustOK(t, err)
	one, err := Train([]Element{{h90, 60 * deg}}, 0, NewCommon())
	mustOK(t, err)
	near(t, "phased element, B1 real", real(one.Wave.B1[0]), real(h60.Wave.B1[0]), 1e-18)
	near(t, "phased element, B1 imag", imag(one.Wave.B1[0]), imag(h60.Wave.B1[0]), 1e-18)
}

func ExampleTrain() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 250e-6
	c.Flip = math.Pi / 2
	h90, _ := Rect(c, h)
	c.Duration = 500e-6
	c.Flip = math.Pi
	h180, _ := Rect(c, h)
	p, err := Train([]Element{{h90, 0}, {h180, math.Pi / 2}, {h90, 0}}, 0, NewCommon())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d samples, %.0f µs\n", p.Shape, p.Wave.Len(), p.Duration()*1e6)
	// Output: train: 3 samples, 1000 µs
}

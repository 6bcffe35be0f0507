package shape

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"Nutate/physics"
)

// Small-tip FWHM of a rectangular pulse is 1.206709/T (CHECKS.md, rectangular
// pulse); at 0.1° the small-tip approximation holds to about 1e-6.
func TestMeasureRectSmallTip(t *testing.T) {
	g := gammaH(t)
	for _, T := range []float64{0.2e-3, 1e-3, 5e-3} {
		p, err := Rect(common(T, 0.1*deg), g)
		mustOK(t, err)
		pr, err := Measure(context.Background(), p, MeasureOptions{})
		mustOK(t, err)
		nearRel(t, fmt.Sprintf("FWHM at T = %g s", T), pr.Bandwidth, 1.206709/T, 1e-5)
	}
}

// The reported bandwidth is where the simulated profile of the role's own
// quantity crosses half of its design pass-band value (Properties.Bandwidth;
// for inversion Mz = 0, for a 90° excitation |Mxy| = 0.5): checked by
// simulating at the reported edges independently, for every role. Quantities
// from Cayley–Klein parameters (Pauly et al., IEEE TMI 10:53, 1991): inversion
// (1 − Mz)/2 = |β|², refocusing |β|².
func TestMeasureHalfCrossing(t *testing.T) {
	g := gammaH(t)
	build := func(role Role, flip float64) *Pulse {
		c := common(3e-3, flip*deg)
		c.Role = role
		p, err := Sinc(c, g, 6, WindowHann)
		mustOK(t, err)
		return p
	}
	hs, err := Hsec(commonPeak(8e-3, 25e-6), g, 1, 5000, 0)
	mustOK(t, err)
	value := func(role Role, r *physics.Result, i int) float64 {
		switch role {
		case RoleInvert:
			return (1 - r.Mz[i]) / 2
		case RoleRefocus:
			return math.Pow(cmplx.Abs(r.Beta[i]), 2)
		case RoleSaturate:
			return 1 - math.Abs(r.Mz[i])
		}
		return math.Hypot(r.Mx[i], r.My[i])
	}
	for _, tc := range []struct {
		name string
		p    *Pulse
	}{
		{"excite 90", build(RoleExcite, 90)},
		{"invert 180", build(RoleInvert, 180)},
		{"refocus 180", build(RoleRefocus, 180)},
		{"saturate 90", build(RoleSaturate, 90)},
		{"none 30", build(RoleNone, 30)},
		{"hsec invert", hs},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pr, err := Measure(context.Background(), tc.p, MeasureOptions{})
			mustOK(t, err)
			if pr.Role != tc.p.Role {
				t.Errorf("role %v, want %v", pr.Role, tc.p.Role)
			}
			r := simulate(t, tc.p, []float64{tc.p.Center, pr.Edges[0], pr.Edges[1]}, nil)
			near(t, "on-band value", value(pr.Role, r, 0), pr.OnBand, 1e-12)
			want := map[Role]float64{RoleExcite: 1, RoleInvert: 1, RoleRefocus: 1, RoleSaturate: 1, RoleNone: 0.5}[pr.Role] // sin 90°, 1, sin² 90°, 1, sin 30°
			if !pr.PassDesign {
				t.Errorf("pass value not from the design")
			}
			near(t, "pass value", pr.PassValue, want, 1e-12)
			near(t, "value at left edge", value(pr.Role, r, 1), want/2, 1e-6)
			near(t, "value at right edge", value(pr.Role, r, 2), want/2, 1e-6)
			near(t, "bandwidth = edge distance", pr.Bandwidth, pr.Edges[1]-pr.Edges[0], 1e-9)
			if !(pr.Transition > 0 && pr.Transition < pr.Bandwidth) {
				t.Errorf("transition %g Hz, want between 0 and the bandwidth %g Hz", pr.Transition, pr.Bandwidth)
			}
		})
	}
}

// Ripples as defined by Properties, recomputed from an independent dense
// simulation: Measure's coarser grid may miss a ripple's extreme by a little,
// never exceed it by more than the crossings' precision.
func TestMeasureRipple(t *testing.T) {
	g := gammaH(t)
	c := common(4e-3, 90*deg)
	c.Role = RoleExcite
	p, err := Sinc(c, g, 8, WindowNone) // no window: visible ripple (Gibbs)
	mustOK(t, err)
	pr, err := Measure(context.Background(), p, MeasureOptions{})
	mustOK(t, err)
	span := pr.Profile.Offset[len(pr.Profile.Offset)-1]
	offs := make([]float64, 8001)
	for i := range offs {
		offs[i] = -span + 2*span*float64(i)/float64(len(offs)-1)
	}
	r := simulate(t, p, offs, nil)
	pass, stop := 0.0, 0.0
	for i, f := range offs {
		v := math.Hypot(r.Mx[i], r.My[i])
		if math.Abs(f) <= pr.Bandwidth/2-pr.Transition {
			pass = math.Max(pass, math.Abs(v-1)) // |Mxy| − sin 90°
		}
		if math.Abs(f) >= pr.Bandwidth/2+pr.Transition {
			stop = math.Max(stop, v)
		}
	}
	if !(pass > 0.005 && stop > 0.005) {
		t.Fatalf("dense ripples pass %g, stop %g: want a sinc without window to show ripple", pass, stop)
	}
	for _, x := range []struct {
		name       string
		got, dense float64
	}{{"pass", pr.PassRipple, pass}, {"stop", pr.StopRipple, stop}} {
		if !(x.got <= x.dense*(1+1e-9) && x.got >= 0.9*x.dense) {
			t.Errorf("%s ripple %g, want within 10 %% below the dense grid's %g", x.name, x.got, x.dense)
		}
	}
}

// The same waveform sampled 100× more finely has the same profile (to about
// 1e-6: a piecewise-constant sinc converges as the dwell shrinks), so Measure
// must give the same figures: the profile's grid follows the pulse's duration,
// not its sample count. Before, a long waveform got a coarse grid that stepped
// over the null between the main lobe and the first side lobe, so the 10 %
// crossing and the stop region moved beyond the side lobe (transition 912 Hz
// instead of 353 Hz, stop ripple 5 % instead of 23 %).
func TestMeasureIndependentOfSampling(t *testing.T) {
	g := gammaH(t)
	measure := func(samples int) Properties {
		c := common(2e-3, 90*deg)
		c.Samples = samples
		p, err := Sinc(c, g, 8, WindowNone)
		mustOK(t, err)
		pr, err := Measure(context.Background(), p, MeasureOptions{})
		mustOK(t, err)
		return pr
	}
	a, b := measure(257), measure(25700)
	for _, x := range []struct {
		name string
		a, b float64
		tol  float64 // relative
	}{
		{"bandwidth", a.Bandwidth, b.Bandwidth, 1e-3},
		{"transition", a.Transition, b.Transition, 0.01},
		{"pass ripple", a.PassRipple, b.PassRipple, 0.02},
		{"stop ripple", a.StopRipple, b.StopRipple, 0.02},
	} {
		if !(math.Abs(x.a-x.b) <= x.tol*math.Abs(x.a)) {
			t.Errorf("%s: %g with 257 samples, %g with 25700; want within %g relative", x.name, x.a, x.b, x.tol)
		}
	}
}

// The threshold is the lowest B1 meeting the target (Properties.Threshold):
// checked independently, the target holds at the reported B1 and fails just
// below it. Target for inversion: Mz ≤ −0.9 over the central half of the band.
func TestMeasureThreshold(t *testing.T) {
	g := gammaH(t)
	p, err := Hsec(commonPeak(10e-3, 20e-6), g, 1, 4000, 0)
	mustOK(t, err)
	pr, err := Measure(context.Background(), p, MeasureOptions{})
	mustOK(t, err)
	near(t, "ThresholdHz / γ̄·Threshold", pr.ThresholdHz, pr.Threshold*g/(2*math.Pi), 1e-9)
	offs := make([]float64, 11)
	for i := range offs {
		offs[i] = -1000 + 200*float64(i)
	}
	worst := func(scale float64) float64 {
		r := simulate(t, p, offs, []float64{scale})
		w := -1.0
		for _, mz := range r.Mz {
			w = math.Max(w, mz)
		}
		return w
	}
	s := pr.Threshold / p.Peak()
	if w := worst(s); !(w <= -0.9) {
		t.Errorf("at the threshold, worst Mz = %.6f, want ≤ −0.9", w)
	}
	if w := worst(s * (1 - 1e-3)); !(w > -0.9) {
		t.Errorf("0.1 %% below the threshold, worst Mz = %.6f, want > −0.9", w)
	}
	// Not adiabatic: no threshold.
	q, err := Rect(common(1e-3, math.Pi), g)
	mustOK(t, err)
	qr, err := Measure(context.Background(), q, MeasureOptions{})
	mustOK(t, err)
	if !math.IsNaN(qr.Threshold) {
		t.Errorf("rect threshold %g, want NaN", qr.Threshold)
	}
}

// Thickness = BW/(γ̄G): 2 kHz at 10 mT/m → 4.69732 mm (1H); displacement =
// (Δf/BW)·thickness, with 1 ppm = γ̄·B0·1e-6 Hz (CHECKS.md, "Slices, chemical
// shift, energy").
func TestSliceAndShift(t *testing.T) {
	g := gammaH(t)
	near(t, "thickness (mm)", SliceThickness(2000, g, 0.010)*1e3, 4.69732, 5e-6)
	const field, ppm = 3.0, 3.5 // fat–water, about 3.5 ppm (common practice)
	df := ppm * 1e-6 * field * g / (2 * math.Pi)
	nearRel(t, "displacement", ShiftPerPPM(field, 0.010)*ppm, df/2000*SliceThickness(2000, g, 0.010), 1e-12)
	// Gradient given (a thickness gives the gradient through the measured
	// width instead: TestThicknessIsMeasured).
	c := common(2e-3, 90*deg)
	c.Gradient = 0.010
	p, err := Sinc(c, g, 4, WindowHamming) // design bandwidth 2 kHz
	mustOK(t, err)
	if len(p.Wave.Gradient) != p.Wave.Len() {
		t.Fatalf("%d gradient samples, want %d", len(p.Wave.Gradient), p.Wave.Len())
	}
	pr, err := Measure(context.Background(), p, MeasureOptions{Field: field})
	mustOK(t, err)
	nearRel(t, "measured thickness", pr.Thickness, SliceThickness(pr.Bandwidth, g, p.Gradient), 1e-12)
	nearRel(t, "shift (mm/ppm)", pr.ShiftPerPPM*1e3, 0.3, 1e-6) // G from a 6-figure thickness
	// A constant gradient maps offset f to position f/(γ̄G): the profile over
	// position at the measured half-thickness is half the on-band value.
	iso := physics.Isochromats{Position: []float64{0, pr.Thickness / 2, -pr.Thickness / 2}}
	r, err := physics.Simulate(context.Background(), &p.Wave, g, &iso, physics.Options{})
	mustOK(t, err)
	for i := 1; i < 3; i++ {
		near(t, "|Mxy| at ± thickness/2 / on-band", math.Hypot(r.Mx[i], r.My[i])/math.Hypot(r.Mx[0], r.My[0]), 0.5, 1e-6)
	}
}

// A cancelled context stops a measurement.
func TestMeasureCancel(t *testing.T) {
	g := gammaH(t)
	p, err := Hsec(commonPeak(10e-3, 20e-6), g, 1, 4000, 0)
	mustOK(t, err)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Measure(ctx, p, MeasureOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("error %v, want context.Canceled", err)
	}
	if _, err := Measure(context.Background(), p, MeasureOptions{TR: 1e-3}); err == nil {
		t.Errorf("tr shorter than the pulse: no error")
	}
	if _, err := Measure(context.Background(), &Pulse{}, MeasureOptions{}); err == nil {
		t.Errorf("empty pulse: no error")
	}
}

// A negative-γ nucleus rotates the other way, but its profiles' magnitudes
// are those of a positive γ of the same size (Bloch equations; CHECKS.md
// conventions: reversing Δω flips Mx only).
func TestMeasureNegativeGamma(t *testing.T) {
	n15, ok := physics.Lookup("15N")
	if !ok {
		t.Fatal("no 15N")
	}
	c := common(2e-3, 90*deg)
	neg, err := Sinc(c, n15.Gamma(), 4, WindowHann)
	mustOK(t, err)
	pos, err := Sinc(c, -n15.Gamma(), 4, WindowHann)
	mustOK(t, err)
	a, err := Measure(context.Background(), neg, MeasureOptions{})
	mustOK(t, err)
	b, err := Measure(context.Background(), pos, MeasureOptions{})
	mustOK(t, err)
	nearRel(t, "bandwidth", a.Bandwidth, b.Bandwidth, 1e-9)
	nearRel(t, "peak Hz", a.PeakHz, b.PeakHz, 1e-12)
	near(t, "rotation (deg)", a.Rotation/deg, 90, 1e-6)
}

func ExampleMeasure() {
	h := 2 * math.Pi * 42.577478518e6
	c := NewCommon()
	c.Duration = 2e-3
	c.Flip = math.Pi / 2
	c.Role = RoleExcite
	p, _ := Sinc(c, h, 4, WindowHamming)
	pr, err := Measure(context.Background(), p, MeasureOptions{TR: 10e-3})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("peak %.2f µT (%.0f Hz), flip %.0f°\n", pr.Peak*1e6, pr.PeakHz, pr.Flip*180/math.Pi)
	fmt.Printf("bandwidth %.0f Hz, transition %.0f Hz\n", pr.Bandwidth, pr.Transition)
	fmt.Printf("energy %.2f µT²·ms, B1rms %.3f µT (relative, waveform-only estimates)\n", pr.Energy*1e15, pr.B1rms*1e6)
	// Output:
	// peak 11.70 µT (498 Hz), flip 90°
	// bandwidth 2178 Hz, transition 741 Hz
	// energy 55.11 µT²·ms, B1rms 2.348 µT (relative, waveform-only estimates)
}

func benchmarkMeasure(b *testing.B, p *Pulse) {
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Measure(context.Background(), p, MeasureOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMeasureSinc(b *testing.B) {
	p, err := Sinc(common(2e-3, 90*deg), gammaH(b), 4, WindowHamming)
	mustOK(b, err)
	benchmarkMeasure(b, p)
}

func BenchmarkMeasureHsec(b *testing.B) {
	p, err := Hsec(commonPeak(8e-3, 25e-6), gammaH(b), 1, 5000, 0)
	mustOK(b, err)
	benchmarkMeasure(b, p)
}

func BenchmarkMeasureWurst(b *testing.B) {
	p, err := Wurst(commonPeak(10e-3, 20e-6), gammaH(b), 40e3, 0)
	mustOK(b, err)
	benchmarkMeasure(b, p)
}

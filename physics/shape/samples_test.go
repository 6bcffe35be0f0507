package shape

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// A waveform written out as amplitude, phase and frequency per sample and read
// back is the same waveform (round trip; common practice).
func TestFromSamplesRoundTrip(t *testing.T) {
	g := gammaH(t)
	src, err := Chirp(commonPeak(5e-3, 12e-6), g, 8e3, 0.1)
	mustOK(t, err)
	n := src.Wave.Len()
	s := Samples{Dwell: src.Wave.Dwell[0], Amplitude: make([]float64, n), Phase: make([]float64, n), Freq: src.Freq}
	for j, b := range src.Wave.B1 {
		s.Amplitude[j] = cmplx.Abs(b)
		s.Phase[j] = cmplx.Phase(b)
	}
	times := make([]float64, n)
	for j := range times {
		times[j] = 0.25 + float64(j)*src.Wave.Dwell[0] // any origin
	}
	for _, tc := range []struct {
		name string
		s    Samples
	}{{"dwell", s}, {"times", Samples{Times: times, Amplitude: s.Amplitude, Phase: s.Phase, Freq: s.Freq}}} {
		t.Run(tc.name, func(t *testing.T) {
			p, err := FromSamples(tc.s, NewCommon(), g)
			mustOK(t, err)
			if p.Wave.Len() != n {
				t.Fatalf("%d samples, want %d", p.Wave.Len(), n)
			}
			for j := range p.Wave.B1 {
				if cmplx.Abs(p.Wave.B1[j]-src.Wave.B1[j]) > 1e-18 || math.Abs(p.Wave.Dwell[j]-src.Wave.Dwell[j]) > 1e-15 {
					t.Fatalf("sample %d: %v for %g s, want %v for %g s", j, p.Wave.B1[j], p.Wave.Dwell[j], src.Wave.B1[j], src.Wave.Dwell[j])
				}
			}
			near(t, "Freq[0]", p.Freq[0], src.Freq[0], 0)
			// A linear sweep sampled at midpoints spans (n−1)/n of its range;
			// the import widens it back by half a sample at each end.
			near(t, "Sweep (Hz)", p.Sweep, src.Sweep, 1e-6)
			near(t, "Center (Hz)", p.Center, src.Center, 1e-6)
		})
	}
	// Without the phase, the frequency is integrated: the same sweep up to the
	// integration rule (trapezoid here, Simpson in Chirp).
	p, err := FromSamples(Samples{Dwell: s.Dwell, Amplitude: s.Amplitude, Freq: s.Freq}, NewCommon(), g)
	mustOK(t, err)
	offs := []float64{-3000, -1000, 0, 2000}
	a := simulate(t, p, offs, nil)
	b := simulate(t, src, offs, nil)
	for i, f := range offs {
		near(t, fmt.Sprintf("Mz(%g Hz), integrated vs given phase", f), a.Mz[i], b.Mz[i], 1e-3)
	}
}

// A constant frequency f0 is a band centred at f0 (Bloch equations in the frame
// of the carrier: checks the sign of the integration); and a flip rescales the
// data so that γ|∫B1 dt|, in the frame following f0, is the flip, which then is
// the simulated rotation at f0 (Pauly et al. 1991: 2·asin|β|).
func TestFromSamplesFrequencyAndFlip(t *testing.T) {
	g := gammaH(t)
	const n, dt, f0 = 200, 5e-6, 2500.0
	amp := make([]float64, n)
	freq := make([]float64, n)
	for j := range amp {
		amp[j] = 1e-6 * math.Sin(math.Pi*(float64(j)+0.5)/n)
		freq[j] = f0
	}
	c := NewCommon()
	c.Flip = 20 * deg
	p, err := FromSamples(Samples{Dwell: dt, Amplitude: amp, Freq: freq}, c, g)
	mustOK(t, err)
	near(t, "Pulse.Flip (deg)", p.Flip/deg, 20, 1e-9)
	// Each sample holds its phase, which weighs the response at f0 by
	// sinc(f0·dt) (zero-order hold; Fourier transform of a rectangle).
	r := simulate(t, p, []float64{f0}, nil)
	hold := math.Sin(math.Pi*f0*dt) / (math.Pi * f0 * dt)
	near(t, "rotation at f0 (deg)", 2*math.Asin(cmplx.Abs(r.Beta[0]))/deg, 20*hold, 1e-4)
	// A constant frequency is the pulse's centre, so Measure looks there.
	near(t, "Pulse.Center (Hz)", p.Center, f0, 0)
	if p.Freq != nil || p.Sweep != 0 {
		t.Errorf("constant frequency kept as a modulation: Freq %d values, Sweep %g Hz; want none", len(p.Freq), p.Sweep)
	}
	pr, err := Measure(context.Background(), p, MeasureOptions{})
	mustOK(t, err)
	near(t, "band middle (Hz)", (pr.Edges[0]+pr.Edges[1])/2, f0, 1)
}

func ExampleFromSamples() {
	h := 2 * math.Pi * 42.577478518e6
	s := Samples{Dwell: 10e-6, Amplitude: []float64{1, 2, 3, 2, 1}}
	c := NewCommon()
	c.Peak = 6e-6 // scale the data to a 6 µT peak
	p, err := FromSamples(s, c, h)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d samples, %.0f µs, peak %.1f µT, nominal flip %.1f°\n", p.Wave.Len(), p.Duration()*1e6, p.Peak()*1e6, p.Flip*180/math.Pi)
	// Output: 5 samples, 50 µs, peak 6.0 µT, nominal flip 2.8°
}

package slr

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"Nutate/physics/shape"
)

// The on-resonance rotation is the nominal flip within the passband ripple: the
// published β filter is 1 ± δ1 across its passband, zero offset included (Pauly
// et al. 1991), so the role's profile at zero offset is within the asked pass
// ripple of its pass value (2× allowed, as for the ripple checks); 180° designs
// pin |β(0)| to the top of the passband (lowpass) and keep it below 1 by
// betaMargin, 0.05° of flip (phaseMargin, 0.16°, for minimum phase); the cepstral minimum-phase factor loses a little
// more: at least 179.4°.
func TestOnResonanceFlip(t *testing.T) {
	g := proton(t)
	var cases []designCase
	for _, p := range roleProfiles {
		for _, tbw := range []float64{4, 6, 8, 10, 12} {
			for _, d := range []Design{Linear, Minimum} {
				cases = append(cases, designCase{p, d, tbw, 0.01, 0.01})
			}
		}
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%s_%v_tbw%g", c.prof.name, c.design, c.tbw), func(t *testing.T) {
			p, _ := c.build(t, g, 4e-3)
			r := simulate(t, p, []float64{0})
			flip := 2 * math.Asin(math.Min(1, cmplx.Abs(r.Beta[0]))) * 180 / math.Pi
			want := p.Flip * 180 / math.Pi
			v := c.prof.value(r.Mx[0], r.My[0], r.Mz[0], r.Beta[0])
			t.Logf("on-resonance flip %.3f°, nominal %g°; profile %.5f, pass value %g", flip, want, v, c.prof.passTarget)
			if want == 180 && flip < 179.4 {
				t.Errorf("on-resonance flip %.3f°, want ≥ 179.4°", flip)
			}
			if d := math.Abs(v - c.prof.passTarget); d > 2*c.pass {
				t.Errorf("on-resonance profile %.5f, want %g ± 2 × %g", v, c.prof.passTarget, c.pass)
			}
		})
	}
}

// A cancelled context stops a design with an error wrapping ctx.Err().
func TestPulseContextCancelled(t *testing.T) {
	g := proton(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	c := shape.NewCommon()
	c.Duration = 4e-3
	_, err := PulseContext(ctx, NewSpec(shape.RoleInvert), c, g)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want one wrapping context.Canceled", err)
	}
	if p, err := PulseContext(context.Background(), NewSpec(shape.RoleInvert), c, g); err != nil || p.Wave.Len() != DefaultSamples {
		t.Fatalf("uncancelled design: %v", err)
	}
}

// A wide band gets samples for it: the default of a TBW-128 excitation is
// 8·tbw = 1024 samples, and its measured ripples stay near the 1 % asked
// (within 1.5×, as at ordinary TBW). On the old fixed 256 samples the stop band
// reached 63 % (the band filled half the sampling rate and aliased).
func TestWideBandDefaultSamples(t *testing.T) {
	g := proton(t)
	s := NewSpec(shape.RoleExcite)
	s.TBW = 128
	c := shape.NewCommon()
	c.Duration, c.Flip = 20e-3, math.Pi/2
	p, err := Pulse(s, c, g)
	if err != nil {
		t.Fatal(err)
	}
	if n := p.Wave.Len(); n != 1024 {
		t.Errorf("default samples for tbw 128: %d, want 1024", n)
	}
	pr, err := shape.Measure(context.Background(), p, shape.MeasureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if pr.PassRipple > 0.015 || pr.StopRipple > 0.015 {
		t.Errorf("ripples pass %.4f, stop %.4f; want ≤ 0.015 for a 1 %% design", pr.PassRipple, pr.StopRipple)
	}
}

// 180° designs change smoothly with the time-bandwidth product (5 ms, TBW 4 to
// 12 in steps of 0.4, 1 %/1 %): the role's profile is half-way at TBW/(2T)
// within 2 % (CHECKS.md) at every step, the measured transition (as in
// TestAgainstScipyReference) changes by at most 6 % from step to step (the
// published width D∞/TBW·TBW/T does not change at all), and the peak B1 by a
// factor within 0.9 to 1.2 (about +9 % per step is the growth of a peak ∝ TBW).
func TestSmoothInTBW(t *testing.T) {
	g := proton(t)
	const T = 5e-3
	for _, pi := range []int{2, 3} {
		prof := roleProfiles[pi]
		for _, d := range []Design{Linear, Minimum} {
			t.Run(fmt.Sprintf("%s_%v", prof.name, d), func(t *testing.T) {
				prevTr, prevPk := math.NaN(), math.NaN()
				for k := 0; k <= 20; k++ {
					tbw := 4 + 0.4*float64(k)
					spec := NewSpec(prof.role)
					spec.TBW, spec.Design = tbw, d
					cm := shape.NewCommon()
					cm.Duration = T
					p, info, err := PulseInfo(spec, cm, g)
					if err != nil {
						t.Fatal(err)
					}
					m := measureRole(t, p, prof, tbw, T, info.PassEdge, info.StopEdge, 0.01, 4001)
					pk := p.Peak()
					t.Logf("tbw %.1f: half-way %.2f Hz, transition %.1f Hz, peak %.2f µT", tbw, m.half, m.transition, pk*1e6)
					want := tbw / (2 * T)
					if math.Abs(m.half-want) > 0.02*want {
						t.Errorf("tbw %.1f: half-way at %.2f Hz, want %.2f ± 2 %%", tbw, m.half, want)
					}
					if r := m.transition / prevTr; math.Abs(r-1) > 0.06 {
						t.Errorf("tbw %.1f: transition %.1f Hz after %.1f Hz, want a change within 6 %%", tbw, m.transition, prevTr)
					}
					if r := pk / prevPk; r < 0.9 || r > 1.2 {
						t.Errorf("tbw %.1f: peak %.2f µT after %.2f µT, want a ratio within 0.9 to 1.2", tbw, pk*1e6, prevPk*1e6)
					}
					prevTr, prevPk = m.transition, pk
				}
			})
		}
	}
}

// The opt-in rising stopband (Spec.Rising) earns its place: the published flat
// stopband puts 5–80 % of the peak in the end samples (a comb of equal stopband
// ripples transforms to spikes in the end taps; Parks & McClellan's equiripple
// property), the rising one at most 2 %, with the role's profile still half-way
// at TBW/(2T) within 2 % (CHECKS.md) and the ripples within 2× of the asked
// (CHECKS.md) except for 90° excitation, whose cost is documented (within 5×).
func TestRisingStopband(t *testing.T) {
	g := proton(t)
	const T = 8e-3
	for _, prof := range roleProfiles {
		for _, tbw := range []float64{8, 12} {
			t.Run(fmt.Sprintf("%s_tbw%g", prof.name, tbw), func(t *testing.T) {
				spec := NewSpec(prof.role)
				spec.TBW, spec.Rising = tbw, true
				c := shape.NewCommon()
				c.Duration = T
				c.Flip = prof.flip
				p, info, err := PulseInfo(spec, c, g)
				if err != nil {
					t.Fatal(err)
				}
				n := p.Wave.Len()
				end := math.Max(cmplx.Abs(p.Wave.B1[0]), cmplx.Abs(p.Wave.B1[n-1])) / p.Peak()
				m := measureRole(t, p, prof, tbw, T, info.PassEdge, info.StopEdge, 0.01, 4001)
				t.Logf("end samples %.4f of the peak; half-way %.2f Hz; ripples %.4f, %.4f", end, m.half, m.pass, m.stop)
				if end > 0.02 {
					t.Errorf("end samples %.4f of the peak, want ≤ 0.02", end)
				}
				want := tbw / (2 * T)
				if math.Abs(m.half-want) > 0.02*want {
					t.Errorf("half-way at %.2f Hz, want %.2f ± 2 %%", m.half, want)
				}
				lim := 2.0
				if prof.role == shape.RoleExcite && prof.flip == math.Pi/2 {
					lim = 5
				}
				if m.pass > lim*0.01 || m.stop > lim*0.01 {
					t.Errorf("ripples %.4f, %.4f, want ≤ %g × 0.01", m.pass, m.stop, lim)
				}
			})
		}
	}
	spec := NewSpec(shape.RoleInvert)
	spec.Rising, spec.Design = true, Minimum
	c := shape.NewCommon()
	c.Duration = T
	if _, err := Pulse(spec, c, g); err == nil || !strings.Contains(err.Error(), "want linear") {
		t.Errorf("rising minimum phase: err %v, want one asking for linear phase", err)
	}
}

// 90° excitation keeps the asked ripple at every time-bandwidth product (8 ms,
// 256 samples, TBW 4 to 12 in steps of 0.4, 1 %/1 %): |Mxy| pass and stop
// ripple inside the design's edges within 2× of the asked (CHECKS.md; before
// the width was fitted to the levelled error, the D∞ estimate left up to 3.7×),
// half-way at TBW/(2T) within 2 %, and the transition (as in
// TestAgainstScipyReference) within 0.9 to 1.2 × the width of the published
// design at TBW 4 (173 Hz linear, 151 Hz minimum phase at TBW 8, from the
// scipy script's published design before the amendment).
func TestRightAngleRipple(t *testing.T) {
	g := proton(t)
	const T = 8e-3
	prof := roleProfiles[1]
	for _, d := range []Design{Linear, Minimum} {
		t.Run(d.String(), func(t *testing.T) {
			for k := 0; k <= 20; k++ {
				tbw := 4 + 0.4*float64(k)
				spec := NewSpec(prof.role)
				spec.TBW, spec.Design = tbw, d
				cm := shape.NewCommon()
				cm.Duration, cm.Flip = T, math.Pi/2
				p, info, err := PulseInfo(spec, cm, g)
				if err != nil {
					t.Fatal(err)
				}
				m := measureRole(t, p, prof, tbw, T, info.PassEdge, info.StopEdge, 0.01, 4001)
				t.Logf("tbw %.1f: half-way %.2f Hz, ripples %.4f, %.4f, transition %.1f Hz", tbw, m.half, m.pass, m.stop, m.transition)
				if want := tbw / (2 * T); math.Abs(m.half-want) > 0.02*want {
					t.Errorf("tbw %.1f: half-way at %.2f Hz, want %.2f ± 2 %%", tbw, m.half, want)
				}
				if m.pass > 0.02 || m.stop > 0.02 {
					t.Errorf("tbw %.1f: ripples pass %.4f, stop %.4f, want ≤ 2 × 0.01", tbw, m.pass, m.stop)
				}
				ref := 173.1
				if d == Minimum {
					ref = 151.4
				}
				if r := m.transition / ref; r < 0.9 || r > 1.2 {
					t.Errorf("tbw %.1f: transition %.1f Hz, want 0.9 to 1.2 × %.1f Hz", tbw, m.transition, ref)
				}
			}
		})
	}
}

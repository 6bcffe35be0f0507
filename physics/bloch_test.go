package physics

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"
)

// within reports whether got is within tol of want (absolute).
func within(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

func checkVec(t *testing.T, what string, got, want [3]float64, tol float64) {
	t.Helper()
	for k := range want {
		if !within(got[k], want[k], tol) {
			t.Errorf("%s: M = (%.9f, %.9f, %.9f), want (%.9f, %.9f, %.9f) ± %g", what,
				got[0], got[1], got[2], want[0], want[1], want[2], tol)
			return
		}
	}
}

func sim(t *testing.T, w *Waveform, gamma float64, iso *Isochromats, opt Options) *Result {
	t.Helper()
	r, err := Simulate(context.Background(), w, gamma, iso, opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func rect(b1, dur float64, n int) *Waveform {
	w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
	for j := range n {
		w.Dwell[j] = dur / float64(n)
		w.B1[j] = complex(b1, 0)
	}
	return w
}

// Rabi closed form from M = ẑ (Rabi, Phys. Rev. 51:652, 1937; CHECKS.md):
// Ω = √(ω1² + Δω²), a = ω1/Ω, c = Δω/Ω, φ = ΩT: Mx = a·c·(1 − cos φ), My = a·sin φ,
// Mz = c² + a² cos φ. Tested over many flips, offsets and sample counts (a constant
// pulse cut into any number of samples is the same rotation), gamma = 1.
func TestRabiClosedForm(t *testing.T) {
	for _, flipDeg := range []float64{5, 30, 90, 137, 180, 270, 360, 1000} {
		for _, n := range []int{1, 7, 64} {
			t.Run(fmt.Sprintf("flip=%g/samples=%d", flipDeg, n), func(t *testing.T) {
				const dur = 1e-3
				w1 := flipDeg * math.Pi / 180 / dur
				var offs []float64
				for f := -7000.0; f <= 7000; f += 350 {
					offs = append(offs, f+13) // avoid landing only on round numbers
				}
				iso := Isochromats{Offset: offs}
				r := sim(t, rect(w1, dur, n), 1, &iso, Options{})
				for i, f := range offs {
					dw := 2 * math.Pi * f
					om := math.Hypot(w1, dw)
					a, c, phi := w1/om, dw/om, om*dur
					want := [3]float64{a * c * (1 - math.Cos(phi)), a * math.Sin(phi), c*c + a*a*math.Cos(phi)}
					checkVec(t, fmt.Sprintf("offset %g Hz", f), [3]float64{r.Mx[i], r.My[i], r.Mz[i]}, want, 1e-12)
				}
			})
		}
	}
}

// The CHECKS.md row of the Rabi closed form, with the proton's γ (CODATA 2018):
// 90°, T = 250 µs, ν1 = 1 kHz, offset 1000 Hz → (0.8028499, 0.5626401, 0.1971501).
func TestRabiCheckValue(t *testing.T) {
	h, _ := Lookup("1H")
	g := h.Gamma()
	w := &Waveform{Dwell: []float64{250e-6}, B1: []complex128{complex(2*math.Pi*1000/g, 0)}}
	iso := Isochromats{Offset: []float64{1000, -1000}}
	r := sim(t, w, g, &iso, Options{})
	checkVec(t, "+1 kHz", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0.8028499, 0.5626401, 0.1971501}, 1e-6)
	// Reversing the sign of Δω flips Mx only (CHECKS.md conventions).
	checkVec(t, "−1 kHz", [3]float64{r.Mx[1], r.My[1], r.Mz[1]}, [3]float64{-0.8028499, 0.5626401, 0.1971501}, 1e-6)
}

// Conventions (CHECKS.md): B1 along +x tips +z toward +y for positive γ; a negative
// γ turns the other way; B1 phase φ turns the result by φ about z (common practice).
func TestConventions(t *testing.T) {
	const dur = 1e-3
	w1 := math.Pi / 2 / dur
	iso := Isochromats{}
	r := sim(t, rect(w1, dur, 3), 1, &iso, Options{})
	checkVec(t, "γ > 0", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, 1, 0}, 1e-14)
	r = sim(t, rect(w1, dur, 3), -1, &iso, Options{})
	checkVec(t, "γ < 0", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, -1, 0}, 1e-14)
	r = sim(t, rect(w1, dur, 3), 1, &iso, Options{Start: StartMinusZ})
	checkVec(t, "from −z", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, -1, 0}, 1e-14)
	r = sim(t, rect(w1, dur, 3), 1, &iso, Options{Start: StartPlusY})
	checkVec(t, "from +y", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, 0, -1}, 1e-14)
	r = sim(t, rect(w1, dur, 3), 1, &iso, Options{Start: StartPlusX})
	checkVec(t, "from +x", [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{1, 0, 0}, 1e-14)

	offs := []float64{-1500, -200, 0, 700}
	iso = Isochromats{Offset: offs}
	base := sim(t, rect(w1*1.3, dur, 5), 1, &iso, Options{})
	for _, ph := range []float64{0.3, math.Pi / 2, -2.1} {
		w := rect(w1*1.3, dur, 5)
		for j := range w.B1 {
			w.B1[j] *= cmplx.Rect(1, ph)
		}
		r := sim(t, w, 1, &iso, Options{})
		s, c := math.Sincos(ph)
		for i := range offs {
			want := [3]float64{c*base.Mx[i] - s*base.My[i], s*base.Mx[i] + c*base.My[i], base.Mz[i]}
			checkVec(t, fmt.Sprintf("phase %g, offset %g", ph, offs[i]), [3]float64{r.Mx[i], r.My[i], r.Mz[i]}, want, 1e-13)
		}
	}
}

// First null of |Mxy| of a rectangular pulse from +z: Δf = √(1/T² − ν1²), that is
// √15/(4T) for 90° and √3/(2T) for 180° (CHECKS.md, from the Rabi form).
func TestRectNulls(t *testing.T) {
	for _, tc := range []struct {
		flipDeg, dur float64
		ratio        float64 // Δf·T from CHECKS.md
	}{
		{90, 250e-6, math.Sqrt(15) / 4},
		{90, 1e-3, math.Sqrt(15) / 4},
		{180, 500e-6, math.Sqrt(3) / 2},
		{180, 2e-3, math.Sqrt(3) / 2},
	} {
		t.Run(fmt.Sprintf("%g°/%gs", tc.flipDeg, tc.dur), func(t *testing.T) {
			nu1 := tc.flipDeg / 360 / tc.dur
			df := math.Sqrt(1/(tc.dur*tc.dur) - nu1*nu1)
			if !within(df*tc.dur, tc.ratio, 1e-12) {
				t.Fatalf("Δf·T = %g, want %g", df*tc.dur, tc.ratio)
			}
			iso := Isochromats{Offset: []float64{df, -df, 0.97 * df}}
			r := sim(t, rect(2*math.Pi*nu1, tc.dur, 10), 1, &iso, Options{})
			for i := range 2 {
				if m := r.Transverse(i); m > 1e-12 {
					t.Errorf("|Mxy| at %g Hz = %g, want 0", iso.Offset[i], m)
				}
			}
			if m := r.Transverse(2); m < 1e-3 {
				t.Errorf("|Mxy| just inside the null = %g, want clearly above 0", m)
			}
		})
	}
}

// Cayley–Klein parameters (Pauly et al., IEEE TMI 10:53, 1991): |α|² + |β|² = 1,
// Mxy = 2α*β and Mz = 1 − 2|β|² from equilibrium; 180° hard pulse, ν1 = 1 kHz,
// 500 µs: |β|² = 0.938979 at 250 Hz and 0.316564 at 1 kHz (CHECKS.md).
func TestCayleyKlein(t *testing.T) {
	w := rect(2*math.Pi*1000, 500e-6, 8)
	iso := Isochromats{Offset: []float64{250, 1000, -250}}
	r := sim(t, w, 1, &iso, Options{})
	for i, want := range []float64{0.938979, 0.316564, 0.938979} {
		b := r.Beta[i]
		if got := real(b)*real(b) + imag(b)*imag(b); !within(got, want, 1e-6) {
			t.Errorf("|β|² at %g Hz = %.7f, want %.6f", iso.Offset[i], got, want)
		}
		e, ok := r.Echo(i)
		if !ok || !within(cmplx.Abs(e), want, 1e-6) {
			t.Errorf("|echo| at %g Hz = %.7f, want %.6f", iso.Offset[i], cmplx.Abs(e), want)
		}
	}
	// Identities over a random pulse and grid.
	rng := rand.New(rand.NewPCG(1, 2))
	wr := randomWaveform(rng, 60, 2*math.Pi*3000, 30e-6)
	grid := Grid(linspace(-5000, 5000, 41), linspace(0.3, 1.7, 7), nil, nil, nil)
	r = sim(t, wr, 1, &grid, Options{})
	for i := range grid.Len() {
		a, b := r.Alpha[i], r.Beta[i]
		aa, bb := real(a)*real(a)+imag(a)*imag(a), real(b)*real(b)+imag(b)*imag(b)
		if !within(aa+bb, 1, 1e-13) {
			t.Fatalf("spin %d: |α|² + |β|² = %.16f, want 1", i, aa+bb)
		}
		mxy := 2 * cmplx.Conj(a) * b
		if !within(real(mxy), r.Mx[i], 1e-13) || !within(imag(mxy), r.My[i], 1e-13) || !within(1-2*bb, r.Mz[i], 1e-13) {
			t.Fatalf("spin %d: 2α*β = %v, 1 − 2|β|² = %g; want M = (%g, %g, %g)", i, mxy, 1-2*bb, r.Mx[i], r.My[i], r.Mz[i])
		}
	}
}

// The crushed spin echo −β²·Mxy* (Pauly et al. 1991) is what survives averaging the
// refocused magnetization over the phase ψ that identical crushers on both sides
// give: Mxy → Mxy·e^{−iψ}, pulse, then ·e^{−iψ}. The pulse response for each ψ is
// simulated from the transverse start directly (relaxation path with negligible
// rates, so the check does not go through Rotate).
func TestCrushedEcho(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	w := randomWaveform(rng, 30, 2*math.Pi*2500, 40e-6)
	offs := []float64{-800, 0, 450}
	r := sim(t, w, 1, &Isochromats{Offset: offs}, Options{})
	const k = 16 // uniform phases; the e^{−2iψ} term averages out exactly for k ≥ 3
	mxy0 := complex(0.6, -0.8)
	for i, f := range offs {
		var sum complex128
		for p := range k {
			psi := 2 * math.Pi * float64(p) / k
			m := mxy0 * cmplx.Rect(1, -psi)
			iso := Isochromats{Offset: []float64{f}, T1: []float64{1e300}, T2: []float64{1e300}}
			rr := sim(t, w, 1, &iso, Options{Start: [3]float64{real(m), imag(m), 0}})
			sum += rr.Mxy(0) * cmplx.Rect(1, -psi)
		}
		got, want := sum/k, EchoOf(r.Beta[i], mxy0)
		if cmplx.Abs(got-want) > 1e-12 {
			t.Errorf("offset %g: crushed echo %v, want −β²·Mxy* = %v", f, got, want)
		}
		if !within(cmplx.Abs(Echo(r.Beta[i])), real(r.Beta[i])*real(r.Beta[i])+imag(r.Beta[i])*imag(r.Beta[i]), 1e-15) {
			t.Errorf("|Echo(β)| ≠ |β|²")
		}
	}
}

// Start states: the Cayley–Klein rotation applied to a start (Rotate) agrees with
// the magnetization propagated directly (relaxation path, negligible rates), and
// both keep |M| (rotations conserve length; Bloch, Phys. Rev. 70:460, 1946).
func TestStartStates(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	w := randomWaveform(rng, 50, 2*math.Pi*2000, 25e-6)
	grid := Grid(linspace(-3000, 3000, 9), []float64{0.7, 1.2}, nil, nil, nil)
	slow := grid
	slow.T1, slow.T2 = fill(grid.Len(), 1e300), fill(grid.Len(), 1e300)
	for _, name := range []string{"z", "-z", "x", "y", "-x", "-y"} {
		s, err := StartState(name)
		if err != nil {
			t.Fatal(err)
		}
		for _, start := range [][3]float64{s, {0.36, 0.48, -0.8}} {
			a := sim(t, w, 1, &grid, Options{Start: start})
			b := sim(t, w, 1, &slow, Options{Start: start})
			for i := range grid.Len() {
				checkVec(t, fmt.Sprintf("start %v spin %d", start, i), [3]float64{a.Mx[i], a.My[i], a.Mz[i]}, [3]float64{b.Mx[i], b.My[i], b.Mz[i]}, 1e-12)
				if n := math.Sqrt(a.Mx[i]*a.Mx[i] + a.My[i]*a.My[i] + a.Mz[i]*a.Mz[i]); !within(n, 1, 1e-12) {
					t.Errorf("start %v spin %d: |M| = %.16f, want 1", start, i, n)
				}
			}
		}
	}
	if _, err := StartState("w"); err == nil || !strings.Contains(err.Error(), `"w"`) {
		t.Errorf("StartState(\"w\") error = %v, want one naming \"w\"", err)
	}
}

// Hyperbolic secant (Silver, Joseph & Hoult, Phys. Rev. A 31:2753, 1985; CHECKS.md):
// infinite-pulse profile Mz = tanh x·tanh y + cos(π√(ω1max²/β² − μ²))·sech x·sech y
// (cosh when the root's argument is negative), x = π(Ω/β + μ)/2, y = π(Ω/β − μ)/2.
// A long truncation (βT/2 = 14, sech = 1.7e-6) and fine sampling approach the
// infinite pulse; the tolerance 5e-6 covers the truncation (deviations seen are
// at most 2e-6). β = 1000 s⁻¹, μ = 5:
// Mz(0) = −0.372389 at 300 Hz and −0.938867 at 500 Hz are the CHECKS rows.
func TestHyperbolicSecantClosedForm(t *testing.T) {
	const beta, mu = 1000.0, 5.0
	closed := func(w1max, om float64) float64 {
		x := math.Pi * (om/beta + mu) / 2
		y := math.Pi * (om/beta - mu) / 2
		d := w1max*w1max/(beta*beta) - mu*mu
		var c float64
		if d >= 0 {
			c = math.Cos(math.Pi * math.Sqrt(d))
		} else {
			c = math.Cosh(math.Pi * math.Sqrt(-d))
		}
		return math.Tanh(x)*math.Tanh(y) + c/(math.Cosh(x)*math.Cosh(y))
	}
	if !within(closed(2*math.Pi*300, 0), -0.372389, 1e-6) || !within(closed(2*math.Pi*500, 0), -0.938867, 1e-6) {
		t.Fatalf("closed form does not reproduce the CHECKS rows: %g, %g", closed(2*math.Pi*300, 0), closed(2*math.Pi*500, 0))
	}
	const trunc = 14.0
	dur := 2 * trunc / beta
	n := 28000
	offs := []float64{0, 150, -400, 800, -1300, 2500}
	for _, peak := range []float64{300, 500, 700, 1100} {
		t.Run(fmt.Sprintf("peak=%gHz", peak), func(t *testing.T) {
			w := hsWaveform(dur, n, mu*beta/math.Pi, trunc, peak)
			r := sim(t, w, 1, &Isochromats{Offset: offs}, Options{})
			for i, f := range offs {
				want := closed(2*math.Pi*peak, 2*math.Pi*f)
				if !within(r.Mz[i], want, 5e-6) {
					t.Errorf("offset %g Hz: Mz = %.7f, want %.7f", f, r.Mz[i], want)
				}
			}
		})
	}
}

// Landau–Zener (Landau 1932; Zener, Proc. R. Soc. A 137:696, 1932; CHECKS.md):
// constant amplitude, linear sweep through resonance, Q = ω1²/|dΔω/dt|:
// Mz = 2·exp(−πQ/2) − 1; Q = 1 → −0.584241. The formula is for an infinite sweep,
// where the field's axis starts and ends along ±z. A finite sweep of ±D (D ≫ ω1)
// approaches it when the spin starts along the initial effective field and the
// result is read along the final one (in the frame that follows the RF phase φ the
// effective field is (ω1, 0, Δω + dφ/dt)). With D = 160·ω1 the residual of the
// finite ends is a few 1e-6; the tolerance is 1e-5.
func TestLandauZener(t *testing.T) {
	if !within(2*math.Exp(-math.Pi/2)-1, -0.584241, 1e-6) {
		t.Fatal("formula does not reproduce the CHECKS row")
	}
	for _, q := range []float64{0.25, 0.5, 1, 2} {
		t.Run(fmt.Sprintf("Q=%g", q), func(t *testing.T) {
			w1 := 2 * math.Pi * 50.0
			rate := w1 * w1 / q // rad/s²
			d := 2 * math.Pi * 8000.0
			dur := 2 * d / rate
			const dt = 2e-6
			n := int(math.Ceil(dur / dt))
			dur = float64(n) * dt
			phase := func(tm float64) float64 { return -rate * tm * tm / 2 } // RF frequency −rate·t
			w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
			for j := range n {
				w.Dwell[j] = dt
				w.B1[j] = cmplx.Rect(w1, phase((float64(j)+0.5)*dt-dur/2))
			}
			axis := func(tm float64) [3]float64 {
				dz := -rate * tm // Δω + dφ/dt with Δω = 0
				nn := math.Hypot(w1, dz)
				s, c := math.Sincos(phase(tm))
				return [3]float64{w1 * c / nn, w1 * s / nn, dz / nn}
			}
			r := sim(t, w, 1, &Isochromats{}, Options{Start: axis(-dur / 2)})
			e := axis(dur / 2)
			got := -(r.Mx[0]*e[0] + r.My[0]*e[1] + r.Mz[0]*e[2])
			want := 2*math.Exp(-math.Pi*q/2) - 1
			if !within(got, want, 1e-5) {
				t.Errorf("Mz = %.6f, want %.6f", got, want)
			}
		})
	}
}

// Relaxation during a pulse (Torrey, Phys. Rev. 76:1059, 1949; CHECKS.md row):
// ω1 = 2π·250 Hz along x from ẑ, T = 1 ms, T1 = 100 ms, T2 = 1 ms →
// (0, 0.638612220, 0.255052486); and the steady state under long on-resonance
// irradiation My = ω1R1/(R1R2 + ω1²), Mz = R1R2/(R1R2 + ω1²) for several cases.
func TestTorrey(t *testing.T) {
	for _, n := range []int{1, 10} {
		w := rect(2*math.Pi*250, 1e-3, n)
		r := sim(t, w, 1, &Isochromats{T1: []float64{0.1}, T2: []float64{1e-3}}, Options{})
		checkVec(t, fmt.Sprintf("CHECKS row, %d samples", n), [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, 0.638612220, 0.255052486}, 1e-9)
	}
	for _, tc := range []struct{ nu1, t1, t2 float64 }{
		{250, 0.1, 1e-3}, {50, 0.02, 0.01}, {10, 0.05, 0.05}, {100, 1e-3, 5e-4},
	} {
		t.Run(fmt.Sprintf("steady/ν1=%g/T1=%g/T2=%g", tc.nu1, tc.t1, tc.t2), func(t *testing.T) {
			w1, r1, r2 := 2*math.Pi*tc.nu1, 1/tc.t1, 1/tc.t2
			dur := 60 * max(tc.t1, tc.t2, 1/w1)
			den := r1*r2 + w1*w1
			// One long sample (combined by squaring) and many.
			for _, n := range []int{1, 400} {
				r := sim(t, rect(w1, dur, n), 1, &Isochromats{T1: []float64{tc.t1}, T2: []float64{tc.t2}}, Options{})
				checkVec(t, fmt.Sprintf("steady state, %d samples", n), [3]float64{r.Mx[0], r.My[0], r.Mz[0]}, [3]float64{0, w1 * r1 / den, r1 * r2 / den}, 1e-9)
			}
		})
	}
}

// Free precession with relaxation (Bloch, Phys. Rev. 70:460, 1946): with B1 = 0,
// Mxy(t) = Mxy(0)·e^{−t/T2}·e^{−iΔωt}, Mz(t) = 1 − (1 − Mz(0))·e^{−t/T1}.
func TestFreeRelaxation(t *testing.T) {
	const dur = 7e-3
	w := &Waveform{Dwell: []float64{dur / 3, dur / 3, dur / 3}, B1: make([]complex128, 3)}
	iso := Isochromats{Offset: []float64{0, 130, -75}, T1: []float64{0.02, 0.5, math.Inf(1)}, T2: []float64{0.01, 0.004, 0.03}}
	start := [3]float64{0.6, 0.0, -0.8}
	r := sim(t, w, 1, &iso, Options{Start: start})
	for i := range 3 {
		mxy := complex(start[0], start[1]) * complex(math.Exp(-dur/iso.T2[i]), 0) * cmplx.Rect(1, -2*math.Pi*iso.Offset[i]*dur)
		mz := 1 - (1-start[2])*math.Exp(-dur/iso.T1[i])
		checkVec(t, fmt.Sprintf("spin %d", i), [3]float64{r.Mx[i], r.My[i], r.Mz[i]}, [3]float64{real(mxy), imag(mxy), mz}, 1e-13)
	}
}

// Without relaxation |M| stays 1 (rotations conserve length; Bloch 1946) through
// the 2048-sample hyperbolic secant of the benchmark, over ±6 kHz and B1 0.5–1.5.
func TestNormConserved(t *testing.T) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
	grid := Grid(linspace(-6000, 6000, 97), linspace(0.5, 1.5, 11), nil, nil, nil)
	for _, start := range [][3]float64{StartPlusZ, {0.36, 0.48, -0.8}} {
		r := sim(t, w, 1, &grid, Options{Start: start})
		worst := 0.0
		for i := range grid.Len() {
			n := math.Sqrt(r.Mx[i]*r.Mx[i] + r.My[i]*r.My[i] + r.Mz[i]*r.Mz[i])
			worst = max(worst, math.Abs(n-1))
			a, b := r.Alpha[i], r.Beta[i]
			worst = max(worst, math.Abs(real(a)*real(a)+imag(a)*imag(a)+real(b)*real(b)+imag(b)*imag(b)-1))
		}
		if worst > 1e-12 {
			t.Errorf("start %v: largest | |M| − 1 | or | |α|² + |β|² − 1 | = %g, want ≤ 1e-12", start, worst)
		}
	}
}

// The series for cos φ and sin φ / φ agrees with the library's sine and cosine
// to the double-precision rounding (Abramowitz & Stegun 4.3.65–66).
func TestCosSinc(t *testing.T) {
	for k := 0; k <= 4000; k++ {
		x := seriesMax * float64(k) / 4000
		c, s := cosSinc(x)
		phi := math.Sqrt(x)
		sw, cw := math.Sincos(phi)
		sincw := 1.0
		if phi > 0 {
			sincw = sw / phi
		}
		if !within(c, cw, 2.3e-16) || !within(s, sincw, 2.3e-16) {
			t.Fatalf("x = %g: cos %.17g, sinc %.17g; want %.17g, %.17g", x, c, s, cw, sincw)
		}
	}
}

// The two exact kernels agree: Cayley–Klein rotation and the Cayley–Hamilton
// relaxation step with negligible rates, through steps small and large (the series
// and library sine paths), with a gradient, against a straightforward per-step
// Rodrigues rotation with math.Sincos (Rodrigues 1840; common practice).
func TestKernelsAgree(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	w := randomWaveform(rng, 80, 2*math.Pi*4000, 80e-6)
	w.Gradient = make([]float64, w.Len())
	for j := range w.Gradient {
		w.Gradient[j] = (rng.Float64()*2 - 1) * 2 * math.Pi * 42.58e6 * 5e-3
	}
	grid := Grid(linspace(-4000, 4000, 7), []float64{0.5, 1.1}, linspace(-4e-3, 4e-3, 5), nil, nil)
	slow := grid
	slow.T1, slow.T2 = fill(grid.Len(), 1e300), fill(grid.Len(), 1e300)
	start := [3]float64{0.36, 0.48, -0.8}
	a := sim(t, w, 1, &grid, Options{Start: start})
	b := sim(t, w, 1, &slow, Options{Start: start})
	for i := range grid.Len() {
		m := start
		for j := range w.Len() {
			wx := grid.B1Scale[i] * real(w.B1[j])
			wy := grid.B1Scale[i] * imag(w.B1[j])
			wz := 2*math.Pi*grid.Offset[i] + w.Gradient[j]*grid.Position[i]
			m = rodrigues(m, wx, wy, wz, w.Dwell[j])
		}
		checkVec(t, fmt.Sprintf("rotation kernel, spin %d", i), [3]float64{a.Mx[i], a.My[i], a.Mz[i]}, m, 1e-12)
		checkVec(t, fmt.Sprintf("relaxation kernel, spin %d", i), [3]float64{b.Mx[i], b.My[i], b.Mz[i]}, m, 1e-12)
	}
}

// rodrigues turns m clockwise by |ω|·dt about ω (dM/dt = M × ω).
func rodrigues(m [3]float64, wx, wy, wz, dt float64) [3]float64 {
	wn := math.Sqrt(wx*wx + wy*wy + wz*wz)
	if wn == 0 {
		return m
	}
	nx, ny, nz := wx/wn, wy/wn, wz/wn
	s, c := math.Sincos(-wn * dt)
	dot := nx*m[0] + ny*m[1] + nz*m[2]
	cx, cy, cz := ny*m[2]-nz*m[1], nz*m[0]-nx*m[2], nx*m[1]-ny*m[0]
	return [3]float64{
		m[0]*c + cx*s + nx*dot*(1-c),
		m[1]*c + cy*s + ny*dot*(1-c),
		m[2]*c + cz*s + nz*dot*(1-c),
	}
}

func randomWaveform(rng *rand.Rand, n int, w1max, dtmax float64) *Waveform {
	w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
	for j := range n {
		w.Dwell[j] = dtmax * (0.1 + 0.9*rng.Float64())
		w.B1[j] = complex((2*rng.Float64()-1)*w1max, (2*rng.Float64()-1)*w1max)
	}
	return w
}

// Results do not depend on the number of workers, bit for bit (common practice:
// each spin's arithmetic is the same whichever worker runs it).
func TestWorkersBitIdentical(t *testing.T) {
	w := hsWaveform(5e-3, 700, 4000, 5.3, 800)
	grid := Grid(linspace(-6000, 6000, 37), linspace(0.5, 1.5, 9), nil, nil, nil) // 333 spins: a partial block
	relaxed := grid
	relaxed.T1, relaxed.T2 = fill(grid.Len(), 0.3), fill(grid.Len(), 0.02)
	for name, iso := range map[string]*Isochromats{"rotation": &grid, "relaxation": &relaxed} {
		var ref *Result
		for _, workers := range []int{1, 2, 7} {
			r := sim(t, w, 1, iso, Options{Workers: workers})
			if ref == nil {
				ref = r
				continue
			}
			for i := range iso.Len() {
				if r.Mx[i] != ref.Mx[i] || r.My[i] != ref.My[i] || r.Mz[i] != ref.Mz[i] ||
					(r.Alpha != nil && (r.Alpha[i] != ref.Alpha[i] || r.Beta[i] != ref.Beta[i])) {
					t.Fatalf("%s: spin %d differs between 1 and %d workers", name, i, workers)
				}
			}
		}
	}
}

// Cancellation returns ctx.Err(): before the start, and from inside the run (the
// progress callback cancels after the first block, no timing involved).
func TestCancel(t *testing.T) {
	w := hsWaveform(10e-3, 2048, 4000, 5.3, 800)
	grid := Grid(linspace(-6000, 6000, 64), linspace(0.5, 1.5, 16), nil, nil, nil)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Simulate(ctx, w, 1, &grid, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled before: err = %v, want context.Canceled", err)
	}
	for _, workers := range []int{1, 2} {
		ctx, cancel := context.WithCancel(context.Background())
		opt := Options{Workers: workers, Progress: func(done, total int) {
			cancel()
		}}
		if _, err := Simulate(ctx, w, 1, &grid, opt); !errors.Is(err, context.Canceled) {
			t.Errorf("workers %d: cancelled during: err = %v, want context.Canceled", workers, err)
		}
	}
}

// Progress reports every spin once, ending at the total.
func TestProgress(t *testing.T) {
	w := rect(1000, 1e-3, 10)
	grid := Grid(linspace(-100, 100, 200), nil, nil, nil, nil)
	var last, calls int
	_, err := Simulate(context.Background(), w, 1, &grid, Options{Workers: 1, Progress: func(done, total int) {
		if total != 200 || done <= last {
			t.Errorf("progress(%d, %d) after %d", done, total, last)
		}
		last = done
		calls++
	}})
	if err != nil || last != 200 || calls != 4 {
		t.Errorf("err %v, last %d, calls %d; want nil, 200, 4", err, last, calls)
	}
}

// The budget guard refuses before allocating, naming the size.
func TestBudget(t *testing.T) {
	w := rect(1000, 1e-3, 1000)
	grid := Grid(linspace(-100, 100, 50), nil, nil, nil, nil)
	_, err := Simulate(context.Background(), w, 1, &grid, Options{MaxSteps: 49999})
	want := "simulation of 50 isochromats × 1000 samples = 5e+04 steps exceeds the budget of 5e+04"
	if err == nil || err.Error() != want {
		t.Errorf("err = %v, want %q", err, want)
	}
	if _, err := Simulate(context.Background(), w, 1, &grid, Options{MaxSteps: 50000}); err != nil {
		t.Errorf("at the budget: %v", err)
	}
	// A refusal of a huge request allocates next to nothing.
	_, err = Simulate(context.Background(), w, 1, &grid, Options{MaxSteps: 1})
	if err == nil {
		t.Fatal("no error over the budget")
	}
	// Counted on one P (AllocsPerRun): the error message only.
	if n := testing.AllocsPerRun(5, func() {
		Simulate(context.Background(), w, 1, &grid, Options{MaxSteps: 1})
	}); n > 8 {
		t.Errorf("refusal made %v allocations, want at most 8 (the error message)", n)
	}
}

// The isochromat limit refuses before the values are read or the result is
// allocated. The offsets slice is made but never written, so its pages stay
// untouched; invalid values in it show the values were not read.
func TestMaxIsochromats(t *testing.T) {
	w := rect(1, 1e-3, 1000)
	off := make([]float64, MaxIsochromats+1)
	off[len(off)-1] = math.NaN() // would fail validation if it were read
	_, err := Simulate(context.Background(), w, 1, &Isochromats{Offset: off}, Options{})
	want := fmt.Sprintf("simulation of %d isochromats exceeds the limit of %d", MaxIsochromats+1, MaxIsochromats)
	if err == nil || err.Error() != want {
		t.Fatalf("err = %v, want %q", err, want)
	}
	// Allocations counted on one P (AllocsPerRun), so that other goroutines of
	// the test binary do not count: the error message only.
	if n := testing.AllocsPerRun(5, func() {
		Simulate(context.Background(), w, 1, &Isochromats{Offset: off}, Options{})
	}); n > 8 {
		t.Errorf("refusal made %v allocations, want at most 8 (the error message)", n)
	}
	// At the limit the isochromat check passes and the steps budget refuses next.
	_, err = Simulate(context.Background(), w, 1, &Isochromats{Offset: off[:MaxIsochromats]}, Options{MaxSteps: 1})
	if err == nil || !strings.Contains(err.Error(), "exceeds the budget") {
		t.Errorf("at the limit: err = %v, want the steps budget to refuse next", err)
	}
}

// Bad input is an error naming the argument, never a panic.
func TestInvalidInput(t *testing.T) {
	good := rect(1000, 1e-3, 4)
	for _, tc := range []struct {
		name  string
		w     *Waveform
		gamma float64
		iso   Isochromats
		opt   Options
		want  string
	}{
		{"no samples", &Waveform{}, 1, Isochromats{}, Options{}, "no samples"},
		{"dwell", &Waveform{Dwell: []float64{0}, B1: []complex128{1}}, 1, Isochromats{}, Options{}, "dwell 0 s, want > 0"},
		{"nan b1", &Waveform{Dwell: []float64{1e-3}, B1: []complex128{complex(math.NaN(), 0)}}, 1, Isochromats{}, Options{}, "sample 0 has B1"},
		{"gamma", good, math.NaN(), Isochromats{}, Options{}, "gamma is NaN"},
		{"lengths", good, 1, Isochromats{Offset: []float64{1, 2}, B1Scale: []float64{1}}, Options{}, "b1 scale has 1 values, want 2"},
		{"nan offset", good, 1, Isochromats{Offset: []float64{math.NaN()}}, Options{}, "offset[0] is NaN"},
		{"negative t1", good, 1, Isochromats{T1: []float64{-1}}, Options{}, "t1[0] is -1 s, want ≥ 0"},
		{"start", good, 1, Isochromats{}, Options{Start: [3]float64{math.Inf(1), 0, 0}}, "start magnetization component 0 is +Inf"},
		{"max steps", good, 1, Isochromats{}, Options{MaxSteps: math.NaN()}, "max steps is NaN, want > 0"},
		{"overflow", &Waveform{Dwell: []float64{1}, B1: []complex128{1e300}}, 1e10, Isochromats{}, Options{}, "sample 0: the rotation angle overflows"},
		{"relaxation too long", &Waveform{Dwell: []float64{1e30}, B1: []complex128{1000}}, 1, Isochromats{T2: []float64{1}}, Options{}, "sample 0: ‖γB_eff‖·dt + dt/T = 1e+33 rad is too large"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Simulate(context.Background(), tc.w, tc.gamma, &tc.iso, tc.opt)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// The inner loops allocate nothing (STYLE.md).
func TestKernelsAllocateNothing(t *testing.T) {
	w := hsWaveform(1e-3, 64, 4000, 5.3, 800)
	st, _ := newSteps(w, 1, 2*3.14159*6000, 0, 1.5)
	_ = st.planRelax(w, 1, 4e4, 0, 1.5, 10)
	var b block
	if a := testing.AllocsPerRun(10, func() {
		rotateBlock(st, 0, st.n, b.off[:], b.pos[:], b.scale[:], b.scale2[:], b.ar[:], b.ai[:], b.br[:], b.bi[:])
		relaxBlock(st, 0, st.n, b.off[:], b.pos[:], b.scale[:], b.r1[:], b.r2[:], b.mx[:], b.my[:], b.mz[:], &b.relax)
	}); a != 0 {
		t.Errorf("kernels allocate %g times per run, want 0", a)
	}
}

// A set where only some spins relax: the others match a simulation without
// relaxation, and the result carries no Cayley–Klein parameters (Bloch 1946;
// Pauly et al. 1991 for α and β of pure rotations).
func TestMixedRelaxation(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	w := randomWaveform(rng, 40, 2*math.Pi*2000, 30e-6)
	offs := linspace(-2000, 2000, 130)
	t1, t2 := make([]float64, len(offs)), make([]float64, len(offs))
	for i := range offs {
		if i%3 == 0 {
			t1[i], t2[i] = 0.05, 0.01
		} else if i%3 == 1 {
			t1[i], t2[i] = math.Inf(1), 0
		}
	}
	mixed := sim(t, w, 1, &Isochromats{Offset: offs, T1: t1, T2: t2}, Options{Start: StartPlusX})
	pure := sim(t, w, 1, &Isochromats{Offset: offs}, Options{Start: StartPlusX})
	if mixed.Alpha != nil || mixed.Beta != nil {
		t.Error("Alpha and Beta are set although spins relax")
	}
	for i := range offs {
		m := [3]float64{mixed.Mx[i], mixed.My[i], mixed.Mz[i]}
		p := [3]float64{pure.Mx[i], pure.My[i], pure.Mz[i]}
		if i%3 == 0 {
			if math.Abs(m[0]-p[0])+math.Abs(m[1]-p[1])+math.Abs(m[2]-p[2]) < 1e-6 {
				t.Errorf("spin %d relaxes but matches the pure rotation", i)
			}
			continue
		}
		checkVec(t, fmt.Sprintf("spin %d", i), m, p, 1e-12)
	}
}

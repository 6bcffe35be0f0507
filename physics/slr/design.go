package slr

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"
)

// cepstrum computes minimum-phase sequences from magnitude responses on a grid of
// m points (m a power of two), by the real cepstrum: fold the cepstrum of log|H|
// onto non-negative times and exponentiate (the homomorphic construction of
// Oppenheim & Schafer, Discrete-Time Signal Processing; from memory).
type cepstrum struct {
	m    int
	fft  *fourier.FFT
	spec []complex128
	seq  []float64
}

func newCepstrum(m int) *cepstrum {
	return &cepstrum{m: m, fft: fourier.NewFFT(m), spec: make([]complex128, m/2+1), seq: make([]float64, m)}
}

// cepstra keeps FFT plans and buffers between designs, one pool per grid size.
var cepstra sync.Map // int → *sync.Pool

func getCepstrum(m int) *cepstrum {
	p, _ := cepstra.LoadOrStore(m, &sync.Pool{New: func() any { return newCepstrum(m) }})
	return p.(*sync.Pool).Get().(*cepstrum)
}

func putCepstrum(c *cepstrum) {
	if p, ok := cepstra.Load(c.m); ok {
		p.(*sync.Pool).Put(c)
	}
}

// logFloor bounds log|H| from below where the magnitude vanishes.
const logFloor = -40.0

// minimumPhase returns the first n coefficients of the real minimum-phase sequence
// whose magnitude response at ω = 2πk/m is mag[k], k = 0..m/2.
func (c *cepstrum) minimumPhase(mag []float64, n int) []float64 {
	m := c.m
	for k := range c.spec {
		l := logFloor
		if mag[k] > 0 {
			l = math.Max(math.Log(mag[k]), logFloor)
		}
		c.spec[k] = complex(l, 0)
	}
	c.fft.Sequence(c.seq, c.spec)
	// Fold the (even) cepstrum onto n ≥ 0: ĉ[0] = c[0], ĉ[k] = 2c[k] for
	// 0 < k < m/2, ĉ[m/2] = c[m/2], ĉ[k] = 0 beyond.
	inv := 1 / float64(m)
	c.seq[0] *= inv
	for k := 1; k < m/2; k++ {
		c.seq[k] *= 2 * inv
	}
	c.seq[m/2] *= inv
	for k := m/2 + 1; k < m; k++ {
		c.seq[k] = 0
	}
	c.fft.Coefficients(c.spec, c.seq)
	for k, v := range c.spec {
		c.spec[k] = cmplx.Exp(v)
	}
	c.fft.Sequence(c.seq, c.spec)
	h := make([]float64, n)
	for k := range h {
		h[k] = c.seq[k] * inv
	}
	return h
}

// response returns H(ω) = Σ h[k]·e^{−iωk} at ω = 2πk/m, k = 0..m/2.
func (c *cepstrum) response(h []float64) []complex128 {
	clear(c.seq)
	copy(c.seq, h)
	return c.fft.Coefficients(nil, c.seq)
}

// MinimumPhase returns the first n coefficients of the real minimum-phase sequence
// whose magnitude response is mag[k] at ω = 2πk/m, k = 0..m/2, for a power of two
// m ≥ 2n (more points, less cepstral aliasing). It panics on a grid that is not a
// power of two or too short.
func MinimumPhase(mag []float64, n int) []float64 {
	m := 2 * (len(mag) - 1)
	if m < 2*n || m&(m-1) != 0 {
		panic(fmt.Sprintf("slr: MinimumPhase grid of %d points, want a power of two ≥ %d", m, 2*n))
	}
	return newCepstrum(m).minimumPhase(mag, n)
}

// gridSize is the FFT grid for the minimum-phase steps of an n-sample design:
// fine enough that cepstral aliasing stays below the 1e-6 the checks ask for.
func gridSize(n int) int {
	m := 1 << 14
	for m < gridFactor*n {
		m *= 2
	}
	return m
}

// edges returns the published passband and stopband edges (cycles/sample) of an
// n-sample β filter of time-bandwidth product tbw whose equiripple design of
// length taps has factor dinf (Pauly et al. 1991): the transition of dinf/taps
// cycles/sample centred on tbw/(2n), i.e. (1 ∓ W)·tbw/(2n) with W = D∞/TBW for
// linear phase (taps = n).
func edges(n, taps int, tbw, dinf float64) (fp, fs float64) {
	edge := tbw / (2 * float64(n))
	half := dinf / (2 * float64(taps))
	return edge - half, edge + half
}

// lowpass designs the published equiripple lowpass (Pauly et al. 1991): taps
// coefficients, passband 0 to fp with ripple d1, stopband fs to 0.5 with ripple
// d2 (weights 1 and d1/d2), by Remez exchange; least squares over the same bands
// when the exchange does not converge. It returns the filter, the extremal
// frequencies (to warm-start the next design), the levelled error in passband
// units (NaN for least squares) and the method used.
//
// One point departs from the plain design: the amplitude at zero offset is
// pinned to 1 (weight dcWeight), so that the on-resonance rotation is the
// nominal flip rather than anywhere within the passband ripple. With top (for
// 180° designs, whose |β| cannot exceed 1, so that the filter is scaled by its
// largest amplitude) it is pinned to the top of the passband ripple of the
// plain design, 1 + δ, so that zero offset is the passband's largest amplitude
// and keeps |β| = 1 after scaling.
func lowpass(ctx context.Context, taps int, fp, fs, d1, d2 float64, sh shaping, init []float64, density int) ([]float64, []float64, float64, string, error) {
	top := sh.top
	if err := ctx.Err(); err != nil {
		return nil, nil, 0, "", err
	}
	bands := []Band{{0, fp, 1, 1}, {fs, 0.5, 0, d1 / d2}}
	dc := 1.0
	ext := init
	if top {
		// The levelled error δ of the plain design (D∞ is an estimate): the
		// top of its passband ripple is 1 + δ.
		_, e, delta, err := remez(taps, bands, init, density, sh.target(bands, 1, 0))
		if err == nil {
			dc, ext = 1+delta, e
		}
	}
	tg := func(i int, f float64) (float64, float64) {
		return sh.target(bands, dc, dcWeight)(i, f)
	}
	h, e, delta, err := remez(taps, bands, ext, density, tg)
	// The largest amplitude between grid points may still exceed the pinned
	// one by a little: pin to it again (a shortfall ε of |β(0)| costs √(8ε)
	// rad of flip).
	for k := 0; top && err == nil && k < 6; k++ {
		mx := dc
		const m = 512
		for i := 1; i <= m; i++ {
			mx = math.Max(mx, zeroPhase(h, fs*float64(i)/m))
		}
		if mx <= dc*(1+1e-9) {
			break
		}
		dc = 2*mx - dc // the excess grows as dc does: step beyond it
		h, e, delta, err = remez(taps, bands, e, density, tg)
	}
	if errors.Is(err, ErrNoConvergence) {
		h, err = LeastSquares(taps, bands)
		if err == nil {
			g := 1 / zeroPhase(h, 0)
			for i := range h {
				h[i] *= g
			}
		}
		return h, nil, math.NaN(), "least squares", err
	}
	return h, e, delta, "remez", err
}

// shaping says how a β filter departs from the plain equiripple lowpass.
type shaping struct {
	// top pins zero offset to the top of the passband ripple (see lowpass).
	top bool
	// slope > 0 makes the stopband weight rise as (f/fs)^slope beyond the
	// stopband edge fs (Spec.Rising): the flat stopband error of the
	// equiripple design is a comb of equal ripples up to half the sampling
	// rate, whose transform is a pair of spikes in the filter's end taps, so
	// in the pulse's first and last samples; a rising weight lets the ripples
	// decay away from the edge and lowers the spikes, at some cost in ripple
	// near the edge. 0: the published flat stopband.
	slope float64
	// fit sets the transition width by the levelled error the exchange
	// reaches rather than by the D∞ estimate alone (see centred): for 90°
	// excitation, whose passband ripple 2δ1² is second order in the filter's,
	// the estimate's error (the levelled error up to 1.9× δ1 at TBW 4 to 12,
	// 256 samples) comes out squared in the profile.
	fit bool
}

// target returns the gain and weight at frequency f of band i, with zero
// offset pinned to dc by weight pin (none when pin is 0).
func (sh shaping) target(bands []Band, dc, pin float64) target {
	fs := bands[1].Lo
	return func(i int, f float64) (float64, float64) {
		if i == 0 && f == 0 && pin > 0 {
			return dc, pin
		}
		if i == 1 && sh.slope > 0 {
			return 0, bands[1].Weight * math.Pow(f/fs, sh.slope)
		}
		return bands[i].Gain, bands[i].Weight
	}
}

// dcWeight pins the amplitude at zero offset (see lowpass): its weighted error
// is at most the levelled error, so its unweighted error at most that divided
// by dcWeight.
const dcWeight = 1e4

// zeroPhase is the amplitude Σ h[k]·cos(2πf·(k − (L−1)/2)) of a symmetric filter.
func zeroPhase(h []float64, f float64) float64 {
	mid := float64(len(h)-1) / 2
	// cos(ω(k − mid)) by rotation from k = 0, step ω (rounding grows as k·ε).
	sw, cw := math.Sincos(2 * math.Pi * f)
	sn, cs := math.Sincos(-2 * math.Pi * f * mid)
	s := 0.0
	for _, v := range h {
		s += v * cs
		cs, sn = cs*cw-sn*sw, sn*cw+cs*sw
	}
	return s
}

// centred designs the published lowpass of taps coefficients for an n-sample
// pulse of time-bandwidth product tbw: the transition of D∞/taps cycles/sample
// (Herrmann, Rabiner & Chan 1973; Pauly et al. 1991), centred first on
// tbw/(2n) (the published edges, see edges). The role's profile is half-way
// where the filter's amplitude is level, which is not the transition's centre
// and moves within it with the ripples and with tbw (by a few per cent at
// TBW 4 to 12); the transition, its width kept, is then moved by secant steps
// until that point is at tbw/(2n) within centreTol. It returns the edges used.
//
// With sh.fit (an amendment to the published design, for 90° excitation) the
// width is fitted too: D∞ is an estimate, and the exchange with the
// published edges levels the error at up to 1.9× δ1; each step moves the
// width by the difference of D∞ between the asked ripples and those reached
// (δ, δ·δ2/δ1), a Newton step on the estimate's own slope, until the levelled
// error is within fitLo to fitHi of δ1.
func centred(ctx context.Context, n, taps int, tbw, d1, d2, level float64, sh shaping) (h []float64, fp, fs float64, method string, err error) {
	want := tbw / (2 * float64(n))
	p0, s0 := edges(n, taps, tbw, DInf(d1, d2))
	half := (s0 - p0) / 2
	c := want
	// Secant steps on a coarse grid, each warm-started from the last; then
	// one design on the full grid from the coarse extremal set.
	var ext []float64
	found := false
	goodC, goodHalf := want, half
	steps := 6
	if sh.fit {
		steps = 10
	}
	for range steps {
		fp, fs = c-half, c+half
		if !(fp > 0 && fs < 0.5) {
			break
		}
		var delta float64
		var e []float64
		h, e, delta, _, err = lowpass(ctx, taps, fp, fs, d1, d2, sh, ext, coarseDensity)
		if err != nil {
			break
		}
		f := crossing(h, level*zeroPhase(h, 0), fp, fs)
		if math.IsNaN(f) {
			break
		}
		found, ext = true, e
		goodC, goodHalf = c, half
		centreOK := math.Abs(f-want) <= centreTol*want
		widthOK := !sh.fit || math.IsNaN(delta) || (delta >= fitLo*d1 && delta <= fitHi*d1)
		if centreOK && widthOK {
			break
		}
		c += want - f // the crossing moves with the transition
		if !widthOK {
			r := d2 / d1
			half += (DInf(fitAim*d1, fitAim*d1*r) - DInf(delta, delta*r)) / (2 * float64(taps))
		}
	}
	if sh.fit {
		c, half = goodC, goodHalf // the last width designed, not a step beyond
	}
	if !found || !(c-half > 0 && c+half < 0.5) {
		// No crossing found: the published edges as they are.
		c, half, ext = want, (s0-p0)/2, nil
	}
	fp, fs = c-half, c+half
	h, _, _, method, err = lowpass(ctx, taps, fp, fs, d1, d2, sh, ext, gridDensity)
	return h, fp, fs, method, err
}

// The levelled error sh.fit accepts, as a fraction of δ1, and aims at (the
// full grid levels a little above the coarse one).
const (
	fitLo, fitAim, fitHi = 0.85, 0.93, 1.0
)

// coarseDensity is the design grid density of centred's secant steps.
const coarseDensity = 4

// centreTol is how close to tbw/(2n) centred puts the role's half-way point.
const centreTol = 1e-3

// crossing returns the frequency between lo and hi at which the amplitude of
// the symmetric filter h falls through level (bisection, after a scan for the
// first fall); NaN if it does not.
func crossing(h []float64, level, lo, hi float64) float64 {
	const steps = 32
	prev := lo
	if zeroPhase(h, lo) < level {
		return math.NaN()
	}
	for i := 1; i <= steps; i++ {
		f := lo + (hi-lo)*float64(i)/steps
		if zeroPhase(h, f) < level {
			a, b := prev, f
			for range 40 {
				m := (a + b) / 2
				if zeroPhase(h, m) < level {
					b = m
				} else {
					a = m
				}
			}
			return (a + b) / 2
		}
		prev = f
	}
	return math.NaN()
}

// betaFilter designs the β filter of n taps with ripples d1, d2 and the
// published band edges (see edges). Minimum phase follows the published
// construction: a linear-phase filter of 2n−1 taps with ripples 2δ1 and δ2²/2,
// raised by its stopband ripple to be non-negative, and its minimum-phase
// spectral factor taken (Pauly et al. 1991; Herrmann & Schüssler, Electron.
// Lett. 6:329, 1970, from memory); maximum phase is its time reversal. It
// returns the band edges used (cycles/sample) and the method.
func betaFilter(ctx context.Context, n int, tbw, d1, d2, level float64, design Design, sh shaping, cep *cepstrum) (h []float64, fp, fs float64, method string, err error) {
	if design == Linear {
		h, fp, fs, method, err = centred(ctx, n, n, tbw, d1, d2, level, sh)
		return h, fp, fs, method, err
	}
	l1, l2 := 2*d1, d2*d2/2
	taps := 2*n - 1
	// |β|² ∝ the prototype: |β| = level where it is level².
	sh.slope *= 2 // |β|² decays as fast as |β| with twice the exponent
	h2, fp, fs, method, err := centred(ctx, n, taps, tbw, l1, l2, level*level, sh)
	if err != nil {
		return nil, 0, 0, "", err
	}
	// Zero-phase amplitude of h2: Re(e^{iω(n−1)}·H2(ω)).
	H := cep.response(h2)
	amp := make([]float64, len(H))
	low := 0.0
	for k, v := range H {
		w := 2 * math.Pi * float64(k) / float64(cep.m)
		s, c := math.Sincos(w * float64(n-1))
		amp[k] = real(v)*c - imag(v)*s
		low = math.Min(low, amp[k])
	}
	// Raise the stopband ripple (about δ2²/2 as designed; the measured one)
	// just above zero so the factor has no zeros on |z| = 1, and scale the
	// amplitude at zero offset back to 1.
	raise := -low * (1 + 1e-3)
	a0 := amp[0] + raise
	for k, v := range amp {
		amp[k] = math.Sqrt(math.Max(v+raise, 0) / a0)
	}
	h = cep.minimumPhase(amp, n)
	if design == Maximum {
		for i, j := 0, n-1; i < j; i, j = i+1, j-1 {
			h[i], h[j] = h[j], h[i]
		}
	}
	return h, fp, fs, method + ", minimum-phase factor", nil
}

// betaMargin keeps max|β| on the design grid at most 1 − betaMargin, so that
// |α| = √(1 − |β|²) stays away from zero and its cepstrum converges; a margin
// ε costs √(8ε) rad of a 180° flip (0.05° here). Minimum and maximum phase,
// whose β is itself a cepstral factor with less accurate magnitude, keep
// phaseMargin (0.16°) so that |α|² + |β|² stays within 1e-6 of 1.
const (
	betaMargin  = 1e-7
	phaseMargin = 1e-6
)

// gridFactor sets the minimum-phase grid to gridFactor·n points (at least 2^14):
// with betaMargin it keeps the forward transform of the RF within about 1e-8 of β.
const gridFactor = 256

// polynomials scales the unit β filter h to β = i·sin(θ/2)·h (the factor i makes
// phase 0 put B1 along +x, as in package physics) and completes α as the
// minimum-phase sequence with |α|² = 1 − |β|² (Pauly et al. 1991).
func polynomials(h []float64, flip, margin float64, cep *cepstrum) (a, b []complex128, scaled bool) {
	s := math.Sin(flip / 2)
	H := cep.response(h)
	peak := 0.0
	for _, v := range H {
		peak = math.Max(peak, cmplx.Abs(v))
	}
	if s*peak > 1-margin {
		s = (1 - margin) / peak
		scaled = true
	}
	mag := make([]float64, len(H))
	for k, v := range H {
		bb := s * cmplx.Abs(v)
		mag[k] = math.Sqrt(math.Max(1-bb*bb, 0))
	}
	ar := cep.minimumPhase(mag, len(h))
	a = make([]complex128, len(h))
	b = make([]complex128, len(h))
	for k := range h {
		a[k] = complex(ar[k], 0)
		b[k] = complex(0, s*h[k])
	}
	return a, b, scaled
}

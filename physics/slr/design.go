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

// edges returns the passband and stopband edges (cycles/sample) of an n-tap β
// filter of time-bandwidth product tbw whose equiripple design of length taps has
// factor dinf: the transition of about dinf/taps cycles/sample is centred on the
// nominal edge tbw/(2n).
func edges(n, taps int, tbw, dinf float64) (fp, fs float64) {
	edge := tbw / (2 * float64(n))
	half := dinf / (2 * float64(taps))
	return edge - half, edge + half
}

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

// crossing returns the first frequency above lo at which the amplitude of the
// symmetric filter h falls below level, searching up to hi; NaN if it does not.
func crossing(h []float64, level, lo, hi float64) float64 {
	const steps = 64
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

// shaping says how a β filter departs from the plain equiripple lowpass of
// Pauly et al. (1991), whose stopband error keeps its full height up to half the
// sampling rate. That flat error is a comb of equal ripples across the whole
// stopband, and its transform is a pair of spikes in the filter's end taps, so in
// the first and last samples of the pulse, which grow with the number of samples
// per time-bandwidth product. Here the stopband weight rises as (f/fs)^slope
// beyond the stopband edge fs: the ripples keep their specified height near the
// transition, where the profile is specified, and decay further out, where it
// only costs the end spikes.
type shaping struct {
	slope float64 // stopband weight grows as (f/fs)^slope
	// top makes the amplitude at zero offset the largest of the passband (for
	// 180° designs, whose |β| cannot exceed 1, so that the on-resonance flip
	// is the nominal one); otherwise the amplitude at zero offset is exactly 1.
	top bool
	// lift centres the stopband ripple above zero (for the non-negative
	// prototype of minimum-phase designs), so that it needs no constant raise.
	lift bool
}

// dcWeight pins the amplitude at zero offset (see shaping): its weighted error
// is at most the levelled error, so the unweighted error there is at most that
// divided by dcWeight.
const dcWeight = 1e4

// topMargin places a top passband (see shaping) topMargin·d1 below the amplitude
// 1 at zero offset rather than d1: the largest error between the points of the
// design grid exceeds the levelled error by a little, and |β| at zero offset must
// stay the largest for the flip there to be 180° (a shortfall ε in |β| costs
// √(8ε) rad of flip).
const topMargin = 1.0

// errNarrow reports a transition band wider than the passband it bounds: the
// time-bandwidth product is too small for the ripples.
var errNarrow = errors.New("transition does not fit")

// narrowRatio is how far above the asked ripple the passband error of a design
// that ran out of steps may be before lowpass gives up with errNarrow.
const narrowRatio = 1.1

// narrowEdgeTol is how far from the nominal edge the crossing of such a design
// may be (the checks ask for 2 %; the search aims at edgeTol).
const narrowEdgeTol = 1.5e-2

// Tolerances of lowpass: the 50 % crossing within edgeTol of the nominal edge;
// the levelled passband error δ between rippleLo and rippleHi times the asked
// ripple, aiming at rippleAim times it. rippleHi is just above 1 because a
// design with a top passband (see shaping) cannot have δ below the ripple.
const (
	edgeTol   = 2e-3
	rippleLo  = 0.96
	rippleAim = 0.98
	rippleHi  = 1.002
	topLo     = 0.94
	topAim    = 0.965
	topHi     = 0.99
)

// lowpass designs a linear-phase lowpass of taps coefficients, amplitude 1 at
// zero offset, whose amplitude falls through level at edge, with passband ripple
// d1 and stopband ripple d2: equiripple by Remez exchange with the stopband
// weighting of sh, falling back to least squares when the exchange fails.
//
// The transition width starts at tw (from D∞, Herrmann, Rabiner & Chan 1973,
// which holds for the plain equiripple design); it is then widened or narrowed
// until the levelled passband error of the design is d1 within rippleTol, by a
// D∞-scaled first step and secant steps in log δ, since the constraints of sh
// cost ripple at a given width. Together with it the transition is moved by
// secant steps until the crossing is within edgeTol of edge (the transition of
// an equiripple filter with δ1 ≠ δ2 is not symmetric about its centre). The
// steps run on a coarse grid, each warm-started from the last; the final design
// on the full grid starts from the coarse extremal set. It returns errNarrow
// (wrapped) when the transition no longer fits, and reports the method used.
func lowpass(ctx context.Context, taps int, edge, tw, level, d1, d2 float64, sh shaping) (h []float64, fp, fs float64, method string, err error) {
	ws := d1 / d2
	// A top passband is centred d1 below the amplitude 1 at zero offset; a
	// lifted stopband is centred just above its ripple, which is at most
	// rippleHi·d2 when δ is accepted.
	off, lift := 0.0, 0.0
	if sh.top {
		off = topMargin * d1
	}
	if sh.lift {
		lift = rippleHi * d2
	}
	lo, aimR, hi := rippleLo, rippleAim, rippleHi
	if sh.top && !sh.lift {
		lo, aimR, hi = topLo, topAim, topHi
	}
	bands := func(c, tw float64) ([]Band, target, bool) {
		p, s := c-tw/2, c+tw/2
		b := []Band{{0, p, 1 - off, 1}, {s, 0.5, 0, ws}}
		pass, stop := 1-off, lift
		tg := func(i int, f float64) (float64, float64) {
			if i == 0 {
				if f == 0 {
					return 1, dcWeight
				}
				return pass, 1
			}
			env := math.Pow(s/f, sh.slope) // ≤ 1: the allowed error decays as env
			return stop * env, ws / env
		}
		return b, tg, p > 0 && s < 0.5
	}
	type designer func([]Band, target) ([]float64, float64, error)
	// solve moves the centre c and width tw of the transition until the
	// crossing and the ripple are met, or maxSteps designs are made.
	solve := func(design designer, c, tw float64, maxSteps int) (float64, float64, []float64, error) {
		var h []float64
		prevC, prevF := math.NaN(), math.NaN()
		prevW, prevD := math.NaN(), math.NaN()
		for range maxSteps {
			b, tg, ok := bands(c, tw)
			if !ok {
				return c, tw, nil, fmt.Errorf("%w: transition %.4g to %.4g cycles/sample", errNarrow, c-tw/2, c+tw/2)
			}
			hh, delta, err := design(b, tg)
			if err != nil {
				return c, tw, nil, err
			}
			h = hh
			f := crossing(hh, level, 0, math.Min(0.5, c+1.5*tw))
			okF := math.IsNaN(f) || math.Abs(f-edge) <= edgeTol*edge
			okD := (delta >= lo*d1 && delta <= hi*d1) || delta == 0
			if okF && okD {
				return c, tw, h, nil
			}
			nc, nw := c, tw
			if !okF {
				slope := 1.0 // the crossing moves with the transition
				if !math.IsNaN(prevF) && f != prevF && prevW == tw {
					slope = (f - prevF) / (c - prevC)
				}
				nc = c + (edge-f)/slope
			}
			if !okD {
				// A first step that scales the width as D∞ would: the
				// design behaves as a plain one of ripples delta and
				// delta/ws; later steps are secant steps in log δ.
				aim := aimR * d1
				k := DInf(aim, aim/ws) / DInf(delta, delta/ws)
				if !math.IsNaN(prevD) && prevW != tw {
					s := (math.Log(delta) - math.Log(prevD)) / (tw - prevW)
					if s < 0 {
						k = 1 + (math.Log(aim)-math.Log(delta))/s/tw
					}
				}
				nw = tw * math.Min(math.Max(k, 0.5), 2)
			}
			// Keep the bands inside 0 to 0.5: halve the step until they fit.
			for k := 0; k < 30 && !(nc-nw/2 > 0 && nc+nw/2 < 0.5); k++ {
				nc, nw = (c+nc)/2, (tw+nw)/2
			}
			prevC, prevF, prevW, prevD = c, f, tw, delta
			c, tw = nc, nw
		}
		if prevD > narrowRatio*d1 {
			return prevC, prevW, nil, fmt.Errorf("%w: passband error %.3g, want %.3g", errNarrow, prevD, d1)
		}
		if !(math.Abs(prevF-edge) <= narrowEdgeTol*edge) {
			return prevC, prevW, nil, fmt.Errorf("%w: 50 %% point at %.4g cycles/sample, want %.4g", errNarrow, prevF, edge)
		}
		return prevC, prevW, h, nil
	}
	var ext []float64
	coarse := func(b []Band, tg target) ([]float64, float64, error) {
		if err := ctx.Err(); err != nil {
			return nil, 0, err
		}
		hh, e, delta, err := remez(taps, b, ext, 4, tg)
		ext = e
		return hh, delta, err
	}
	fine := func(b []Band, tg target) ([]float64, float64, error) {
		if err := ctx.Err(); err != nil {
			return nil, 0, err
		}
		hh, e, delta, err := remez(taps, b, ext, gridDensity, tg)
		ext = e
		return hh, delta, err
	}
	c, tw, _, err := solve(coarse, edge, tw, 16)
	if err == nil {
		// One full-grid design; solve again on the full grid only if it moved.
		c, tw, h, err = solve(fine, c, tw, 8)
	}
	method = "remez"
	if errors.Is(err, ErrNoConvergence) {
		method = "least squares"
		b, _, ok := bands(edge, tw)
		if !ok {
			return nil, 0, 0, "", fmt.Errorf("%w: transition %.4g to %.4g cycles/sample", errNarrow, b[0].Hi, b[1].Lo)
		}
		// Centred on the edge; unit amplitude at zero offset.
		c = edge
		h, err = LeastSquares(taps, []Band{{0, b[0].Hi, 1, 1}, {b[1].Lo, 0.5, 0, ws}})
		if err == nil {
			g := 1 / zeroPhase(h, 0)
			for i := range h {
				h[i] *= g
			}
		}
	}
	if err != nil {
		return nil, 0, 0, "", err
	}
	return h, c - tw/2, c + tw/2, method, nil
}

// betaFilter designs the β filter of n taps with ripples d1, d2, amplitude 1 at
// zero offset. Minimum phase follows the published construction: a linear-phase
// filter of 2n−1 taps with ripples 2δ1 and δ2²/2, non-negative, and its
// minimum-phase spectral factor taken (Pauly et al. 1991; Herrmann & Schüssler,
// Electron. Lett. 6:329, 1970, from memory); maximum phase is its time reversal.
// It returns the band edges used (cycles/sample) and the method.
func betaFilter(ctx context.Context, n int, tbw, d1, d2 float64, design Design, top bool, cep *cepstrum) (h []float64, fp, fs float64, method string, err error) {
	edge := tbw / (2 * float64(n))
	if design == Linear {
		// The 50 % point of |β| at the nominal edge.
		return lowpass(ctx, n, edge, DInf(d1, d2)/float64(n), 0.5, d1, d2, shaping{slope: stopSlope, top: top})
	}
	l1, l2 := 2*d1, d2*d2/2
	taps := 2*n - 1
	// |β|² ∝ the prototype: |β| = 1/2 where it is 1/4.
	h2, fp, fs, method, err := lowpass(ctx, taps, edge, DInf(l1, l2)/float64(taps), 0.25, l1, l2, shaping{slope: 2 * stopSlope, top: top, lift: true})
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
	// Raise what negative ripple is left just above zero so the factor has no
	// zeros on |z| = 1, keeping the amplitude 1 at zero offset.
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

// stopSlope is the exponent of the rising stopband weight (see shaping) of the
// linear-phase β filter; the minimum-phase prototype, which is |β|², uses twice
// it, so that |β| decays alike.
const stopSlope = 2.0

// betaMargin keeps max|β| on the design grid at most 1 − betaMargin, so that
// |α| = √(1 − |β|²) stays away from zero and its cepstrum converges.
const betaMargin = 1e-6

// gridFactor sets the minimum-phase grid to gridFactor·n points (at least 2^14):
// with betaMargin it keeps the forward transform of the RF within about 1e-8 of β.
const gridFactor = 256

// polynomials scales the unit β filter h to β = i·sin(θ/2)·h (the factor i makes
// phase 0 put B1 along +x, as in package physics) and completes α as the
// minimum-phase sequence with |α|² = 1 − |β|² (Pauly et al. 1991).
func polynomials(h []float64, flip float64, cep *cepstrum) (a, b []complex128, scaled bool) {
	s := math.Sin(flip / 2)
	H := cep.response(h)
	peak := 0.0
	for _, v := range H {
		peak = math.Max(peak, cmplx.Abs(v))
	}
	if s*peak > 1-betaMargin {
		s = (1 - betaMargin) / peak
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

package slr

import (
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
	s := 0.0
	for k, v := range h {
		s += v * math.Cos(2*math.Pi*f*(float64(k)-mid))
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

// lowpass designs a linear-phase lowpass of taps coefficients with a transition
// of width tw cycles/sample whose amplitude falls through level at edge:
// equiripple by Remez exchange, falling back to least squares when the exchange
// fails. The published edges centre the transition on the nominal edge; because
// the transition of an equiripple filter with δ1 ≠ δ2 is not symmetric, the
// transition is moved by secant steps until the crossing is within 0.2 % of
// edge. The steps run on a coarse grid, each warm-started from the last; the
// final design on the full grid starts from the coarse extremal set. It reports
// the method used.
func lowpass(taps int, edge, tw, level, d1, d2 float64) (h []float64, fp, fs float64, method string, err error) {
	bands := func(c float64) ([]Band, bool) {
		p, s := c-tw/2, c+tw/2
		return []Band{{0, p, 1, 1}, {s, 0.5, 0, d1 / d2}}, p > 0 && s < 0.5
	}
	centre := func(design func([]Band) ([]float64, error), c, tol float64) (float64, []float64, error) {
		var h []float64
		prevC, prevF := math.NaN(), math.NaN()
		for range 6 {
			b, ok := bands(c)
			if !ok {
				break
			}
			hh, err := design(b)
			if err != nil {
				return 0, nil, err
			}
			h = hh
			f := crossing(hh, level, 0, math.Min(0.5, c+1.5*tw))
			if math.IsNaN(f) || math.Abs(f-edge) <= tol*edge {
				return c, h, nil
			}
			slope := 1.0 // the crossing moves with the transition
			if !math.IsNaN(prevF) && f != prevF {
				slope = (f - prevF) / (c - prevC)
			}
			prevC, prevF = c, f
			c += (edge - f) / slope
		}
		if h == nil {
			return 0, nil, fmt.Errorf("transition band %g to %g cycles/sample does not fit", edge-tw/2, edge+tw/2)
		}
		return prevC, h, nil
	}
	var ext []float64
	coarse := func(b []Band) ([]float64, error) {
		hh, e, err := remez(taps, b, ext, 4)
		ext = e
		return hh, err
	}
	fine := func(b []Band) ([]float64, error) {
		hh, e, err := remez(taps, b, ext, gridDensity)
		ext = e
		return hh, err
	}
	c, _, err := centre(coarse, edge, 2e-3)
	if err == nil {
		// One full-grid design; re-centre on the full grid only if it moved.
		b, _ := bands(c)
		h, err = fine(b)
		if err == nil {
			f := crossing(h, level, 0, math.Min(0.5, c+1.5*tw))
			if !(math.Abs(f-edge) <= 5e-3*edge) {
				c, h, err = centre(fine, c, 2e-3)
			}
		}
	}
	method = "remez"
	if errors.Is(err, ErrNoConvergence) {
		method = "least squares"
		c, h, err = centre(func(b []Band) ([]float64, error) { return LeastSquares(taps, b) }, edge, 2e-3)
	}
	if err != nil {
		return nil, 0, 0, "", err
	}
	return h, c - tw/2, c + tw/2, method, nil
}

// betaFilter designs the unit-passband β filter of n taps with ripples d1, d2.
// Minimum phase follows the published construction: a linear-phase filter of
// 2n−1 taps with ripples 2δ1 and δ2²/2 is raised to be non-negative and its
// minimum-phase spectral factor taken (Pauly et al. 1991; Herrmann & Schüssler,
// Electron. Lett. 6:329, 1970, from memory); maximum phase is its time reversal.
// It returns the band edges used (cycles/sample) and the method.
func betaFilter(n int, tbw, d1, d2 float64, design Design, cep *cepstrum) (h []float64, fp, fs float64, method string, err error) {
	edge := tbw / (2 * float64(n))
	if design == Linear {
		// The 50 % point of |β| at the nominal edge.
		return lowpass(n, edge, DInf(d1, d2)/float64(n), 0.5, d1, d2)
	}
	l1, l2 := 2*d1, d2*d2/2
	taps := 2*n - 1
	// |β|² = (A + raise)/(1 + raise) with raise ≈ δ2': |β| = 1/2 where A ≈ 1/4 − 3δ2'/4.
	h2, fp, fs, method, err := lowpass(taps, edge, DInf(l1, l2)/float64(taps), 0.25-0.75*l2, l1, l2)
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
	// Raise the stopband just above zero so the factor has no zeros on |z| = 1.
	raise := -low * (1 + 1e-3)
	for k, v := range amp {
		amp[k] = math.Sqrt(math.Max(v+raise, 0) / (1 + raise))
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

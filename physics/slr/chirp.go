package slr

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// fastGrid evaluates the Remez interpolant on the dense grid in
// O(r² + grid·log grid) instead of O(r·grid): the polynomial p of degree < r in
// x = cos ω is sampled at the K = nc/2 + 1 points ω_j = 2πj/nc (nc a power of two,
// nc ≥ 2(r − 1)), its cosine series p(cos ω) = Σ a_k·cos(kω) read off by one real
// FFT (a discrete cosine transform, exact for degree < nc/2), and the series
// summed over each band's equally spaced grid points f_i = lo + i·s by the
// chirp z-transform (Bluestein, IEEE Trans. Audio Electroacoust. 18:451, 1970:
// k·i = (k² + i² − (i − k)²)/2 turns the sum into a convolution, done by FFT).
// Rounding is about 1e-15 of Σ|a_k|, far below the exchange's 1e-9 tolerance.
type fastGrid struct {
	nc    int
	xs    []float64 // cos(2πj/nc), j < K
	ps    []float64 // p at xs
	dct   *fourier.FFT
	seq   []float64
	coef  []complex128
	a     []float64 // cosine series of the last interpolant (series)
	bands []chirpBand
}

// chirpBand holds the fixed parts of one band's chirp z-transform.
type chirpBand struct {
	start, m int // grid indices start … start+m−1
	fft      *fourier.CmplxFFT
	pre      []complex128 // e^{2πi·k·lo}·W(k), k < K
	post     []complex128 // W(i)/M, i < m
	kern     []complex128 // transform of conj(W(n)), n from −(K−1) to m−1
	buf      []complex128
}

// fastGridMin is the number of basis functions from which the FFT evaluation is
// used: below it the direct sum is about as fast, and designs of the default
// 256 samples (128 basis functions linear phase, 256 minimum phase) keep the
// direct sum's rounding, which the design's discrete steps (the centring
// tolerance, the re-pinning of zero offset) can amplify.
const fastGridMin = 257

// turn returns e^{2πi·frac(a·b)} for a float a and an integer-valued b < 2⁵³,
// with the product's rounding error recovered (FMA), so that the phase stays
// exact to about 1e-16 cycles however large a·b is.
func turn(a, b float64) complex128 {
	hi := a * b
	lo := math.FMA(a, b, -hi)
	fr := hi - math.Round(hi) + lo
	s, c := math.Sincos(2 * math.Pi * fr)
	return complex(c, s)
}

// newFastGrid prepares the evaluation for r basis functions on the grid f made
// of bands ending at bandEnd, each band equally spaced.
func newFastGrid(r int, f []float64, bandEnd []int) *fastGrid {
	nc := 2
	for nc < 2*(r-1) {
		nc *= 2
	}
	K := nc/2 + 1
	g := &fastGrid{nc: nc, xs: make([]float64, K), ps: make([]float64, K), dct: fourier.NewFFT(nc), seq: make([]float64, nc)}
	for j := range g.xs {
		g.xs[j] = math.Cos(2 * math.Pi * float64(j) / float64(nc))
	}
	start := 0
	for _, end := range bandEnd {
		m := end - start
		if m < 2 {
			return nil
		}
		lo := f[start]
		s := (f[end-1] - lo) / float64(m-1)
		M := 1
		for M < K+m-1 {
			M *= 2
		}
		b := chirpBand{start: start, m: m, fft: fourier.NewCmplxFFT(M), pre: make([]complex128, K), post: make([]complex128, m), kern: make([]complex128, M), buf: make([]complex128, M)}
		// W(n) = e^{iπ·s·n²} = e^{2πi·(s/2)·n²}.
		w := func(n int) complex128 { return turn(s/2, float64(n)*float64(n)) }
		for k := range K {
			b.pre[k] = turn(lo, float64(k)) * w(k)
		}
		for i := range m {
			b.post[i] = w(i) / complex(float64(M), 0)
		}
		for n := -(K - 1); n < m; n++ {
			b.kern[(n+M)%M] = cmplx.Conj(w(n))
		}
		b.fft.Coefficients(b.kern, b.kern)
		g.bands = append(g.bands, b)
		start = end
	}
	return g
}

// series sets g.a to the cosine series of p (p(cos ω) = Σ a_k·cos(kω)) and
// returns Σ|a_k|.
func (g *fastGrid) series(p *interpolant) float64 {
	K := len(g.xs)
	k := 0
	for j, x := range g.xs {
		for k < len(p.xs) && p.xs[k] > x {
			k++
		}
		if k < len(p.xs) && p.xs[k] == x {
			g.ps[j] = p.ys[k]
		} else {
			g.ps[j] = p.evalOff(x)
		}
	}
	// The even extension's transform.
	nc := g.nc
	g.seq[0] = g.ps[0]
	g.seq[nc/2] = g.ps[K-1]
	for j := 1; j < K-1; j++ {
		g.seq[j] = g.ps[j]
		g.seq[nc-j] = g.ps[j]
	}
	g.coef = g.dct.Coefficients(g.coef, g.seq)
	g.a = resize(g.a, K)
	sum := 0.0
	for k := range g.a {
		g.a[k] = 2 * real(g.coef[k]) / float64(nc)
		if k == 0 || k == K-1 {
			g.a[k] /= 2
		}
		sum += math.Abs(g.a[k])
	}
	return sum
}

// errors sets e[i] = w[i]·(d[i] − p(x[i])) over the grid, as interpolant.errors,
// and reports true; or reports false, having set nothing, when the rounding of
// the transforms (about fastRounding·Σ|a_k|, weighted) could reach 1e-10
// of the levelled error at more than a few points: early in an exchange the
// interpolant can be huge in the transition bands, where the grid does not
// look, and its cosine series with it. The few points of large weight (a
// pinned zero offset) are summed directly.
func (g *fastGrid) errors(p *interpolant, e []float64, ext []int, x, d, w []float64) bool {
	sum := g.series(p)
	// Weights above wmax get the direct sum.
	wmax := 1e-10 * math.Abs(p.delta) / (fastRounding * sum)
	heavy := 0
	for _, v := range w {
		if v > wmax {
			heavy++
		}
	}
	if heavy > maxHeavy {
		return false
	}
	for _, b := range g.bands {
		clear(b.buf)
		for k, v := range g.a {
			b.buf[k] = complex(v, 0) * b.pre[k]
		}
		b.fft.Coefficients(b.buf, b.buf)
		for n, v := range b.kern {
			b.buf[n] *= v
		}
		b.fft.Sequence(b.buf, b.buf)
		for i := range b.m {
			gi := b.start + i
			if w[gi] > wmax {
				e[gi] = w[gi] * (d[gi] - p.eval(x[gi]))
				continue
			}
			e[gi] = w[gi] * (d[gi] - real(b.buf[i]*b.post[i]))
		}
	}
	// The nodes themselves, as the direct sum sets them.
	for k, i := range ext {
		e[i] = w[i] * (d[i] - p.ys[k])
	}
	return true
}

// maxHeavy is the number of grid points fastGrid.errors sums directly before it
// leaves the whole grid to the direct sum.
const maxHeavy = 16

// taps returns the taps coefficients of the symmetric filter whose amplitude
// is the cosine series g.a (type I, odd taps: Σ a_k·cos(kω)) or cos(ω/2) times
// it (type II: cos(ω/2)·cos(kω) = ½cos((k+½)ω) + ½cos((k−½)ω)); as impulse,
// from the series instead of L samples of the interpolant.
func (g *fastGrid) taps(taps int) []float64 {
	h := make([]float64, taps)
	a := g.a
	if taps%2 == 1 {
		mid := taps / 2
		h[mid] = a[0]
		for k := 1; k <= mid && k < len(a); k++ {
			h[mid+k] = a[k] / 2
			h[mid-k] = a[k] / 2
		}
		return h
	}
	r := taps / 2
	b := make([]float64, r) // amplitude Σ b_m·cos((m+½)ω)
	for k, v := range a {
		switch {
		case k == 0:
			if r > 0 {
				b[0] += v
			}
		default:
			if k < r {
				b[k] += v / 2
			}
			if k-1 < r {
				b[k-1] += v / 2
			}
		}
	}
	for m := range r {
		h[r+m] = b[m] / 2
		h[r-1-m] = b[m] / 2
	}
	return h
}

// fastRounding bounds the relative rounding of fastGrid's transforms (a few
// hundred ulps: FFTs of up to 2¹⁷ points, measured below 1e-15).
const fastRounding = 1e-13

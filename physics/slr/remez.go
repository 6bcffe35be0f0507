package slr

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// Band is one band of a linear-phase filter specification: edges Lo < Hi in cycles
// per sample (0 to 0.5), the desired amplitude Gain over the band and the error
// Weight (> 0). Frequencies between bands are left free (transition bands).
type Band struct {
	Lo, Hi       float64
	Gain, Weight float64
}

// ErrNoConvergence reports a Remez exchange that did not settle on an alternation
// set within its iteration limit.
var ErrNoConvergence = errors.New("remez exchange did not converge")

func checkBands(taps int, bands []Band) error {
	if taps < 3 {
		return fmt.Errorf("taps: got %d, want at least 3", taps)
	}
	if len(bands) == 0 {
		return fmt.Errorf("bands: got none, want at least one")
	}
	prev := 0.0
	for i, b := range bands {
		if !(b.Lo >= prev) || !(b.Hi > b.Lo) || !(b.Hi <= 0.5) {
			return fmt.Errorf("band %d: got edges %g to %g, want increasing, non-overlapping edges within 0 to 0.5 cycles/sample", i, b.Lo, b.Hi)
		}
		if !(b.Weight > 0) || math.IsInf(b.Weight, 0) || math.IsNaN(b.Gain) || math.IsInf(b.Gain, 0) {
			return fmt.Errorf("band %d: got weight %g and gain %g, want a finite positive weight and a finite gain", i, b.Weight, b.Gain)
		}
		prev = b.Hi
	}
	return nil
}

// Remez designs a real, symmetric (linear-phase, type I for odd taps, type II for
// even taps) FIR filter with taps coefficients whose amplitude response best
// approximates the bands in the weighted minimax (equiripple) sense, by the
// Parks–McClellan algorithm (Parks & McClellan, IEEE Trans. Circuit Theory 19:189,
// 1972): Remez exchange on a dense grid, barycentric Lagrange interpolation in
// x = cos ω. For even taps the response is zero at 0.5 cycles/sample. It returns
// ErrNoConvergence (wrapped) when the exchange does not settle.
func Remez(taps int, bands []Band) ([]float64, error) {
	h, _, _, err := remez(taps, bands, nil, gridDensity, nil)
	return h, err
}

// target gives the desired amplitude and error weight at frequency f (cycles/
// sample) of band i, for responses that are not constant across a band; nil
// means each band's Gain and Weight.
type target func(i int, f float64) (gain, weight float64)

// gridDensity is the number of dense-grid points per basis function over 0 to
// 0.5 cycles/sample (16, common practice since Parks & McClellan).
const gridDensity = 16

// remez is Remez on a grid of the given density, started from the extremal
// frequencies init (cycles/sample) when they fit the problem, evenly spaced ones
// otherwise; it also returns the final extremal frequencies, to warm-start a
// neighbouring or finer design, and the largest weighted error on the grid. A non-nil
// tg replaces the bands' gains and weights point by point.
func remez(taps int, bands []Band, init []float64, density int, tg target) (h, extF []float64, delta float64, err error) {
	if err := checkBands(taps, bands); err != nil {
		return nil, nil, 0, fmt.Errorf("remez: %w", err)
	}
	odd := taps%2 == 1
	r := taps / 2 // basis functions cos(kω), k < r (plus one for odd taps)
	if odd {
		r++
	}
	step := 0.5 / float64(density*r)
	var f, x, d, w []float64
	var bandEnd []int
	for bi, b := range bands {
		lo, hi := b.Lo, b.Hi
		if !odd && hi > 0.5-step {
			hi = 0.5 - step // type II responses vanish at 0.5
		}
		if hi <= lo {
			continue
		}
		m := int(math.Ceil((hi-lo)/step)) + 1
		if m < 2 {
			m = 2
		}
		for i := 0; i < m; i++ {
			fi := lo + (hi-lo)*float64(i)/float64(m-1)
			di, wi := b.Gain, b.Weight
			if tg != nil {
				di, wi = tg(bi, fi)
			}
			if !odd {
				c := math.Cos(math.Pi * fi)
				di, wi = di/c, wi*c
			}
			f = append(f, fi)
			x = append(x, math.Cos(2*math.Pi*fi))
			d = append(d, di)
			w = append(w, wi)
		}
		bandEnd = append(bandEnd, len(f))
	}
	ng := len(f)
	scale := 0.0
	for i := range d {
		scale = math.Max(scale, math.Abs(w[i]*d[i]))
	}
	if ng < r+1 {
		return nil, nil, 0, fmt.Errorf("remez: bands too narrow for %d taps", taps)
	}
	ext := make([]int, r+1)
	for k := range ext {
		ext[k] = int(math.Round(float64(k) * float64(ng-1) / float64(r)))
	}
	if len(init) == r+1 {
		// Nearest grid point to each given frequency, kept strictly increasing.
		warm := make([]int, r+1)
		ok := true
		for k, fk := range init {
			i := sort.SearchFloat64s(f, fk)
			if i == ng || (i > 0 && fk-f[i-1] < f[i]-fk) {
				i--
			}
			if k > 0 && i <= warm[k-1] {
				i = warm[k-1] + 1
			}
			if i >= ng {
				ok = false
				break
			}
			warm[k] = i
		}
		if ok {
			ext = warm
		}
	}
	var (
		ip    interpolant
		e     = make([]float64, ng)
		done  bool
		worst float64 // largest weighted error on the grid of the last fit
	)
	const maxIter = 60
	for iter := 0; iter < maxIter; iter++ {
		ip.fit(ext, x, d, w)
		ip.errors(e, ext, x, d, w)
		maxE := 0.0
		for _, v := range e {
			maxE = math.Max(maxE, math.Abs(v))
		}
		// Accept extrema down to |δ| less rounding: δ can itself be near rounding
		// level on the first iterations of long filters.
		thr := math.Abs(ip.delta)*(1-1e-6) - 1e-12*scale
		next, ok := extrema(e, bandEnd, thr, r+1)
		if !ok {
			return nil, nil, 0, fmt.Errorf("remez: %w (alternation lost at iteration %d)", ErrNoConvergence, iter)
		}
		same := true
		for k := range next {
			same = same && next[k] == ext[k]
		}
		worst = maxE
		ext = next
		if same || maxE-math.Abs(ip.delta) <= 1e-9*maxE {
			done = true
			break
		}
	}
	if !done {
		return nil, nil, 0, fmt.Errorf("remez: %w in %d iterations", ErrNoConvergence, maxIter)
	}
	if !(worst-math.Abs(ip.delta) <= 1e-9*worst) {
		// The set changed on the last step: measure the final fit.
		ip.fit(ext, x, d, w)
		ip.errors(e, ext, x, d, w)
		worst = 0
		for _, v := range e {
			worst = math.Max(worst, math.Abs(v))
		}
	}
	extF = make([]float64, len(ext))
	for k, i := range ext {
		extF[k] = f[i]
	}
	return impulse(taps, ip.eval), extF, worst, nil
}

// interpolant is the degree r−1 polynomial in x through the r+1 extremal points
// with the levelled error ±δ (Parks & McClellan 1972), in barycentric form.
type interpolant struct {
	xs, ys, bw []float64
	delta      float64
}

func (p *interpolant) fit(ext []int, x, d, w []float64) {
	n := len(ext)
	p.xs = resize(p.xs, n)
	p.ys = resize(p.ys, n)
	p.bw = resize(p.bw, n)
	for k, i := range ext {
		p.xs[k] = x[i]
	}
	// Barycentric weights 1/∏(x_k − x_j), scaled by powers of two to stay finite.
	exps := make([]int, n)
	parallel(n, n*n, func(lo, hi int) {
		for k := lo; k < hi; k++ {
			m, ex := 1.0, 0
			for j := range n {
				if j == k {
					continue
				}
				m *= p.xs[k] - p.xs[j]
				if j&15 == 15 {
					fr, e2 := math.Frexp(m)
					m, ex = fr, ex+e2
				}
			}
			fr, e2 := math.Frexp(m)
			p.bw[k], exps[k] = 1/fr, -(ex + e2)
		}
	})
	maxExp := math.MinInt
	for _, v := range exps {
		maxExp = max(maxExp, v)
	}
	for k := range n {
		p.bw[k] = math.Ldexp(p.bw[k], exps[k]-maxExp)
	}
	num, den := 0.0, 0.0
	sign := 1.0
	for k, i := range ext {
		num += p.bw[k] * d[i]
		den += sign * p.bw[k] / w[i]
		sign = -sign
	}
	p.delta = num / den
	sign = 1
	for k, i := range ext {
		p.ys[k] = d[i] - sign*p.delta/w[i]
		sign = -sign
	}
}

// errors sets the weighted error e[i] = w[i]·(d[i] − p(x[i])) on the grid,
// whose nodes are the grid points ext (increasing). The O(nodes × grid) sum is
// the exchange's cost: on large grids it is split over GOMAXPROCS goroutines,
// each point computed as in one (the same result).
func (p *interpolant) errors(e []float64, ext []int, x, d, w []float64) {
	span := func(lo, hi int) {
		k := sort.SearchInts(ext, lo)
		for i := lo; i < hi; i++ {
			if k < len(ext) && ext[k] == i {
				e[i] = w[i] * (d[i] - p.ys[k])
				k++
			} else {
				e[i] = w[i] * (d[i] - p.evalOff(x[i]))
			}
		}
	}
	parallel(len(e), len(e)*len(ext), span)
}

// parallel calls span over 0 to n split in up to GOMAXPROCS contiguous parts,
// one goroutine each, when the work (in inner-loop terms) is worth it; each
// index is computed as it would be in one call, so the result is the same.
func parallel(n, work int, span func(lo, hi int)) {
	parts := min(runtime.GOMAXPROCS(0), work/parallelWork, n)
	if parts < 2 {
		span(0, n)
		return
	}
	var wg sync.WaitGroup
	for j := range parts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			span(j*n/parts, (j+1)*n/parts)
		}()
	}
	wg.Wait()
}

// parallelWork is the number of interpolant terms below which errors does not
// start goroutines (a few hundred microseconds of work).
const parallelWork = 1 << 17

// evalOff is eval at an x that is none of the nodes.
func (p *interpolant) evalOff(x float64) float64 {
	num, den := 0.0, 0.0
	ys := p.ys[:len(p.xs)]
	bw := p.bw[:len(p.xs)]
	for k, xk := range p.xs {
		t := bw[k] / (x - xk)
		num += t * ys[k]
		den += t
	}
	return num / den
}

func (p *interpolant) eval(x float64) float64 {
	num, den := 0.0, 0.0
	for k, xk := range p.xs {
		dx := x - xk
		if dx == 0 {
			return p.ys[k]
		}
		t := p.bw[k] / dx
		num += t * p.ys[k]
		den += t
	}
	return num / den
}

func resize(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}

// extrema picks the next alternation set of want points from the weighted error e
// on a grid made of bands ending at bandEnd: local extrema of magnitude at least
// thr (the levelled error), alternating in sign, trimmed to the largest.
func extrema(e []float64, bandEnd []int, thr float64, want int) ([]int, bool) {
	var cand []int
	start := 0
	for _, end := range bandEnd {
		for i := start; i < end; i++ {
			v := e[i]
			if math.Abs(v) < thr {
				continue
			}
			left, right := math.Inf(-1), math.Inf(-1)
			s := 1.0
			if v < 0 {
				s = -1
			}
			if i > start {
				left = s * e[i-1]
			}
			if i < end-1 {
				right = s * e[i+1]
			}
			if s*v >= left && s*v > right {
				cand = append(cand, i)
			}
		}
		start = end
	}
	// Alternation: of neighbours with the same sign keep the larger.
	alt := cand[:0:0]
	for _, i := range cand {
		if n := len(alt); n > 0 && (e[alt[n-1]] > 0) == (e[i] > 0) {
			if math.Abs(e[i]) > math.Abs(e[alt[n-1]]) {
				alt[n-1] = i
			}
			continue
		}
		alt = append(alt, i)
	}
	for len(alt) > want {
		if len(alt) == want+1 {
			// One too many: drop the smaller end, which keeps alternation.
			if math.Abs(e[alt[0]]) < math.Abs(e[alt[len(alt)-1]]) {
				alt = alt[1:]
			} else {
				alt = alt[:len(alt)-1]
			}
			continue
		}
		k := 0
		for j := range alt {
			if math.Abs(e[alt[j]]) < math.Abs(e[alt[k]]) {
				k = j
			}
		}
		switch {
		case k == 0:
			alt = alt[1:]
		case k == len(alt)-1:
			alt = alt[:len(alt)-1]
		default:
			// Removing an interior point joins two neighbours of equal sign.
			keep := k - 1
			if math.Abs(e[alt[k+1]]) > math.Abs(e[alt[k-1]]) {
				keep = k + 1
			}
			alt[k-1] = alt[keep]
			alt = append(alt[:k], alt[k+2:]...)
		}
	}
	if len(alt) < want {
		return nil, false
	}
	sort.Ints(alt)
	return alt, true
}

// impulse returns the taps coefficients of the symmetric filter whose amplitude
// response in cos ω is p (type I) or cos(ω/2)·p (type II), by sampling the
// response at taps equally spaced frequencies and inverting the DFT:
// h[n] = (1/L)·Σ_m A(ω_m)·cos(ω_m·(n − (L−1)/2)), ω_m = 2πm/L.
func impulse(taps int, p func(x float64) float64) []float64 {
	L := taps
	amp := make([]float64, L)
	parallel(L, L*L/2, func(lo, hi int) {
		for m := lo; m < hi; m++ {
			om := 2 * math.Pi * float64(m) / float64(L)
			amp[m] = p(math.Cos(om))
			if L%2 == 0 {
				amp[m] *= math.Cos(om / 2)
			}
		}
	})
	// cos(π·j/L) for j mod 2L: ω_m·(n − (L−1)/2) = π·m·(2n − L + 1)/L.
	tab := make([]float64, 2*L)
	for j := range tab {
		tab[j] = math.Cos(math.Pi * float64(j) / float64(L))
	}
	h := make([]float64, L)
	half := (L + 1) / 2
	parallel(half, half*L, func(lo, hi int) {
		for n := lo; n < hi; n++ {
			k := 2*n - L + 1
			k = ((k % (2 * L)) + 2*L) % (2 * L)
			s, j := 0.0, 0
			for m := 0; m < L; m++ {
				s += amp[m] * tab[j]
				j += k
				if j >= 2*L {
					j -= 2 * L
				}
			}
			h[n] = s / float64(L)
			h[L-1-n] = h[n]
		}
	})
	return h
}

// LeastSquares designs a real, symmetric FIR filter with taps coefficients that
// minimises the weighted integral squared error Σ_bands Weight·∫(Gain − A(ω))² dω
// of its amplitude response, by solving the normal equations in closed form
// (common practice). It is the fallback when the Remez exchange fails.
func LeastSquares(taps int, bands []Band) ([]float64, error) {
	if err := checkBands(taps, bands); err != nil {
		return nil, fmt.Errorf("least squares: %w", err)
	}
	odd := taps%2 == 1
	r := taps / 2
	if odd {
		r++
	}
	// Basis cos(m_k·ω): m_k = k (odd taps) or k + 1/2 (even taps).
	mk := func(k int) float64 {
		if odd {
			return float64(k)
		}
		return float64(k) + 0.5
	}
	// ∫_{ω1}^{ω2} cos(c·ω) dω.
	icos := func(c, w1, w2 float64) float64 {
		if c == 0 {
			return w2 - w1
		}
		return (math.Sin(c*w2) - math.Sin(c*w1)) / c
	}
	g := mat.NewSymDense(r, nil)
	rhs := mat.NewVecDense(r, nil)
	for _, b := range bands {
		w1, w2 := 2*math.Pi*b.Lo, 2*math.Pi*b.Hi
		for k := range r {
			rhs.SetVec(k, rhs.AtVec(k)+b.Weight*b.Gain*icos(mk(k), w1, w2))
			for l := k; l < r; l++ {
				v := 0.5 * b.Weight * (icos(mk(k)-mk(l), w1, w2) + icos(mk(k)+mk(l), w1, w2))
				g.SetSym(k, l, g.At(k, l)+v)
			}
		}
	}
	var coef mat.VecDense
	var ch mat.Cholesky
	if ok := ch.Factorize(g); ok {
		if err := ch.SolveVecTo(&coef, rhs); err != nil {
			return nil, fmt.Errorf("least squares: %w", err)
		}
	} else if err := coef.SolveVec(g, rhs); err != nil {
		return nil, fmt.Errorf("least squares: normal equations are singular: %w", err)
	}
	h := make([]float64, taps)
	if odd {
		mid := r - 1
		h[mid] = coef.AtVec(0)
		for k := 1; k < r; k++ {
			h[mid+k] = coef.AtVec(k) / 2
			h[mid-k] = h[mid+k]
		}
	} else {
		for k := range r {
			h[r+k] = coef.AtVec(k) / 2
			h[r-1-k] = h[r+k]
		}
	}
	return h, nil
}

package physics

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// Isochromats is a set of spins in structure-of-arrays form. Every non-nil slice has
// the same length N (Len); a nil slice means the default for every spin: offset 0 Hz,
// B1 scale 1, position 0 m, T1 and T2 infinite (no relaxation).
type Isochromats struct {
	Offset   []float64 // Hz, spin frequency minus carrier frequency
	B1Scale  []float64 // dimensionless factor on the waveform's B1
	Position []float64 // m, along the waveform's gradient
	T1, T2   []float64 // s; +Inf or 0 means no relaxation
}

// Len is the number of isochromats.
func (s *Isochromats) Len() int {
	for _, a := range [][]float64{s.Offset, s.B1Scale, s.Position, s.T1, s.T2} {
		if a != nil {
			return len(a)
		}
	}
	return 1
}

func (s *Isochromats) validate() error {
	n := s.Len()
	for _, a := range []struct {
		name  string
		v     []float64
		relax bool
	}{{"offset", s.Offset, false}, {"b1 scale", s.B1Scale, false}, {"position", s.Position, false}, {"t1", s.T1, true}, {"t2", s.T2, true}} {
		if a.v != nil && len(a.v) != n {
			return fmt.Errorf("isochromats: %s has %d values, want %d", a.name, len(a.v), n)
		}
		for i, v := range a.v {
			switch {
			case math.IsNaN(v) || (math.IsInf(v, 0) && !(a.relax && v > 0)):
				return fmt.Errorf("isochromats: %s[%d] is %g, want a finite value", a.name, i, v)
			case a.relax && v < 0:
				return fmt.Errorf("isochromats: %s[%d] is %g s, want ≥ 0 (0 or +Inf: no relaxation)", a.name, i, v)
			}
		}
	}
	return nil
}

func at(a []float64, i int, def float64) float64 {
	if a == nil {
		return def
	}
	return a[i]
}

// Grid returns the isochromats of the outer product of the given axes, with the
// first axis varying slowest. A nil or empty axis is left at its default.
func Grid(offset, b1Scale, position, t1, t2 []float64) Isochromats {
	axes := [][]float64{offset, b1Scale, position, t1, t2}
	n := 1
	for _, a := range axes {
		if len(a) > 0 {
			n *= len(a)
		}
	}
	out := make([][]float64, len(axes))
	stride := n
	for k, a := range axes {
		if len(a) == 0 {
			continue
		}
		stride /= len(a)
		v := make([]float64, n)
		for i := range v {
			v[i] = a[(i/stride)%len(a)]
		}
		out[k] = v
	}
	return Isochromats{Offset: out[0], B1Scale: out[1], Position: out[2], T1: out[3], T2: out[4]}
}

// Options control a simulation.
type Options struct {
	// Start is the initial magnetization (M0 = 1 units). The zero value means +z;
	// StartState names the usual ones.
	Start [3]float64
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results are
	// identical bit for bit whatever the number of workers.
	Workers int
	// Progress, when non-nil, is called from the workers with the number of
	// isochromats finished so far and the total, after each block of spins. It must
	// be safe for concurrent use.
	Progress func(done, total int)
	// MaxSteps bounds isochromats × samples; 0 means DefaultMaxSteps.
	MaxSteps float64
}

// DefaultMaxSteps is the default budget of isochromat-steps for one simulation
// (about a minute of work on one core at the rates quoted in bench_test.go).
const DefaultMaxSteps = 4e10

// MaxIsochromats bounds the result size (three float64 and two complex128 per spin).
const MaxIsochromats = 20_000_000

// Result holds the state after the waveform, one entry per isochromat.
type Result struct {
	Mx, My, Mz []float64
	// Alpha and Beta are the Cayley–Klein parameters of the whole pulse
	// (Pauly et al., IEEE TMI 10:53, 1991). They are nil when any spin relaxes.
	Alpha, Beta []complex128
}

// Block sizes of the scheduler: a worker takes blockSpins spins at a time and
// checks for cancellation every stepChunk samples (a few tens of microseconds of
// work, far inside the 50 ms that cancellation may take).
const (
	blockSpins = 64
	stepChunk  = 128
)

// Simulate propagates the isochromats through the waveform exactly: each
// piecewise-constant step is a rotation composed in Cayley–Klein form (see
// rotateBlock) or, when any spin relaxes, the exact solution of the linear step
// (see relax.go). gamma is in rad·s⁻¹·T⁻¹. The size is checked against
// Options.MaxSteps and MaxIsochromats before anything is allocated. It returns
// ctx.Err() when cancelled.
func Simulate(ctx context.Context, w *Waveform, gamma float64, iso *Isochromats, opt Options) (*Result, error) {
	if err := w.Validate(); err != nil {
		return nil, err
	}
	if math.IsNaN(gamma) || math.IsInf(gamma, 0) {
		return nil, fmt.Errorf("gamma is %g, want a finite value", gamma)
	}
	// The size is checked before the values are read: a request too large to
	// run costs nothing.
	n := iso.Len()
	if n > MaxIsochromats {
		return nil, fmt.Errorf("simulation of %d isochromats exceeds the limit of %d", n, MaxIsochromats)
	}
	budget := opt.MaxSteps
	if budget == 0 {
		budget = DefaultMaxSteps
	}
	if !(budget > 0) {
		return nil, fmt.Errorf("max steps is %g, want > 0 (0: the default %.3g)", budget, float64(DefaultMaxSteps))
	}
	if steps := float64(n) * float64(w.Len()); steps > budget {
		return nil, fmt.Errorf("simulation of %d isochromats × %d samples = %.3g steps exceeds the budget of %.3g", n, w.Len(), steps, budget)
	}
	if err := iso.validate(); err != nil {
		return nil, err
	}
	for k, v := range opt.Start {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("start magnetization component %d is %g, want a finite value", k, v)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	start := opt.Start
	if start == [3]float64{} {
		start = [3]float64{0, 0, 1}
	}
	relax := false
	maxOff, maxPos, maxScale, maxR := 0.0, 0.0, 0.0, 0.0
	for i := 0; i < n; i++ {
		r1, r2 := rate(at(iso.T1, i, 0)), rate(at(iso.T2, i, 0))
		if r1 != 0 || r2 != 0 {
			relax = true
		}
		maxR = max(maxR, r1, r2)
		maxOff = max(maxOff, math.Abs(2*math.Pi*at(iso.Offset, i, 0)))
		maxPos = max(maxPos, math.Abs(at(iso.Position, i, 0)))
		maxScale = max(maxScale, math.Abs(at(iso.B1Scale, i, 1)))
	}
	st, err := newSteps(w, gamma, maxOff, maxPos, maxScale)
	if err != nil {
		return nil, err
	}
	if relax {
		if err := st.planRelax(w, gamma, maxOff, maxPos, maxScale, maxR); err != nil {
			return nil, err
		}
	}
	res := &Result{Mx: make([]float64, n), My: make([]float64, n), Mz: make([]float64, n)}
	if !relax {
		res.Alpha = make([]complex128, n)
		res.Beta = make([]complex128, n)
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	nblocks := (n + blockSpins - 1) / blockSpins
	workers = min(workers, nblocks)

	// The workers poll ctx.Done() themselves: a goroutine started on cancellation
	// would wait for a busy worker to be preempted (milliseconds or more).
	done := ctx.Done()
	var next, finished atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b block
			for !cancelled(done) {
				k := int(next.Add(1)) - 1
				if k >= nblocks {
					return
				}
				lo := k * blockSpins
				hi := min(n, lo+blockSpins)
				if !b.run(st, iso, lo, hi, start, done) {
					return
				}
				b.store(res, lo, hi, relax)
				if opt.Progress != nil {
					opt.Progress(int(finished.Add(int64(hi-lo))), n)
				}
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return res, nil
}

// cancelled polls a context's Done channel without blocking.
func cancelled(done <-chan struct{}) bool {
	select {
	case <-done:
		return true
	default:
		return false
	}
}

// rate converts a relaxation time to a rate; 0 and +Inf mean no relaxation.
func rate(t float64) float64 {
	if t > 0 && !math.IsInf(t, 1) {
		return 1 / t
	}
	return 0
}

// block is one worker's state for a block of spins, in structure-of-arrays form.
type block struct {
	off, pos, scale, scale2, r1, r2 [blockSpins]float64
	// Cayley–Klein state (rotation) or magnetization (relaxation).
	ar, ai, br, bi [blockSpins]float64
	mx, my, mz     [blockSpins]float64
	relax          relaxScratch
}

// run propagates spins [lo, hi) through every step; it returns false when stopped.
func (b *block) run(st *steps, iso *Isochromats, lo, hi int, start [3]float64, done <-chan struct{}) bool {
	m := hi - lo
	blockRelax := false
	for i := range m {
		b.off[i] = 2 * math.Pi * at(iso.Offset, lo+i, 0)
		b.pos[i] = at(iso.Position, lo+i, 0)
		s := at(iso.B1Scale, lo+i, 1)
		b.scale[i], b.scale2[i] = s, s*s
		b.r1[i], b.r2[i] = rate(at(iso.T1, lo+i, 0)), rate(at(iso.T2, lo+i, 0))
		if b.r1[i] != 0 || b.r2[i] != 0 {
			blockRelax = true
		}
		b.ar[i], b.ai[i], b.br[i], b.bi[i] = 1, 0, 0, 0
		b.mx[i], b.my[i], b.mz[i] = start[0], start[1], start[2]
	}
	for j0 := 0; j0 < st.n; j0 += stepChunk {
		if cancelled(done) {
			return false
		}
		j1 := min(st.n, j0+stepChunk)
		if blockRelax {
			relaxBlock(st, j0, j1, b.off[:m], b.pos[:m], b.scale[:m], b.r1[:m], b.r2[:m], b.mx[:m], b.my[:m], b.mz[:m], &b.relax)
		} else {
			rotateBlock(st, j0, j1, b.off[:m], b.pos[:m], b.scale[:m], b.scale2[:m], b.ar[:m], b.ai[:m], b.br[:m], b.bi[:m])
		}
	}
	if !blockRelax {
		for i := range m {
			a := complex(b.ar[i], b.ai[i])
			c := complex(b.br[i], b.bi[i])
			b.mx[i], b.my[i], b.mz[i] = Rotate(a, c, start)
		}
	}
	return true
}

// store copies the block's results into res.
func (b *block) store(res *Result, lo, hi int, relax bool) {
	for i := range hi - lo {
		res.Mx[lo+i], res.My[lo+i], res.Mz[lo+i] = b.mx[i], b.my[i], b.mz[i]
		if !relax {
			res.Alpha[lo+i] = complex(b.ar[i], b.ai[i])
			res.Beta[lo+i] = complex(b.br[i], b.bi[i])
		}
	}
}

package physics

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"sync"
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
		name string
		v    []float64
	}{{"offset", s.Offset}, {"b1 scale", s.B1Scale}, {"position", s.Position}, {"t1", s.T1}, {"t2", s.T2}} {
		if a.v != nil && len(a.v) != n {
			return fmt.Errorf("isochromats: %s has %d values, want %d", a.name, len(a.v), n)
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
	// Start is the initial magnetization (M0 = 1 units). The zero value means +z.
	Start [3]float64
	// Workers is the number of goroutines; 0 means GOMAXPROCS.
	Workers int
	// Progress, when non-nil, is called from the workers with the number of
	// isochromats finished so far and the total. It must be safe for concurrent use.
	Progress func(done, total int)
	// MaxSteps bounds isochromats × samples; 0 means DefaultMaxSteps.
	MaxSteps float64
}

// DefaultMaxSteps is the default budget of isochromat-steps for one simulation.
const DefaultMaxSteps = 4e10

// MaxIsochromats bounds the result size (five float64 and two complex128 per spin).
const MaxIsochromats = 20_000_000

// Result holds the state after the waveform, one entry per isochromat.
type Result struct {
	Mx, My, Mz []float64
	// Alpha and Beta are the Cayley–Klein parameters of the whole pulse
	// (Pauly et al., IEEE TMI 10:53, 1991). They are nil when any spin relaxes.
	Alpha, Beta []complex128
}

// Simulate propagates the isochromats through the waveform exactly: each
// piecewise-constant step is a rotation (or, with relaxation, the exact solution of
// the linear step). gamma is in rad·s⁻¹·T⁻¹. It returns ctx.Err() when cancelled.
func Simulate(ctx context.Context, w *Waveform, gamma float64, iso *Isochromats, opt Options) (*Result, error) {
	if err := w.Validate(); err != nil {
		return nil, err
	}
	if err := iso.validate(); err != nil {
		return nil, err
	}
	n := iso.Len()
	if n > MaxIsochromats {
		return nil, fmt.Errorf("simulation of %d isochromats exceeds the limit of %d", n, MaxIsochromats)
	}
	budget := opt.MaxSteps
	if budget == 0 {
		budget = DefaultMaxSteps
	}
	if steps := float64(n) * float64(w.Len()); steps > budget {
		return nil, fmt.Errorf("simulation of %d isochromats × %d samples = %.3g steps exceeds the budget of %.3g", n, w.Len(), steps, budget)
	}
	start := opt.Start
	if start == [3]float64{} {
		start = [3]float64{0, 0, 1}
	}
	relax := false
	for i := 0; i < n; i++ {
		if relaxes(at(iso.T1, i, 0)) || relaxes(at(iso.T2, i, 0)) {
			relax = true
			break
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
	const chunk = 64
	var (
		mu   sync.Mutex
		next int
		done int
		wg   sync.WaitGroup
	)
	take := func() (int, int, bool) {
		mu.Lock()
		defer mu.Unlock()
		if next >= n {
			return 0, 0, false
		}
		lo := next
		next = min(n, next+chunk)
		return lo, next, true
	}
	for k := 0; k < workers; k++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				if ctx.Err() != nil {
					return
				}
				lo, hi, ok := take()
				if !ok {
					return
				}
				for i := lo; i < hi; i++ {
					simulateOne(w, gamma, iso, i, start, res)
				}
				if opt.Progress != nil {
					mu.Lock()
					done += hi - lo
					d := done
					mu.Unlock()
					opt.Progress(d, n)
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

func relaxes(t float64) bool { return t > 0 && !math.IsInf(t, 1) }

func simulateOne(w *Waveform, gamma float64, iso *Isochromats, i int, start [3]float64, res *Result) {
	off := 2 * math.Pi * at(iso.Offset, i, 0)
	scale := at(iso.B1Scale, i, 1)
	x := at(iso.Position, i, 0)
	t1, t2 := at(iso.T1, i, 0), at(iso.T2, i, 0)
	r1, r2 := 0.0, 0.0
	if relaxes(t1) {
		r1 = 1 / t1
	}
	if relaxes(t2) {
		r2 = 1 / t2
	}
	m := start
	a, b := complex(1, 0), complex(0, 0)
	relax := res.Alpha == nil
	for j, b1 := range w.B1 {
		wx := gamma * scale * real(b1)
		wy := gamma * scale * imag(b1)
		wz := off
		if w.Gradient != nil {
			wz += gamma * w.Gradient[j] * x
		}
		dt := w.Dwell[j]
		if relax {
			m = relaxStep(m, wx, wy, wz, r1, r2, dt)
			continue
		}
		wn := math.Sqrt(wx*wx + wy*wy + wz*wz)
		if wn == 0 {
			continue
		}
		theta := -wn * dt
		nx, ny, nz := wx/wn, wy/wn, wz/wn
		m = rotate(m, nx, ny, nz, theta)
		s, c := math.Sincos(theta / 2)
		aj := complex(c, -nz*s)
		bj := complex(ny*s, -nx*s) // −i(nx + i·ny)·sin(θ/2)
		a, b = aj*a-cmplx.Conj(bj)*b, bj*a+cmplx.Conj(aj)*b
	}
	res.Mx[i], res.My[i], res.Mz[i] = m[0], m[1], m[2]
	if !relax {
		res.Alpha[i], res.Beta[i] = a, b
	}
}

// rotate turns m by angle theta about the unit axis n (Rodrigues' formula).
func rotate(m [3]float64, nx, ny, nz, theta float64) [3]float64 {
	s, c := math.Sincos(theta)
	dot := nx*m[0] + ny*m[1] + nz*m[2]
	cx := ny*m[2] - nz*m[1]
	cy := nz*m[0] - nx*m[2]
	cz := nx*m[1] - ny*m[0]
	return [3]float64{
		m[0]*c + cx*s + nx*dot*(1-c),
		m[1]*c + cy*s + ny*dot*(1-c),
		m[2]*c + cz*s + nz*dot*(1-c),
	}
}

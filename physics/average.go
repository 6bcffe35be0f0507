package physics

import (
	"context"
	"fmt"
	"math"
)

// Averaged spreads: the magnetization a sample gives when one of its spin
// settings is spread uniformly (B1 inhomogeneity, a line shape, a range of T2),
// computed as a weighted sum over extra isochromats run through Simulate.

// SpreadSetting names the spin setting a Spread varies.
type SpreadSetting int

// Spread settings.
const (
	SpreadOffset SpreadSetting = iota // Hz, added to each isochromat's offset
	SpreadB1                          // factor, multiplies each isochromat's B1 scale
	SpreadT2                          // s, replaces each isochromat's T2
)

func (s SpreadSetting) String() string {
	switch s {
	case SpreadOffset:
		return "offset"
	case SpreadB1:
		return "b1"
	case SpreadT2:
		return "t2"
	}
	return fmt.Sprintf("SpreadSetting(%d)", int(s))
}

// Spread is a uniform distribution of one spin setting over [Lo, Hi]. An offset
// spread is added to each isochromat's own offset (a line around every swept
// offset), a B1 spread multiplies its B1 scale (80 %–120 % is Lo 0.8, Hi 1.2), a
// T2 spread replaces its T2 (seconds, Lo > 0). Points fixes the number of
// Gauss–Legendre points; 0 lets AverageOptions choose it.
type Spread struct {
	Setting SpreadSetting
	Lo, Hi  float64
	Points  int
}

// AverageOptions control SimulateAveraged. The zero value means the defaults.
type AverageOptions struct {
	// Tolerance is the agreement (M0 units, every component of every
	// isochromat) at which the automatic rule stops; 0 means
	// DefaultAverageTolerance.
	Tolerance float64
	// MaxPoints bounds the quadrature points per isochromat (the product over
	// the spreads); 0 means DefaultMaxAveragePoints.
	MaxPoints int
	// FirstPoints is where the automatic rule starts (at least 8);
	// SimulateAveraged sets it from Spread.Turn when 0.
	FirstPoints int
	// Steps (samples per isochromat) and MaxSteps (0: DefaultMaxSteps) bound
	// the work of AverageOver as Options.MaxSteps bounds Simulate's;
	// SimulateAveraged sets them from the waveform and its Options.
	Steps    int
	MaxSteps float64
}

// Defaults of the automatic quadrature rule.
const (
	DefaultAverageTolerance = 1e-4
	DefaultMaxAveragePoints = 4096
	firstAveragePoints      = 8
)

// Averaged is the result of SimulateAveraged: per isochromat of the input, the
// averages of the magnetization components and, without relaxation, of the
// crushed spin echo −β² (Echo, which is linear in the pulse's effect on a
// transverse start and so averages exactly; Cayley–Klein parameters themselves
// do not average and are not returned).
type Averaged struct {
	Mx, My, Mz []float64
	Echo       []complex128 // nil when any spin relaxes
	AverageInfo
}

// AverageInfo says which quadrature an average used.
type AverageInfo struct {
	// Points is the number of Gauss–Legendre points used per spread.
	Points []int
	// Change is the largest difference, over every averaged value, between the
	// returned rule and the one with half the points per spread: an estimate
	// (for these smooth integrands a generous one) of the quadrature error. It
	// is NaN when every spread's points were given.
	Change float64
	// Converged reports that Change is within the tolerance (always true when
	// the points were given).
	Converged bool
}

// SimulateAveraged simulates every isochromat of iso averaged over the spreads
// (their product, each uniform), with the same engine, options and exactness as
// Simulate: the quadrature points are simply more isochromats, and the average
// is their weighted sum in a fixed order (results are identical bit for bit
// whatever the number of workers). AverageOver does the same around any
// simulation (a sequence, a trace).
//
// Quadrature: Gauss–Legendre on each spread's interval, the product rule over
// several. An n-point rule integrates polynomials of degree 2n−1 exactly
// (Abramowitz & Stegun 25.4.29), and its error falls geometrically with n for
// the analytic integrands of the Bloch equations once n resolves the
// oscillation of the magnetization across the spread (about a quarter of its
// range of rotation angle in radians: a long pulse over a wide offset range
// needs many points). Rule, when a spread's Points is 0: start at 8 points per
// such spread, or at a quarter of the spread's range of rotation angle (see
// Spread.Turn) when that is larger, so that two coarse rules cannot agree by
// chance; double them until the averages with n and 2n points agree within
// Tolerance (default 1e-4 of M0) in every component of every isochromat; the
// 2n-point result is returned, with Change the last difference, its error then
// typically far below the tolerance (see the tests). Doubling stops before the
// points per isochromat would pass MaxPoints (default 4096) or the engine's
// budgets, and the result then says Converged false. Spreads with a zero width
// take one point.
func SimulateAveraged(ctx context.Context, w *Waveform, gamma float64, iso *Isochromats, spreads []Spread, opt Options, aopt AverageOptions) (*Averaged, error) {
	if err := w.Validate(); err != nil {
		return nil, err
	}
	if aopt.FirstPoints == 0 {
		scale := 1.0
		for _, v := range iso.B1Scale {
			scale = math.Max(scale, math.Abs(v))
		}
		for _, s := range spreads {
			if s.Points == 0 {
				aopt.FirstPoints = max(aopt.FirstPoints, int(math.Ceil(s.Turn(w, gamma, scale)/4)))
			}
		}
	}
	aopt.Steps, aopt.MaxSteps = w.Len(), opt.MaxSteps
	relax := false
	vals, info, err := AverageOver(ctx, iso, spreads, aopt, func(ex *Isochromats) ([][]float64, error) {
		r, err := Simulate(ctx, w, gamma, ex, opt)
		if err != nil {
			return nil, err
		}
		out := [][]float64{r.Mx, r.My, r.Mz}
		if r.Beta == nil {
			relax = true
			return out, nil
		}
		re, im := make([]float64, len(r.Beta)), make([]float64, len(r.Beta))
		for i, b := range r.Beta {
			e := Echo(b)
			re[i], im[i] = real(e), imag(e)
		}
		return append(out, re, im), nil
	})
	if err != nil {
		return nil, err
	}
	a := &Averaged{Mx: vals[0], My: vals[1], Mz: vals[2], AverageInfo: info}
	if !relax && len(vals) == 5 {
		a.Echo = make([]complex128, len(a.Mx))
		for i := range a.Echo {
			a.Echo[i] = complex(vals[3][i], vals[4][i])
		}
	}
	return a, nil
}

// AverageOver averages what run computes over the spreads, by the rule
// SimulateAveraged states: run gets the isochromats of iso expanded over the
// quadrature points (each isochromat's points consecutive, in the order
// Expand gives) and returns any number of arrays, each with one value per
// expanded isochromat (the magnetization components, a trace's samples as
// arrays per time, the state after a sequence); AverageOver returns their
// weighted means, one value per isochromat of iso, in the same order. The
// convergence test compares every returned value. aopt.Steps and MaxSteps
// bound the work as Options.MaxSteps bounds Simulate's.
func AverageOver(ctx context.Context, iso *Isochromats, spreads []Spread, aopt AverageOptions, run func(ex *Isochromats) ([][]float64, error)) ([][]float64, AverageInfo, error) {
	var none AverageInfo
	if err := iso.validate(); err != nil {
		return nil, none, err
	}
	tol := aopt.Tolerance
	if tol == 0 {
		tol = DefaultAverageTolerance
	}
	if !(tol > 0) || math.IsInf(tol, 0) {
		return nil, none, fmt.Errorf("averaged: tolerance is %g, want a positive number", tol)
	}
	maxPts := aopt.MaxPoints
	if maxPts == 0 {
		maxPts = DefaultMaxAveragePoints
	}
	if maxPts < 1 {
		return nil, none, fmt.Errorf("averaged: max points is %d, want at least 1", maxPts)
	}
	seen := map[SpreadSetting]bool{}
	auto := false
	for _, s := range spreads {
		if err := s.validate(); err != nil {
			return nil, none, err
		}
		if seen[s.Setting] {
			return nil, none, fmt.Errorf("averaged: %s is spread twice, want one spread per setting", s.Setting)
		}
		seen[s.Setting] = true
		if s.Points == 0 && s.Lo != s.Hi {
			auto = true
		}
	}
	points := func(n int) []int {
		out := make([]int, len(spreads))
		for k, s := range spreads {
			switch {
			case s.Lo == s.Hi:
				out[k] = 1
			case s.Points > 0:
				out[k] = s.Points
			default:
				out[k] = n
			}
		}
		return out
	}
	total := func(ps []int) int {
		t := 1
		for _, p := range ps {
			if t > maxPts {
				return t
			}
			t *= p
		}
		return t
	}
	limit := aopt.MaxSteps
	if limit == 0 {
		limit = DefaultMaxSteps
	}
	budget := func(ps []int) bool {
		q := total(ps)
		if q > maxPts || q > MaxIsochromats/iso.Len() {
			return false
		}
		return float64(q)*float64(iso.Len())*float64(max(aopt.Steps, 1)) <= limit
	}
	tooBig := func(ps []int) error {
		return fmt.Errorf("averaged: got %d points per isochromat over %d isochromats and %d samples, want at most %d points and %g isochromat-steps in all", total(ps), iso.Len(), aopt.Steps, maxPts, limit)
	}
	once := func(ps []int) ([][]float64, error) {
		ex, wts := Expand(iso, spreads, ps)
		vals, err := run(&ex)
		if err != nil {
			return nil, err
		}
		out := make([][]float64, len(vals))
		for k, v := range vals {
			if len(v) != ex.Len() {
				return nil, fmt.Errorf("averaged: run returned %d values, want %d", len(v), ex.Len())
			}
			out[k] = Reduce(v, wts)
		}
		return out, nil
	}
	if !auto {
		ps := points(0)
		if !budget(ps) {
			return nil, none, tooBig(ps)
		}
		vals, err := once(ps)
		return vals, AverageInfo{Points: ps, Change: math.NaN(), Converged: true}, err
	}
	n := max(firstAveragePoints, aopt.FirstPoints)
	for n > firstAveragePoints && !budget(points(n)) {
		n /= 2
	}
	if !budget(points(n)) {
		return nil, none, tooBig(points(n))
	}
	prev, err := once(points(n))
	if err != nil {
		return nil, none, err
	}
	info := AverageInfo{Points: points(n), Change: math.NaN()}
	for budget(points(2 * n)) {
		n *= 2
		cur, err := once(points(n))
		if err != nil {
			return nil, none, err
		}
		info = AverageInfo{Points: points(n), Change: maxDiff(prev, cur)}
		info.Converged = info.Change <= tol
		prev = cur
		if info.Converged {
			break
		}
	}
	return prev, info, nil
}

func (s Spread) validate() error {
	if math.IsNaN(s.Lo) || math.IsNaN(s.Hi) || math.IsInf(s.Lo, 0) || math.IsInf(s.Hi, 0) {
		return fmt.Errorf("averaged: %s spread is %g to %g, want finite ends", s.Setting, s.Lo, s.Hi)
	}
	if s.Lo > s.Hi {
		return fmt.Errorf("averaged: %s spread is %g to %g, want the low end first", s.Setting, s.Lo, s.Hi)
	}
	if s.Points < 0 {
		return fmt.Errorf("averaged: %s spread has %d points, want at least 1 (0: chosen by the rule)", s.Setting, s.Points)
	}
	switch s.Setting {
	case SpreadOffset, SpreadB1:
	case SpreadT2:
		if !(s.Lo > 0) {
			return fmt.Errorf("averaged: t2 spread starts at %g s, want a positive time", s.Lo)
		}
	default:
		return fmt.Errorf("averaged: got spread setting %d, want offset, b1 or t2", int(s.Setting))
	}
	return nil
}

// Turn is how far (rad) the magnetization's rotation angle can change across
// the spread for the waveform w: the nutation angle (at B1 scale scale) times
// the B1 spread's width, the precession over the pulse times the offset
// spread's width, the number of decay constants across a T2 spread. The rule
// starts at a quarter of it (AverageOptions.FirstPoints), about where
// Gauss–Legendre begins to resolve an oscillation of that many radians.
func (s Spread) Turn(w *Waveform, gamma, scale float64) float64 {
	T := w.Duration()
	switch s.Setting {
	case SpreadB1:
		area := 0.0
		for j, b := range w.B1 {
			area += math.Hypot(real(b), imag(b)) * w.Dwell[j]
		}
		return math.Abs(gamma) * area * math.Abs(scale) * (s.Hi - s.Lo)
	case SpreadOffset:
		return 2 * math.Pi * T * (s.Hi - s.Lo)
	case SpreadT2:
		return T/s.Lo - T/s.Hi
	}
	return 0
}

// maxDiff is the largest difference between two sets of averages.
func maxDiff(a, b [][]float64) float64 {
	d := 0.0
	for k := range a {
		for i := range a[k] {
			d = math.Max(d, math.Abs(a[k][i]-b[k][i]))
		}
	}
	return d
}

// Expand returns the isochromats of iso expanded over the product
// Gauss–Legendre rule with points[k] points on spreads[k] (each isochromat's
// points consecutive, the last spread varying fastest), and the rule's
// weights (summing to 1), one per point: offsets are added, B1 scales
// multiplied, T2 replaced (see Spread). Reduce averages values over it.
func Expand(iso *Isochromats, spreads []Spread, points []int) (Isochromats, []float64) {
	nodes := [][]float64{nil}
	weights := []float64{1}
	for k, s := range spreads {
		x, wt := GaussLegendre(points[k], s.Lo, s.Hi)
		var nn [][]float64
		var nw []float64
		for i, base := range nodes {
			for j := range x {
				nn = append(nn, append(append([]float64(nil), base...), x[j]))
				nw = append(nw, weights[i]*wt[j])
			}
		}
		nodes, weights = nn, nw
	}
	L, q := iso.Len(), len(weights)
	ex := Isochromats{
		Offset:   make([]float64, L*q),
		B1Scale:  make([]float64, L*q),
		Position: make([]float64, L*q),
		T1:       make([]float64, L*q),
		T2:       make([]float64, L*q),
	}
	for i := range L {
		for j := range q {
			m := i*q + j
			ex.Offset[m] = at(iso.Offset, i, 0)
			ex.B1Scale[m] = at(iso.B1Scale, i, 1)
			ex.Position[m] = at(iso.Position, i, 0)
			ex.T1[m] = at(iso.T1, i, math.Inf(1))
			ex.T2[m] = at(iso.T2, i, math.Inf(1))
			for k, s := range spreads {
				v := nodes[j][k]
				switch s.Setting {
				case SpreadOffset:
					ex.Offset[m] += v
				case SpreadB1:
					ex.B1Scale[m] *= v
				case SpreadT2:
					ex.T2[m] = v
				}
			}
		}
	}
	return ex, weights
}

// Reduce averages v, one value per isochromat expanded by Expand, with the
// rule's weights: one value per original isochromat, summed in a fixed order.
func Reduce(v, weights []float64) []float64 {
	q := len(weights)
	out := make([]float64, len(v)/q)
	for i := range out {
		for j, wt := range weights {
			out[i] += wt * v[i*q+j]
		}
	}
	return out
}

// GaussLegendre returns the n-point Gauss–Legendre nodes on [lo, hi] with
// weights normalised to sum to 1 (a mean, not an integral). The nodes are the
// roots of the Legendre polynomial P_n found by Newton's method from the
// estimate cos(π(i − 1/4)/(n + 1/2)), the weights 2/((1 − x²)P_n'(x)²) on
// [−1, 1] (Abramowitz & Stegun 25.4.29); nodes ascend. n < 1 returns nil.
func GaussLegendre(n int, lo, hi float64) (x, w []float64) {
	if n < 1 {
		return nil, nil
	}
	x, w = make([]float64, n), make([]float64, n)
	mid, half := (lo+hi)/2, (hi-lo)/2
	for i := range (n + 1) / 2 {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for range 100 {
			// P_n(z) and P_n'(z) by the three-term recurrence.
			p0, p1 := 1.0, z
			if n == 1 {
				p0, p1 = 0, z
			}
			for k := 2; k <= n; k++ {
				p0, p1 = p1, ((2*float64(k)-1)*z*p1-(float64(k)-1)*p0)/float64(k)
			}
			pn, pm := p1, p0 // P_n, P_{n-1}
			if n == 1 {
				pm = 1
			}
			dp = float64(n) * (z*pn - pm) / (z*z - 1)
			dz := pn / dp
			z -= dz
			if math.Abs(dz) <= 1e-15 {
				break
			}
		}
		wt := 1 / ((1 - z*z) * dp * dp) // 2/((1−z²)P'²), halved to a mean
		// z is the i-th largest root; place it and its mirror image.
		x[n-1-i], w[n-1-i] = mid+half*z, wt
		x[i], w[i] = mid-half*z, wt
	}
	return x, w
}

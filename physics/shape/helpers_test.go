package shape

import (
	"context"
	"math"
	"testing"

	"Nutate/physics"
)

// gammaH is the proton's γ (CODATA 2018, as pinned by package physics).
func gammaH(t testing.TB) float64 {
	t.Helper()
	h, ok := physics.Lookup("1H")
	if !ok {
		t.Fatal("no 1H")
	}
	return h.Gamma()
}

const deg = math.Pi / 180

// near fails when |got − want| > tol.
func near(t testing.TB, what string, got, want, tol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= tol) {
		t.Errorf("%s = %.10g, want %.10g ± %.3g", what, got, want, tol)
	}
}

// nearRel fails when |got − want| > tol·|want|.
func nearRel(t testing.TB, what string, got, want, tol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= tol*math.Abs(want)) {
		t.Errorf("%s = %.10g, want %.10g ± %.3g relative", what, got, want, tol)
	}
}

// common returns Common with duration and flip (rad) set.
func common(T, flip float64) Common {
	c := NewCommon()
	c.Duration = T
	c.Flip = flip
	return c
}

// commonPeak returns Common with duration and peak (T) set.
func commonPeak(T, peak float64) Common {
	c := NewCommon()
	c.Duration = T
	c.Peak = peak
	return c
}

// simulate runs p at the given offsets (Hz) and B1 scales, gradient off.
func simulate(t testing.TB, p *Pulse, offsets, scales []float64) *physics.Result {
	t.Helper()
	w := p.Wave
	w.Gradient = nil
	iso := physics.Grid(offsets, scales, nil, nil, nil)
	r, err := physics.Simulate(context.Background(), &w, p.Gamma, &iso, physics.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// mean and meanSquare of a real waveform normalised to its peak sample.
func shapeFactors(p *Pulse) (a, ms float64) {
	peak := p.Peak()
	T := p.Duration()
	for j, b := range p.Wave.B1 {
		v := real(b) / peak
		a += v * p.Wave.Dwell[j]
		ms += v * v * p.Wave.Dwell[j]
	}
	return a / T, ms / T
}

// mustOK fails the test on err.
func mustOK(t testing.TB, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

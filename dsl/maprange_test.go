package dsl

import (
	"context"
	"math"
	"testing"
)

func TestLogScale(t *testing.T) {
	s := NewSession(t.TempDir())
	if err := s.Exec(context.Background(), "pulse p = rect(duration = 1 ms, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	ev := &evaluator{ctx: context.Background(), sess: s, st: s.state().clone()}
	defs, err := ev.pulses([]Ident{{Name: "p"}})
	if err != nil {
		t.Fatal(err)
	}
	// A relaxation axis over more than a decade is drawn on a log scale; with
	// `points` its values are then in equal ratios (a geometric sequence from
	// FROM to TO), with `step` as written.
	for _, c := range []struct {
		axis           string
		log, geometric bool
		first, last, n float64 // expected ends (s) and count
	}{
		{"t2 1 ms to 1 s points 5", true, true, 1e-3, 1, 5},          // three decades
		{"t1 2 s to 10 ms points 5", true, true, 2, 10e-3, 5},        // descending, over a decade
		{"t2 10 ms to 100 ms points 5", false, false, 10e-3, 0.1, 5}, // exactly a decade
		{"t1 10 ms to 1 s step 90 ms", true, false, 10e-3, 1, 12},    // step: as written
		{"offset 1 Hz to 1 kHz points 5", false, false, 1, 1000, 5},  // not a relaxation time
	} {
		t.Run(c.axis, func(t *testing.T) {
			stmts, errs := parse("sweep p over " + c.axis)
			if len(errs) > 0 {
				t.Fatal(errs[0])
			}
			a, err := ev.evalAxis(stmts[0].(*SweepStmt).Axes[0], defs)
			if err != nil {
				t.Fatal(err)
			}
			if a.logScale != c.log || a.geometric != c.geometric {
				t.Errorf("log scale %v, geometric %v; want %v, %v", a.logScale, a.geometric, c.log, c.geometric)
			}
			if a.n != int(c.n) {
				t.Fatalf("got %d points, want %g", a.n, c.n)
			}
			v := make([]float64, a.n)
			for i := range v {
				v[i] = a.value(i).Q.V
			}
			if !sameRel(v[0], c.first) || !sameRel(v[a.n-1], c.last) {
				t.Errorf("ends %g, %g; want %g, %g", v[0], v[a.n-1], c.first, c.last)
			}
			for i := 2; i < a.n; i++ {
				// Geometric: equal ratios; otherwise equal differences.
				same := sameRel(v[i]-v[i-1], v[i-1]-v[i-2])
				if c.geometric {
					same = sameRel(v[i]/v[i-1], v[i-1]/v[i-2])
				}
				if !same {
					t.Fatalf("values %v not evenly spaced (geometric %v)", v, c.geometric)
				}
			}
		})
	}
}

// sameRel compares to 1e-12 relative (rounding of a few float64 operations).
func sameRel(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }

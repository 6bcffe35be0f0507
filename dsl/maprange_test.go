package dsl

import (
	"context"
	"testing"
)

func TestColourRange(t *testing.T) {
	// Magnetization in M0 units lies within the unit sphere (|M| ≤ M0 without
	// gain: Bloch equations), |β|² ≤ 1 (|α|² + |β|² = 1), phase in (−180°, 180°].
	for _, c := range []struct {
		q      string
		lo, hi float64
	}{
		{"mx", -1, 1}, {"my", -1, 1}, {"mz", -1, 1},
		{"mxy", 0, 1}, {"echo", 0, 1}, {"phase", -180, 180},
		{"energy", 0, 0},
	} {
		t.Run(c.q, func(t *testing.T) {
			if lo, hi := colourRange(c.q); lo != c.lo || hi != c.hi {
				t.Errorf("range %g…%g, want %g…%g", lo, hi, c.lo, c.hi)
			}
		})
	}
}

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
	for _, c := range []struct {
		axis string
		want bool
	}{
		{"t2 1 ms to 1 s points 5", true},        // three decades
		{"t1 2 s to 10 ms points 5", true},       // descending, over a decade
		{"t2 10 ms to 100 ms points 5", false},   // exactly a decade
		{"offset 1 Hz to 1 kHz points 5", false}, // not a relaxation time
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
			if got := a.logScale(); got != c.want {
				t.Errorf("log scale %v, want %v", got, c.want)
			}
		})
	}
}

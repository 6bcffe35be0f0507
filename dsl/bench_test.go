package dsl

import (
	"context"
	"testing"
)

// BenchmarkParse measures scanning and parsing of the LANGUAGE.md example.
func BenchmarkParse(b *testing.B) {
	src := "nucleus 31P\nfield 7 T\npulse hard = rect(duration = 200 us, flip = 90 deg)\n" +
		"pulse soft = sinc(duration = 2 ms, tbw = 6, window = hann, flip = 90 deg, center = -7.5 ppm)\n" +
		"sweep hard, soft over offset -15 ppm to 15 ppm points 601\n"
	for b.Loop() {
		if _, errs := parse(src); len(errs) > 0 {
			b.Fatal(errs[0])
		}
	}
}

// BenchmarkSweep measures a one-axis sweep of a 256-sample sinc at several sizes,
// language overhead included.
func BenchmarkSweep(b *testing.B) {
	for _, n := range []string{"101", "1001", "10001"} {
		b.Run(n, func(b *testing.B) {
			s := NewSession(b.TempDir())
			ctx := context.Background()
			if err := s.Exec(ctx, "pulse p = sinc(duration = 2 ms, tbw = 4, flip = 90 deg, samples = 256)", Sink{}); err != nil {
				b.Fatal(err)
			}
			src := "sweep p over offset -5 kHz to 5 kHz points " + n
			for b.Loop() {
				if err := s.Exec(ctx, src, Sink{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

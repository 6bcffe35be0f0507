package dsl

import (
	"context"
	"errors"
	"testing"
	"time"
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

// BenchmarkInterrupt measures the time from a cancellation, made once a long map
// sweep (4e9 rotation steps) reports 1 % done, to Exec's return.
func BenchmarkInterrupt(b *testing.B) {
	s := NewSession(b.TempDir())
	if err := s.Exec(context.Background(), "pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)", Sink{}); err != nil {
		b.Fatal(err)
	}
	total := 0.0
	for b.Loop() {
		ctx, cancel := context.WithCancel(context.Background())
		var at time.Time
		err := s.Exec(ctx, "sweep p over offset -20 kHz to 20 kHz points 1000, b1 0.5 to 1.5 points 1000", Sink{Progress: func(_ string, done, _ int) {
			if done >= 1 && at.IsZero() {
				at = time.Now()
				cancel()
			}
		}})
		total += time.Since(at).Seconds()
		cancel()
		if !errors.Is(err, context.Canceled) {
			b.Fatalf("error %v, want context.Canceled", err)
		}
	}
	b.ReportMetric(1e3*total/float64(b.N), "ms-to-stop")
}

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

// BenchmarkDescribeLong measures describe of a sinc at several sample counts, up
// to the language's limit of 10⁶ (language, measurement and plot included).
func BenchmarkDescribeLong(b *testing.B) {
	for _, n := range []string{"10000", "100000", "1000000"} {
		b.Run(n, func(b *testing.B) {
			s := NewSession(b.TempDir())
			ctx := context.Background()
			if err := s.Exec(ctx, "pulse p = sinc(duration = 10 ms, tbw = 4, flip = 90 deg, samples = "+n+")", Sink{}); err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				if err := s.Exec(ctx, "describe p", Sink{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkInterruptDescribe measures the time from a cancellation to Exec's
// return for describe of a pulse of 10⁶ samples (sinc; hyperbolic secant with its
// threshold search), cancelling at 10 %, 30 %, 50 %, 70 % and 90 % of the time
// an uninterrupted describe takes, so that every phase (profile, crossings,
// threshold, plot) is hit; ms-to-stop is the mean, max-ms-to-stop the largest
// (a describe that goes on to the end after the cancellation counts too).
func BenchmarkInterruptDescribe(b *testing.B) {
	for _, tc := range []struct{ name, pulse string }{
		{"sinc", "sinc(duration = 10 ms, tbw = 4, flip = 90 deg, samples = 1000000)"},
		{"hsec", "hsec(duration = 10 ms, bandwidth = 4 kHz, peak = 20 uT, role = invert, samples = 1000000)"},
	} {
		b.Run(tc.name, func(b *testing.B) {
			s := NewSession(b.TempDir())
			if err := s.Exec(context.Background(), "pulse p = "+tc.pulse, Sink{}); err != nil {
				b.Fatal(err)
			}
			start := time.Now()
			if err := s.Exec(context.Background(), "describe p", Sink{}); err != nil {
				b.Fatal(err)
			}
			whole := time.Since(start)
			total, worst, runs := 0.0, 0.0, 0
			for b.Loop() {
				for _, f := range []float64{0.1, 0.3, 0.5, 0.7, 0.9} {
					ctx, cancel := context.WithCancel(context.Background())
					fired := make(chan time.Time, 1)
					timer := time.AfterFunc(time.Duration(f*float64(whole)), func() {
						fired <- time.Now()
						cancel()
					})
					err := s.Exec(ctx, "describe p", Sink{})
					stop := time.Now()
					if timer.Stop() {
						cancel()
						continue // finished before the cancellation
					}
					at := <-fired
					cancel()
					if err != nil && !errors.Is(err, context.Canceled) {
						b.Fatal(err)
					}
					// A describe that ignored the cancellation and finished
					// counts with the time it went on for.
					d := stop.Sub(at).Seconds()
					total += d
					worst = max(worst, d)
					runs++
				}
			}
			if runs > 0 {
				b.ReportMetric(1e3*total/float64(runs), "ms-to-stop")
			}
			b.ReportMetric(1e3*worst, "max-ms-to-stop")
		})
	}
}

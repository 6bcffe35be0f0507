package dsl

import (
	"context"
	"errors"
	"strings"
	"testing"

	"Nutate/display"
	"Nutate/dsl/present"
)

// describe and report of a long pulse report progress through the session's
// sink, as sweeps do: whole percents from 0, increasing, ending at 100; a short
// one reports nothing.
func TestMeasureProgress(t *testing.T) {
	for _, tc := range []struct{ stmt, short string }{{"describe long", "describe short"}, {"report long, short", "report short"}} {
		stmt := tc.stmt
		t.Run(stmt, func(t *testing.T) {
			s := NewSession(t.TempDir())
			execText(t, s, "pulse long = sinc(duration = 10 ms, tbw = 4, flip = 90 deg, samples = 100000)\n"+
				"pulse short = rect(duration = 1 ms, flip = 90 deg)")
			var dones []int
			task := stmt
			err := s.Exec(context.Background(), stmt, Sink{Progress: func(tk string, done, total int) {
				if tk != task || total != 100 {
					t.Errorf("progress %q %d/%d, want task %q out of 100", tk, done, total, task)
				}
				dones = append(dones, done)
			}})
			if err != nil {
				t.Fatal(err)
			}
			if len(dones) < 3 || dones[0] != 0 || dones[len(dones)-1] != 100 {
				t.Fatalf("progress %v, want 0 first, 100 last and steps between", dones)
			}
			for i := 1; i < len(dones); i++ {
				if dones[i] <= dones[i-1] {
					t.Fatalf("progress %v does not increase", dones)
				}
			}
			dones = nil
			if err := s.Exec(context.Background(), tc.short, Sink{Progress: func(string, int, int) { dones = append(dones, 0) }}); err != nil || dones != nil {
				t.Errorf("short pulse: err %v, progress %v, want no progress", err, dones)
			}
		})
	}
}

// An interrupt during describe or report of a pulse of 10⁶ samples (the
// language's limit) stops it with context.Canceled, in the profile or in an
// adiabatic pulse's threshold search, and the session goes on with its names.
// Latency figures: BenchmarkInterruptDescribe.
func TestCancelMeasure(t *testing.T) {
	for _, tc := range []struct {
		name, pulse, stmt string
		at                int // percent at which to interrupt
	}{
		{"describe profile", "sinc(duration = 10 ms, tbw = 4, flip = 90 deg, samples = 1000000)", "describe big", 1},
		{"report profile", "sinc(duration = 10 ms, tbw = 4, flip = 90 deg, samples = 1000000)", "report big", 1},
		// For a hyperbolic secant the threshold search is about two thirds of
		// the cost (shape.MeasureCost).
		{"describe threshold", "hsec(duration = 10 ms, bandwidth = 4 kHz, peak = 20 uT, role = invert, samples = 100000)", "describe big", 50},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := NewSession(t.TempDir())
			execText(t, s, "pulse big = "+tc.pulse+"\npulse small = rect(duration = 1 ms, flip = 90 deg)")
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			var outputs, last int
			err := s.Exec(ctx, tc.stmt, Sink{
				Display: func(display.Bundle) { outputs++ },
				Progress: func(_ string, done, _ int) {
					last = done
					if done >= tc.at {
						cancel()
					}
				},
			})
			if !errors.Is(err, context.Canceled) {
				t.Fatalf("error %v, want context.Canceled", err)
			}
			if last >= 100 && outputs > 0 {
				t.Errorf("the work finished (progress %d %%, %d outputs) before the interrupt took effect", last, outputs)
			}
			if s.st.names["big"] == nil || s.st.names["small"] == nil {
				t.Fatalf("names lost after the interrupt")
			}
			if out := execText(t, s, "describe small"); !strings.Contains(out, "pulse small") {
				t.Errorf("describe after the interrupt: %q", out)
			}
		})
	}
}

// buildBundle returns at an interrupt without waiting for the bundle (the plot
// of a long waveform), and a panic while building is raised on the caller's
// goroutine, where the session's recover sees it.
func TestBuildBundleInterrupt(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	ev := &evaluator{ctx: ctx}
	release := make(chan struct{})
	defer close(release)
	started := make(chan struct{})
	go func() {
		<-started
		cancel()
	}()
	_, err := ev.buildBundle(func() present.Figure {
		close(started)
		<-release // a build that would never end before the interrupt
		return present.Figure{}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}

	ev = &evaluator{ctx: context.Background()}
	defer func() {
		if r := recover(); r != "bundle fault" {
			t.Errorf("recovered %v, want the build's panic", r)
		}
	}()
	ev.buildBundle(func() present.Figure { panic("bundle fault") })
	t.Errorf("buildBundle returned after its build panicked")
}

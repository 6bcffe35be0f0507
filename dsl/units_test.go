package dsl

import (
	"context"
	"math"
	"strings"
	"testing"
)

// evalIn runs setup in a fresh session and evaluates expr there.
func evalIn(t *testing.T, setup, expr string) Value {
	t.Helper()
	s := NewSession(t.TempDir())
	if setup != "" {
		if err := s.Exec(context.Background(), setup, Sink{}); err != nil {
			t.Fatalf("setup %q: %v", setup, err)
		}
	}
	stmts, errs := parse("print " + expr)
	if len(errs) > 0 {
		t.Fatalf("parse %q: %v", expr, errs[0])
	}
	ev := &evaluator{ctx: context.Background(), sess: s, st: s.st.clone()}
	v, err := ev.evalExpr(stmts[0].(*PrintStmt).Xs[0])
	if err != nil {
		t.Fatalf("eval %q: %v", expr, err)
	}
	return v
}

func closeRel(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Abs(want)
}

func TestConversionsCheckValues(t *testing.T) {
	cases := []struct {
		name, setup, expr string
		want, tol         float64 // base units; relative tolerance
		source            string
	}{
		// CHECKS.md: 1 kHz of B1 is 23.486595 µT for protons (CODATA 2018 γ/2π).
		{"1H 1 kHz in uT", "", "1 kHz in uT", 23.486595e-6, 1e-7, "CODATA 2018"},
		// CHECKS.md: Larmor frequency of 1H at 3 T is 127.73 MHz (common practice).
		{"1H 3 T in MHz", "", "3 T in MHz", 127.73e6, 5e-5, "common practice"},
		// IUPAC 2001: 31P γ/2π = 17.251441 MHz/T, so 1 kHz = 1e3/17.251441e6 T.
		{"31P 1 kHz in uT", "nucleus 31P", "1 kHz in uT", 1e3 / 17.251441e6, 1e-9, "IUPAC, Harris et al. 2001"},
		// IUPAC 2001: 15 ppm of 31P at 7 T = 15e-6 · 17.251441e6 · 7 Hz.
		{"31P 15 ppm in Hz", "nucleus 31P\nfield 7 T", "15 ppm in Hz", 15e-6 * 17.251441e6 * 7, 1e-9, "IUPAC, Harris et al. 2001"},
		// IUPAC 2001: 129Xe γ/2π = −11.860390 MHz/T; conversions use |γ̄|.
		{"129Xe 1 kHz in uT", "nucleus 129Xe", "1 kHz in uT", 1e3 / 11.860390e6, 1e-9, "IUPAC, Harris et al. 2001"},
		// CHECKS.md: fat–water shift about 3.5 ppm (common practice); at 3 T for 1H
		// it is 3.5e-6 · 42.577478518e6 · 3 Hz.
		{"1H 3.5 ppm at 3 T", "field 3 T", "3.5 ppm in Hz", 3.5e-6 * 42.577478518e6 * 3, 1e-9, "CODATA 2018"},
		{"Hz in ppm", "field 3 T", "127.732435554 Hz in ppm", 1, 1e-9, "CODATA 2018"},
		// Unit definitions (SI; 1 G = 1e-4 T).
		{"G/cm", "", "1 G/cm in mT/m", 10e-3, 1e-12, "SI definition of the gauss"},
		{"mG", "", "5 mG in uT", 0.5e-6, 1e-12, "SI definition of the gauss"},
		{"deg", "", "180 deg in rad", math.Pi, 1e-12, "definition"},
		{"degree sign", "", "90° in rad", math.Pi / 2, 1e-12, "definition"},
		{"percent", "", "50% * 2", 1, 1e-12, "definition"},
		{"µs", "", "250 µs + 250us in ms", 0.5e-3, 1e-12, "definition"},
		{"arithmetic", "", "(1 ms + 500 us) * 2 in us", 3e-3, 1e-12, "definition"},
		{"product", "", "1 kHz * 1 ms", 1, 1e-12, "definition"},
		{"gradient from field over length", "", "10 mT / 1 m in mT/m", 10e-3, 1e-12, "definition"},
		{"bare unit", "", "10 mT / m", 10e-3, 1e-12, "definition"},
		{"reciprocal", "", "1 / ms in kHz", 1e3, 1e-12, "definition"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v := evalIn(t, c.setup, c.expr)
			if !closeRel(v.Q.V, c.want, c.tol) {
				t.Errorf("%s = %g, want %g (%s)", c.expr, v.Q.V, c.want, c.source)
			}
		})
	}
}

func TestFlipAndPeakCheckValues(t *testing.T) {
	// CHECKS.md: 90° at 1 kHz takes 250 µs (common practice); the peak given in Hz.
	s := NewSession(t.TempDir())
	if err := s.Exec(context.Background(), "pulse p = rect(duration = 250 us, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	p := s.st.names["p"].pulse.Pulse
	if got := p.Peak() * 42.577478518e6; !closeRel(got, 1000, 1e-9) {
		t.Errorf("peak = %g Hz, want 1000 Hz (common practice)", got)
	}
	// CHECKS.md: sinc without window, TBW 4: A = 0.22570583, so 90° in 2 ms needs
	// a peak of θ/(360°·γ̄·T·A) (Bernstein, King & Zhou 2004). The arguments must
	// reach the shape as given (2000 samples: the sampled mean is within 1e-4).
	if err := s.Exec(context.Background(), "pulse q = sinc(duration = 2 ms, tbw = 4, window = none, flip = 90 deg, samples = 2000)", Sink{}); err != nil {
		t.Fatal(err)
	}
	q := s.st.names["q"].pulse.Pulse
	if want := 0.25 / (42.577478518e6 * 2e-3 * 0.22570583); !closeRel(q.Peak(), want, 1e-4) {
		t.Errorf("sinc peak = %g T, want %g T (CHECKS.md, Bernstein et al. 2004)", q.Peak(), want)
	}
	// CHECKS.md: Hamming sinc TBW 4, 90° in 2 ms → 11.6975 µT (498.05 Hz)
	// (Bernstein, King & Zhou 2004; A = 0.25097821).
	if err := s.Exec(context.Background(), "pulse m = sinc(duration = 2 ms, tbw = 4, window = hamming, flip = 90 deg, samples = 2000)", Sink{}); err != nil {
		t.Fatal(err)
	}
	if got := s.st.names["m"].pulse.Pulse.Peak(); !closeRel(got, 11.6975e-6, 1e-4) {
		t.Errorf("hamming sinc peak = %g T, want 11.6975 µT (CHECKS.md)", got)
	}
	// CHECKS.md: energy of a hard 90° in 1 ms (5.87165 µT) is 34.4763 µT²·ms.
	if err := s.Exec(context.Background(), "pulse h = rect(duration = 1 ms, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	h := s.st.names["h"].pulse.Pulse
	if got := h.Energy() * 1e15; !closeRel(got, 34.4763, 1e-5) {
		t.Errorf("energy = %g µT²·ms, want 34.4763 (CHECKS.md)", got)
	}
	// The peak may be given in Hz through γ̄: 1 kHz for 1H is 23.486595 µT.
	if err := s.Exec(context.Background(), "pulse k = rect(duration = 1 ms, peak = 1 kHz)", Sink{}); err != nil {
		t.Fatal(err)
	}
	if got := s.st.names["k"].pulse.Pulse.Peak(); !closeRel(got, 23.486595e-6, 1e-7) {
		t.Errorf("peak = %g T, want 23.486595 µT (CHECKS.md, CODATA 2018)", got)
	}
}

func TestDimensionErrors(t *testing.T) {
	cases := []struct{ src, want string }{
		{"pulse p = rect(duration = 3 kHz, flip = 90 deg)", "duration expects a time, got 3 kHz (a frequency)"},
		{"print 1 ms + 1 kHz", "cannot add 1 ms (a time) and 1 kHz (a frequency)"},
		{"field 3 s", "field expects a magnetic field"},
		{"pulse p = rect(duration = 1 ms, flip = 1 T)", "flip expects an angle, got 1 T (a magnetic field)"},
		{"pulse p = sinc(duration = 1 ms, flip = 90 deg, tbw = 4 ms)", "tbw expects a plain number, got 4 ms (a time)"},
		{"print 3 ppm in Hz", "ppm needs the main field"},
	}
	for _, c := range cases {
		t.Run(c.src, func(t *testing.T) {
			err := NewSession(t.TempDir()).Exec(context.Background(), c.src, Sink{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error = %v, want it to contain %q", err, c.want)
			}
		})
	}
}

func TestB1rmsCheckValue(t *testing.T) {
	// CHECKS.md: a hard 90° in 1 ms (5.87165 µT) once per 10 ms has B1rms 1.85678 µT.
	s := NewSession(t.TempDir())
	if err := s.Exec(context.Background(), "pulse h = rect(duration = 1 ms, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	ev := &evaluator{ctx: context.Background(), sess: s, st: s.st}
	pr, err := ev.measure(s.st.names["h"].pulse, 10e-3, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !closeRel(pr.B1rms, 1.85678e-6, 1e-5) {
		t.Errorf("B1rms = %g T, want 1.85678 µT (CHECKS.md)", pr.B1rms)
	}
}

package dsl

import (
	"context"
	"math"
	"strings"
	"testing"

	"Nutate/display"
	"Nutate/dsl/present"
)

func execText(t *testing.T, s *Session, src string) string {
	t.Helper()
	var out strings.Builder
	err := s.Exec(context.Background(), src, Sink{Display: func(b display.Bundle) {
		text, _ := b["text/plain"].(string)
		out.WriteString(text + "\n")
	}})
	if err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	return out.String()
}

// A chemical shift δ adds the field B0·δ along z; with γB_eff = (ω1x, ω1y, Δω)
// (conventions of ../shared/CHECKS.md) its offset is Δω = γ·B0·δ, signed like a
// position's γ·G·x. For 15N (γ < 0, IUPAC 2001) +10 ppm at 7 T is −302.2 Hz.
func TestNegativeGammaShiftSign(t *testing.T) {
	s := NewSession(t.TempDir())
	execText(t, s, "nucleus 15N\nfield 7 T")
	got := execText(t, s, "print 10 ppm in Hz")
	want := -4.317266e6 * 7 * 10e-6 // γ̄·B0·δ, IUPAC 2001 γ̄ for 15N
	if !strings.Contains(got, "-302.2") {
		t.Errorf("print 10 ppm in Hz for 15N at 7 T = %q, want %.4g Hz", got, want)
	}
	// The same spins reached by ppm and by Hz give the same magnetization, and it
	// is the Rabi closed form (Rabi, Phys. Rev. 51:652, 1937) with signed ω1 = γB1 and
	// Δω = γB0δ: Mx = a·c·(1 − cos φ).
	execText(t, s, "pulse p = rect(duration = 250 us, flip = 90 deg)")
	byPPM := execText(t, s, "sweep p over offset 10 ppm to 10 ppm points 1 show mx")
	byHz := execText(t, s, "sweep p over offset -302.20862 Hz to -302.20862 Hz points 1 show mx")
	w1 := -2 * math.Pi * 1000.0 // 90° in 250 µs: |ν1| = 1 kHz, sign of γ
	dw := 2 * math.Pi * want
	om := math.Hypot(w1, dw)
	a, c := w1/om, dw/om
	mx := a * c * (1 - math.Cos(om*250e-6))
	num := func(text string) string {
		for _, f := range strings.Fields(text) {
			if strings.HasPrefix(f, "0.") || strings.HasPrefix(f, "-0.") {
				return f
			}
		}
		return ""
	}
	if num(byPPM) == "" || num(byPPM) != num(byHz) {
		t.Errorf("mx at +10 ppm (%q) differs from mx at its offset in Hz (%q)", num(byPPM), num(byHz))
	}
	if mx <= 0 || !strings.Contains(byPPM, strings.TrimRight(strings.TrimRight(present.Number(math.Round(mx*1e4)/1e4), "0"), ".")) {
		t.Errorf("mx at +10 ppm for 15N: got\n%s\nwant Rabi %.4f", byPPM, mx)
	}
}

// A width in ppm is a width: for a negative-γ nucleus the band of
// bandwidth = 20 ppm is |γ̄|·B0·20e-6 wide (15N at 11.7 T: 1.01024 kHz, IUPAC
// γ̄), not refused as negative, for swept and amplitude-modulated shapes alike.
func TestBandwidthInPPMNegativeGamma(t *testing.T) {
	s := NewSession(t.TempDir())
	out := execText(t, s, "nucleus 15N\nfield 11.7 T\npulse h = hsec(duration = 8 ms, bandwidth = 20 ppm, peak = 1 kHz, role = invert)\npulse g = slr(duration = 4 ms, bandwidth = 20 ppm, flip = 90 deg, role = excite)")
	if strings.Count(out, "bandwidth 1.01024 kHz") != 2 {
		t.Errorf("want both bands 1.01024 kHz wide:\n%s", out)
	}
}

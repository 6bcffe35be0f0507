package dsl

import (
	"encoding/json"
	"math"
	"testing"
)

// mapZ runs a cell whose last output is a map over a one-point second axis and
// returns its values along the first axis, decoded from its data (display.ResultMIME).
func mapZ(t *testing.T, src string) []float64 {
	t.Helper()
	_, raw := lastOutput(t, src)
	var data struct {
		Kind string
		Z    [][]*float64
	}
	if err := json.Unmarshal(raw, &data); err != nil || data.Kind != "map" || len(data.Z) != 1 {
		t.Fatalf("json %.200s: want a map with one row (%v)", raw, err)
	}
	var out []float64
	for _, z := range data.Z[0] {
		v := math.NaN()
		if z != nil {
			v = *z
		}
		out = append(out, v)
	}
	return out
}

// The echo phase of a sweep against closed forms. A hard pulse of phase φ:
// −β² = (ω1/Ω)²·sin²(ΩT/2)·e^{2iφ} (Rabi, Phys. Rev. 51:652, 1937, in the
// Cayley–Klein form of Pauly et al., IEEE TMI 10:53, 1991), so echophase is 2φ at
// every offset and echo keeps the CHECKS.md values. A time-symmetric real pulse
// times e^{iφ} has a symmetric Cayley–Klein matrix up to that frame rotation
// (σx and σz are symmetric), so its echo phase is also 2φ wherever it is defined.
func TestEchoPhaseSweep(t *testing.T) {
	cases := []struct {
		name, src string
		want      float64 // deg, at every defined point
		echo      []float64
	}{
		{"hard 45 deg", "pulse p = rect(duration = 500 us, flip = 180 deg, phase = 45 deg)\nsweep p over offset 250 Hz to 1000 Hz points 4 show echo", 90, []float64{0.938979, math.NaN(), math.NaN(), 0.316564}},
		{"hard -120 deg", "pulse p = rect(duration = 500 us, flip = 180 deg, phase = -120 deg)\nsweep p over offset -3 kHz to 3 kHz points 121 show echo", -240 + 360, nil},
		{"symmetric sinc", "pulse p = sinc(duration = 3 ms, tbw = 6, window = hann, flip = 180 deg, phase = 30 deg, role = refocus)\nsweep p over offset -3 kHz to 3 kHz points 301", 60, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := sweepJSON(t, c.src)
			ph, echo := got["echophase"], got["echo"]
			if len(ph) != len(echo) || len(ph) == 0 {
				t.Fatalf("echophase has %d values, echo %d; want the same, not 0", len(ph), len(echo))
			}
			defined := 0
			for i := range ph {
				if echo[i] < echoPhaseFloor {
					if !math.IsNaN(ph[i]) {
						t.Errorf("echophase[%d] = %g where echo is %g; want it left out", i, ph[i], echo[i])
					}
					continue
				}
				defined++
				if math.Abs(ph[i]-c.want) > 1e-6 {
					t.Errorf("echophase[%d] = %.9f, want %g", i, ph[i], c.want)
				}
			}
			if defined == 0 {
				t.Errorf("no echophase value defined")
			}
			for i, w := range c.echo {
				if !math.IsNaN(w) && math.Abs(echo[i]-w) > 1e-6 {
					t.Errorf("echo[%d] = %.9f, want %.6f", i, echo[i], w)
				}
			}
		})
	}
}

// A minimum-phase refocusing design has a curved echo phase: the one-axis sweep
// unwraps it (successive defined points within half a turn, the largest echo's
// point in (−180, 180]) and a map gives the same phase wrapped, point for point.
func TestEchoPhaseUnwrapAndMap(t *testing.T) {
	def := "pulse p = slr(duration = 3 ms, tbw = 6, role = refocus, design = minimum)\n"
	one := sweepJSON(t, def+"sweep p over offset -2 kHz to 2 kHz points 201 show echophase, echo")
	ph, echo := one["echophase"], one["echo"]
	top := 0
	span := 0.0
	for i := range ph {
		if echo[i] > echo[top] {
			top = i
		}
		if i > 0 && !math.IsNaN(ph[i]) && !math.IsNaN(ph[i-1]) {
			if d := math.Abs(ph[i] - ph[i-1]); d > 180 {
				t.Errorf("echophase jumps by %g deg between points %d and %d; want it unwrapped", d, i-1, i)
			}
			span = math.Max(span, math.Abs(ph[i]-ph[top]))
		}
	}
	if v := ph[top]; !(v > -180 && v <= 180) {
		t.Errorf("echophase at the largest echo = %g, want within (−180, 180]", v)
	}
	if span < 360 {
		t.Errorf("echophase of a minimum-phase design spans %g deg, want more than a turn (it is far from linear)", span)
	}
	mapped := mapZ(t, def+"sweep p over offset -2 kHz to 2 kHz points 201, b1 1 to 1 points 1 show echophase")
	if len(mapped) != len(ph) {
		t.Fatalf("map has %d values, want %d", len(mapped), len(ph))
	}
	for i := range ph {
		if math.IsNaN(ph[i]) != math.IsNaN(mapped[i]) {
			t.Fatalf("point %d: sweep %g, map %g; want both left out or both given", i, ph[i], mapped[i])
		}
		if math.IsNaN(ph[i]) {
			continue
		}
		if !(mapped[i] > -180-1e-9 && mapped[i] <= 180+1e-9) {
			t.Errorf("map echophase[%d] = %g, want within (−180, 180]", i, mapped[i])
		}
		if d := ph[i] - mapped[i]; math.Abs(d-360*math.Round(d/360)) > 1e-9 {
			t.Errorf("point %d: sweep %g and map %g differ by other than whole turns", i, ph[i], mapped[i])
		}
	}
}

// unwrapDefined keeps NaN gaps, unwraps each run and puts the largest magnitude's
// point of each run in (−180, 180] (values by hand).
func TestUnwrapDefined(t *testing.T) {
	nan := math.NaN()
	ph := []float64{170, -170, -150, nan, 100, 170, -100}
	mag := []float64{0.1, 0.9, 0.2, 0, 0.3, 0.2, 0.8}
	unwrapDefined(ph, mag)
	want := []float64{-190, -170, -150, nan, -260, -190, -100}
	for i := range want {
		if math.IsNaN(want[i]) != math.IsNaN(ph[i]) || !math.IsNaN(want[i]) && math.Abs(ph[i]-want[i]) > 1e-12 {
			t.Errorf("unwrapped = %v, want %v", ph, want)
			break
		}
	}
}

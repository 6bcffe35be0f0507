package dsl

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// describe, sweep and report use one definition of FWHM and ripple (help
// quantities): for the same pulse, describe's measured FWHM and ripples (refined
// by simulation), a dense sweep's feature table (read from its points) and
// report's bandwidth column agree. The sweep's grid (2401 points) can miss a
// ripple's extreme by a little, and describe's profile grid is coarser still, so
// ripples agree within 15 % (or 0.15 percentage points); the FWHM within 0.1 %.
func TestDefinitionsAgree(t *testing.T) {
	cases := []struct {
		name, def, span, quantity string
	}{
		{"hs", "hsec(duration = 8 ms, bandwidth = 5 kHz, peak = 25 uT, role = invert)", "-6 kHz to 6 kHz", "mz"},
		{"ex", "sinc(duration = 3 ms, tbw = 6, window = hann, flip = 90 deg, role = excite)", "-4 kHz to 4 kHz", "mxy"},
		{"rf", "sinc(duration = 3 ms, tbw = 6, window = none, flip = 180 deg, role = refocus)", "-4 kHz to 4 kHz", "echo"},
		{"sat", "sinc(duration = 3 ms, tbw = 6, window = hamming, flip = 90 deg, role = saturate)", "-4 kHz to 4 kHz", "mz"},
	}
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil {
			t.Fatalf("not a number: %q", s)
		}
		return v
	}
	cols := regexp.MustCompile(`\s{2,}`)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := NewSession(t.TempDir())
			execText(t, s, "pulse "+c.name+" = "+c.def)
			desc := execText(t, s, "describe "+c.name)
			m := regexp.MustCompile(`bandwidth \(measured FWHM, [^)]*\)\s+([0-9.]+) (k?Hz)`).FindStringSubmatch(desc)
			if m == nil {
				t.Fatalf("no measured FWHM in describe:\n%s", desc)
			}
			fwhm := num(m[1])
			if m[2] == "kHz" {
				fwhm *= 1000
			}
			r := regexp.MustCompile(`ripple in [^(]*\(measured, pass / stop\)\s+([0-9.e-]+) % / ([0-9.e-]+) % of M0`).FindStringSubmatch(desc)
			if r == nil {
				t.Fatalf("no ripples in describe:\n%s", desc)
			}
			pass, stop := num(r[1]), num(r[2])

			sw := execText(t, s, "sweep "+c.name+" over offset "+c.span+" points 2401 show "+c.quantity)
			var row []string
			for _, l := range strings.Split(sw, "\n") {
				if f := cols.Split(strings.TrimSpace(l), -1); len(f) >= 8 && f[0] == c.name && f[1] == c.quantity {
					row = f
				}
			}
			if row == nil {
				t.Fatalf("no feature row in the sweep:\n%s", sw)
			}
			sweepFWHM := 1000 * num(row[4]) // kHz axis
			if math.Abs(sweepFWHM-fwhm) > 1e-3*fwhm {
				t.Errorf("sweep FWHM %g Hz, describe %g Hz", sweepFWHM, fwhm)
			}
			for _, x := range []struct {
				what       string
				sweep, got float64
			}{{"pass", num(row[6]), pass}, {"stop", num(row[7]), stop}} {
				if d := math.Abs(x.sweep - x.got); d > 0.15*x.got && d > 0.15 {
					t.Errorf("%s ripple: sweep %g %%, describe %g %%", x.what, x.sweep, x.got)
				}
			}

			rep := execText(t, s, "report "+c.name)
			var rrow []string
			for _, l := range strings.Split(rep, "\n") {
				if f := cols.Split(strings.TrimSpace(l), -1); len(f) > 7 && f[0] == c.name {
					rrow = f
				}
			}
			if rrow == nil {
				t.Fatalf("no report row:\n%s", rep)
			}
			if got := num(rrow[7]); math.Abs(got-fwhm) > 1e-4*fwhm {
				t.Errorf("report FWHM %g Hz, describe %g Hz", got, fwhm)
			}
		})
	}
}

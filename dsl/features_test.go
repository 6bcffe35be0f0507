package dsl

import (
	"math"
	"testing"
)

func TestCurveFeatures(t *testing.T) {
	// A Gaussian exp(−x²/2) has FWHM 2√(2 ln 2) = 2.354820 (definition of the
	// Gaussian); its inverse 1 − 2·exp(−x²/2) is a dip of the same width.
	fwhm := 2 * math.Sqrt(2*math.Ln2)
	var x, peak, dip []float64
	for i := 0; i <= 1000; i++ {
		v := -5 + 0.01*float64(i)
		x = append(x, v)
		peak = append(peak, math.Exp(-v*v/2))
		dip = append(dip, 1-2*math.Exp(-v*v/2))
	}
	for _, c := range []struct {
		name     string
		y        []float64
		min, max float64
	}{
		{"peak", peak, math.Exp(-12.5), 1},
		{"dip", dip, -1, 1 - 2*math.Exp(-12.5)},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := curveFeatures(x, c.y, false)
			if math.Abs(f.width-fwhm) > 1e-4 {
				t.Errorf("width %.6f, want %.6f", f.width, fwhm)
			}
			if math.Abs(f.min-c.min) > 1e-12 || math.Abs(f.max-c.max) > 1e-12 {
				t.Errorf("min %g max %g, want %g %g", f.min, f.max, c.min, c.max)
			}
			if f.crossings != "-1.1774, 1.1774" {
				t.Errorf("crossings %q, want -1.1774, 1.1774", f.crossings)
			}
			// Inside the central half of the band the curve falls by
			// 1 − exp(−(fwhm/4)²/2) of its height; the grid of 0.01 puts the
			// last point inside up to 0.01 short of the edge (≤ 5 % here).
			want := (1 - math.Exp(-math.Pow(fwhm/4, 2)/2)) * (c.max - c.min)
			if math.Abs(f.passRipple-want) > 0.05*want {
				t.Errorf("pass ripple %g, want %g", f.passRipple, want)
			}
		})
	}
	// A flat curve has no width.
	f := curveFeatures(x, make([]float64, len(x)), false)
	if !math.IsNaN(f.width) {
		t.Errorf("flat curve width %g, want none", f.width)
	}
}

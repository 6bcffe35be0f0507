package display

import (
	"fmt"
	"math"
	"slices"
	"testing"
)

// Significant-figure rounding as written in physics papers (common practice):
// plain decimals in the usual range, a short exponent outside it.
func TestNum(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		sig  int
		want string
	}{
		{1234.5678, 3, "1230"},
		{0.012345, 3, "0.0123"},
		{9.996, 3, "10"}, // rounding carries into the next decade
		{-4.5, 2, "-4.5"},
		{0.5, 3, "0.5"},
		{1.2e-5, 2, "1.2e-5"},
		{3.4e7, 2, "3.4e7"},
		{999999.6, 6, "1e6"},
		{0.001, 3, "0.001"},
		{0.00099999, 3, "0.001"},
		{0.1 + 0.2, 3, "0.3"},
		{123456, 6, "123456"},
		{math.Copysign(0, -1), 3, "0"},
		{-1e-9, 2, "-1e-9"},
		{2.5, 0, "2"}, // sig clamped to 1; half to even
		{math.NaN(), 3, "NaN"},
		{math.Inf(1), 3, "+Inf"},
		{math.Inf(-1), 3, "-Inf"},
	} {
		t.Run(tc.want, func(t *testing.T) {
			if got := Num(tc.v, tc.sig); got != tc.want {
				t.Errorf("Num(%v, %d): got %q, want %q", tc.v, tc.sig, got, tc.want)
			}
		})
	}
}

// Column formatting keeps one number of decimals per column (common practice in
// typeset tables), dropping only zeros that every entry shares.
func TestNumColumn(t *testing.T) {
	for _, tc := range []struct {
		name string
		v    []float64
		sig  int
		want []string
	}{
		{"magnetization", []float64{1, 0.995, -0.0292}, 4, []string{"1.000", "0.995", "-0.029"}},
		{"integers", []float64{0, 1, 2}, 6, []string{"0", "1", "2"}},
		{"shared zero", []float64{0.5, 1.5}, 3, []string{"0.5", "1.5"}},
		{"tiny", []float64{1e-5, 2.5e-5}, 2, []string{"1e-5", "2.5e-5"}},
		{"negative zero", []float64{-0.0001, 1}, 3, []string{"0", "1"}},
		{"gap", []float64{1.25, math.NaN()}, 3, []string{"1.25", "NaN"}},
		{"empty", nil, 3, []string{}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := NumColumn(tc.v, tc.sig); !slices.Equal(got, tc.want) {
				t.Errorf("NumColumn(%v, %d): got %q, want %q", tc.v, tc.sig, got, tc.want)
			}
		})
	}
}

// Phase axes are labelled at multiples of 90° up to one and a half turns, then at
// half and whole turns, with at most about seven labels (common practice for
// readable axes: labels must not overlap).
func TestDegreeTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		step   float64
	}{
		{-180, 180, 90},
		{-400, 300, 180},
		{-720, 720, 360},
		{-5000, 5000, 1800},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%g to %g", c.lo, c.hi), func(t *testing.T) {
			var labelled []float64
			for _, tk := range (degreeTicks{}).Ticks(c.lo, c.hi) {
				if tk.Label != "" {
					labelled = append(labelled, tk.Value)
				}
			}
			if len(labelled) < 2 || len(labelled) > 8 {
				t.Fatalf("labels at %v: want 2 to 8", labelled)
			}
			for i, v := range labelled {
				if math.Mod(v, c.step) != 0 {
					t.Errorf("label at %g, want multiples of %g", v, c.step)
				}
				if i > 0 && v-labelled[i-1] != c.step {
					t.Errorf("labels %g and %g, want %g apart", labelled[i-1], v, c.step)
				}
			}
		})
	}
}

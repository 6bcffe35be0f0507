package present

import (
	"math"
	"testing"
)

func TestColourRange(t *testing.T) {
	// Magnetization in M0 units lies within the unit sphere (|M| ≤ M0 without
	// gain: Bloch equations), |β|² ≤ 1 (|α|² + |β|² = 1), phase in (−180°, 180°].
	for _, c := range []struct {
		q      string
		lo, hi float64
	}{
		{"mx", -1, 1}, {"my", -1, 1}, {"mz", -1, 1},
		{"mxy", 0, 1}, {"echo", 0, 1}, {"phase", -180, 180},
		{"energy", 0, 0},
	} {
		t.Run(c.q, func(t *testing.T) {
			if lo, hi := ColourRange(c.q); lo != c.lo || hi != c.hi {
				t.Errorf("range %g…%g, want %g…%g", lo, hi, c.lo, c.hi)
			}
		})
	}
}

// TestNumber checks the six significant digits of a table's numbers: no
// exponent from 1e-4 to 1e7 (the 10⁶ to 10⁷ decade written out, where %g
// would turn to one), an exponent outside, "—" for a missing value.
func TestNumber(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0, "0"}, {1.5, "1.5"}, {-0.000123456789, "-0.000123457"},
		{2885235.214247, "2885240"}, {1234567.8, "1234570"},
		{1.23456789e7, "1.23457e+07"}, {3.2e-5, "3.2e-05"}, {math.NaN(), "—"},
	} {
		if got := Number(c.v); got != c.want {
			t.Errorf("Number(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}

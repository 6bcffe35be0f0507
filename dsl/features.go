package dsl

import (
	"math"
	"strings"
)

// features summarize a long curve for the table under a plot.
type features struct {
	min, minAt, max, maxAt float64
	width                  float64 // distance between the half-level crossings around the main extreme
	crossings              string  // every half-level crossing, up to 6
	passRipple, stopRipple float64
}

// curveFeatures finds the extremes, the crossings of the half level (midway
// between the baseline, the mean of the two ends, and the main extreme), the width
// between the crossings around the extreme, and the ripples inside and outside
// that band. Crossings are interpolated linearly between points.
func curveFeatures(x, y []float64, phase bool) features {
	f := features{min: math.NaN(), max: math.NaN(), width: math.NaN(), passRipple: math.NaN(), stopRipple: math.NaN(), crossings: "—"}
	n := len(y)
	if n == 0 {
		return f
	}
	imin, imax := 0, 0
	for i, v := range y {
		if v < y[imin]-tieTol(y[imin]) {
			imin = i
		}
		if v > y[imax]+tieTol(y[imax]) {
			imax = i
		}
	}
	f.min, f.minAt, f.max, f.maxAt = y[imin], x[imin], y[imax], x[imax]
	if phase || n < 3 || f.max-f.min < 1e-9 {
		return f
	}
	base := (y[0] + y[n-1]) / 2
	ext := imax
	if math.Abs(y[imin]-base) > math.Abs(y[imax]-base)+tieTol(y[imax]) {
		ext = imin
	}
	half := (base + y[ext]) / 2
	cross := func(i int) float64 { // crossing between i and i+1
		a, b := y[i]-half, y[i+1]-half
		if a == b {
			return x[i]
		}
		return x[i] + (x[i+1]-x[i])*a/(a-b)
	}
	var all []string
	for i := 0; i+1 < n; i++ {
		if (y[i]-half)*(y[i+1]-half) < 0 || (y[i] == half && i > 0) {
			if len(all) < 6 {
				all = append(all, formatNumber(roundSig(cross(i), 5)))
			} else if len(all) == 6 {
				all = append(all, "…")
			}
		}
	}
	if len(all) > 0 {
		f.crossings = strings.Join(all, ", ")
	}
	side := func(v float64) bool { return (v-half)*(y[ext]-half) > 0 }
	lo, hi := ext, ext
	for lo > 0 && side(y[lo-1]) {
		lo--
	}
	for hi < n-1 && side(y[hi+1]) {
		hi++
	}
	if lo == 0 || hi == n-1 {
		return f
	}
	xl, xh := cross(lo-1), cross(hi)
	f.width = math.Abs(xh - xl)
	// Pass ripple: peak to peak over the central half of the band.
	c0, c1 := (3*xl+xh)/4, (xl+3*xh)/4
	if c0 > c1 {
		c0, c1 = c1, c0
	}
	pmin, pmax := math.Inf(1), math.Inf(-1)
	// Stop ripple: largest excursion from the baseline beyond a quarter band width
	// outside the edges.
	q := f.width / 4
	o0, o1 := math.Min(xl, xh)-q, math.Max(xl, xh)+q
	stop := math.NaN()
	for i, v := range y {
		if x[i] >= c0 && x[i] <= c1 {
			pmin, pmax = math.Min(pmin, v), math.Max(pmax, v)
		}
		if x[i] < o0 || x[i] > o1 {
			d := math.Abs(v - base)
			if math.IsNaN(stop) || d > stop {
				stop = d
			}
		}
	}
	if pmax >= pmin {
		f.passRipple = pmax - pmin
	}
	f.stopRipple = stop
	return f
}

package dsl

import (
	"math"
	"strings"

	"Nutate/dsl/present"
	"Nutate/physics/shape"
)

// curveLevels gives the physical levels a magnetization curve's features are
// measured between (help quantities): base, the value far outside the band (for
// a b1 axis, at b1 = 0), which is the start state; and target, the pass-band
// value where the design fixes it, the same as describe's (shape.Properties
// PassValue): mz of a pulse of nominal flip θ from ±z Mz0·cos θ, inversion −Mz0,
// saturation 0; mxy |M0|·|sin θ| (1 for an adiabatic pulse); echo sin²(θ/2) (1
// for an adiabatic pulse). NaN takes the curve's extreme farthest from base.
// base is NaN where the axis has no such baseline (t1, t2, shape arguments), for
// mx and my (they oscillate across an offset axis as the phase runs, so a half
// level, width or ripple of theirs would be noise: only their extremes are
// given) and where the quantity is not magnetization.
func curveLevels(q, axis string, start [3]float64, p *shape.Pulse) (base, target float64) {
	base, target = math.NaN(), math.NaN()
	if axis != "offset" && axis != "b1" && axis != "position" {
		return base, target
	}
	fromZ := start[0] == 0 && start[1] == 0 && p != nil
	designFlip := p != nil && !math.IsNaN(p.Flip) && !p.Adiabatic && !imported(p)
	switch q {
	case "mz":
		base = start[2]
		if !fromZ {
			break
		}
		switch {
		case p.Role == shape.RoleInvert:
			target = -start[2]
		case p.Role == shape.RoleSaturate:
			target = 0
		case designFlip:
			target = start[2] * math.Cos(p.Flip)
		}
	case "mxy":
		base = math.Hypot(start[0], start[1])
		switch {
		case !fromZ:
		case designFlip:
			target = math.Abs(start[2] * math.Sin(p.Flip))
		case p.Adiabatic && (p.Role == shape.RoleExcite):
			target = math.Abs(start[2])
		}
	case "echo":
		base = 0
		switch {
		case p == nil:
		case designFlip:
			s := math.Sin(p.Flip / 2)
			target = s * s
		case p.Adiabatic && (p.Role == shape.RoleRefocus || p.Role == shape.RoleInvert):
			target = 1
		}
	}
	return base, target
}

// curveFeatures finds the extremes, the crossings of the half level (midway
// between base and the pass-band level: target, or when NaN the extreme farthest
// from base), the width between the crossings around that extreme, the
// transition (90 %–10 % of the swing from base to the pass-band level, mean of
// both edges) and the ripples, as describe defines them (help quantities): pass
// ripple the largest distance from the pass-band level within the band edges
// moved inward by one transition width, stop ripple the largest distance from
// base beyond the edges moved outward by one transition width, both in the
// quantity's own units. Crossings are interpolated linearly between points. With
// base NaN only the extremes are given; when the curve does not pass the half
// level and come back on both sides inside the window the width is NaN.
func curveFeatures(x, y []float64, base, target float64) present.Features {
	f := present.Features{Min: math.NaN(), Max: math.NaN(), Width: math.NaN(), PassRipple: math.NaN(), StopRipple: math.NaN(), Crossings: "—"}
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
	f.Min, f.MinAt, f.Max, f.MaxAt = y[imin], x[imin], y[imax], x[imax]
	if math.IsNaN(base) || n < 3 || f.Max-f.Min < 1e-9 {
		return f
	}
	ext := imax
	if math.Abs(y[imin]-base) > math.Abs(y[imax]-base)+tieTol(y[imax]) {
		ext = imin
	}
	level := target
	if math.IsNaN(level) {
		level = y[ext]
	} else if level < base {
		ext = imin
	} else {
		ext = imax
	}
	if math.Abs(level-base) < 1e-6 {
		return f
	}
	at := func(q float64) float64 { return base + q*(level-base) }
	half := at(0.5)
	cross := func(i int, lv float64) float64 { // crossing of lv between i and i+1
		a, b := y[i]-lv, y[i+1]-lv
		if a == b {
			return x[i]
		}
		return x[i] + (x[i+1]-x[i])*a/(a-b)
	}
	var all []string
	for i := 0; i+1 < n; i++ {
		if (y[i]-half)*(y[i+1]-half) < 0 || (y[i] == half && i > 0) {
			if len(all) < 6 {
				all = append(all, present.Number(present.RoundSig(cross(i, half), 5)))
			} else if len(all) == 6 {
				all = append(all, "…")
			}
		}
	}
	if len(all) > 0 {
		f.Crossings = strings.Join(all, ", ")
	}
	// edges walks outward from ext while the curve is on the pass side of
	// level lv, and gives the crossings on both sides (ok false at the window's
	// end).
	edges := func(lv float64) (xl, xh float64, ok bool) {
		side := func(v float64) bool { return (v-lv)*(level-lv) > 0 }
		if !side(y[ext]) {
			return 0, 0, false
		}
		lo, hi := ext, ext
		for lo > 0 && side(y[lo-1]) {
			lo--
		}
		for hi < n-1 && side(y[hi+1]) {
			hi++
		}
		if lo == 0 || hi == n-1 {
			return 0, 0, false
		}
		return cross(lo-1, lv), cross(hi, lv), true
	}
	xl, xh, ok := edges(half)
	if !ok {
		return f
	}
	f.Width = math.Abs(xh - xl)
	l90, h90, ok90 := edges(at(0.9))
	l10, h10, ok10 := edges(at(0.1))
	if !ok90 || !ok10 {
		return f
	}
	tr := (math.Abs(l90-l10) + math.Abs(h10-h90)) / 2
	c := (xl + xh) / 2
	pass, stop := math.NaN(), math.NaN()
	for i, v := range y {
		d := math.Abs(x[i] - c)
		if d <= f.Width/2-tr {
			pass = maxNaN(pass, math.Abs(v-level))
		}
		if d >= f.Width/2+tr {
			stop = maxNaN(stop, math.Abs(v-base))
		}
	}
	// The regions' ends, interpolated: a region may begin on a steep slope.
	for _, e := range []float64{c - f.Width/2 - tr, c + f.Width/2 + tr} {
		if v, ok := interpAt(x, y, e); ok {
			stop = maxNaN(stop, math.Abs(v-base))
		}
	}
	if f.Width/2-tr >= 0 {
		for _, e := range []float64{c - f.Width/2 + tr, c + f.Width/2 - tr} {
			if v, ok := interpAt(x, y, e); ok {
				pass = maxNaN(pass, math.Abs(v-level))
			}
		}
	}
	f.PassRipple, f.StopRipple = pass, stop
	return f
}

// interpAt interpolates y linearly at xe between the points of x (increasing
// or decreasing); ok is false outside them.
func interpAt(x, y []float64, xe float64) (float64, bool) {
	for i := 0; i+1 < len(x); i++ {
		a, b := x[i], x[i+1]
		if (xe-a)*(xe-b) <= 0 && a != b {
			return y[i] + (y[i+1]-y[i])*(xe-a)/(b-a), true
		}
	}
	return 0, false
}

func maxNaN(a, b float64) float64 {
	if math.IsNaN(a) {
		return b
	}
	return math.Max(a, b)
}

// phaseFeatures fits a line to the unwrapped phase (deg) by least squares over
// the band: where mag (|Mxy|, may be nil) is at least half its maximum, the run of
// points around the maximum; the whole axis when mag is nil. It returns the slope
// (deg per x unit), the largest deviation from the line (deg) and the band's ends.
// NaN when the band has fewer than 3 points.
func phaseFeatures(x, phase, mag []float64) (slope, dev, x0, x1 float64) {
	slope, dev, x0, x1 = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	n := len(phase)
	lo, hi := 0, n-1
	if len(mag) == n && n > 0 {
		im := 0
		for i, v := range mag {
			if v > mag[im] {
				im = i
			}
		}
		h := mag[im] / 2
		if !(h > 0) {
			return
		}
		lo, hi = im, im
		for lo > 0 && mag[lo-1] >= h {
			lo--
		}
		for hi < n-1 && mag[hi+1] >= h {
			hi++
		}
	}
	if hi-lo+1 < 3 {
		return
	}
	for i := lo; i <= hi; i++ {
		if math.IsNaN(phase[i]) {
			return // a phase left out inside the band (its magnitude is tiny)
		}
	}
	// Unwrap: successive points differ by at most half a turn.
	u := make([]float64, 0, hi-lo+1)
	prev := phase[lo]
	acc := phase[lo]
	for i := lo; i <= hi; i++ {
		if i > lo {
			d := phase[i] - prev
			d -= 360 * math.Round(d/360)
			acc += d
			prev = phase[i]
		}
		u = append(u, acc)
	}
	// Least-squares line through (x, u).
	var sx, su float64
	m := float64(len(u))
	for k, v := range u {
		sx += x[lo+k]
		su += v
	}
	mx, mu := sx/m, su/m
	var sxx, sxu float64
	for k, v := range u {
		dx := x[lo+k] - mx
		sxx += dx * dx
		sxu += dx * (v - mu)
	}
	if sxx == 0 {
		return
	}
	slope = sxu / sxx
	dev = 0
	for k, v := range u {
		dev = math.Max(dev, math.Abs(v-(mu+slope*(x[lo+k]-mx))))
	}
	return slope, dev, x[lo], x[hi]
}

// unwrapDefined unwraps a phase curve (deg) in place along the axis, within each
// run of defined (non-NaN) points separately: successive points differ by at most
// half a turn. Each run is then shifted by whole turns so that its value where mag
// is largest lies in (−180, 180], which keeps the stretch a user reads first (the
// band) at its wrapped value.
func unwrapDefined(phase, mag []float64) {
	n := len(phase)
	for lo := 0; lo < n; {
		if math.IsNaN(phase[lo]) {
			lo++
			continue
		}
		hi := lo
		for hi+1 < n && !math.IsNaN(phase[hi+1]) {
			hi++
		}
		top := lo
		for i := lo + 1; i <= hi; i++ {
			d := phase[i] - phase[i-1]
			phase[i] -= 360 * math.Round(d/360)
			if len(mag) == n && mag[i] > mag[top] {
				top = i
			}
		}
		shift := 360 * math.Ceil((phase[top]-180)/360)
		for i := lo; i <= hi; i++ {
			phase[i] -= shift
		}
		lo = hi + 1
	}
}

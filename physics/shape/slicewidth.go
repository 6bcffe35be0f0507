package shape

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"Nutate/physics"
)

// ProfileWidth is the full width (Hz) of a pulse's own profile where it is
// half-way between its value at the band's centre (p.Center) and its value far
// outside the band, measured by simulation (physics.Simulate, gradient off,
// from equilibrium): |Mxy| for excitation (half the centre value), Mz for
// inversion and saturation (half-way between Mz at the centre and 1), |β|² for
// refocusing, the crushed echo amplitude (half the centre value) (Pauly et al.,
// IEEE TMI 10:53, 1991, for the profiles). A pulse without a role is read as
// an excitation below 120° of flip and as an inversion above. The edges are
// found on each side as the first crossing going out from the centre, within
// widthReach design bandwidths, to a relative precision of about 1e-6.
//
// This is the width a slice-select gradient turns into the thickness the pulse
// really selects: thickness = width/(γ̄·|G|).
func ProfileWidth(ctx context.Context, p *Pulse) (float64, error) {
	if p == nil || p.Wave.Len() == 0 {
		return math.NaN(), fmt.Errorf("profile width: empty pulse")
	}
	w := p.Wave
	w.Gradient = nil
	role := p.Role
	if role == RoleNone {
		role = RoleExcite
		if p.Flip > 2*math.Pi/3 {
			role = RoleInvert
		}
	}
	value := func(r *physics.Result, i int) float64 {
		switch role {
		case RoleInvert, RoleSaturate:
			return r.Mz[i]
		case RoleRefocus:
			b := cmplx.Abs(r.Beta[i])
			return b * b
		}
		return math.Hypot(r.Mx[i], r.My[i])
	}
	far := 0.0
	if role == RoleInvert || role == RoleSaturate {
		far = 1
	}
	band := p.Bandwidth
	if !(band > 0) {
		band = 1 / p.Duration()
	}
	const steps = 200 // per design bandwidth
	n := widthReach * steps
	offs := make([]float64, 2*n+1)
	for k := range offs {
		offs[k] = p.Center + band*float64(k-n)/steps
	}
	sim := func(o []float64) (*physics.Result, error) {
		return physics.Simulate(ctx, &w, p.Gamma, &physics.Isochromats{Offset: o}, physics.Options{})
	}
	r, err := sim(offs)
	if err != nil {
		return math.NaN(), err
	}
	pass := value(r, n)
	mid := (pass + far) / 2
	if math.Abs(pass-far) < 1e-3 {
		return math.NaN(), fmt.Errorf("profile width: the profile at the centre (%.4g) is its value outside the band", pass)
	}
	inside := func(v float64) bool { return (v-mid)*(pass-far) > 0 }
	edge := func(dir int) (float64, error) {
		for k := 1; k <= n; k++ {
			i := n + dir*k
			if inside(value(r, i)) {
				continue
			}
			a, b := offs[i-dir], offs[i] // a inside, b outside
			for range 40 {
				m := (a + b) / 2
				rm, err := sim([]float64{m})
				if err != nil {
					return math.NaN(), err
				}
				if inside(value(rm, 0)) {
					a = m
				} else {
					b = m
				}
			}
			return (a + b) / 2, nil
		}
		return math.NaN(), fmt.Errorf("profile width: the profile does not fall to half-way within %d bandwidths of the centre", widthReach)
	}
	hi, err := edge(1)
	if err != nil {
		return math.NaN(), err
	}
	lo, err := edge(-1)
	if err != nil {
		return math.NaN(), err
	}
	return hi - lo, nil
}

// widthReach is how many design bandwidths either side of the centre
// ProfileWidth searches for the edges.
const widthReach = 4

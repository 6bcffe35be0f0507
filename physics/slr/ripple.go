package slr

import (
	"fmt"
	"math"

	"Nutate/physics/shape"
)

// DInf is the filter-length factor D∞(δ1, δ2) of an equiripple lowpass with
// passband ripple δ1 and stopband ripple δ2 (Herrmann, Rabiner & Chan, Bell Syst.
// Tech. J. 52:769, 1973): with L1 = log10 δ1, L2 = log10 δ2,
//
//	D∞ = (a1·L1² + a2·L1 + a3)·L2 + (a4·L1² + a5·L1 + a6),
//
// a = 5.309e-3, 7.114e-2, −4.761e-1, −2.66e-3, −5.941e-1, −4.278e-1. A filter of
// length N has a transition width of about D∞/N cycles/sample, so an SLR pulse of
// time-bandwidth product TBW has a fractional transition width of about D∞/TBW.
func DInf(d1, d2 float64) float64 {
	const (
		a1 = 5.309e-3
		a2 = 7.114e-2
		a3 = -4.761e-1
		a4 = -2.66e-3
		a5 = -5.941e-1
		a6 = -4.278e-1
	)
	l1, l2 := math.Log10(d1), math.Log10(d2)
	return (a1*l1*l1+a2*l1+a3)*l2 + (a4*l1*l1 + a5*l1 + a6)
}

// nearRightAngle is how close to 90° an excitation must be for the 90° ripple
// relation, whose passband error is second order in the filter ripple.
const nearRightAngle = math.Pi / 180

// Ripples converts the ripples of a pulse's profile (pass δe1, stop δe2, as
// fractions) to those of its β filter (δ1, δ2), by the relations of Pauly et al.
// (1991, table):
//
//	small-tip excitation  δ1 = δe1,       δ2 = δe2
//	90° excitation        δ1 = √(δe1/2),  δ2 = δe2/√2
//	inversion             δ1 = δe1/8,     δ2 = √(δe2/2)
//	refocusing (echo)     δ1 = δe1/4,     δ2 = √δe2
//	saturation            δ1 = δe1/2,     δ2 = √δe2
//
// flip (rad) selects between the excitation relations: within 1° of 90° the 90°
// relation, otherwise the small-tip one. Above 90° (no published row) the
// small-tip relations are corrected to first order (derived here from
// |Mxy| = 2|β|·√(1 − |β|²) with |β| = sin(θ/2)·(1 + ε)): a relative change ε of
// the passband changes |Mxy|/sin θ by ε·|cos θ|/cos²(θ/2), so δ1 is scaled by
// cos²(θ/2)/|cos θ| where that is below 1; the stopband |Mxy|/sin θ ≈
// δ2/cos(θ/2), so δ2 = δe2·cos(θ/2), which at 90° is the published δe2/√2. The profiles the ripples refer to are
// |Mxy|/sin θ (excitation), Mz (inversion, saturation) and |β|², the crushed
// echo amplitude (refocusing).
func Ripples(role shape.Role, flip, pass, stop float64) (d1, d2 float64) {
	switch role {
	case shape.RoleInvert:
		return pass / 8, math.Sqrt(stop / 2)
	case shape.RoleRefocus:
		return pass / 4, math.Sqrt(stop)
	case shape.RoleSaturate:
		return pass / 2, math.Sqrt(stop)
	}
	if math.Abs(flip-math.Pi/2) <= nearRightAngle {
		return math.Sqrt(pass / 2), stop / math.Sqrt2
	}
	if flip > math.Pi/2 {
		c := math.Cos(flip / 2)
		return pass * math.Min(1, c*c/math.Abs(math.Cos(flip))), stop * c
	}
	return pass, stop
}

// HalfLevel is the β filter amplitude |β|/sin(θ/2) at which the profile of a
// pulse of role and flip (rad) is half-way between its pass and stop values:
// inversion Mz = 1 − 2|β|² = 0 and refocusing |β|² = ½ at |β| = 1/√2;
// saturation Mz = ½ at |β| = ½; excitation |Mxy| = 2|β|·√(1 − |β|²) = ½·sin θ
// at |β|² = (1 − √(1 − ¼·sin²θ))/2 (Pauly et al. 1991 for the profiles; the
// solutions are elementary).
func HalfLevel(role shape.Role, flip float64) float64 {
	var b float64
	switch role {
	case shape.RoleInvert, shape.RoleRefocus:
		b = math.Sqrt(0.5)
	case shape.RoleSaturate:
		b = 0.5
	default:
		s := math.Sin(flip)
		b = math.Sqrt((1 - math.Sqrt(1-s*s/4)) / 2)
	}
	return b / math.Sin(flip/2)
}

// Design is the phase of the β filter, which sets the phase of the profile and
// where the pulse's energy sits in time.
type Design int

// Designs: linear phase (symmetric pulse, refocusable), minimum phase (energy at
// the end, shortest delay to the echo), maximum phase (time reversal of minimum).
const (
	Linear Design = iota
	Minimum
	Maximum
)

var designNames = [...]string{"linear", "minimum", "maximum"}

// String returns the design's name as ParseDesign reads it.
func (d Design) String() string {
	if d < 0 || int(d) >= len(designNames) {
		return fmt.Sprintf("Design(%d)", int(d))
	}
	return designNames[d]
}

// ParseDesign reads a design name: linear, minimum or maximum.
func ParseDesign(s string) (Design, bool) {
	for i, n := range designNames {
		if n == s {
			return Design(i), true
		}
	}
	return Linear, false
}

// DesignNames lists the design names.
func DesignNames() []string { return designNames[:] }

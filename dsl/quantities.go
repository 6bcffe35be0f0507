package dsl

import "Nutate/physics/shape"

// quantitySpec is one `show` quantity.
type quantitySpec struct {
	Name     string
	Property bool   // a pulse property (needs a shape-argument axis) rather than magnetization
	Unit     string // display unit; "" for magnetization in M0 units
	Help     string
	Method   string
}

// quantityTable lists the `show` quantities (LANGUAGE.md "Quantities").
var quantityTable = []quantitySpec{
	{Name: "mx", Help: "x magnetization after the pulse (M0 units)", Method: "exact piecewise-constant Bloch rotation"},
	{Name: "my", Help: "y magnetization after the pulse (M0 units)", Method: "exact piecewise-constant Bloch rotation"},
	{Name: "mz", Help: "longitudinal magnetization after the pulse (M0 units)", Method: "exact piecewise-constant Bloch rotation"},
	{Name: "mxy", Help: "transverse magnitude |Mx + iMy| after the pulse", Method: "exact piecewise-constant Bloch rotation"},
	{Name: "phase", Unit: "deg", Help: "phase of Mx + iMy after the pulse, atan2(My, Mx); left out where |Mxy| is below 0.001 (there it is noise)", Method: "exact piecewise-constant Bloch rotation"},
	{Name: "echo", Help: "crushed spin-echo response of a refocusing pulse: the magnitude |β|² of Mxy+ = −β²·Mxy* (for Mxy* of unit size); a one-axis sweep draws echophase below it", Method: "Cayley–Klein parameters (Pauly et al., IEEE TMI 10:53, 1991)"},
	{Name: "echophase", Unit: "deg", Help: "phase of the crushed spin echo, arg(−β²) (twice the pulse's phase for a hard pulse; linear across offset shifts the echo in time, curvature dephases it); left out where echo is below 0.001; unwrapped along a one-axis sweep, within (−180, 180] on a map", Method: "Cayley–Klein parameters (Pauly et al., IEEE TMI 10:53, 1991)"},
	{Name: "peak", Property: true, Unit: "uT", Help: "peak B1 of the pulse", Method: "largest |B1| sample"},
	{Name: "energy", Property: true, Unit: "µT²·ms", Help: "∫B1² dt: a relative, waveform-only estimate (not SAR)", Method: "sum of |B1|²·dwell"},
	{Name: "b1rms", Property: true, Unit: "uT", Help: "time-averaged B1, √(energy/TR); needs `with tr = ...`; relative, waveform-only", Method: "√(∫B1² dt / TR)"},
	{Name: "flip", Property: true, Unit: "deg", Help: "nominal on-resonance flip (γ∫B1 dt); for adiabatic pulses and trains the simulated rotation at the centre", Method: "γ∫B1 dt; rotation 2·asin|β| (Pauly et al. 1991)"},
	{Name: "bandwidth", Property: true, Unit: "Hz", Help: "measured FWHM: the width of the pulse's simulated profile where its role's quantity is half-way between its stop-band value and its design pass-band value (Mz = 0 for inversion; see `help quantities`)", Method: "simulated profile of the role's quantity, half-level crossings refined by simulation"},
	{Name: "tbw", Property: true, Help: "time-bandwidth product, measured: FWHM × duration", Method: "bandwidth × duration"},
	{Name: "transition", Property: true, Unit: "Hz", Help: "measured 90 %–10 % transition width of the role's profile (of the swing from stop-band to design pass-band value), mean of both edges", Method: "simulated profile"},
	{Name: "ripple", Property: true, Unit: "%", Help: "measured pass-band ripple in % of M0 in the role's quantity (Mz for invert and saturate, |Mxy| for excite, |β|² for refocus, as slr's pass is given): the largest deviation from the design pass-band value within the FWHM band edges moved inward by one transition width (as describe)", Method: "simulated profile"},
	{Name: "threshold", Property: true, Unit: "uT", Help: "adiabatic threshold (measured): the lowest peak B1 at which the pulse meets its role's target (invert Mz ≤ −0.9, excite |Mxy| ≥ 0.9·sin flip, refocus |β|² ≥ 0.9, saturate |Mz| ≤ 0.1) at 11 offsets over ±¼ of its design band, and keeps meeting it over half an octave of B1; bir4, which has no design band, at its centre only, and it must also land within 0.1 of the rotation it promises, phase included. It does not depend on the peak the pulse was given; `describe` also gives the upper B1 limit where the target fails again, or why no threshold exists", Method: "quarter-octave B1 scan over a range set by the sweep rate and the sampling, then bisection to 1e-4"},
}

func lookupQuantity(name string) (quantitySpec, bool) {
	for _, q := range quantityTable {
		if q.Name == name {
			return q, true
		}
	}
	return quantitySpec{}, false
}

func quantityNames() []string {
	var out []string
	for _, q := range quantityTable {
		out = append(out, q.Name)
	}
	return out
}

// defaultQuantities by role: excitation mxy and phase, inversion and saturation
// mz, refocusing echo, anything else mx my mz.
func defaultQuantities(r shape.Role) []string {
	switch r {
	case shape.RoleExcite:
		return []string{"mxy", "phase"}
	case shape.RoleInvert, shape.RoleSaturate:
		return []string{"mz"}
	case shape.RoleRefocus:
		return []string{"echo"}
	}
	return []string{"mx", "my", "mz"}
}

package dsl

import (
	"context"
	"fmt"
	"math"

	"Nutate/physics"
	"Nutate/physics/shape"
)

// meetsAdiabaticTarget reports whether an adiabatic pulse with a role meets its
// role's target at its own peak at the centre of its band. It costs one
// simulation of one spin, so a `pulse` statement can afford it where the
// threshold search cannot. A pulse that misses its target at the centre is below
// its threshold (shape.Measure asks the target of the centre among other
// offsets, and scans the pulse's own peak); the band's edges are left to the
// threshold itself, since some shapes never meet the target there at any peak.
// ok is true for pulses it does not apply to.
func meetsAdiabaticTarget(ctx context.Context, p *shape.Pulse) (bool, error) {
	if !p.Adiabatic || p.Role == shape.RoleNone || p.Peak() == 0 {
		return true, nil
	}
	offs := []float64{p.Center}
	w := p.Wave
	w.Gradient = nil
	r, err := physics.Simulate(ctx, &w, p.Gamma, &physics.Isochromats{Offset: offs}, physics.Options{})
	if err != nil {
		return false, err
	}
	for i := range offs {
		if !p.TargetMet(p.Role, r.Mx[i], r.My[i], r.Mz[i], r.Beta[i]) {
			return false, nil
		}
	}
	return true, nil
}

// roleVerb says what a pulse of the role does to its band.
func roleVerb(r shape.Role) string {
	switch r {
	case shape.RoleInvert:
		return "invert"
	case shape.RoleExcite:
		return "fully excite"
	case shape.RoleRefocus:
		return "refocus"
	case shape.RoleSaturate:
		return "saturate"
	}
	return "act on"
}

// pulseAction says what p does to object ("its band"): a plane rotation (bir4)
// is judged on its rotation, phase included, whatever its role.
func pulseAction(p *shape.Pulse, object string) string {
	if p.Plane {
		return "turn " + object + " as promised (phase included)"
	}
	return roleVerb(p.Role) + " " + object
}

// thresholdWarning is the plain warning for an adiabatic pulse played below its
// threshold th (T; NaN when the search found none), or "" when the peak is
// enough. met is meetsAdiabaticTarget's answer, which speaks when th is NaN.
func thresholdWarning(p *shape.Pulse, th float64, met bool) string {
	gb := gammaBarOf(p)
	peak := Quantity{p.Peak(), dimField}.format("uT")
	switch {
	case !p.Adiabatic || p.Role == shape.RoleNone:
		return ""
	case !math.IsNaN(th) && th > p.Peak():
		return fmt.Sprintf("peak %s is below the adiabatic threshold %s: this pulse will not %s", peak, fmtField(th, gb), pulseAction(p, "its band"))
	case math.IsNaN(th) && !met:
		return fmt.Sprintf("peak %s does not %s, and no adiabatic threshold was found up to 32 times this peak", peak, pulseAction(p, "even the centre of the band"))
	}
	return ""
}

package dsl

import (
	"context"
	"errors"

	"Nutate/physics/shape"
	"Nutate/physics/slr"
)

// buildSLR adapts the slr shape row to package slr: the role is required, the
// other values default in slr.NewSpec.
func buildSLR(b *builder) (*shape.Pulse, error) {
	c := b.common()
	if c.Role == shape.RoleNone {
		return nil, errors.New("slr needs role (excite, invert, refocus or saturate)")
	}
	spec := slr.NewSpec(c.Role)
	if _, ok := b.vals["tbw"]; ok {
		spec.TBW = b.tbw(4)
	}
	if _, ok := b.vals["bandwidth"]; ok {
		spec.TBW = b.tbw(4)
	}
	if v, ok := b.vals["pass"]; ok {
		spec.PassRipple = v
	}
	if v, ok := b.vals["stop"]; ok {
		spec.StopRipple = v
	}
	if w, ok := b.words["design"]; ok {
		d, _ := slr.ParseDesign(w)
		spec.Design = d
	}
	spec.Rising = b.words["stopband"] == "rising"
	ctx := b.ctx
	if ctx == nil {
		ctx = context.Background()
	}
	return slr.PulseContext(ctx, spec, c, b.gamma)
}

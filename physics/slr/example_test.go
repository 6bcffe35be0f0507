package slr_test

import (
	"fmt"

	"Nutate/physics"
	"Nutate/physics/shape"
	"Nutate/physics/slr"
)

// A 4 ms inversion pulse with TBW 8 and 1 % ripples for protons.
func ExamplePulse() {
	h, _ := physics.Lookup("1H")
	spec := slr.NewSpec(shape.RoleInvert)
	spec.TBW = 8
	c := shape.NewCommon()
	c.Duration = 4e-3
	p, err := slr.Pulse(spec, c, h.Gamma())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s %v: %d samples, bandwidth %.0f Hz\n", p.Shape, p.Role, p.Wave.Len(), p.Bandwidth)

	spec.TBW = 1.5
	_, err = slr.Pulse(spec, c, h.Gamma())
	fmt.Println(err)
	// Output:
	// slr invert: 256 samples, bandwidth 2000 Hz
	// slr: tbw: got 1.5, too small for filter ripples 0.00125 and 0.0707 (pass 0.01, stop 0.01, invert, linear phase): want more than 2.011, or larger ripples
}

// Forward and Inverse are each other's inverse: rotation angles per sample in,
// the SLR polynomials A and B out, and back.
func ExampleForward() {
	rf := []complex128{0.1, 0.2i, 0.1}
	a, b := slr.Forward(rf)
	back := slr.Inverse(a, b)
	fmt.Printf("%.3f\n", back)
	// Output:
	// [(0.100+0.000i) (0.000+0.200i) (0.100+0.000i)]
}

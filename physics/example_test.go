package physics_test

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"Nutate/physics"
)

// A 90° hard pulse of 250 µs for protons, seen by spins on resonance and 1 kHz off.
func ExampleSimulate() {
	h, _ := physics.Lookup("1H")
	b1 := 2 * math.Pi * 1000 / h.Gamma() // 1 kHz of B1, in tesla
	w := &physics.Waveform{Dwell: []float64{250e-6}, B1: []complex128{complex(b1, 0)}}
	iso := physics.Grid([]float64{0, 1000}, nil, nil, nil, nil)
	r, err := physics.Simulate(context.Background(), w, h.Gamma(), &iso, physics.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	round := func(v float64) float64 { return math.Round(v*1e4)/1e4 + 0 } // no "-0"
	for i, f := range iso.Offset {
		fmt.Printf("offset %.0f Hz: M = (%.4f, %.4f, %.4f), |Mxy| = %.4f, phase %.1f°\n",
			f, round(r.Mx[i]), round(r.My[i]), round(r.Mz[i]), r.Transverse(i), r.Phase(i)*180/math.Pi)
	}
	// Output:
	// offset 0 Hz: M = (0.0000, 1.0000, 0.0000), |Mxy| = 1.0000, phase 90.0°
	// offset 1000 Hz: M = (0.8028, 0.5626, 0.1972), |Mxy| = 0.9804, phase 35.0°
}

// The refocusing quality of a 180° hard pulse: the crushed spin echo |β|².
func ExampleEcho() {
	w := &physics.Waveform{Dwell: []float64{500e-6}, B1: []complex128{complex(2*math.Pi*1000, 0)}}
	iso := physics.Grid([]float64{0, 250, 1000}, nil, nil, nil, nil)
	r, _ := physics.Simulate(context.Background(), w, 1, &iso, physics.Options{}) // γ = 1: B1 in rad/s
	for i, f := range iso.Offset {
		e := physics.Echo(r.Beta[i])
		fmt.Printf("offset %.0f Hz: echo magnitude %.6f, phase %.1f°\n", f, cmplx.Abs(e), math.Abs(cmplx.Phase(e))*180/math.Pi)
	}
	// Output:
	// offset 0 Hz: echo magnitude 1.000000, phase 0.0°
	// offset 250 Hz: echo magnitude 0.938979, phase 0.0°
	// offset 1000 Hz: echo magnitude 0.316564, phase 0.0°
}

package physics

import (
	"context"
	"math"
	"testing"
)

// Rabi closed form from M = ẑ (Rabi, Phys. Rev. 51:652, 1937), values from
// ../shared/CHECKS.md: 90°, T = 250 µs, ν1 = 1 kHz, offset 1000 Hz.
func TestRectRabiCheckValue(t *testing.T) {
	h, _ := Lookup("1H")
	g := h.Gamma()
	b1 := 2 * math.Pi * 1000 / g
	w := &Waveform{Dwell: []float64{250e-6}, B1: []complex128{complex(b1, 0)}}
	iso := Isochromats{Offset: []float64{1000}}
	r, err := Simulate(context.Background(), w, g, &iso, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := [3]float64{0.8028499, 0.5626401, 0.1971501}
	got := [3]float64{r.Mx[0], r.My[0], r.Mz[0]}
	for k := range want {
		if math.Abs(got[k]-want[k]) > 1e-6 {
			t.Errorf("M[%d] = %.7f, want %.7f", k, got[k], want[k])
		}
	}
	// Cayley–Klein: Mxy = 2α*β, Mz = 1 − 2|β|² (Pauly et al. 1991).
	a, b := r.Alpha[0], r.Beta[0]
	mxy := 2 * complex(real(a), -imag(a)) * b
	if math.Abs(real(mxy)-got[0]) > 1e-12 || math.Abs(imag(mxy)-got[1]) > 1e-12 {
		t.Errorf("2α*β = %v, want %v", mxy, complex(got[0], got[1]))
	}
}

// Torrey, Phys. Rev. 76:1059 (1949); values from ../shared/CHECKS.md.
func TestRelaxationCheckValue(t *testing.T) {
	g := 1.0
	w := &Waveform{Dwell: []float64{1e-3}, B1: []complex128{complex(2*math.Pi*250, 0)}}
	iso := Isochromats{T1: []float64{0.1}, T2: []float64{1e-3}}
	r, err := Simulate(context.Background(), w, g, &iso, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := [3]float64{0, 0.638612220, 0.255052486}
	got := [3]float64{r.Mx[0], r.My[0], r.Mz[0]}
	for k := range want {
		if math.Abs(got[k]-want[k]) > 1e-6 {
			t.Errorf("M[%d] = %.9f, want %.9f", k, got[k], want[k])
		}
	}
}

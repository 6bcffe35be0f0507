package shape

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"Nutate/physics"
)

// selectedThickness simulates p with its gradient on at positions across the
// slice and returns the full width (m) where the role's own profile is
// half-way between its value at the slice centre and its value far outside
// (excitation |Mxy|, inversion and saturation Mz, refocusing |β|²; Pauly et
// al., IEEE TMI 10:53, 1991), by linear interpolation on a grid of 1/2000 of
// the span. It is written apart from ProfileWidth (positions and the
// gradient, not offsets) so that the two check each other.
func selectedThickness(t *testing.T, p *Pulse, span float64) float64 {
	t.Helper()
	const n = 4001
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = span * (float64(i)/float64(n-1) - 0.5)
	}
	r, err := physics.Simulate(context.Background(), &p.Wave, p.Gamma, &physics.Isochromats{Position: xs}, physics.Options{})
	if err != nil {
		t.Fatal(err)
	}
	v := make([]float64, n)
	far := 0.0
	for i := range xs {
		switch p.Role {
		case RoleInvert, RoleSaturate:
			v[i], far = r.Mz[i], 1
		case RoleRefocus:
			v[i] = math.Pow(cmplx.Abs(r.Beta[i]), 2)
		default:
			v[i] = math.Hypot(r.Mx[i], r.My[i])
		}
	}
	c := n / 2
	mid := (v[c] + far) / 2
	s := 1.0
	if v[c] < far {
		s = -1
	}
	side := func(dir int) float64 {
		for i := c; i+dir >= 0 && i+dir < n; i += dir {
			a, b := s*(v[i]-mid), s*(v[i+dir]-mid)
			if a >= 0 && b < 0 {
				return xs[i] + (xs[i+dir]-xs[i])*a/(a-b)
			}
		}
		t.Fatalf("profile does not reach half-way within ±%g m", span/2)
		return 0
	}
	return side(1) - side(-1)
}

// A pulse given a thickness selects that thickness in its own role's profile,
// within 2 % (the brief's tolerance; thickness = width/(γ̄·G), common
// practice), for every shape with a profile: sinc with each window, gauss,
// rect and hsec, in every role.
func TestThicknessIsMeasured(t *testing.T) {
	g := gammaH(t)
	const thk = 5e-3
	type role struct {
		name string
		r    Role
		flip float64
	}
	roles := []role{
		{"excite30", RoleExcite, 30 * deg},
		{"excite90", RoleExcite, 90 * deg},
		{"invert", RoleInvert, 180 * deg},
		{"refocus", RoleRefocus, 180 * deg},
		{"saturate", RoleSaturate, 90 * deg},
	}
	build := map[string]func(c Common) (*Pulse, error){
		"sinc":         func(c Common) (*Pulse, error) { return Sinc(c, g, 4, WindowNone) },
		"sinc_hann":    func(c Common) (*Pulse, error) { return Sinc(c, g, 4, WindowHann) },
		"sinc_hamming": func(c Common) (*Pulse, error) { return Sinc(c, g, 6, WindowHamming) },
		"gauss":        func(c Common) (*Pulse, error) { return Gauss(c, g, 0, 0.011) },
		"rect":         func(c Common) (*Pulse, error) { return Rect(c, g) },
	}
	for _, name := range []string{"sinc", "sinc_hann", "sinc_hamming", "gauss", "rect"} {
		for _, ro := range roles {
			t.Run(fmt.Sprintf("%s_%s", name, ro.name), func(t *testing.T) {
				c := common(2e-3, ro.flip)
				c.Role, c.Thickness = ro.r, thk
				p, err := build[name](c)
				if err != nil {
					t.Fatal(err)
				}
				got := selectedThickness(t, p, 4*thk)
				design := SliceThickness(p.Bandwidth, p.Gamma, p.Gradient)
				t.Logf("selected %.4f mm; design figure %.4f mm", got*1e3, design*1e3)
				nearRel(t, "selected thickness (m)", got, thk, 0.02)
			})
		}
	}
	t.Run("hsec_invert", func(t *testing.T) {
		c := commonPeak(8e-3, 20e-6)
		c.Thickness = thk
		p, err := Hsec(c, g, 1, 2000, 0)
		if err != nil {
			t.Fatal(err)
		}
		got := selectedThickness(t, p, 4*thk)
		t.Logf("selected %.4f mm; design figure %.4f mm", got*1e3, SliceThickness(p.Bandwidth, p.Gamma, p.Gradient)*1e3)
		nearRel(t, "selected thickness (m)", got, thk, 0.02)
	})
}

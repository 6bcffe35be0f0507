package physics_test

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"Nutate/physics"
	"Nutate/physics/shape"
)

// The proton's γ̄ is CODATA 2018 (42.577478518 MHz/T, CHECKS.md), and the
// nucleus table uses the same value.
func TestProtonGammaBar(t *testing.T) {
	if physics.ProtonGammaBar != 42.577478518e6 {
		t.Errorf("ProtonGammaBar = %v Hz/T, want 42.577478518e6 (CODATA 2018)", physics.ProtonGammaBar)
	}
	h, _ := physics.Lookup("1H")
	if h.GammaBar != physics.ProtonGammaBar {
		t.Errorf("nucleus table 1H: %v Hz/T, want ProtonGammaBar %v", h.GammaBar, physics.ProtonGammaBar)
	}
}

// A magnet named by its 1H frequency: 600 MHz is 600e6/42.577478518e6 T
// (CODATA 2018 γ̄), 14.091957 T; 3 T is 127.73 MHz (CHECKS.md, common practice
// "about 128 MHz"). 1 ppm at 600 MHz is 600 Hz for 1H: γ̄ cancels, so the only
// error is floating-point rounding (tolerance 1e-9 Hz); for 13C it is
// 600 Hz · 10.708397/42.577478518 = 150.9 Hz (IUPAC 2001 and CODATA 2018
// ratios), for 15N −60.84 Hz (negative γ).
func TestFieldFromProton(t *testing.T) {
	b0 := physics.FieldFromProton(600e6)
	if want := 600e6 / 42.577478518e6; math.Abs(b0-want) > 1e-12 {
		t.Errorf("600 MHz: got %.9f T, want %.9f T", b0, want)
	}
	if math.Abs(b0-14.091957) > 5e-7 {
		t.Errorf("600 MHz: got %.6f T, want 14.091957 T", b0)
	}
	if f := physics.ProtonFrequency(3); math.Abs(f-127.73e6) > 0.005e6 {
		t.Errorf("3 T: got %.4f MHz, want 127.73 MHz", f/1e6)
	}
	if back := physics.ProtonFrequency(b0); math.Abs(back-600e6) > 1e-6 {
		t.Errorf("round trip: got %.6f Hz, want 600e6", back)
	}
	for _, tc := range []struct {
		nucleus string
		want    float64 // Hz per ppm at 600 MHz
		tol     float64
	}{
		{"1H", 600, 1e-9},
		{"13C", 600 * 10.708397 / 42.577478518, 1e-9},
		{"15N", -600 * 4.317266 / 42.577478518, 1e-9},
	} {
		n, _ := physics.Lookup(tc.nucleus)
		got := physics.ShiftOffset(5.5, 4.5, n.GammaBar, b0)
		if math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s: 1 ppm at 600 MHz is %.12f Hz, want %.12f Hz", tc.nucleus, got, tc.want)
		}
		if d := physics.OffsetShift(got, 4.5, n.GammaBar, b0); math.Abs(d-5.5) > 1e-12 {
			t.Errorf("%s: OffsetShift(ShiftOffset(5.5 ppm)) = %v ppm, want 5.5", tc.nucleus, d)
		}
	}
	if d := physics.OffsetShift(100, 4.7, 42.58e6, 0); !math.IsNaN(d) {
		t.Errorf("no field: got %v ppm, want NaN", d)
	}
}

// A pulse centred (shape Center) at the offset of δ = 2 ppm from a carrier at
// 4.7 ppm acts on the spins at δ = 2 ppm, by simulation over an axis of
// absolute shifts converted with the same function; also for 15N (negative γ),
// carrier 118 ppm, centre 110 ppm. The peak of |Mxy| and the centroid of the
// band must lie within one axis step of the asked shift, and the carrier must
// be untouched (|Mxy| < 1e-3).
func TestCentredAtAbsoluteShift(t *testing.T) {
	b0 := physics.FieldFromProton(600e6)
	for _, tc := range []struct {
		nucleus                    string
		carrier, centre, lo, hi, d float64
		duration                   float64
	}{
		{"1H", 4.7, 2, 0, 6, 0.005, 10e-3},
		{"15N", 118, 110, 100, 125, 0.02, 20e-3},
	} {
		t.Run(tc.nucleus, func(t *testing.T) {
			n, _ := physics.Lookup(tc.nucleus)
			c := shape.NewCommon()
			c.Duration, c.Flip, c.Role = tc.duration, math.Pi/2, shape.RoleExcite
			c.Center = physics.ShiftOffset(tc.centre, tc.carrier, n.GammaBar, b0)
			p, err := shape.Gauss(c, n.Gamma(), 4, 0)
			if err != nil {
				t.Fatal(err)
			}
			var shifts, offs []float64
			for d := tc.lo; d <= tc.hi+1e-9; d += tc.d {
				shifts = append(shifts, d)
				offs = append(offs, physics.ShiftOffset(d, tc.carrier, n.GammaBar, b0))
			}
			offs = append(offs, 0) // the carrier itself
			iso := physics.Grid(offs, nil, nil, nil, nil)
			r, err := physics.Simulate(context.Background(), &p.Wave, n.Gamma(), &iso, physics.Options{})
			if err != nil {
				t.Fatal(err)
			}
			best, sum, wsum := 0, 0.0, 0.0
			for i := range shifts {
				m := cmplx.Abs(r.Mxy(i))
				if m > cmplx.Abs(r.Mxy(best)) {
					best = i
				}
				sum += m * shifts[i]
				wsum += m
			}
			if got := shifts[best]; math.Abs(got-tc.centre) > tc.d {
				t.Errorf("peak |Mxy| at δ = %.3f ppm, want %.3f ppm", got, tc.centre)
			}
			if got := sum / wsum; math.Abs(got-tc.centre) > tc.d {
				t.Errorf("centroid of |Mxy| at δ = %.3f ppm, want %.3f ppm", got, tc.centre)
			}
			if m := r.Transverse(len(offs) - 1); m > 1e-3 {
				t.Errorf("carrier (δ = %v ppm) has |Mxy| = %.4f, want < 1e-3", tc.carrier, m)
			}
			if m := r.Transverse(best); m < 0.99 {
				t.Errorf("peak |Mxy| = %.4f, want a 90° excitation (> 0.99)", m)
			}
		})
	}
}

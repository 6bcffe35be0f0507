package dsl

import (
	"math"
	"testing"

	"Nutate/physics/shape"
)

func TestCurveFeatures(t *testing.T) {
	// A Gaussian exp(−x²/2) has FWHM 2√(2 ln 2) = 2.354820 (definition of the
	// Gaussian); its inverse 1 − 2·exp(−x²/2) is a dip of the same width.
	fwhm := 2 * math.Sqrt(2*math.Ln2)
	var x, peak, dip []float64
	for i := 0; i <= 1000; i++ {
		v := -5 + 0.01*float64(i)
		x = append(x, v)
		peak = append(peak, math.Exp(-v*v/2))
		dip = append(dip, 1-2*math.Exp(-v*v/2))
	}
	for _, c := range []struct {
		name         string
		y            []float64
		base, target float64
		min, max     float64
	}{
		{"peak", peak, 0, math.NaN(), math.Exp(-12.5), 1},
		{"dip", dip, 1, -1, -1, 1 - 2*math.Exp(-12.5)},
		{"dip to its extreme", dip, 1, math.NaN(), -1, 1 - 2*math.Exp(-12.5)},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := curveFeatures(x, c.y, c.base, c.target)
			if math.Abs(f.Width-fwhm) > 1e-4 {
				t.Errorf("width %.6f, want %.6f", f.Width, fwhm)
			}
			if math.Abs(f.Min-c.min) > 1e-12 || math.Abs(f.Max-c.max) > 1e-12 {
				t.Errorf("min %g max %g, want %g %g", f.Min, f.Max, c.min, c.max)
			}
			if f.Crossings != "-1.1774, 1.1774" {
				t.Errorf("crossings %q, want -1.1774, 1.1774", f.Crossings)
			}
			// A Gaussian's 90 %–10 % transition, √(2 ln 10) − √(2 ln(1/0.9)) =
			// 1.687, is wider than its half width 1.177: the pass region (the
			// band's edges moved inward by one transition) is empty.
			if !math.IsNaN(f.PassRipple) {
				t.Errorf("pass ripple %g, want none (no pass region)", f.PassRipple)
			}
		})
	}
	t.Run("ripples", func(t *testing.T) {
		// A flat top 1 + 0.01·cos 8x for |x| ≤ 2, linear edges to 0 at |x| =
		// 2.5, and 0.005·|cos 8x| beyond: half crossings at ±2.25, transition
		// 0.8 × 0.5 = 0.4, so the pass region is |x| ≤ 1.85 (where cos 8x
		// reaches ±1: pass ripple 0.01) and the stop region |x| ≥ 2.65 (stop
		// ripple 0.005), by the definitions of help quantities.
		y := make([]float64, len(x))
		for i, v := range x {
			switch a := math.Abs(v); {
			case a <= 2:
				y[i] = 1 + 0.01*math.Cos(8*v)
			case a <= 2.5:
				y[i] = (2.5 - a) / 0.5
			default:
				y[i] = 0.005 * math.Abs(math.Cos(8*v))
			}
		}
		f := curveFeatures(x, y, 0, 1)
		if math.Abs(f.Width-4.5) > 1e-9 {
			t.Errorf("width %g, want 4.5", f.Width)
		}
		if math.Abs(f.PassRipple-0.01) > 1e-6 || math.Abs(f.StopRipple-0.005) > 1e-6 {
			t.Errorf("ripples %g / %g, want 0.01 / 0.005", f.PassRipple, f.StopRipple)
		}
	})
	t.Run("overshoot", func(t *testing.T) {
		// mz = 1 − 1.3·exp(−x²/2) overshoots a pass-band target of 0 (a 90°
		// pulse). The half level is 0.5, midway between the baseline 1 and the
		// target, whatever the overshoot: 1.3·exp(−x²/2) = 0.5 at
		// x = ±√(2 ln 2.6) (algebra on the definition).
		y := make([]float64, len(x))
		for i, v := range x {
			y[i] = 1 - 1.3*math.Exp(-v*v/2)
		}
		f := curveFeatures(x, y, 1, 0)
		if want := 2 * math.Sqrt(2*math.Log(2.6)); math.Abs(f.Width-want) > 1e-4 {
			t.Errorf("width %.6f, want %.6f", f.Width, want)
		}
	})
	t.Run("never reaches half", func(t *testing.T) {
		// A curve between −1 and −0.915 from a baseline of 1 (start +z) and an
		// extreme −1 never crosses the half level 0: no width, no crossings.
		y := make([]float64, len(x))
		for i, v := range x {
			y[i] = -0.915 - 0.085*math.Exp(-v*v/2)
		}
		f := curveFeatures(x, y, 1, math.NaN())
		if !math.IsNaN(f.Width) || f.Crossings != "—" {
			t.Errorf("width %g, crossings %q; want none", f.Width, f.Crossings)
		}
	})
	t.Run("one edge in the window", func(t *testing.T) {
		// Half a band: the curve passes the half level once; the width is not
		// known inside the window.
		f := curveFeatures(x[500:], peak[500:], 0, math.NaN())
		if !math.IsNaN(f.Width) || f.Crossings != "1.1774" {
			t.Errorf("width %g, crossings %q; want none and 1.1774", f.Width, f.Crossings)
		}
	})
	t.Run("no baseline", func(t *testing.T) {
		f := curveFeatures(x, peak, math.NaN(), math.NaN())
		if !math.IsNaN(f.Width) || f.Crossings != "—" || f.Max != 1 {
			t.Errorf("width %g, crossings %q, max %g; want none, none, 1", f.Width, f.Crossings, f.Max)
		}
	})
	// A flat curve has no width.
	f := curveFeatures(x, make([]float64, len(x)), 0, math.NaN())
	if !math.IsNaN(f.Width) {
		t.Errorf("flat curve width %g, want none", f.Width)
	}
}

func TestCurveLevels(t *testing.T) {
	z, mz := [3]float64{0, 0, 1}, [3]float64{0, 0, -1}
	hard := &shape.Pulse{Flip: math.Pi / 2}
	inv := &shape.Pulse{Flip: math.NaN(), Adiabatic: true, Role: shape.RoleInvert}
	for _, c := range []struct {
		q, axis      string
		start        [3]float64
		p            *shape.Pulse
		base, target float64
	}{
		// Far off resonance, or at b1 = 0, the magnetization is the start state
		// (Bloch equations with no field); in the band a pulse of flip θ leaves
		// Mz0·cos θ (rotation about a transverse axis).
		{"mz", "offset", z, hard, 1, 0},
		{"mz", "b1", mz, hard, -1, 0},
		{"mz", "offset", z, inv, 1, -1},
		// The design's pass value (help quantities): |Mxy| = sin θ from +z,
		// echo |β|² = sin²(θ/2) (Pauly et al., IEEE TMI 10:53, 1991).
		{"mxy", "offset", z, hard, 0, 1},
		{"echo", "position", z, hard, 0, 0.5},
		{"mxy", "offset", z, &shape.Pulse{Flip: math.Pi / 6}, 0, 0.5},
		{"mxy", "offset", z, &shape.Pulse{Flip: math.NaN()}, 0, math.NaN()},
		{"mz", "t2", z, hard, math.NaN(), math.NaN()},
		{"mz", "duration", z, hard, math.NaN(), math.NaN()},
		// mx and my oscillate across an offset axis as the phase runs (Rabi, Phys.
		// Rev. 51:652, 1937: Mx = a·c·(1 − cos ΩT)): no half level, extremes only.
		{"mx", "offset", z, hard, math.NaN(), math.NaN()},
		{"my", "b1", [3]float64{0, 1, 0}, hard, math.NaN(), math.NaN()},
	} {
		t.Run(c.q+" over "+c.axis, func(t *testing.T) {
			base, target := curveLevels(c.q, c.axis, c.start, c.p)
			same := func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) || math.Abs(a-b) < 1e-12 }
			if !same(base, c.base) || !same(target, c.target) {
				t.Errorf("levels %g, %g; want %g, %g", base, target, c.base, c.target)
			}
		})
	}
}

func TestPhaseFeatures(t *testing.T) {
	// φ = 37x + 2x² + 5 deg, wrapped to (−180, 180]: the least-squares line has
	// slope 37 (the x² term is even, x symmetric); the largest residual is
	// 2·(25 − mean x²) at x = ±5 (least squares on a parabola).
	var x, ph []float64
	sq := 0.0
	for i := 0; i <= 1000; i++ {
		v := -5 + 0.01*float64(i)
		x = append(x, v)
		p := 37*v + 2*v*v + 5
		ph = append(ph, p-360*math.Round(p/360))
		sq += v * v
	}
	slope, dev, x0, x1 := phaseFeatures(x, ph, nil)
	if math.Abs(slope-37) > 1e-9 {
		t.Errorf("slope %g, want 37", slope)
	}
	if want := 2 * (25 - sq/1001); math.Abs(dev-want) > 1e-9 {
		t.Errorf("deviation %g, want %g", dev, want)
	}
	if x0 != -5 || x1 != 5 {
		t.Errorf("band %g to %g, want -5 to 5", x0, x1)
	}
	// With a magnitude, only the band where it is at least half its maximum
	// counts: exp(−x²/2) ≥ 1/2 for |x| ≤ 1.1774 (definition of the Gaussian).
	mag := make([]float64, len(x))
	for i, v := range x {
		mag[i] = math.Exp(-v * v / 2)
	}
	_, _, x0, x1 = phaseFeatures(x, ph, mag)
	if math.Abs(x0+1.17) > 1e-9 || math.Abs(x1-1.17) > 1e-9 {
		t.Errorf("band %g to %g, want -1.17 to 1.17", x0, x1)
	}
	// A phase left out inside the band (its magnitude below the floor) gives no fit.
	ph[500] = math.NaN()
	if slope, _, _, _ := phaseFeatures(x, ph, mag); !math.IsNaN(slope) {
		t.Errorf("slope %g with a phase left out in the band, want NaN", slope)
	}
}

package dsl

import (
	"context"
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"

	"Nutate/physics"
)

// The Bloch equations with relaxation keep |M| ≤ M0 exactly when T2 ≤ 2·T1
// (closed form from the Bloch equations: on the sphere |M| = 1,
// d|M|²/dt = −2(1 − Mz)[(1 + Mz)/T2 − Mz/T1], which is ≤ 0 for every Mz in
// [−1, 1] iff 2/T2 ≥ 1/T1; common practice: T2 ≤ 2·T1, Abragam, The Principles
// of Nuclear Magnetism, 1961, from memory). The engine is run on a T1 × T2 grid
// for several pulses, offsets and start states: where T2 ≤ 2·T1, |M| ≤ 1 to
// 1e-12; the same grid beyond the limit does exceed 1, so the check can fail.
func TestRelaxLimitKeepsM(t *testing.T) {
	h, _ := physics.Lookup("1H")
	gamma := h.Gamma()
	rect := func(n int, dur, flip float64, phases ...float64) *physics.Waveform {
		w := &physics.Waveform{}
		b1 := flip / (gamma * dur) // T, constant amplitude
		for i := range n {
			ph := 0.0
			if len(phases) > 0 {
				ph = phases[i%len(phases)]
			}
			w.Dwell = append(w.Dwell, dur/float64(n))
			w.B1 = append(w.B1, complex(b1*math.Cos(ph), b1*math.Sin(ph)))
		}
		return w
	}
	pulses := []struct {
		name string
		w    *physics.Waveform
	}{
		{"hard 90 in 1 ms", rect(1, 1e-3, math.Pi/2)},
		{"weak 90 in 20 ms", rect(50, 20e-3, math.Pi/2)},
		{"phase-cycled 360 in 10 ms", rect(40, 10e-3, 2*math.Pi, 0, math.Pi/2, math.Pi, 3*math.Pi/2)},
	}
	var t1s, t2s []float64
	for i := range 15 {
		t1s = append(t1s, 1e-3*math.Pow(2000, float64(i)/14)) // 1 ms … 2 s
		t2s = append(t2s, 0.5e-3*math.Pow(4000, float64(i)/14))
	}
	for _, p := range pulses {
		t.Run(p.name, func(t *testing.T) {
			iso := &physics.Isochromats{}
			for _, t1 := range t1s {
				for _, t2 := range t2s {
					for _, off := range []float64{-200, 0, 300} {
						iso.T1, iso.T2, iso.Offset = append(iso.T1, t1), append(iso.T2, t2), append(iso.Offset, off)
					}
				}
			}
			beyond := 0.0
			for _, start := range [][3]float64{{0, 0, 1}, {1, 0, 0}, {0, 0, -1}} {
				res, err := physics.Simulate(context.Background(), p.w, gamma, iso, physics.Options{Start: start})
				if err != nil {
					t.Fatal(err)
				}
				for k := range res.Mx {
					m := math.Sqrt(res.Mx[k]*res.Mx[k] + res.My[k]*res.My[k] + res.Mz[k]*res.Mz[k])
					if !beyondRelaxLimit(iso.T1[k], iso.T2[k]) {
						if m > 1+1e-12 {
							t.Fatalf("T1 %g s, T2 %g s, offset %g Hz, start %v: |M| = %.15g, want ≤ 1", iso.T1[k], iso.T2[k], iso.Offset[k], start, m)
						}
					} else {
						beyond = math.Max(beyond, m)
					}
				}
			}
			if !(beyond > 1+1e-6) {
				t.Errorf("beyond T2 = 2·T1 the largest |M| is %g; want it above 1 (the limit is sharp)", beyond)
			}
		})
	}
}

// A map over t1 × t2 leaves out exactly the points where t2 > 2·t1 (null in its
// JSON), keeps the points on t2 = 2·t1, and its magnetization stays within the
// unit sphere elsewhere; a profile over t1 with fixed t2 leaves out its short
// end the same way.
func TestRelaxMask(t *testing.T) {
	run := func(src string) map[string]json.RawMessage {
		out, _ := lastJSON(t, src)
		return out
	}
	type axis struct{ Values []float64 }
	const pulse = "pulse p = rect(duration = 2 ms, flip = 90 deg)\n"
	z := map[string][][]*float64{}
	var x, y axis
	for _, q := range []string{"mx", "my", "mz"} {
		// t2 steps onto 2·t1 at 10/20, 20/40, 30/60 and 40/80 ms.
		out := run(pulse + "sweep p over t1 10 ms to 40 ms step 10 ms, t2 10 ms to 100 ms step 10 ms show " + q)
		var zq [][]*float64
		if err := json.Unmarshal(out["z"], &zq); err != nil {
			t.Fatal(err)
		}
		z[q] = zq
		json.Unmarshal(out["x"], &x)
		json.Unmarshal(out["y"], &y)
	}
	onLimit := 0
	for iy, t2 := range y.Values {
		for ix, t1 := range x.Values {
			left := z["mx"][iy][ix] == nil
			want := t2 > 2*t1*(1+1e-9) // ms: equal up to rounding counts as equal
			if left != want {
				t.Errorf("t1 %g ms, t2 %g ms: left out %v, want %v", t1, t2, left, want)
			}
			if math.Abs(t2-2*t1) < 1e-9*t2 {
				onLimit++
			}
			if left {
				continue
			}
			mx, my, mz := *z["mx"][iy][ix], *z["my"][iy][ix], *z["mz"][iy][ix]
			if m := math.Sqrt(mx*mx + my*my + mz*mz); m > 1+1e-12 {
				t.Errorf("t1 %g ms, t2 %g ms: |M| = %.15g, want ≤ 1", t1, t2, m)
			}
		}
	}
	if onLimit != 4 {
		t.Errorf("%d points on t2 = 2·t1, want 4 (the grid is meant to test the boundary)", onLimit)
	}

	out := run(pulse + "sweep p over t1 1 ms to 100 ms points 60 show mxy with t2 = 20 ms")
	var px axis
	var curves []struct{ Y []*float64 }
	json.Unmarshal(out["x"], &px)
	json.Unmarshal(out["curves"], &curves)
	if len(curves) != 1 || len(curves[0].Y) != len(px.Values) {
		t.Fatalf("profile JSON: %d curves for %d points", len(curves), len(px.Values))
	}
	for i, t1 := range px.Values {
		if left, want := curves[0].Y[i] == nil, 20 > 2*t1*(1+1e-9); left != want {
			t.Errorf("t1 %g ms with t2 = 20 ms: left out %v, want %v", t1, left, want)
		}
	}
}

// With t1 and no t2, T2 is taken as 2·t1 (the longest T2 consistent with T1,
// see TestRelaxLimitKeepsM): a sweep over t1 alone gives the same numbers as
// the same pulse run point by point with t2 = 2·t1 written out, keeps |M| ≤ 1
// from a transverse start, and says so in a note.
func TestT2DefaultsToTwiceT1(t *testing.T) {
	run := func(src string) (map[string]json.RawMessage, string) {
		t.Helper()
		out, _ := lastJSON(t, src)
		var text string // the figure's and its table's
		for _, b := range cellBundles(t, src) {
			s, _ := b["text/plain"].(string)
			text += s + "\n"
		}
		return out, text
	}
	const pulse = "pulse p = rect(duration = 20 ms, flip = 30 deg)\n"
	values := func(out map[string]json.RawMessage) []float64 {
		var curves []struct{ Y []float64 }
		if err := json.Unmarshal(out["curves"], &curves); err != nil || len(curves) != 1 {
			t.Fatalf("curves: %v (%d)", err, len(curves))
		}
		return curves[0].Y
	}
	var mags []float64
	qs := []string{"mx", "my", "mz"}
	for _, q := range qs {
		out, text := run(pulse + "sweep p over t1 5 ms to 45 ms step 20 ms show " + q + " with start = x")
		if !strings.Contains(text, "t2 not given: taken as 2·t1") {
			t.Errorf("%s: no note on t2:\n%s", q, text)
		}
		got := values(out)
		for i, t1 := range []float64{5, 25, 45} {
			ref, _ := run(pulse + "sweep p over offset 0 Hz to 0 Hz points 1 show " + q + " with start = x, t1 = " + strconv.FormatFloat(t1, 'g', -1, 64) + " ms, t2 = " + strconv.FormatFloat(2*t1, 'g', -1, 64) + " ms")
			if w := values(ref)[0]; math.Abs(got[i]-w) > 1e-12 {
				t.Errorf("%s at t1 = %g ms: %.15g, want %.15g as with t2 = 2·t1", q, t1, got[i], w)
			}
			if len(mags) <= i {
				mags = append(mags, 0)
			}
			mags[i] += got[i] * got[i]
		}
	}
	for i, m2 := range mags {
		if m := math.Sqrt(m2); m > 1+1e-12 {
			t.Errorf("point %d: |M| = %.15g, want ≤ 1", i, m)
		}
	}
}

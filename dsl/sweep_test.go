package dsl

import (
	"context"
	"encoding/json"
	"math"
	"testing"

	"Nutate/display"
)

// sweepJSON runs a cell whose last output is a sweep and returns its curves by
// quantity, decoded from the data (display.ResultMIME) of the bundle.
func sweepJSON(t *testing.T, src string) map[string][]float64 {
	t.Helper()
	_, raw := lastOutput(t, src)
	var data struct {
		Curves []struct {
			Quantity string
			Y        []*float64
		}
	}
	if err := json.Unmarshal(raw, &data); err != nil {
		t.Fatalf("json %s: %v", raw, err)
	}
	out := map[string][]float64{}
	for _, c := range data.Curves {
		for _, y := range c.Y {
			v := math.NaN()
			if y != nil {
				v = *y
			}
			out[c.Quantity] = append(out[c.Quantity], v)
		}
	}
	return out
}

func TestSweepCheckValues(t *testing.T) {
	cases := []struct {
		name, src string
		q         string
		want      []float64
		tol       float64
	}{
		// Rabi, Phys. Rev. 51:652 (1937), CHECKS.md: 90°, 250 µs, ν1 = 1 kHz, 1 kHz off.
		{"rabi mx", "pulse p = rect(duration = 250 us, flip = 90 deg)\nsweep p over offset 1 kHz to 1 kHz points 1", "mx", []float64{0.8028499}, 1e-6},
		{"rabi my", "pulse p = rect(duration = 250 us, flip = 90 deg)\nsweep p over offset 1 kHz to 1 kHz points 1", "my", []float64{0.5626401}, 1e-6},
		{"rabi mz", "pulse p = rect(duration = 250 us, flip = 90 deg)\nsweep p over offset 1 kHz to 1 kHz points 1", "mz", []float64{0.1971501}, 1e-6},
		// The same with the offset as a setting.
		{"rabi setting", "pulse p = rect(duration = 250 us, flip = 90 deg)\nsweep p over b1 1 to 1 points 1 with offset = 1 kHz", "my", []float64{0.5626401}, 1e-6},
		// Pauly et al., IEEE TMI 10:53 (1991), CHECKS.md: 180° hard pulse, 1 kHz,
		// 500 µs: |β|² = 0.938979 at 250 Hz, 0.316564 at 1 kHz.
		{"echo", "pulse p = rect(duration = 500 us, flip = 180 deg)\nsweep p over offset 250 Hz to 1000 Hz points 4 show echo", "echo", []float64{0.938979, math.NaN(), math.NaN(), 0.316564}, 1e-6},
		// Torrey, Phys. Rev. 76:1059 (1949), CHECKS.md: ω1 = 2π·250 Hz, T = 1 ms,
		// T1 = 100 ms, T2 = 1 ms → My 0.638612220, Mz 0.255052486 (1H, peak in Hz).
		{"torrey my", "pulse p = rect(duration = 1 ms, peak = 250 Hz)\nsweep p over t2 1 ms to 1 ms points 1 show my, mz with t1 = 100 ms", "my", []float64{0.638612220}, 1e-6},
		{"torrey mz", "pulse p = rect(duration = 1 ms, peak = 250 Hz)\nsweep p over t2 1 ms to 1 ms points 1 show my, mz with t1 = 100 ms", "mz", []float64{0.255052486}, 1e-6},
		// Levitt & Freeman, J. Magn. Reson. 33:473 (1979; from memory), CHECKS.md:
		// 90x-180y-90x at B1 scale 0.9 → Mz −0.998802; a single 180° gives −0.951057.
		{"composite", "pulse h = rect(duration = 250 us, flip = 90 deg)\npulse c = train(h, h(flip = 180 deg, duration = 500 us) at 90 deg, h)\nsweep c over b1 0.9 to 0.9 points 1 show mz", "mz", []float64{-0.998802}, 1e-6},
		{"single 180", "pulse h = rect(duration = 500 us, flip = 180 deg)\nsweep h over b1 90% to 90% points 1 show mz", "mz", []float64{-0.951057}, 1e-6},
		// Sign convention (LANGUAGE.md Conventions): phase 0 takes +z to +y for
		// positive γ; a negative-γ nucleus rotates the other way (to −y).
		{"+y for 1H", "pulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset 0 Hz to 0 Hz points 1", "my", []float64{1}, 1e-12},
		{"-y for 15N", "nucleus 15N\npulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset 0 Hz to 0 Hz points 1", "my", []float64{-1}, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := sweepJSON(t, c.src)[c.q]
			if len(got) != len(c.want) {
				t.Fatalf("%s has %d values, want %d", c.q, len(got), len(c.want))
			}
			for i, w := range c.want {
				if !math.IsNaN(w) && math.Abs(got[i]-w) > c.tol {
					t.Errorf("%s[%d] = %.9f, want %.9f", c.q, i, got[i], w)
				}
			}
		})
	}
}

// The axis runs in the unit given; ppm axes convert through the nucleus and
// field and run high to low.
func TestPPMAxis(t *testing.T) {
	var last display.Bundle
	src := "field 3 T\npulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset -2 ppm to 2 ppm points 3 show mz"
	if err := NewSession(t.TempDir()).Exec(context.Background(), src, Sink{Display: keepLast(&last)}); err != nil {
		t.Fatal(err)
	}
	raw, _ := json.Marshal(last[display.ResultMIME])
	var data struct {
		X struct {
			Unit    string
			Reverse bool
			Values  []float64
		}
	}
	if err := json.Unmarshal(raw, &data); err != nil {
		t.Fatal(err)
	}
	if data.X.Unit != "ppm" || !data.X.Reverse || len(data.X.Values) != 3 || data.X.Values[0] != -2 {
		t.Errorf("x axis %+v, want ppm values -2..2 drawn reversed", data.X)
	}
	// 2 ppm of 1H at 3 T is 255.46 Hz (CODATA 2018 γ̄); compare with the Hz sweep.
	hz := sweepJSON(t, "pulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset -255.464871 Hz to 255.464871 Hz points 3 show mz")["mz"]
	ppm := sweepJSON(t, src)["mz"]
	for i := range hz {
		if math.Abs(hz[i]-ppm[i]) > 1e-6 {
			t.Errorf("mz[%d] = %g in ppm, %g in Hz", i, ppm[i], hz[i])
		}
	}
}

// A pulse's center moves its band: the excited band of a sinc centred at −7.5 ppm
// is centred at −7.5 ppm on a ppm axis (LANGUAGE.md "Shapes": center is the
// carrier offset of the band).
func TestCenterMovesBand(t *testing.T) {
	src := "nucleus 31P\nfield 7 T\npulse soft = sinc(duration = 2 ms, tbw = 6, window = hann, flip = 10 deg, center = -7.5 ppm)\n" +
		"sweep soft over offset -30 ppm to 15 ppm points 451 show mxy"
	y := sweepJSON(t, src)["mxy"]
	x := func(i int) float64 { return -30 + 0.1*float64(i) }
	// The half-maximum crossings are symmetric about the centre.
	peak := 0.0
	for _, v := range y {
		peak = math.Max(peak, v)
	}
	var cross []float64
	for i := 0; i+1 < len(y); i++ {
		a, b := y[i]-peak/2, y[i+1]-peak/2
		if a*b < 0 {
			cross = append(cross, x(i)+0.1*a/(a-b))
		}
	}
	if len(cross) != 2 {
		t.Fatalf("half-maximum crossings %v, want 2", cross)
	}
	if mid := (cross[0] + cross[1]) / 2; math.Abs(mid+7.5) > 0.05 {
		t.Errorf("band centre %.3f ppm, want -7.5 ppm", mid)
	}
}
